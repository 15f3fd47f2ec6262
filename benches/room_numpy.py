#!/usr/bin/env python3
"""The per-position arithmetic of a retidose room survey, vectorised with numpy.

Usage: room_numpy.py PARAMS.json OUT.csv

A reference for `benches/room_vs_numpy.sh`: the same survey as
`retidose assess ROOM.toml --format csv`, written independently from the published formulas
(it never calls retidose), so the two CSV files can be compared number by number and the two
programs timed side by side, whole process.

PARAMS.json holds what retidose computes from spectra once per rack (the per-lux factors of the
light phase, the leak and each event, through the cage wall), the guidance bounds, the room's
geometry, the cycle, the events and the pigment constants; `room_vs_numpy.sh` writes it from
retidose's JSON report of a one-position-per-rack copy of the room and from the scenario it
wrote. No spectral integral is redone here.

The arithmetic (see README.md in this folder for the sources):

- Ceiling luminaires are downward Lambertian emitters: E = I h² / d⁴ on a horizontal surface
  h below and d away, summed over luminaires, times shelf_shading^(top − shelf).
- Rates are linear in light: rod R*/rod/s = lux × per-lux factor (likewise the melanopsin
  photon irradiance); the fractional bleaching rate is k = R*/rod/s ÷ rhodopsin per rod.
- Rate-limited pigment kinetics (Lamb & Pugh 2004; Mahroo & Lamb 2004):
  dB/dt = k (1 − B) − v B / (K_m + B). Steady state: the positive root r₁ of
  k B² + (v + k K_m − k) B − k K_m = 0. In constant light the time from B₀ to B is
  t = −[a ln((B − r₁)/(B₀ − r₁)) + b ln((B − r₂)/(B₀ − r₂))] / k with
  a = (K_m + r₁)/(r₁ − r₂), b = (K_m + r₂)/(r₂ − r₁); the state after a time is found by a
  safeguarded Newton iteration on that closed form. In darkness t = [K_m ln(B₀/B) + B₀ − B]/v
  and B(t) = K_m W₀[(B₀/K_m) exp((B₀ − v t)/K_m)].
- Rushton (first-order) kinetics, when the scenario asks for it:
  dB/dt = k (1 − B) − B/τ₀, solved by exponentials.
- The cycle: day one starts dark-adapted; the days run one after another (at most the
  scenario's number) until the light phase brings the state at lights-on back to the same state
  at lights-off (the pigment "settles" when it comes within 1e-12 of its steady state, shown by a
  contraction bound or by the closed-form time), or the state at lights-on repeats; the last day
  run is reported. Each night: time to 90 % of the pigment back (B = 0.10) under the leak; each event
  (in start order) from the state at its start, its bleach at its end, and the time for its extra
  bleach over the leak's steady state to fall to a tenth; melanopic photon dose per night.
- Flags: above / below the rack's light-phase guidance range, leak and event light above the
  dark-phase bound.

Only numpy and the standard library (json, sys) are used.
"""

import json
import sys

import numpy as np

SETTLED = 1e-12  # bleached fraction within which the pigment counts as at its steady state
DARK_RATE = 1e-12  # k (s⁻¹) below which the rate-limited model is solved as darkness
FLAG_NAMES = ("above", "below", "leak", "event")


class Kinetics:
    """One pigment's closed forms, over arrays of positions."""

    def __init__(self, model, v, km, tau0):
        self.model = model
        self.v, self.km, self.tau0 = v, km, tau0

    # Steady state and its roots --------------------------------------------------------------

    def roots(self, k):
        """r₁ > 0 > r₂ of k B² + (v + k K_m − k) B − k K_m = 0 (the numerically stable pair)."""
        v, km = self.v, self.km
        bq = v + k * km - k
        disc = np.sqrt(bq * bq + 4.0 * k * k * km)
        r2 = (-bq - disc) / (2.0 * k)
        r1 = -km / r2
        neg = bq < 0.0
        if neg.any():
            r1n = (-bq[neg] + disc[neg]) / (2.0 * k[neg])
            r1[neg] = r1n
            r2[neg] = -km / r1n
        return r1, r2

    def steady(self, k):
        """Steady bleach, with the roots for reuse (rate-limited) or None (Rushton)."""
        if self.model == "rushton":
            return k / (k + 1.0 / self.tau0), None
        r1, r2 = self.roots(k)
        dark = k < DARK_RATE
        if dark.any():
            r1 = np.where(dark, 0.0, r1)
        return r1, (r1, r2)

    def contraction(self, k, b_max):
        """A rate λ with |B(t) − B∞| ≤ |B₀ − B∞| e^(−λt) while B stays at or below b_max:
        |f′(B)| = k + v K_m/(K_m + B)² is smallest at the largest B on the way."""
        if self.model == "rushton":
            return k + 1.0 / self.tau0
        return k + self.v * self.km / ((self.km + b_max) * (self.km + b_max))

    # Times ---------------------------------------------------------------------------------

    def _light_time(self, k, r1, r2, b0, b):
        km = self.km
        a = (km + r1) / (r1 - r2)
        bb = (km + r2) / (r2 - r1)
        l1 = np.log1p((b - b0) / (b0 - r1))
        l2 = np.log1p((b - b0) / (b0 - r2))
        return -(a * l1 + bb * l2) / k

    def _dark_time(self, b0, b):
        out = np.full(b0.shape, np.nan)
        out[b >= b0] = 0.0
        m = (b < b0) & (b > 0.0)
        out[m] = (self.km * np.log(b0[m] / b[m]) + (b0[m] - b[m])) / self.v
        return out

    def light_time_to(self, b0, k, b, target, rr):
        """Time at constant k from b0 to b; NaN where never (b not between b0 and the target)."""
        between = ((b0 <= b) & (b < target)) | ((target < b) & (b <= b0))
        out = np.where(np.abs(b - b0) < 1e-15, 0.0, np.nan)
        if not between.any():
            return out
        idx = np.flatnonzero(between)
        kb, b0b, bb = k[idx], b0[idx], b[idx]
        if self.model == "rushton":
            lam = kb + 1.0 / self.tau0
            tb = target[idx]
            out[idx] = np.log((b0b - tb) / (bb - tb)) / lam
            return out
        dark = kb < DARK_RATE
        res = np.empty(idx.size)
        lit = ~dark
        if lit.any():
            res[lit] = self._light_time(kb[lit], rr[0][idx][lit], rr[1][idx][lit], b0b[lit], bb[lit])
        if dark.any():
            res[dark] = self._dark_time(b0b[dark], bb[dark])
        out[idx] = res
        return out

    def time_to(self, b0, k, b, target, rr):
        """Time from b0 until the bleach falls to b (0 if already there, ∞ if never)."""
        out = np.zeros(b0.shape)
        m = b0 > b
        if m.any():
            t = self.light_time_to(b0[m], k[m], b[m], target[m], _take(rr, m))
            t[np.isnan(t)] = np.inf
            out[m] = t
        return out

    # States --------------------------------------------------------------------------------

    def advance(self, b0, k, dt, target, rr):
        """Bleach after dt (scalar or array) at constant k from b0."""
        dt = np.broadcast_to(np.asarray(dt, dtype=float), b0.shape)
        if self.model == "rushton":
            lam = k + 1.0 / self.tau0
            binf = k / lam
            return binf + (b0 - binf) * np.exp(-lam * dt)
        out = np.empty(b0.shape)
        dark = k < DARK_RATE
        if dark.any():
            out[dark] = self._advance_dark(b0[dark], dt[dark])
        lit = ~dark
        if lit.any():
            out[lit] = self._advance_light(b0[lit], k[lit], dt[lit], rr[0][lit], rr[1][lit])
        return out

    def _advance_dark(self, b0, dt):
        km, v = self.km, self.v
        out = np.zeros(b0.shape)
        m = b0 > 0.0
        b0m = b0[m]
        x = np.log(b0m / km) + (b0m - v * dt[m]) / km
        out[m] = np.clip(km * wright_omega(x), 0.0, 1.0)
        return out

    def _advance_light(self, b0, k, dt, r1, r2):
        """Safeguarded Newton on the closed-form time, element by element as in the scalar code
        (each position stops at its own convergence test)."""
        v, km = self.v, self.km
        target = r1
        out = np.empty(b0.shape)
        at = np.abs(b0 - target) < 1e-15
        out[at] = target[at]
        idx = np.flatnonzero(~at)
        if idx.size == 0:
            return out
        b0, k, dt, r1, r2, target = b0[idx], k[idx], dt[idx], r1[idx], r2[idx], target[idx]
        up = b0 < target
        lo = np.where(up, b0, target)
        hi = np.where(up, target, b0)
        b = b0 + (target - b0) * (1.0 - np.exp(-(k + v / (km + np.maximum(b0, target))) * dt))
        tol = 1e-12 * np.maximum(dt, 1e-9)
        act = np.arange(idx.size)
        for _ in range(100):
            ba, ka, b0a, dta = b[act], k[act], b0[act], dt[act]
            f = self._light_time(ka, r1[act], r2[act], b0a, ba) - dta
            upa = up[act]
            high = (f > 0.0) == upa
            hia = np.where(high, ba, hi[act])
            loa = np.where(high, lo[act], ba)
            hi[act], lo[act] = hia, loa
            go = ~((hia - loa < 1e-13) | (np.abs(f) < tol[act]))
            if not go.any():
                break
            act, ba, ka, f, loa, hia = act[go], ba[go], ka[go], f[go], loa[go], hia[go]
            rate = ka * (1.0 - ba) - v * ba / (km + ba)
            nxt = ba - f * rate
            b[act] = np.where((nxt > loa) & (nxt < hia), nxt, 0.5 * (loa + hia))
        out[idx] = b
        return out

    def settle(self, b0, k, dt, bs, rr):
        """The state after dt at k, or the steady state bs when it is reached within SETTLED."""
        gap = np.abs(b0 - bs)
        out = bs.copy()
        bound = np.exp(-self.contraction(k, np.maximum(b0, bs)) * dt)
        rest = ~((gap <= SETTLED) | (gap * bound <= SETTLED))
        if not rest.any():
            return out
        idx = np.flatnonzero(rest)
        b0r, kr, bsr, rrr = b0[idx], k[idx], bs[idx], _take(rr, idx)
        dtr = dt[idx] if np.ndim(dt) else dt
        near = np.where(b0r > bsr, bsr + SETTLED, bsr - SETTLED)
        t = self.light_time_to(b0r, kr, near, bsr, rrr)
        moving = ~(t <= np.broadcast_to(dtr, t.shape))  # NaN (never) moves too
        if moving.any():
            j = np.flatnonzero(moving)
            dtj = dtr[j] if np.ndim(dtr) else dtr
            idx_m = idx[j]
            out[idx_m] = self.advance(b0r[j], kr[j], dtj, bsr[j], _take(rrr, j))
        return out


def _take(rr, m):
    return None if rr is None else (rr[0][m], rr[1][m])


def wright_omega(x):
    """ω(x) = W₀(eˣ): the root of ω + ln ω = x, by Newton's method. The function is increasing
    and concave in ω, so from any positive start the iterates stay positive and converge."""
    w = np.where(x > 1.0, x - np.log(np.maximum(x, 1.0)), np.log1p(np.exp(np.minimum(x, 1.0))))
    for _ in range(60):
        w_new = w - (w + np.log(w) - x) / (1.0 + 1.0 / w)
        if np.all(np.abs(w_new - w) <= 4e-16 * np.abs(w_new)):
            return w_new
        w = w_new
    return w


def powi(base, n):
    """base**n for whole n ≥ 0 by binary powering (repeated multiplication, as a compiler's
    integer power does), over an array of exponents."""
    n = np.asarray(n, dtype=np.int64).copy()
    r = np.ones(n.shape)
    a = np.full(n.shape, float(base))
    while np.any(n > 0):
        odd = (n & 1) == 1
        r = np.where(odd, r * a, r)
        n >>= 1
        a = a * a
    return r


def lux_from(luminaires, x, y, z):
    """Σ I h²/d⁴ over downward Lambertian luminaires, in their order (0 where h ≤ 0)."""
    total = np.zeros(np.broadcast_shapes(np.shape(x), np.shape(y), np.shape(z)))
    for l in luminaires:
        h = l["z"] - z
        dx, dy = l["x"] - x, l["y"] - y
        d2 = dx * dx + dy * dy + h * h
        e = l["intensity_cd"] * np.where(h > 0.0, h * h / (d2 * d2), 0.0)
        total = total + e
    return total


def survey_rack(p, rack):
    """Every figure of one grid rack, as arrays (bottom shelf first, then along x)."""
    shelves, columns = rack["shelves"], rack["columns"]
    n = shelves * columns
    s0 = np.arange(shelves)  # shelf − 1
    c0 = np.arange(columns)
    # Geometry per shelf and per column, then broadcast: lux = shade[shelf] × Σ I h²/d⁴.
    xs = rack["x0"] + c0 * rack["column_spacing"]
    zs = rack["bottom"] + s0 * rack["shelf_spacing"]
    top = shelves
    shade = powi(rack["shelf_shading"], top - (s0 + 1))
    raw = lux_from(p["luminaires"], xs[None, :], rack["y"], zs[:, None])  # (shelves, columns)
    room_lux = (raw * shade[:, None]).reshape(n)
    light, leak = rack["per_lux"][0], rack["per_lux"][1]
    events = p["events"]
    ev_per = rack["per_lux"][2:]
    T = rack["cage_transmittance"]
    pig = rack["pigment"]
    kin = Kinetics(p["model"], pig["v_per_s"], pig["k_m"], pig["tau0_s"])
    kpr = pig["k_per_rate"]
    light_s, dark_s, days = p["light_s"], p["dark_s"], p["days"]

    out = {}
    out["room_lux"] = room_lux
    out["cage_lux"] = room_lux * T
    rod = room_lux * light["rod_rate"]
    out["rod"] = rod
    out["mel"] = light["opic"][3] * room_lux
    leak_lux = np.full(n, p["leak_lux"])
    out["leak_lux"] = leak_lux
    leak_rod = leak_lux * leak["rod_rate"]
    leak_mel = leak_lux * leak["opic"][3]
    out["leak_rod"], out["leak_mel"] = leak_rod, leak_mel
    dose = leak_lux * leak["opic"][3] * dark_s
    ev = []
    for e, per in zip(events, ev_per):
        if "lux" in e:
            lx = np.full(n, e["lux"])
        else:
            lum = e["luminaire"]
            lx = (lux_from([lum], xs[None, :], rack["y"], zs[:, None]) * shade[:, None]).reshape(n)
        ev.append({"lux": lx, "rod": leak_rod + lx * per["rod_rate"], "mel": leak_mel + lx * per["opic"][3]})
        dose = dose + lx * per["opic"][3] * e["duration_s"]
    out["dose"] = dose

    # Pigment through the cycle.
    k_light = rod * kpr
    k_leak = leak_rod * kpr
    lb, rr_light = kin.steady(k_light)
    kb, rr_leak = kin.steady(k_leak)
    out["light_bleach"], out["leak_bleach"] = lb, kb
    k_ev = [e["rod"] * kpr for e in ev]
    ss_ev = [kin.steady(k) for k in k_ev]
    order = sorted(range(len(events)), key=lambda i: events[i]["start_s"])
    rec90 = np.empty(n)
    peaks = [np.empty(n) for _ in ev]
    recs = [np.empty(n) for _ in ev]

    def night(sel, b_off):
        """One dark phase at positions `sel` from b_off; fills the rows; the bleach at lights-on."""
        kl, kbs, rl = k_leak[sel], kb[sel], _take(rr_leak, sel)
        rec90[sel] = kin.time_to(b_off, kl, np.full(sel.size, 0.10), kbs, rl)
        b, t = b_off, 0.0
        for e in order:
            b = kin.settle(b, kl, events[e]["start_s"] - t, kbs, rl)
            ke = k_ev[e][sel]
            bse, rre = ss_ev[e][0][sel], _take(ss_ev[e][1], sel)
            peak = kin.settle(b, ke, events[e]["duration_s"], bse, rre)
            peaks[e][sel] = peak
            recs[e][sel] = kin.time_to(peak, kl, kbs + 0.1 * (peak - kbs), kbs, rl)
            b = peak
            t = events[e]["start_s"] + events[e]["duration_s"]
        return kin.settle(b, kl, dark_s - t, kbs, rl)

    # Day one starts dark-adapted; the days run on (each position by itself) until the light
    # phase brings the state at lights-on back to the same state at lights-off, or the state at
    # lights-on repeats: every later day is then the same, and the last day run is reported.
    sel = np.arange(n)
    b_on = np.zeros(n)
    for _ in range(max(days, 1)):
        kl, lbs, rrl = k_light[sel], lb[sel], _take(rr_light, sel)
        b_off = kin.settle(b_on, kl, light_s, lbs, rrl)
        nxt = night(sel, b_off)
        done = (kin.settle(nxt, kl, light_s, lbs, rrl) == b_off) | (np.abs(nxt - b_on) <= SETTLED * 1e-3)
        keep = ~done
        if not keep.any():
            break
        sel, b_on = sel[keep], nxt[keep]
    out["rec90"] = rec90
    out["events"] = [
        {"lux": e["lux"], "rod": e["rod"], "mel": e["mel"], "peak": peaks[i], "rec": recs[i]} for i, e in enumerate(ev)
    ]

    # Flags.
    b = rack["bounds"]
    code = np.zeros(n, dtype=np.int64)
    if b.get("upper") is not None:
        code |= (room_lux > b["upper"]) * 1
    if b.get("lower") is not None:
        code |= (room_lux < b["lower"]) * 2
    if b.get("dark") is not None:
        d = b["dark"]
        code |= (leak_lux > d) * 4
        hit = np.zeros(n, dtype=bool)
        for e in ev:
            hit |= (e["lux"] + leak_lux > d) & (e["lux"] > 0.0)
        code |= hit * 8
    out["flags"] = code
    out["shelf"] = np.repeat(s0 + 1, columns)
    out["column"] = np.tile(c0 + 1, shelves)
    return out


def header(n_events):
    h = (
        "scenario,rack,shelf,column,basis,model_lux,calibrated_lux,reading_lux,reading_over_model,room_lux,cage_lux,"
        "rod_r_star_per_s,melanopsin_photons_per_m2_s,light_bleach,recovery_90_s,leak_lux,leak_rod_r_star_per_s,"
        "leak_melanopsin_photons_per_m2_s,leak_bleach"
    )
    for k in range(1, n_events + 1):
        h += (
            f",event{k}_lux,event{k}_rod_r_star_per_s,event{k}_melanopsin_photons_per_m2_s,"
            f"event{k}_peak_bleach,event{k}_recovery_s"
        )
    return h + ",melanopic_photons_per_m2_per_night,flags\n"


def csv_field(text):
    return '"' + text.replace('"', '""') + '"' if any(c in text for c in ',"\n\r') else text


def write_rack(f, scenario, rack_id, r):
    """The rack's rows: numbers with 17 significant digits (they read back to the same value;
    `%.17g` is the fastest exact float formatting Python has, faster than the shortest form),
    empty for a missing value, `inf` for a time never reached."""
    cols = [r["room_lux"], None, None, None, r["room_lux"], r["cage_lux"], r["rod"], r["mel"],
            r["light_bleach"], r["rec90"], r["leak_lux"], r["leak_rod"], r["leak_mel"], r["leak_bleach"]]
    for e in r["events"]:
        cols += [e["lux"], e["rod"], e["mel"], e["peak"], e["rec"]]
    cols.append(r["dose"])
    fmt = [f"{csv_field(scenario)},{csv_field(rack_id)},%d,%d,model"]
    data = [r["shelf"].tolist(), r["column"].tolist()]
    for c in cols:
        if c is None or np.isnan(c).all():
            fmt.append("")
        elif np.isnan(c).any():
            fmt.append("%s")
            data.append(["" if v != v else "%.17g" % v for v in c.tolist()])
        else:
            fmt.append("%.17g")
            data.append(c.tolist())
    names = np.array([" ".join(FLAG_NAMES[b] for b in range(4) if code >> b & 1) for code in range(16)], dtype=object)
    fmt.append("%s\n")
    data.append(names[r["flags"]].tolist())
    line = ",".join(fmt)
    f.write("".join(map(line.__mod__, zip(*data))))


def main(argv):
    if len(argv) != 3:
        sys.stderr.write(__doc__.split("\n\n")[1] + "\n")
        return 2
    with open(argv[1]) as fh:
        p = json.load(fh)
    n_events = len(p["events"])
    with open(argv[2], "w") as f:
        f.write(header(n_events))
        for rack in p["racks"]:
            r = survey_rack(p, rack)
            write_rack(f, p["scenario"], rack["id"], r)
    sys.stderr.write(
        f"room_numpy.py: numpy {np.__version__}, {sum(r['shelves'] * r['columns'] for r in p['racks'])} positions\n"
    )
    return 0


if __name__ == "__main__":
    with np.errstate(all="ignore"):
        sys.exit(main(sys.argv))
