#!/usr/bin/env python3
"""Reference numbers for retidose, computed with colour-science 0.4.7.

Source
    Every value is computed with the Python package colour-science, version
    0.4.7 exactly (PyPI ``colour-science==0.4.7``), plus numpy and scipy. The
    script refuses to run with any other colour version.

Conventions
    - K_m = 683 lm/W (colour's CONSTANT_K_M) for photopic quantities and
      K'_m = 1700 lm/W (colour's CONSTANT_KP_M) for scotopic quantities,
      unless an entry says otherwise (the alpha-opic ELR entries use
      K_m = 683.002 lm/W, as CIE S 026:2018 does).
    - Planck's second radiation constant c2 = 1.4388e-2 m*K (colour's default
      CONSTANT_C2, ITS-90) unless stated; the ``_codata`` entry uses
      c2 = h*c/k from scipy.constants (CODATA).
    - Integrals use the trapezoid rule, ``np.trapezoid`` on the spectrum's own
      wavelength grid, as colour's ``luminous_efficacy`` / ``luminous_flux``
      do; the luminous efficiency function is reshaped by colour onto that
      grid (zero outside its own range). Entries record this as rule "trapz".
    - The "rule" field is "trapz" or "rect-sum"; every entry here is "trapz".
      Point values (planck_*, V_555, Vp_507, ohno_*) involve no integral and
      carry "trapz" only nominally.
    - ohno_* entries are node values, i.e. ``sd.values`` at the node whose
      wavelength equals the requested one, not ``sd[w]`` (which goes through
      colour's interpolator and can differ in the last digits, e.g.
      1.0000000000000013 instead of 1.0 at the single LED's peak).

Each JSON entry is {"value", "unit", "call", "grid", "rule"}; "call" is the
exact colour expression that produced the value.

Usage (from the repository root; .ci/run does the same)
    python3 -m venv .venv-ci
    .venv-ci/bin/pip install colour-science==0.4.7 numpy==2.4.6 scipy==1.17.1
    .venv-ci/bin/python tests/colour_reference.py --write tests/fixtures/colour_reference.json
    .venv-ci/bin/python tests/colour_reference.py --check tests/fixtures/colour_reference.json

--check recomputes everything and exits 0 if the keys are identical and every
value agrees to a relative 1e-12 (string fields must match exactly), else it
prints the differences and exits 1.
"""

import argparse
import json
import math
import sys
import warnings

warnings.filterwarnings("ignore", message='.*"Matplotlib" related API features.*')

import numpy as np  # noqa: E402
import scipy.constants  # noqa: E402
import colour  # noqa: E402
from colour import SpectralShape  # noqa: E402
from colour.colorimetry import (  # noqa: E402
    SDS_LEFS_PHOTOPIC,
    SDS_LEFS_SCOTOPIC,
    planck_law,
    sd_blackbody,
    sd_multi_leds_Ohno2005,
    sd_single_led_Ohno2005,
)
from colour.colorimetry.blackbody import CONSTANT_C2  # noqa: E402
from colour.colorimetry.datasets.cmfs import DATA_CMFS_LMS  # noqa: E402
from colour.colorimetry.datasets.lefs import (  # noqa: E402
    DATA_LEFS_PHOTOPIC,
    DATA_LEFS_SCOTOPIC,
)

REQUIRED_COLOUR = "0.4.7"
if colour.__version__ != REQUIRED_COLOUR:
    sys.exit(
        f"error: colour-science {REQUIRED_COLOUR} is required, found "
        f"{colour.__version__} (pip install colour-science=={REQUIRED_COLOUR})"
    )
if not hasattr(np, "trapezoid"):
    sys.exit(f"error: numpy >= 2.0 (np.trapezoid) is required, found {np.__version__}")

RTOL = 1e-12

V_KEY = "CIE 1924 Photopic Standard Observer"
VP_KEY = "CIE 1951 Scotopic Standard Observer"
CONE_KEY = "Stockman & Sharpe 10 Degree Cone Fundamentals"
V_SD = SDS_LEFS_PHOTOPIC[V_KEY]
VP_SD = SDS_LEFS_SCOTOPIC[VP_KEY]

V_EXPR = f'colour.colorimetry.SDS_LEFS_PHOTOPIC["{V_KEY}"]'
VP_EXPR = f'colour.colorimetry.SDS_LEFS_SCOTOPIC["{VP_KEY}"]'


def trimmed(name, start, end):
    """colour.SDS_ILLUMINANTS[name] trimmed to [start, end] (on a copy)."""
    sd = colour.SDS_ILLUMINANTS[name].copy()
    return sd.trim(SpectralShape(start, end, sd.shape.interval))


def table_expr(name, start, end):
    return (
        f'colour.SDS_ILLUMINANTS["{name}"].copy()'
        f".trim(colour.SpectralShape({start}, {end}, 5))"
    )


def s_over_p(sd):
    return colour.luminous_flux(sd, VP_SD, K_m=1700) / colour.luminous_flux(
        sd, V_SD, K_m=683
    )


def s_over_p_expr(sd_expr):
    return (
        f"colour.luminous_flux(sd, {VP_EXPR}, K_m=1700) / "
        f"colour.luminous_flux(sd, {V_EXPR}, K_m=683) with sd = {sd_expr}"
    )


def grid(start, end, step):
    n = (end - start) // step + 1
    return f"{start}-{end} nm step {step} nm ({n} nodes)"


def node_value(sd, wavelength):
    """sd.values at the single node whose wavelength equals `wavelength`."""
    (i,) = np.flatnonzero(sd.wavelengths == wavelength)
    return sd.values[i]


def entry(value, unit, call, grid_, rule="trapz"):
    value = float(value)
    assert math.isfinite(value), call
    return {"value": value, "unit": unit, "call": call, "grid": grid_, "rule": rule}


def compute():
    out = {}

    # Luminous efficacy of radiation (LER) of illuminant A and D65.
    out["ler_A_table_5nm_380_780"] = entry(
        colour.luminous_efficacy(trimmed("A", 380, 780)),
        "lm/W",
        f"colour.luminous_efficacy({table_expr('A', 380, 780)})",
        grid(380, 780, 5),
    )
    for key, (a, b, step) in {
        "ler_A_formula_5nm_380_780": (380, 780, 5),
        "ler_A_formula_1nm_380_780": (380, 780, 1),
        "ler_A_formula_1nm_360_830": (360, 830, 1),
    }.items():
        out[key] = entry(
            colour.luminous_efficacy(
                colour.sd_CIE_standard_illuminant_A(SpectralShape(a, b, step))
            ),
            "lm/W",
            "colour.luminous_efficacy(colour.sd_CIE_standard_illuminant_A("
            f"colour.SpectralShape({a}, {b}, {step})))",
            grid(a, b, step)
            + ("; V(λ) defined 360-830 nm" if (a, b) == (360, 830) else ""),
        )
    out["ler_D65_table_5nm_380_780"] = entry(
        colour.luminous_efficacy(trimmed("D65", 380, 780)),
        "lm/W",
        f"colour.luminous_efficacy({table_expr('D65', 380, 780)})",
        grid(380, 780, 5),
    )

    # Scotopic / photopic ratios.
    for name in ("A", "D65"):
        out[f"sp_{name}_table_5nm_380_780"] = entry(
            s_over_p(trimmed(name, 380, 780)),
            "1",
            s_over_p_expr(table_expr(name, 380, 780)),
            grid(380, 780, 5),
        )
    for T in (3000, 4000, 6500):
        out[f"sp_planck_{T}K_1nm_380_780"] = entry(
            s_over_p(sd_blackbody(T, SpectralShape(380, 780, 1))),
            "1",
            s_over_p_expr(
                f"colour.sd_blackbody({T}, colour.SpectralShape(380, 780, 1))"
                " (c2 = 1.4388e-2 m*K, colour default)"
            ),
            grid(380, 780, 1),
        )

    # Illuminance per W/m^2 (380-780 nm) of a 2856 K Planckian radiator.
    c2_codata = scipy.constants.h * scipy.constants.c / scipy.constants.k
    for suffix, c2, c2_text in (
        ("", CONSTANT_C2, "c2 = 1.4388e-2 m*K (colour default)"),
        (
            "_codata",
            c2_codata,
            f"c2 = scipy.constants.h * scipy.constants.c / scipy.constants.k"
            f" = {c2_codata!r} m*K (CODATA)",
        ),
    ):
        sd = sd_blackbody(2856, SpectralShape(380, 780, 1), c2=c2)
        radiant = np.trapezoid(sd.values, sd.wavelengths)
        sd_unit = colour.SpectralDistribution(sd.values / radiant, sd.wavelengths)
        out[f"ev_planck_2856K_1nm_380_780_per_W{suffix}"] = entry(
            colour.luminous_flux(sd_unit, V_SD, K_m=683),
            "lx per (W/m²)",
            f"colour.luminous_flux(sd / np.trapezoid(sd.values, sd.wavelengths), "
            f"{V_EXPR}, K_m=683) with sd = colour.sd_blackbody(2856, "
            f"colour.SpectralShape(380, 780, 1), c2=c2), {c2_text}; "
            "i.e. illuminance in lx of the radiator scaled to 1 W/m² over 380-780 nm",
            grid(380, 780, 1),
        )

    # Planck's law point values (spectral radiance per metre of wavelength).
    out["planck_555nm_2856K"] = entry(
        planck_law(555e-9, 2856),
        "W·sr⁻¹·m⁻³",
        "colour.colorimetry.planck_law(555e-9, 2856) (c1 = 3.741771e-16 W*m², "
        "c2 = 1.4388e-2 m*K, n = 1, colour defaults)",
        "single wavelength 555 nm",
    )
    out["planck_500nm_5500K"] = entry(
        planck_law(500e-9, 5500),
        "W·sr⁻¹·m⁻³",
        "colour.colorimetry.planck_law(500e-9, 5500) (c1 = 3.741771e-16 W*m², "
        "c2 = 1.4388e-2 m*K, n = 1, colour defaults)",
        "single wavelength 500 nm",
    )

    # Raw table values.
    out["V_555"] = entry(
        DATA_LEFS_PHOTOPIC[V_KEY][555],
        "1",
        f'colour.colorimetry.datasets.lefs.DATA_LEFS_PHOTOPIC["{V_KEY}"][555]',
        "raw table value at 555 nm",
    )
    out["Vp_507"] = entry(
        DATA_LEFS_SCOTOPIC[VP_KEY][507],
        "1",
        f'colour.colorimetry.datasets.lefs.DATA_LEFS_SCOTOPIC["{VP_KEY}"][507]',
        "raw table value at 507 nm",
    )

    # alpha-opic equivalent luminance ratios (ELR) of D65, CIE S 026 style,
    # on the D65 table nodes 380-780 nm at 5 nm, K_m = 683.002.
    d65 = trimmed("D65", 380, 780)
    wl = d65.wavelengths
    e = d65.values
    v = np.array([DATA_LEFS_PHOTOPIC[V_KEY][int(w)] for w in wl])
    vp = np.array([DATA_LEFS_SCOTOPIC[VP_KEY][int(w)] for w in wl])
    cones = DATA_CMFS_LMS[CONE_KEY]
    denominator = 683.002 * np.trapezoid(v * e, wl)
    common = (
        f"with D65 = {table_expr('D65', 380, 780)}, λ = D65.wavelengths, "
        f'V = colour.colorimetry.datasets.lefs.DATA_LEFS_PHOTOPIC["{V_KEY}"] at λ; '
        "K_m = 683.002 lm/W (CIE S 026), not colour's 683"
    )
    for col, name in ((2, "s"), (1, "m"), (0, "l")):
        peak = max(row[col] for row in cones.values())
        s = np.array([cones[int(w)][col] / peak if int(w) in cones else 0.0 for w in wl])
        out[f"elr_D65_{name}_mW_per_lm"] = entry(
            1000 * np.trapezoid(s * e, wl) / denominator,
            "mW/lm",
            f"1000 * np.trapezoid(s * D65.values, λ) / (683.002 * "
            f"np.trapezoid(V * D65.values, λ)) {common}; s = "
            f'colour.colorimetry.datasets.cmfs.DATA_CMFS_LMS["{CONE_KEY}"] column {col} '
            f"({name}_bar) / its maximum over the whole table, taken at λ, 0 where "
            "the table has no row (below 390 nm)",
            grid(380, 780, 5),
        )
    out["elr_D65_rh_mW_per_lm"] = entry(
        1000 * np.trapezoid(vp * e, wl) / denominator,
        "mW/lm",
        f"1000 * np.trapezoid(Vp * D65.values, λ) / (683.002 * "
        f"np.trapezoid(V * D65.values, λ)) {common}; Vp = "
        f'colour.colorimetry.datasets.lefs.DATA_LEFS_SCOTOPIC["{VP_KEY}"] at λ',
        grid(380, 780, 5),
    )

    # The same ELRs with D65 linearly interpolated to 1 nm (380-780 nm) and
    # the action spectra / V / V' taken at the 1 nm nodes.
    wl1 = np.arange(380, 781, 1).astype(float)
    e1 = colour.LinearInterpolator(wl, e)(wl1)
    v1 = np.array([DATA_LEFS_PHOTOPIC[V_KEY][int(w)] for w in wl1])
    vp1 = np.array([DATA_LEFS_SCOTOPIC[VP_KEY][int(w)] for w in wl1])
    denominator1 = 683.002 * np.trapezoid(v1 * e1, wl1)
    d65_1nm_expr = (
        f"colour.LinearInterpolator(D65.wavelengths, D65.values)(λ) with D65 = "
        f"{table_expr('D65', 380, 780)}, λ = np.arange(380, 781, 1)"
    )
    common1 = (
        f"with E = {d65_1nm_expr}; "
        f'V = colour.colorimetry.datasets.lefs.DATA_LEFS_PHOTOPIC["{V_KEY}"] at λ; '
        "K_m = 683.002 lm/W (CIE S 026), not colour's 683"
    )
    for col, name in ((2, "s"), (1, "m"), (0, "l")):
        peak = max(row[col] for row in cones.values())
        s1 = np.array(
            [cones[int(w)][col] / peak if int(w) in cones else 0.0 for w in wl1]
        )
        out[f"elr_D65_1nm_{name}_mW_per_lm"] = entry(
            1000 * np.trapezoid(s1 * e1, wl1) / denominator1,
            "mW/lm",
            f"1000 * np.trapezoid(s * E, λ) / (683.002 * np.trapezoid(V * E, λ)) "
            f"{common1}; s = "
            f'colour.colorimetry.datasets.cmfs.DATA_CMFS_LMS["{CONE_KEY}"] column {col} '
            f"({name}_bar) / its maximum over the whole table, taken at λ, 0 where "
            "the table has no row (below 390 nm)"
            + (" or stores 0.0 (above 615 nm)" if name == "s" else ""),
            grid(380, 780, 1),
        )
    out["elr_D65_1nm_rh_mW_per_lm"] = entry(
        1000 * np.trapezoid(vp1 * e1, wl1) / denominator1,
        "mW/lm",
        f"1000 * np.trapezoid(Vp * E, λ) / (683.002 * np.trapezoid(V * E, λ)) "
        f"{common1}; Vp = "
        f'colour.colorimetry.datasets.lefs.DATA_LEFS_SCOTOPIC["{VP_KEY}"] at λ',
        grid(380, 780, 1),
    )
    out["ler_D65_1nm_linear_380_780"] = entry(
        colour.luminous_efficacy(colour.SpectralDistribution(e1, wl1)),
        "lm/W",
        f"colour.luminous_efficacy(colour.SpectralDistribution(E, λ)) with E = "
        f"{d65_1nm_expr}",
        grid(380, 780, 1),
    )

    # Ohno (2005) LED model: node values of a single LED and of a 3-LED sum.
    led_shape = "colour.SpectralShape(360, 830, 1)"
    led = sd_single_led_Ohno2005(460, 20, shape=SpectralShape(360, 830, 1))
    for w in (450, 460, 470, 480, 500):
        out[f"ohno_led_460nm_20nm_at_{w}nm"] = entry(
            node_value(led, w),
            "relative",
            f"sd.values[sd.wavelengths == {w}] with sd = "
            f"colour.colorimetry.sd_single_led_Ohno2005(460, 20, shape={led_shape}); "
            "peak 1 at 460 nm by construction",
            f"node {w} nm of " + grid(360, 830, 1),
        )
    multi = sd_multi_leds_Ohno2005(
        np.array([450, 560, 610]),
        np.array([20, 80, 70]),
        np.array([1.0, 0.9, 0.6]),
        shape=SpectralShape(360, 830, 1),
    )
    finite = np.isfinite(multi.values)
    multi_max = float(np.max(multi.values[finite]))
    multi_max_nm = int(multi.wavelengths[finite][np.argmax(multi.values[finite])])
    nan_nm = multi.wavelengths[~finite].astype(int)
    assert multi_max > 1.0 and list(nan_nm) == list(range(781, 831)), (multi_max, nan_nm)
    for w in (450, 550, 600, 650):
        out[f"ohno_multi_led_at_{w}nm"] = entry(
            node_value(multi, w),
            "relative",
            f"sd.values[sd.wavelengths == {w}] with sd = "
            "colour.colorimetry.sd_multi_leds_Ohno2005(np.array([450, 560, 610]), "
            "np.array([20, 80, 70]), np.array([1.0, 0.9, 0.6]), "
            f"shape={led_shape}); not normalised by colour: plain sum of "
            "peak_power_ratio * sd_single_led_Ohno2005(peak, width) (each single LED "
            f"peaks at 1), maximum {multi_max:.6f} at {multi_max_nm} nm; colour does "
            "not pass shape to the single LEDs (they use SPECTRAL_SHAPE_DEFAULT, "
            f"360-780 nm), so the sum is NaN at {nan_nm[0]}-{nan_nm[-1]} nm",
            f"node {w} nm of " + grid(360, 830, 1),
        )
    return out


def dump(data):
    return json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False) + "\n"


def check(path, fresh):
    with open(path, encoding="utf-8") as f:
        committed = json.load(f)
    problems = []
    for key in sorted(set(committed) - set(fresh)):
        problems.append(f"{key}: in {path} but not computed")
    for key in sorted(set(fresh) - set(committed)):
        problems.append(f"{key}: computed but missing from {path}")
    for key in sorted(set(fresh) & set(committed)):
        a, b = committed[key], fresh[key]
        if not isinstance(a, dict) or set(a) != set(b):
            problems.append(f"{key}: fields {sorted(a) if isinstance(a, dict) else a!r} != {sorted(b)}")
            continue
        va, vb = a["value"], b["value"]
        if not isinstance(va, (int, float)) or isinstance(va, bool):
            problems.append(f"{key}: committed value {va!r} is not a number")
        elif va != vb and abs(va - vb) > RTOL * max(abs(va), abs(vb)):
            problems.append(
                f"{key}: value committed {va!r} != computed {vb!r} "
                f"(relative {abs(va - vb) / max(abs(va), abs(vb)):.3e})"
            )
        for field in sorted(set(b) - {"value"}):
            if a[field] != b[field]:
                problems.append(f"{key}: {field} committed {a[field]!r} != computed {b[field]!r}")
    if problems:
        print(f"{path}: {len(problems)} difference(s):")
        for p in problems:
            print("  " + p)
        return 1
    print(f"{path}: OK ({len(fresh)} entries match to relative {RTOL:g})")
    return 0


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    group = parser.add_mutually_exclusive_group(required=True)
    group.add_argument("--write", metavar="PATH", help="write the reference JSON")
    group.add_argument("--check", metavar="PATH", help="compare with a committed JSON")
    args = parser.parse_args()
    fresh = compute()
    if args.write:
        with open(args.write, "w", encoding="utf-8", newline="\n") as f:
            f.write(dump(fresh))
        print(f"wrote {len(fresh)} entries to {args.write}")
        return 0
    return check(args.check, fresh)


if __name__ == "__main__":
    sys.exit(main())
