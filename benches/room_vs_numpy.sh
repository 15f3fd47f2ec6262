#!/usr/bin/env bash
# retidose against a numpy script doing the same per-position arithmetic, whole process, side by
# side in one run (see benches/README.md).
#
#   benches/room_vs_numpy.sh                       10⁵ positions, both programs, outputs compared
#   benches/room_vs_numpy.sh 1000000               10⁶ positions, both programs
#   benches/room_vs_numpy.sh --retidose-only 10000000
#                                                  retidose alone (10⁷: CSV streamed to a file)
#   benches/room_vs_numpy.sh --readings 100000     retidose with a 10⁵-row readings file
#   benches/room_vs_numpy.sh --check               outputs only, on varied rooms (not timed)
#   benches/room_vs_numpy.sh --all                 --check, 10⁵ and 10⁶ both, 10⁷ retidose only,
#                                                  readings
#
# N is a multiple of 1000: 10 racks × N/1000 shelves × 100 columns. Environment: REPS
# (repetitions per program, default 5; 3 for 10⁷), PYTHON (a python with numpy; default
# .venv-ci/bin/python, else a venv made under /tmp with numpy 2.2.6), BENCH_DIR (work folder,
# default a new one under /tmp), KEEP=1 keeps the CSV files, NO_BUILD=1 skips cargo build.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
repo="$(cd "$here/.." && pwd)"
bin="${CARGO_TARGET_DIR:-$repo/target}/release/retidose"

die() { echo "room_vs_numpy.sh: $*" >&2; exit 2; }

# ---- arguments ---------------------------------------------------------------------------
jobs=()   # "both N", "retidose N", "readings N"
while [ $# -gt 0 ]; do
    case "$1" in
        --all) jobs+=("check 1000" "both 100000" "both 1000000" "retidose 10000000" "readings 100000") ;;
        --check) jobs+=("check 1000") ;;
        --retidose-only) shift; jobs+=("retidose ${1:?--retidose-only needs N}") ;;
        --readings) shift; jobs+=("readings ${1:?--readings needs N}") ;;
        -h|--help) sed -n '2,18p' "$0" | sed 's/^# \{0,1\}//'; exit 0 ;;
        [0-9]*) jobs+=("both $1") ;;
        *) die "unknown argument '$1' (see --help)" ;;
    esac
    shift
done
[ ${#jobs[@]} -gt 0 ] || jobs=("both 100000")
for j in "${jobs[@]}"; do
    n="${j#* }"
    [[ "$n" =~ ^[0-9]+$ ]] && [ "$n" -ge 1000 ] && [ $((n % 1000)) -eq 0 ] \
        || die "N = $n: give a multiple of 1000 (10 racks × N/1000 shelves × 100 columns)"
done

# ---- tools -------------------------------------------------------------------------------
[ -x /usr/bin/time ] || die "/usr/bin/time is missing (apt-get install -y time)"
if [ -z "${PYTHON:-}" ]; then
    if [ -x "$repo/.venv-ci/bin/python" ] && "$repo/.venv-ci/bin/python" -c 'import numpy' 2>/dev/null; then
        PYTHON="$repo/.venv-ci/bin/python"
    else
        PYTHON=/tmp/retidose-npvenv/bin/python
        if ! "$PYTHON" -c 'import numpy' 2>/dev/null; then
            echo "making a numpy venv in /tmp/retidose-npvenv" >&2
            python3 -m venv /tmp/retidose-npvenv
            /tmp/retidose-npvenv/bin/pip install -q numpy==2.2.6
        fi
    fi
fi
"$PYTHON" -c 'import numpy' || die "$PYTHON has no numpy (set PYTHON)"

if [ -z "${NO_BUILD:-}" ]; then
    (cd "$repo" && cargo build --release)
fi
[ -x "$bin" ] || die "no release binary at $bin"
# The per-position table: `--format positions` (older builds: `--format csv`).
if "$bin" assess --help | grep -q 'positions:'; then rows=positions; else rows=csv; fi

W="${BENCH_DIR:-$(mktemp -d /tmp/retidose-room-bench.XXXXXX)}"
mkdir -p "$W"
runs="$W/runs.tsv"
: > "$runs"

# ---- the helper: scenarios, parameters, readings, comparison, table (python) ---------------
cat > "$W/helper.py" <<'PY'
"""Helper of room_vs_numpy.sh (stdlib only, except `compare`, which uses numpy)."""
import json, random, statistics, sys, tomllib


def room(racks, shelves, columns=100, readings=None, calibrate=None):
    """The room of benches/survey.rs `room()`: albino mice on `racks` grid racks of `shelves` ×
    `columns`, four ceiling luminaires, 12 h : 12 h for 7 days, a 0.3 lx leak and a nightly
    10-minute red-safelight check at 5 lx 6 h after lights-off. Shelves 0.002 m apart (as in
    survey.rs) up to 1000 shelves; closer above that, so every cage stays below the ceiling."""
    spacing = 0.002 if shelves <= 1000 else 2.0 / shelves
    t = f'''[scenario]
name = "bench"
title = "bench room (invented)"
[subject]
species = "mouse"
pigmentation = "albino"
pupil = "light"
[guidance]
sets = ["nrc-guide-2011"]
[room]
light_spectrum = "neutral-white-led"
leak_spectrum = "warm-white-led"
leak = "0.3 lx"
light_phase = "12 h"
dark_phase = "12 h"
days = 7
'''
    if readings:
        t += f'readings = "{readings}"\n'
    if calibrate:
        t += f'calibrate = "{calibrate}"\n'
    t += '''[[room.event]]
name = "check"
spectrum = "red-safelight-led"
lux = "5 lx"
start = "6 h"
duration = "10 min"
'''
    for x, y in [(2.0, 1.0), (6.0, 1.0), (2.0, 3.0), (6.0, 3.0)]:
        t += f'[[room.luminaire]]\nx = "{x!r} m"\ny = "{y!r} m"\nz = "2.8 m"\nintensity = "900 cd"\n'
    for r in range(racks):
        t += (f'[[room.rack]]\nid = "R{r}"\nshelves = {shelves}\ncolumns = {columns}\nfirst_column_x = "0.2 m"\n'
              f'column_spacing = "0.08 m"\nrack_y = "{0.5 + 0.3 * r!r} m"\nbottom_shelf = "0.2 m"\n'
              f'shelf_spacing = "{spacing!r} m"\ncage_transmittance = "0.8"\nshelf_shading = "0.999"\n')
    return t


def varied(variant, small=False):
    """Rooms for --check (outputs compared, not timed): a bright rack of albino mice with heavy
    shelf shading (lux over orders of magnitude, bleach near 1), a rack of pigmented rats (the
    slower rat pigment), a light phase too short to settle (days run one by one), two events out
    of start order, one lit by a luminaire. Variants: `dark` (no leak: the Lambert W solution),
    `leak` (1.5 lx), `bright-leak` (400 lx: recovery never reached, `inf`), `rushton`."""
    leak = {"dark": "0 lx", "leak": "1.5 lx", "bright-leak": "400 lx", "rushton": "1.5 lx"}[variant]
    s1, c1, s2, c2 = (1, 1, 1, 1) if small else (12, 40, 5, 30)
    t = '''[scenario]
name = "check"
title = "varied room (invented)"
[subject]
species = "mouse"
pigmentation = "albino"
pupil = "light"
'''
    if variant == "rushton":
        t += '''[[source]]
id = "panels"
spectrum = "neutral-white-led"
illuminance = "250 lx"
full_field = true
[schedule]
receptor = "mouse-rod"
model = "rushton"
[[schedule.step]]
name = "lights on"
phase = "light"
duration = "20 min"
on = ["panels"]
[[schedule.step]]
name = "night"
phase = "dark"
duration = "2 h"
on = []
'''
    t += f'''[guidance]
sets = ["nrc-guide-2011"]
[room]
light_spectrum = "neutral-white-led"
leak_spectrum = "warm-white-led"
leak = "{leak}"
light_phase = "20 min"
dark_phase = "2 h"
days = 5
[[room.event]]
name = "late lamp"
spectrum = "neutral-white-led"
start = "70 min"
duration = "3 min"
luminaire = {{ x = "1 m", y = "0.5 m", z = "2.5 m", intensity = "30000 cd" }}
[[room.event]]
name = "early check"
spectrum = "red-safelight-led"
lux = "50 lx"
start = "30 min"
duration = "10 min"
[[room.luminaire]]
x = "1 m"
y = "1 m"
z = "2.8 m"
intensity = "200000 cd"
[[room.luminaire]]
x = "3 m"
y = "1 m"
z = "2.8 m"
intensity = "5 cd"
[[room.rack]]
id = "bright"
shelves = {s1}
columns = {c1}
first_column_x = "0 m"
column_spacing = "0.1 m"
rack_y = "0.6 m"
bottom_shelf = "0.1 m"
shelf_spacing = "0.2 m"
cage_transmittance = "0.8"
shelf_shading = "0.3"
[[room.rack]]
id = "rats"
species = "rat"
pigmentation = "pigmented"
shelves = {s2}
columns = {c2}
first_column_x = "0.5 m"
column_spacing = "0.2 m"
rack_y = "2 m"
bottom_shelf = "0.3 m"
shelf_spacing = "0.5 m"
cage_transmittance = "0.5"
shelf_shading = "0.6"
'''
    return t


UNITS = {"m": 1.0, "cd": 1.0, "lx": 1.0, "s": 1.0, "min": 60.0, "h": 3600.0,
         "/s": 1.0, "/min": 1.0 / 60.0, "/h": 1.0 / 3600.0}


def value(text):
    """A number with one of the few units these scenarios use, in SI (value × factor)."""
    parts = text.split()
    v = float(parts[0])
    return v * UNITS[parts[1]] if len(parts) > 1 else v


def params(room_toml, small_json, pigments_toml):
    """PARAMS.json for room_numpy.py: per-lux factors and bounds from retidose's JSON of the small
    copy; geometry, leak and event light from the scenario; pigment constants from the table."""
    sc = tomllib.load(open(room_toml, "rb"))
    rep = json.load(open(small_json))
    rj = rep["room"]
    raw = sc["room"]
    table = {p["id"]: p for p in tomllib.load(open(pigments_toml, "rb"))["receptor"]}
    model = sc.get("schedule", {}).get("model", "rate-limited")
    # The report's room.cycle, .events and .luminaires, as lists or as objects.
    cyc = rj["cycle"]
    light_s, dark_s, days = (cyc["light"], cyc["dark"], cyc["days"]) if isinstance(cyc, dict) else cyc
    events = []
    for e, je in zip(raw.get("event", []), rj["events"]):
        name, start, dur = (je["name"], je["start"], je["duration"]) if isinstance(je, dict) else je
        ev = {"name": name, "start_s": start, "duration_s": dur}
        if "lux" in e:
            ev["lux"] = value(e["lux"])
        else:
            l = e["luminaire"]
            ev["luminaire"] = {"x": value(l["x"]), "y": value(l["y"]), "z": value(l["z"]),
                               "intensity_cd": value(l["intensity"])}
        events.append(ev)
    lums = [{"x": value(l["x"]), "y": value(l["y"]), "z": value(l["z"]),
             "intensity_cd": jl["intensity"] if isinstance(jl, dict) else jl[1]}
            for l, jl in zip(raw.get("luminaire", []), rj["luminaires"])]
    racks = []
    subject = sc["subject"]["species"]
    for r, rr in zip(raw["rack"], rj["racks"]):
        pig = table[f'{r.get("species", subject)}-rod']
        bound = lambda b: None if b is None else b["lx"]
        racks.append({
            "id": r["id"], "shelves": r["shelves"], "columns": r["columns"],
            "x0": value(r["first_column_x"]), "column_spacing": value(r["column_spacing"]),
            "y": value(r["rack_y"]), "bottom": value(r["bottom_shelf"]),
            "shelf_spacing": value(r["shelf_spacing"]),
            "cage_transmittance": value(r["cage_transmittance"]),
            "shelf_shading": value(r.get("shelf_shading", "1")),
            "per_lux": rr["per_lux"],
            "bounds": {k: bound(rr["bounds"][k]) for k in ("lower", "upper", "dark")},
            "pigment": {"k_per_rate": 1.0 / value(pig["pigment_per_cell"]["value"]),
                        "v_per_s": value(pig["v"]["value"]), "k_m": value(pig["k_m"]["value"]),
                        "tau0_s": value(pig["tau0"]["value"])},
        })
    return {"schema": "retidose-bench.room-params/1", "scenario": sc["scenario"]["name"],
            "model": model, "light_s": light_s, "dark_s": dark_s, "days": days,
            "leak_lux": value(raw.get("leak", "0 lx")), "luminaires": lums, "events": events,
            "racks": racks}


def readings(racks, shelves, out):
    """A reading at every position: the luminaire model times a factor of 0.8–1.2 (seeded)."""
    rnd = random.Random(11)
    spacing = 0.002 if shelves <= 1000 else 2.0 / shelves
    lums = [(2.0, 1.0), (6.0, 1.0), (2.0, 3.0), (6.0, 3.0)]
    with open(out, "w") as f:
        f.write("rack,shelf,column,lux\n")
        for r in range(racks):
            y = 0.5 + 0.3 * r
            for s in range(shelves):
                z = 0.2 + s * spacing
                shade = 0.999 ** (shelves - 1 - s)
                for c in range(100):
                    x = 0.2 + c * 0.08
                    e = sum(900 * (2.8 - z) ** 2 / ((lx - x) ** 2 + (ly - y) ** 2 + (2.8 - z) ** 2) ** 2
                            for lx, ly in lums)
                    f.write(f"R{r},{s + 1},{c + 1},{e * shade * (0.8 + 0.4 * rnd.random()):.2f}\n")


def compare(a_path, b_path):
    """Every column of two survey CSVs: the largest relative difference of the numbers, and
    mismatches of text, missing values and infinities."""
    import numpy as np
    head = open(a_path).readline().rstrip("\n").split(",")
    if open(b_path).readline().rstrip("\n").split(",") != head:
        print("  the headers differ"); return 1
    text_cols = [i for i, h in enumerate(head) if h in ("scenario", "rack", "basis", "flags")]
    num_cols = [i for i in range(len(head)) if i not in text_cols]

    def load(path):
        with open(path) as f:
            f.readline()
            body = f.read()
        lines = body.splitlines()
        txt = [[ln.split(",")[i] for i in text_cols] for ln in lines[:: max(1, len(lines) // 20000)]]
        # Empty cells are missing values: NaN for loadtxt (two passes catch runs of empties).
        body = body.replace(",,", ",nan,").replace(",,", ",nan,").replace(",\n", ",nan\n")
        num = np.loadtxt(body.splitlines(), delimiter=",", usecols=num_cols, dtype=float)
        return num, txt, lines

    a, at, al = load(a_path)
    b, bt, bl = load(b_path)
    if a.shape != b.shape:
        print(f"  row counts differ: {a.shape[0]} and {b.shape[0]}"); return 1
    flags_a = [ln.rsplit(",", 1)[1] for ln in al]
    flags_b = [ln.rsplit(",", 1)[1] for ln in bl]
    bad_flags = sum(x != y for x, y in zip(flags_a, flags_b))
    worst = 0.0
    print(f"  {a.shape[0]} rows; max relative difference |a − b| / max(|a|, |b|) per column:")
    for j, i in enumerate(num_cols):
        x, y = a[:, j], b[:, j]
        same_missing = np.isnan(x) == np.isnan(y)
        same_inf = np.isinf(x) == np.isinf(y)
        fin = np.isfinite(x) & np.isfinite(y)
        with np.errstate(all="ignore"):
            scale = np.maximum(np.abs(x[fin]), np.abs(y[fin]))
            rel = np.where(scale > 0, np.abs(x[fin] - y[fin]) / scale, 0.0)
        m = float(rel.max()) if rel.size else 0.0
        k = int(np.flatnonzero(fin)[rel.argmax()]) if rel.size else -1
        note = ""
        if not same_missing.all():
            note += f"  missing-value mismatch in {int((~same_missing).sum())} rows"
        if not same_inf.all() or not (x[np.isinf(x)] == y[np.isinf(x)]).all():
            note += "  infinity mismatch"
        if m > 0:
            _, rk, sh, co = al[k].split(",")[:4]
            where = f"  (rack {rk} shelf {sh} column {co}: {float(x[k])!r} vs {float(y[k])!r})"
        else:
            where = ""
        print(f"    {head[i]:<40} {m:9.2e}{where}{note}")
        if np.isfinite(m):
            worst = max(worst, m)
    bad_text = sum(x != y for x, y in zip(at, bt))
    print(f"  text columns (scenario, rack, basis; sampled rows): {bad_text} mismatches; flags: {bad_flags} mismatches")
    print(f"  MAX RELATIVE DIFFERENCE {worst:.3e}")
    return 0


def table(runs_tsv):
    """Medians per (case, program): wall time, peak RSS."""
    rows = [ln.rstrip("\n").split("\t") for ln in open(runs_tsv) if ln.strip()]
    cases = {}
    for case, n, prog, wall, rss in rows:
        cases.setdefault((case, int(n)), {}).setdefault(prog, []).append((float(wall), int(rss)))
    print(f"{'case':<22}{'N':>10}{'retidose s':>12}{'numpy s':>10}{'ratio':>8}{'retidose MiB':>14}{'numpy MiB':>11}  runs")
    for (case, n), progs in cases.items():
        r = progs.get("retidose", [])
        p = progs.get("numpy", [])
        med = lambda v: statistics.median(w for w, _ in v) if v else float("nan")
        rss = lambda v: max(m for _, m in v) / 1024 if v else float("nan")
        ratio = med(p) / med(r) if r and p else float("nan")
        fmt = lambda x, f: "—" if x != x else format(x, f)
        print(f"{case:<22}{n:>10}{fmt(med(r), '.3f'):>12}{fmt(med(p), '.3f'):>10}{fmt(ratio, '.1f'):>8}"
              f"{fmt(rss(r), '.1f'):>14}{fmt(rss(p), '.1f'):>11}  {len(r)}+{len(p)}")


if __name__ == "__main__":
    cmd = sys.argv[1]
    if cmd == "varied":
        sys.stdout.write(varied(sys.argv[2], len(sys.argv) > 3))
    elif cmd == "room":
        sys.stdout.write(room(int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4]), *sys.argv[5:]))
    elif cmd == "params":
        json.dump(params(*sys.argv[2:5]), sys.stdout, indent=1)
    elif cmd == "readings":
        readings(int(sys.argv[2]), int(sys.argv[3]), sys.argv[4])
    elif cmd == "compare":
        sys.exit(compare(sys.argv[2], sys.argv[3]))
    elif cmd == "table":
        table(sys.argv[2])
PY
helper() { "$PYTHON" "$W/helper.py" "$@"; }

# One timed whole-process run: wall seconds (clock in ns around it) and peak RSS (KiB, from
# /usr/bin/time -f "%e %M"), appended to runs.tsv. retidose exits 1 when a flag is raised.
timed() {
    local case="$1" n="$2" prog="$3"; shift 3
    local t0 t1 rc=0
    t0=$(date +%s%N)
    /usr/bin/time -f "%e %M" -o "$W/time.txt" "$@" > "$W/stdout.txt" 2> "$W/stderr.txt" || rc=$?
    t1=$(date +%s%N)
    if [ "$rc" -gt 1 ] || { [ "$prog" = numpy ] && [ "$rc" -ne 0 ]; }; then
        cat "$W/stderr.txt" >&2; die "$prog failed (exit $rc)"
    fi
    local rss; rss=$(tail -n 1 "$W/time.txt" | awk '{print $2}')
    local wall; wall=$(awk -v a="$t0" -v b="$t1" 'BEGIN { printf "%.4f", (b - a) / 1e9 }')
    printf '%s\t%s\t%s\t%s\t%s\n' "$case" "$n" "$prog" "$wall" "$rss" >> "$runs"
    printf '  %-9s %8s s  %8.1f MiB   (/usr/bin/time: %s)\n' "$prog" "$wall" "$(awk -v k="$rss" 'BEGIN{print k/1024}')" "$(tail -n 1 "$W/time.txt")"
}

echo "per-position rows: retidose assess --format $rows"
echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'); $("$bin" --version 2>/dev/null || echo retidose); $("$PYTHON" -c 'import numpy, sys; print(f"numpy {numpy.__version__}, python {sys.version.split()[0]}")')"
echo "work folder: $W; load average at start: $(cut -d' ' -f1-3 /proc/loadavg)"

for j in "${jobs[@]}"; do
    kind="${j% *}"; n="${j#* }"
    shelves=$((n / 1000)); racks=10
    d="$W/n$n-$kind"; mkdir -p "$d"
    helper room "$racks" "$shelves" 100 > "$d/room.toml"
    reps="${REPS:-$([ "$n" -ge 10000000 ] && echo 3 || echo 5)}"
    echo
    case "$kind" in
    check)
        for v in dark leak bright-leak rushton; do
            echo "== check, varied room '$v': retidose against numpy, outputs only"
            helper varied "$v" > "$d/$v.toml"
            helper varied "$v" small > "$d/$v-small.toml"
            "$bin" assess "$d/$v-small.toml" --format json > "$d/$v-small.json" || [ $? -eq 1 ]
            helper params "$d/$v.toml" "$d/$v-small.json" "$repo/src/data/pigments.toml" > "$d/$v.json"
            rm -f "$d/$v-retidose.csv"
            "$bin" assess "$d/$v.toml" --format "$rows" -o "$d/$v-retidose.csv" || [ $? -eq 1 ]
            "$PYTHON" "$here/room_numpy.py" "$d/$v.json" "$d/$v-numpy.csv" 2> "$W/np.err" \
                || { cat "$W/np.err" >&2; die "room_numpy.py failed"; }
            helper compare "$d/$v-retidose.csv" "$d/$v-numpy.csv" || echo "  COMPARISON FAILED"
        done
        continue
        ;;
    both)
        echo "== $n positions: retidose and numpy, $reps runs each, alternating"
        # The per-lux factors from a one-position-per-rack copy of the same room.
        helper room "$racks" 1 1 > "$d/small.toml"
        "$bin" assess "$d/small.toml" --format json > "$d/small.json" || [ $? -eq 1 ]
        helper params "$d/room.toml" "$d/small.json" "$repo/src/data/pigments.toml" > "$d/params.json"
        # One untimed run of each first (page cache, file system).
        rm -f "$d/retidose.csv"; "$bin" assess "$d/room.toml" --format "$rows" -o "$d/retidose.csv" || [ $? -eq 1 ]
        "$PYTHON" "$here/room_numpy.py" "$d/params.json" "$d/numpy.csv" 2> "$W/np.err" \
            || { cat "$W/np.err" >&2; die "room_numpy.py failed"; }
        for _ in $(seq "$reps"); do
            rm -f "$d/retidose.csv" "$d/numpy.csv"
            timed room "$n" retidose "$bin" assess "$d/room.toml" --format "$rows" -o "$d/retidose.csv"
            timed room "$n" numpy "$PYTHON" "$here/room_numpy.py" "$d/params.json" "$d/numpy.csv"
        done
        echo "  numpy side: $(tail -n 1 "$W/stderr.txt")"
        echo "-- outputs compared, retidose (a) against numpy (b):"
        helper compare "$d/retidose.csv" "$d/numpy.csv" || echo "  COMPARISON FAILED"
        ;;
    retidose)
        echo "== $n positions: retidose alone, CSV streamed to a file, $reps runs"
        for _ in $(seq "$reps"); do
            rm -f "$d/retidose.csv"
            timed room "$n" retidose "$bin" assess "$d/room.toml" --format "$rows" -o "$d/retidose.csv"
        done
        echo "  CSV: $(wc -l < "$d/retidose.csv") lines, $(du -h "$d/retidose.csv" | cut -f1)"
        ;;
    readings)
        echo "== $n positions with a reading at each, beside the luminaire model: $reps runs each"
        helper readings "$racks" "$shelves" "$d/readings.csv"
        helper room "$racks" "$shelves" 100 readings.csv > "$d/readings.toml"
        helper room "$racks" "$shelves" 100 readings.csv one-scale > "$d/calibrated.toml"
        "$bin" assess "$d/readings.toml" --format "$rows" > /dev/null || [ $? -eq 1 ]
        # With the 10⁵-row CSV written, and with the terminal summary only (--format table), which
        # separates reading and matching the file from formatting every row.
        for _ in $(seq "$reps"); do
            rm -f "$d/a.csv" "$d/b.csv" "$d/c.csv"
            timed "rows, no readings" "$n" retidose "$bin" assess "$d/room.toml" --format "$rows" -o "$d/a.csv"
            timed "rows, readings" "$n" retidose "$bin" assess "$d/readings.toml" --format "$rows" -o "$d/b.csv"
            timed "rows, one-scale fit" "$n" retidose "$bin" assess "$d/calibrated.toml" --format "$rows" -o "$d/c.csv"
            timed "table, no readings" "$n" retidose "$bin" assess "$d/room.toml" --format table
            timed "table, readings" "$n" retidose "$bin" assess "$d/readings.toml" --format table
            timed "table, one-scale fit" "$n" retidose "$bin" assess "$d/calibrated.toml" --format table
        done
        ;;
    esac
    [ -n "${KEEP:-}" ] || rm -f "$d"/*.csv.tmp "$d/retidose.csv" "$d/numpy.csv" "$d/a.csv" "$d/b.csv" "$d/c.csv"
done

if [ -s "$runs" ]; then
    echo
    echo "== medians (wall, whole process) and peak RSS (largest of the runs); load average now: $(cut -d' ' -f1-3 /proc/loadavg)"
    helper table "$runs"
fi
