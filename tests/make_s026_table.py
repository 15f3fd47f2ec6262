#!/usr/bin/env python3
"""CIE S 026 Table 2 (alpha-opic action spectra) and alpha-opic reference values, from luxpy 1.12.5.

Usage (from the repository root; .ci/run does the --check form):
    python3 tests/make_s026_table.py DATA_DIR FIXTURE_JSON
    python3 tests/make_s026_table.py --check DATA_DIR FIXTURE_JSON
    e.g. DATA_DIR = src/data, FIXTURE_JSON = tests/fixtures/s026_luxpy_reference.json

Needs luxpy 1.12.5 exactly (PyPI ``luxpy==1.12.5``), numpy < 2.3, scipy and
matplotlib (luxpy imports matplotlib.pyplot). Refuses any other luxpy version.

1. Table. Writes DATA_DIR/cie_s026_alpha_opic_action_spectra.csv: CIE S 026/E:2018
   Table 2, the five alpha-opic action spectra, 380-780 nm at 1 nm, transcribed
   from the copy of the CIE dataset (doi 10.25039/CIE.DS.vqqhzp5a, CC BY-SA 4.0)
   that luxpy ships as luxpy/toolboxes/photbiochem/data/
   S026_Table2_Data_downloaded_04062025.csv, which luxpy loads into
   luxpy.toolboxes.photbiochem._ACTIONSPECTRA_CIES026. Every written value is
   checked to equal the decimal literal in luxpy's file and the float in luxpy's
   array; blank cells (the CIE leaves the cone-opic functions blank at 380-389 nm
   and the s-cone-opic function at 616-780 nm) stay blank. Cross-checks against
   files in DATA_DIR made by tests/make_cie_tables.py from colour-science 0.4.7:
   the rhodopic column equals CIE 1951 V'(lambda) and each cone-opic column,
   divided by its maximum, equals the peak-normalised CIE 2006 10 degree cone
   fundamental, bit for bit. The published D65 ELRs in
   DATA_DIR/cie_s026_alpha_opic.toml are checked against luxpy's copy of the
   CIE LuOx app values (rounded to 4 decimals).

2. Fixture. Writes FIXTURE_JSON: alpha-opic irradiance, ELR, DER and EDI from
   luxpy's own functions (spd_to_aopicE, spd_to_aopicELR, spd_to_aopicDER,
   spd_to_aopicEDI in luxpy.toolboxes.photbiochem, default arguments: CIE
   S 026 action spectra, CIE 1931 2 degree V(lambda) with K_m = 683.002 lm/W,
   the spectrum cubic-interpolated onto 380-780 nm at 1 nm and summed at 1 nm,
   reference D65 = luxpy's 1 nm CIE D65) for spectra generated here exactly as
   retidose generates them (src/spectrum/generate.rs), on 1 nm grids, so that
   luxpy's interpolation onto its 1 nm grid changes nothing:
     - Ohno (2005) LED bands, S(l) = r (g + 2 g^5) / 3, g = exp(-((l - peak) / width)^2),
       360-830 nm at 1 nm (retidose ohno_led / multi_band_led);
     - CIE illuminant A from its formula, 100 (560/l)^5 (exp(c/560) - 1) / (exp(c/l) - 1),
       c = 1.435e7 / 2848, 360-830 nm at 1 nm (retidose cie_illuminant_a);
     - D65: the embedded table DATA_DIR/cie_d65.csv (300-830 nm, 5 nm) linearly
       interpolated to 1 nm, which is what retidose does with it.
   The values are read as spectral irradiance in W m^-2 nm^-1.

With --check, the table is generated into a temporary directory and compared
byte for byte with DATA_DIR's, and the fixture is recomputed and compared with
FIXTURE_JSON (same keys, strings equal, numbers within 1e-12 relative); exit 1
on any difference.
"""

import filecmp
import json
import math
import os
import sys
import tempfile
import tomllib
import warnings
from decimal import Decimal

warnings.filterwarnings("ignore")

import numpy as np  # noqa: E402
import luxpy  # noqa: E402
from luxpy.toolboxes import photbiochem as PB  # noqa: E402
from luxpy.toolboxes.photbiochem import (  # noqa: E402
    alpha_opic_quantities_cie_s026_2018_cie_tn003_2015 as AOQ,
)

LUXPY = "1.12.5"
if luxpy.__version__.lstrip("v") != LUXPY:
    sys.exit(f"error: need luxpy {LUXPY}, found {luxpy.__version__}")

TABLE = "cie_s026_alpha_opic_action_spectra.csv"
LUXPY_FILE = "S026_Table2_Data_downloaded_04062025.csv"
# S 026 order (the order of Table 2 and of retidose); luxpy's arrays are l, m, s, rh, mel.
NAMES = ("s-cone-opic", "m-cone-opic", "l-cone-opic", "rhodopic", "melanopic")
LUXPY_ROW = {"l-cone-opic": 0, "m-cone-opic": 1, "s-cone-opic": 2, "rhodopic": 3, "melanopic": 4}
# CIE S 026:2018 D65 ELRs, mW/lm (checked below against luxpy's copy of the CIE LuOx values).
PUBLISHED_D65_ELR = {
    "s-cone-opic": 0.8173,
    "m-cone-opic": 1.4558,
    "l-cone-opic": 1.6289,
    "rhodopic": 1.4497,
    "melanopic": 1.3262,
}
RTOL = 1e-12


def fmt(x: float) -> str:
    """Shortest round-trip decimal, positional, trailing zeros stripped."""
    s = np.format_float_positional(float(x), unique=True, trim="-")
    assert float(s) == float(x), (s, x)
    return s


def two_column(path):
    out = {}
    for line in open(path, encoding="utf-8"):
        if line[0].isdigit():
            a, b = line.strip().split(",")
            out[int(a)] = float(b)
    return out


def luxpy_table():
    """Table 2 as luxpy ships it: {name: {wl: (literal, float)}} and the file's path."""
    path = os.path.join(os.path.dirname(AOQ.__file__), "data", LUXPY_FILE)
    lines = open(path, encoding="utf-8").read().splitlines()
    header = [h.strip() for h in lines[0].split(",")]
    assert header[:6] == ["Wavelength ( l / nm)", "ssc(l)", "smc(l)", "slc(l)", "srh(l)", "smel(l)"], header
    assert all(h == "" for h in header[6:]), header
    table = {n: {} for n in NAMES}
    wls = []
    for line in lines[1:]:
        cells = [c.strip() for c in line.split(",")]
        assert all(c == "" for c in cells[6:]), line
        wl = int(cells[0])
        wls.append(wl)
        for name, cell in zip(NAMES, cells[1:6]):
            if cell:
                table[name][wl] = (cell, float(cell))
    assert wls == list(range(380, 781)), (wls[0], wls[-1], len(wls))
    # The same numbers as luxpy's own array (rows wl, l, m, s, rh, mel; blanks loaded as 0).
    arr = PB._ACTIONSPECTRA_CIES026
    assert arr is AOQ._ACTIONSPECTRA_CIES026 and arr.shape == (6, 401)
    assert np.array_equal(arr[0], np.arange(380, 781, dtype=float))
    for name in NAMES:
        row = arr[1 + LUXPY_ROW[name]]
        for i, wl in enumerate(wls):
            expected = table[name][wl][1] if wl in table[name] else 0.0
            assert row[i] == expected, (name, wl, row[i], expected)
    return table, path


def write_table(data_dir, out_dir):
    table, src_path = luxpy_table()
    rel_src = "luxpy/toolboxes/photbiochem/data/" + LUXPY_FILE
    ranges = {}
    for name in NAMES:
        wl = sorted(table[name])
        assert wl == list(range(wl[0], wl[-1] + 1)), name  # contiguous: blanks only at the ends
        ranges[name] = (wl[0], wl[-1])
    peaks = {}
    for name in NAMES:
        top = max(v for _, v in table[name].values())
        peaks[name] = ([w for w, (_, v) in sorted(table[name].items()) if v == top], top)
    assert ranges == {
        "s-cone-opic": (390, 615),
        "m-cone-opic": (390, 780),
        "l-cone-opic": (390, 780),
        "rhodopic": (380, 780),
        "melanopic": (380, 780),
    }, ranges

    # Cross-checks with the colour-science tables already in DATA_DIR.
    vp = two_column(os.path.join(data_dir, "cie_1951_scotopic_v_prime.csv"))
    assert sorted(vp) == list(range(380, 781))
    assert all(table["rhodopic"][w][1] == vp[w] for w in vp), "rhodopic != CIE 1951 V'"
    for name, c in (("s-cone-opic", "s"), ("m-cone-opic", "m"), ("l-cone-opic", "l")):
        cone = two_column(os.path.join(data_dir, f"cie_2006_10deg_cone_fundamentals_{c}.csv"))
        top = peaks[name][1]
        for w, (_, v) in table[name].items():
            assert v / top == cone[w], (name, w, v / top, cone[w])

    meta = [
        ("name", "CIE S 026 α-opic action spectra s_sc, s_mc, s_lc, s_rh, s_mel (CIE S 026/E:2018 Table 2)"),
        ("quantity", "spectral sensitivity of the five photoreceptor types, energy basis, relative, dimensionless (rhodopic and melanopic peak 1; the cone-opic columns peak at 0.99994-0.99998 as published)"),
        ("source", "CIE S 026/E:2018 CIE System for Metrology of Optical Radiation for ipRGC-Influenced Responses to Light (doi 10.25039/S026.2018), Table 2; published by the CIE as the dataset 'CIE α-opic action spectra', doi 10.25039/CIE.DS.vqqhzp5a"),
        ("licence", "CC BY-SA 4.0 (https://creativecommons.org/licenses/by-sa/4.0/); this file is an adaptation and is shared under the same licence"),
        ("attribution", "CIE 2018, CIE α-opic action spectra, International Commission on Illumination (CIE), Vienna, AT, doi 10.25039/CIE.DS.vqqhzp5a. Changes: values rewritten as shortest decimals (exponents expanded, trailing zeros dropped, no value changed); column names and these comment lines added"),
        ("transcribed_from", f"luxpy {LUXPY} (PyPI), {rel_src} (= luxpy.toolboxes.photbiochem._ACTIONSPECTRA_CIES026, blanks there loaded as 0), by tests/make_s026_table.py"),
        ("status", "confirmed (the CIE dataset as shipped by luxpy; every value equals the literal in luxpy's file; cross-checks below)"),
        ("range", "380-780 nm"),
        ("step", "1 nm"),
        ("columns", "wavelength_nm, then one column per function in the S 026 order: s-cone-opic, m-cone-opic, l-cone-opic, rhodopic, melanopic"),
        ("notes", "blank cells are blank in Table 2: the cone-opic functions start at 390 nm and the s-cone-opic function ends at 615 nm; CIE S 026 sums take them as 0 (as luxpy and the CIE α-opic toolbox do)"),
        ("notes", "peaks: " + "; ".join(f"{n} {fmt(peaks[n][1])} at {', '.join(map(str, peaks[n][0]))} nm" for n in NAMES)),
        ("notes", "checked: the rhodopic column equals CIE 1951 V′(λ) (cie_1951_scotopic_v_prime.csv, colour-science 0.4.7) at all 401 wavelengths; each cone-opic column divided by its maximum equals the peak-normalised CIE 2006 10° cone fundamental (cie_2006_10deg_cone_fundamentals_{s,m,l}.csv) bit for bit"),
    ]
    path = os.path.join(out_dir, TABLE)
    with open(path, "w", encoding="utf-8", newline="\n") as f:
        for k, v in meta:
            assert "\n" not in v
            f.write(f"# {k}: {v}\n")
        f.write("wavelength_nm," + ",".join(NAMES) + "\n")
        for wl in range(380, 781):
            cells = [fmt(table[n][wl][1]) if wl in table[n] else "" for n in NAMES]
            f.write(f"{wl}," + ",".join(cells) + "\n")
    # Re-read and compare every cell with luxpy's literal.
    rows = [line.rstrip("\n").split(",") for line in open(path, encoding="utf-8") if line[0].isdigit()]
    assert [int(r[0]) for r in rows] == list(range(380, 781))
    for r in rows:
        wl = int(r[0])
        for name, cell in zip(NAMES, r[1:]):
            if wl in table[name]:
                assert Decimal(cell) == Decimal(table[name][wl][0]), (name, wl, cell, table[name][wl][0])
            else:
                assert cell == "", (name, wl, cell)

    # Published D65 ELRs in the definition file against luxpy's copy of the CIE LuOx values.
    with open(os.path.join(data_dir, "cie_s026_alpha_opic.toml"), "rb") as f:
        spec = tomllib.load(f)
    luox = AOQ._ELR_D65_LUOX_APP_GITHUB[0]
    assert [fn["name"] for fn in spec["function"]] == list(NAMES)
    for fn in spec["function"]:
        name = fn["name"]
        assert fn["d65_elr_mw_per_lm"] == PUBLISHED_D65_ELR[name], name
        assert round(float(luox[LUXPY_ROW[name]]), 4) == PUBLISHED_D65_ELR[name], (name, luox)
    print(f"table: {TABLE} from {src_path}")
    for n in NAMES:
        print(f"  {n}: {ranges[n][0]}-{ranges[n][1]} nm, peak {fmt(peaks[n][1])} at {peaks[n][0]} nm")


# ---- Spectra, generated as retidose generates them ----

GRID_360_830 = np.arange(360, 831, dtype=float)


def ohno(bands):
    """retidose multi_band_led: sum of r (g + 2 g^5) / 3, g = exp(-((l - p) / w)^2)."""
    out = []
    for x in GRID_360_830:
        s = 0.0
        for p, w, r in bands:
            g = math.exp(-(((x - p) / w) ** 2))
            s += r * (g + 2.0 * g**5) / 3.0
        out.append(s)
    return np.array(out)


def cie_a():
    """retidose cie_illuminant_a: the CIE formula with c2 = 1.435e-2 m K, T = 2848 K."""
    c = 1.435e7 / 2848.0
    return np.array([100.0 * (560.0 / x) ** 5 * math.expm1(c / 560.0) / math.expm1(c / x) for x in GRID_360_830])


def d65_linear(data_dir):
    d = two_column(os.path.join(data_dir, "cie_d65.csv"))
    wl = np.array(sorted(d), dtype=float)
    assert wl[0] == 300 and wl[-1] == 830 and np.all(np.diff(wl) == 5)
    grid = np.arange(300, 831, dtype=float)
    return grid, np.interp(grid, wl, np.array([d[int(w)] for w in wl]))


def cases(data_dir):
    out = {}
    for p in (365, 405, 450, 470, 530, 590, 630):
        out[f"led_{p}nm_20nm"] = (
            {"kind": "ohno_led", "bands": [[p, 20, 1]], "grid_nm": [360, 830, 1]},
            GRID_360_830,
            ohno([(p, 20, 1)]),
        )
    bands = [[450, 20, 1], [560, 80, 0.9], [610, 70, 0.6]]
    out["white_led_450_560_610"] = (
        {"kind": "ohno_led", "bands": bands, "grid_nm": [360, 830, 1]},
        GRID_360_830,
        ohno(bands),
    )
    out["cie_a"] = ({"kind": "cie_a_formula", "grid_nm": [360, 830, 1]}, GRID_360_830, cie_a())
    g, v = d65_linear(data_dir)
    out["cie_d65"] = ({"kind": "cie_d65_table", "grid_nm": [300, 830, 1]}, g, v)
    return out


CALLS = {
    "irradiance_w_m2": "luxpy.toolboxes.photbiochem.spd_to_aopicE(sid, out='Eeas,E')[0]",
    "ev_lx": "luxpy.toolboxes.photbiochem.spd_to_aopicE(sid, out='Eeas,E')[1]",
    "elr_w_per_lm": "luxpy.toolboxes.photbiochem.spd_to_aopicELR(sid)",
    "der": "luxpy.toolboxes.photbiochem.spd_to_aopicDER(sid)",
    "edi_lx": "luxpy.toolboxes.photbiochem.spd_to_aopicEDI(sid)",
}


def fixture(data_dir):
    out = {
        "about": {
            "luxpy": LUXPY,
            "numpy": np.__version__,
            "script": "tests/make_s026_table.py",
            "sid": "np.vstack((wavelengths_nm, values)): the spectrum read as spectral irradiance, W m^-2 nm^-1",
            "calls": CALLS,
            "order": "functions in S 026 order; luxpy returns l, m, s, rh, mel and is reordered here",
        },
        "d65_elr_mw_per_lm": {
            "luxpy_d65": {
                "call": "1000 * luxpy.toolboxes.photbiochem.spd_to_aopicELR(luxpy._CIE_D65)",
                "values": {},
            },
            "cie_luox_app": {
                "call": "luxpy.toolboxes.photbiochem.alpha_opic_quantities_cie_s026_2018_cie_tn003_2015._ELR_D65_LUOX_APP_GITHUB (stored in mW/lm)",
                "values": {},
            },
        },
        "cases": {},
    }
    elr_d65 = PB.spd_to_aopicELR(luxpy._CIE_D65)[0]
    luox = AOQ._ELR_D65_LUOX_APP_GITHUB[0]
    for name in NAMES:
        out["d65_elr_mw_per_lm"]["luxpy_d65"]["values"][name] = float(1000 * elr_d65[LUXPY_ROW[name]])
        out["d65_elr_mw_per_lm"]["cie_luox_app"]["values"][name] = float(luox[LUXPY_ROW[name]])
    for key, (recipe, wl, values) in cases(data_dir).items():
        sid = np.vstack((wl, values))
        ee, ev = PB.spd_to_aopicE(sid.copy(), out="Eeas,E")
        elr = PB.spd_to_aopicELR(sid.copy())
        der = PB.spd_to_aopicDER(sid.copy())
        edi = PB.spd_to_aopicEDI(sid.copy())
        funcs = {}
        for name in NAMES:
            i = LUXPY_ROW[name]
            funcs[name] = {
                "irradiance_w_m2": float(ee[0, i]),
                "elr_w_per_lm": float(elr[0, i]),
                "der": float(der[0, i]),
                "edi_lx": float(edi[0, i]),
            }
        out["cases"][key] = {"spectrum": recipe, "ev_lx": float(np.asarray(ev).ravel()[0]), "functions": funcs}
    return out


def dump(doc):
    return json.dumps(doc, indent=2, ensure_ascii=False, sort_keys=True) + "\n"


def compare(a, b, path, problems):
    if isinstance(a, dict) and isinstance(b, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a or k not in b:
                problems.append(f"{path}/{k}: only in {'computed' if k in b else 'committed'}")
            else:
                compare(a[k], b[k], f"{path}/{k}", problems)
    elif isinstance(a, float) and isinstance(b, float):
        if a != b and abs(a - b) > RTOL * max(abs(a), abs(b)):
            problems.append(f"{path}: committed {a!r} != computed {b!r}")
    elif a != b:
        problems.append(f"{path}: committed {a!r} != computed {b!r}")


def main(data_dir, fixture_path):
    write_table(data_dir, data_dir)
    with open(fixture_path, "w", encoding="utf-8", newline="\n") as f:
        f.write(dump(fixture(data_dir)))
    print(f"wrote {os.path.join(data_dir, TABLE)} and {fixture_path}")
    return 0


def check(data_dir, fixture_path):
    problems = []
    with tempfile.TemporaryDirectory(prefix="make_s026_table_") as tmp:
        write_table(data_dir, tmp)
        ref = os.path.join(data_dir, TABLE)
        if not os.path.isfile(ref):
            problems.append(f"{ref}: missing")
        elif not filecmp.cmp(os.path.join(tmp, TABLE), ref, shallow=False):
            problems.append(f"{ref}: differs from generated output")
    with open(fixture_path, encoding="utf-8") as f:
        committed = json.load(f)
    # Round-trip through JSON so both sides have the same types.
    fresh = json.loads(dump(fixture(data_dir)))
    compare(committed, fresh, fixture_path, problems)
    if problems:
        print(f"check FAILED: {len(problems)} difference(s)")
        for p in problems:
            print("  " + p)
        return 1
    print(f"check OK: {ref} matches byte for byte; {fixture_path} matches to {RTOL:g} relative")
    return 0


if __name__ == "__main__":
    args = sys.argv[1:]
    if len(args) == 3 and args[0] == "--check":
        sys.exit(check(args[1], args[2]))
    if len(args) != 2 or args[0].startswith("-"):
        sys.exit(__doc__)
    sys.exit(main(args[0], args[1]))
