//! Fuzzing on stable Rust, run by `cargo test` (issue: "Any input: a clear error, no crash, no
//! hang, nothing lost").
//!
//! Every shipped text (the demo scenarios that `retidose assess --example` prints, the lamp and
//! spectrum files in sources/, the eye models, the pigment table, the limit sets, weightings and
//! guidance sets) is mutated by a seeded xorshift64* generator and fed to the library's parsers
//! and to the full assessment. Each mutant is one to four stacked edits: a number made extreme, a
//! unit dropped or swapped, lines deleted, duplicated, swapped or repeated, random bytes or
//! unicode inserted, the text truncated, a table duplicated, a key changed to a near miss, an enum
//! word (species, pupil rule, phase, model, set name, file name) replaced, a value's TOML type
//! changed, lines spliced in from another seed. Mutants a parser accepts join the pool, so later
//! mutants build on inputs that got past the first checks (a crude stand-in for coverage).
//!
//! For every case:
//! - no panic: each case runs inside `catch_unwind`; a panic prints the input, writes it
//!   (shrunk line by line while it still panics at the same place) to
//!   `tests/fuzz-regressions/<target>-<n>.txt`, and fails the test;
//! - a time bound: a case slower than [`CASE_LIMIT`] is saved the same way and fails. A hang
//!   cannot be caught and its thread cannot be stopped, so a watchdog (the test's own thread)
//!   saves the input and ends the test process with a message when a case runs past
//!   [`HANG_LIMIT`]. The slowest case per target is printed and written to
//!   `target/tmp/fuzz-slowest/<target>.txt`;
//! - a clear error: a rejected input's message names the file it came from (the origin given to
//!   the parser);
//! - bounded memory, coarsely: the allocator cannot be watched portably, so the watchdog reads
//!   the process's resident set (`VmRSS` in /proc/self/status, Linux only) five times a second
//!   and ends the process, saving the inputs then running, when it passes
//!   [`PEAK_RSS_LIMIT_KIB`]; and each target's test ends by asserting that the peak (`VmHWM`)
//!   stayed under it. The figure is for the whole test process (other tests running beside these
//!   included), and an allocation that fails outright aborts the process rather than failing a
//!   test: this catches runaway growth, not every large allocation. With
//!   `RETIDOSE_FUZZ_TRACE=FILE` each input is written to FILE before it runs, so after an abort
//!   or a stack overflow FILE holds the input that caused it.
//!
//! The full assessment is the slowest target: its cases are `parse_scenario_file` mutants, and
//! the ones that parse (about a fifth) go on through `assess`. The retina and bleaching
//! scenarios likewise go on through the retina chain and the bleaching model when they parse,
//! lamp and spectrum files through photometry.
//!
//! `RETIDOSE_FUZZ_CASES` sets the cases per target (default [`DEFAULT_CASES`]) and
//! `RETIDOSE_FUZZ_SEED` the generator's seed (default [`DEFAULT_SEED`], so CI runs are
//! reproducible); for a longer local run:
//! `RETIDOSE_FUZZ_CASES=100000 cargo test --test it fuzz -- --nocapture`.
//!
//! Every file in tests/fuzz-regressions/ is re-run by [`regressions_replay`]. An input that still
//! crashes library code is listed in [`KNOWN_CRASHES`] with the reason and a [`Guard`] that
//! tells such inputs (a panic by its message, a hang or a slow case by what the input holds): the
//! fuzzer counts them without failing (a known hang's inputs are not run), the replay skips the
//! file, and its own `#[ignore]`d test re-runs it until the library is fixed (then drop the entry
//! and the `#[ignore]`). Errors that do not name the file are listed likewise in
//! [`KNOWN_UNCLEAR`].

use crate::rng::Rng;
use std::cell::{Cell, RefCell};
use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::io::Write as _;
use std::panic::{self, AssertUnwindSafe};
use std::path::{Path, PathBuf};
use std::sync::mpsc;
use std::sync::{Mutex, Once, OnceLock};
use std::time::{Duration, Instant};

use retidose::assess::{DEMOS, assess, parse_scenario_file};
use retidose::housing::guidance::parse_guidance;
use retidose::limits::{parse_set, parse_weighting};
use retidose::pigment::kinetics::parse_pigments;
use retidose::retina::eye::Eye;
use retidose::retina::report::assess_retina;
use retidose::scenario::bleach::parse_bleach_scenario;
use retidose::scenario::retina::parse_scenario;
use retidose::spectrum::photometry::photopic;
use retidose::spectrum::reader::read_spectrum;
use retidose::spectrum::source::parse_lamp;

/// Cases per target in a CI run.
const DEFAULT_CASES: usize = 10_000;
/// The generator's default seed.
const DEFAULT_SEED: u64 = 0x5EED_F022_2026_0001;
/// The slowest one case may be (parse and, where it parses, the assessment).
const CASE_LIMIT: Duration = Duration::from_secs(2);
/// A case still running after this is taken as a hang by the watchdog.
const HANG_LIMIT: Duration = Duration::from_secs(20);
/// Peak resident set of the test process, KiB (2 GiB).
const PEAK_RSS_LIMIT_KIB: u64 = 2 * 1024 * 1024;
/// Accepted mutants kept per target to mutate further (the seeds are always kept).
const POOL_LIMIT: usize = 256;
/// Mutants longer than this are not kept in the pool (they may still run once).
const POOL_TEXT_LIMIT: usize = 256 * 1024;

/// An input that still crashes library code, and how the fuzzer knows it again: it counts
/// such inputs without failing, the replay skips `file`, and an `#[ignore]`d test re-runs it.
struct Known {
    /// The regression file, in tests/fuzz-regressions/.
    file: &'static str,
    /// The target it crashes.
    target: &'static str,
    /// How the fuzzer tells it.
    guard: Guard,
    /// Why it is not fixed here.
    reason: &'static str,
}

/// How the fuzzer tells a known crash.
#[allow(dead_code, reason = "the panic and the hang found so far are fixed; kept for the next find")]
enum Guard {
    /// A panic whose message and location contain this text.
    Panic(&'static str),
    /// A hang cannot be caught once it runs: true for the inputs that would reach it, which are
    /// not run.
    Hang(fn(&str) -> bool),
    /// Slow but bounded: the inputs for which this is true may take up to [`SLOW_ALLOWANCE`].
    Slow(fn(&str) -> bool),
}

/// The time a known slow (bounded) input may take.
const SLOW_ALLOWANCE: Duration = Duration::from_secs(10);

/// Crashes found in library code and not yet fixed (each has an `#[ignore]`d test below). None
/// today: lamp-1 (grid overflow), weighting-1 (unbounded formula) and assess-1 (a survey at the
/// old 10⁶-position cap, now over the 10⁵ cap and refused at once) are fixed and replayed.
const KNOWN_CRASHES: &[Known] = &[];

/// Errors known not to name the file they came from: the fuzzer counts them without failing.
struct KnownUnclear {
    /// The target.
    target: &'static str,
    /// A part of the message.
    message: &'static str,
    /// Where it comes from.
    reason: &'static str,
}

/// Errors found without the file's name, not yet fixed.
const KNOWN_UNCLEAR: &[KnownUnclear] = &[];

// ---------------------------------------------------------------------------------------------
// The generator.

/// Sampling for the mutator, on the shared generator.
impl Rng {
    /// Uniform in 0..n (n > 0).
    fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n as u64) as usize
    }

    /// True with probability 1/n.
    fn one_in(&mut self, n: usize) -> bool {
        self.below(n) == 0
    }

    fn pick_ref<'a, T>(&mut self, xs: &'a [T]) -> &'a T {
        &xs[self.below(xs.len())]
    }

    fn word(&mut self, xs: &[&'static str]) -> &'static str {
        xs[self.below(xs.len())]
    }
}

// ---------------------------------------------------------------------------------------------
// Seeds: the shipped texts, read at build time relative to this file.

const LAMPS: [(&str, &str); 7] = [
    ("cool-white-led.toml", include_str!("../../sources/cool-white-led.toml")),
    ("halogen-3000k.toml", include_str!("../../sources/halogen-3000k.toml")),
    ("neutral-white-led.toml", include_str!("../../sources/neutral-white-led.toml")),
    ("stimulus-460-led.toml", include_str!("../../sources/stimulus-460-led.toml")),
    ("uva-365-led.toml", include_str!("../../sources/uva-365-led.toml")),
    ("warm-white-led.toml", include_str!("../../sources/warm-white-led.toml")),
    ("red-safelight-led.csv", include_str!("../../sources/red-safelight-led.csv")),
];
const D65_CSV: &str = include_str!("../../src/data/cie_d65.csv");
const EYES: [(&str, &str); 3] = [
    ("human.toml", include_str!("../../src/data/eyes/human.toml")),
    ("mouse.toml", include_str!("../../src/data/eyes/mouse.toml")),
    ("rat.toml", include_str!("../../src/data/eyes/rat.toml")),
];
const PIGMENTS: &str = include_str!("../../src/data/pigments.toml");
const LIMIT_SETS: [&str; 5] = [
    include_str!("../../limits/directive_2006_25_ec.toml"),
    include_str!("../../limits/icnirp_1997_visible_ir.toml"),
    include_str!("../../limits/icnirp_2004_uv.toml"),
    include_str!("../../limits/icnirp_2013_visible_ir.toml"),
    include_str!("../../limits/iec62471_2006.toml"),
];
const WEIGHTINGS: [&str; 5] = [
    include_str!("../../limits/weightings/a.toml"),
    include_str!("../../limits/weightings/b.toml"),
    include_str!("../../limits/weightings/r_1997.toml"),
    include_str!("../../limits/weightings/r_2013.toml"),
    include_str!("../../limits/weightings/s_uv.toml"),
];
const GUIDANCE: [&str; 2] = [
    include_str!("../../limits/guidance/brown_2022.toml"),
    include_str!("../../limits/guidance/nrc_guide_2011.toml"),
];

/// A transmittance file and a survey measurement file for the scenarios to refer to.
const FILTER_CSV: &str =
    "# name: fuzz filter\nwavelength_nm,transmittance\n380,0.1\n480,0.5\n580,0.8\n780,0.9\n";
/// Survey readings for the vivarium demo's 5 × 4 rack.
fn measurements_csv() -> String {
    let mut t = String::from("rack,shelf,column,lux,dark_lux\n");
    for shelf in 1..=5 {
        for column in 1..=4 {
            let _ = writeln!(t, "A,{shelf},{column},{},{}", 40 * shelf + 10 * column, 0.1 * f64::from(shelf));
        }
    }
    t
}

/// The bleaching-scenario examples of src/scenario/bleach.rs and its tests, and a human one.
const BLEACH_SEEDS: [&str; 3] = [
    r#"receptor = "mouse-rod"        # human-rod, human-cone, mouse-rod, rat-rod
model = "rate-limited"        # or rushton (default rate-limited)
repeat = 7                    # the steps, 7 times over
[parameters]                  # optional overrides, units in values
tau0 = "600 s"
[subject]                     # needed for steps with a source (as in a retina scenario)
species = "mouse"
pupil = "dark"
[[step]]
name = "light"
duration = "12 h"
source = { spectrum = "warm-white-led", illuminance = "300 lx", full_field = true }
[[step]]
name = "dark"
duration = "12 h"
level = "0 R*/rod/s"
"#,
    r#"receptor = "human-rod"
model = "rushton"
start_bleached = 0.2
[parameters]
tau0 = "400 s"
v = "0.085 /min"
[subject]
species = "human"
age = "28 y"
pupil = "7 mm"
[[step]]
name = "bleach"
duration = "60 s"
source = { spectrum = "cie:D65", luminance = "5000 cd/m2", subtense = "20 deg" }
[[step]]
name = "dark"
duration = "40 min"
level = "0 scot td"
"#,
    r#"receptor = "human-cone"
[[step]]
duration = "2 min"
level = "20000 phot td"
[[step]]
duration = "10 min"
level = "0 phot td"
"#,
];

/// The `[subject]`, `[[source]]` and `[[filter]]` tables of a scenario: a retina scenario.
fn retina_part(scenario: &str) -> String {
    let mut out = String::new();
    let mut keep = false;
    for line in scenario.lines() {
        let t = line.trim_start();
        if t.starts_with('[') {
            keep =
                matches!(t.split('#').next().unwrap_or("").trim(), "[subject]" | "[[source]]" | "[[filter]]");
        }
        if keep {
            out.push_str(line);
            out.push('\n');
        }
    }
    out
}

fn demo(name: &str) -> &'static str {
    DEMOS.iter().find(|d| d.0 == name).expect("a demo of that name").1
}

/// The demos, and variants of them that read files next to the scenario (a lamp table, a
/// transmittance file, a user eye model, survey measurements).
fn scenario_seeds() -> Vec<String> {
    let mut v: Vec<String> = DEMOS.iter().map(|d| d.1.to_string()).collect();
    let viv = demo("vivarium");
    v.push(
        viv.replace("spectrum = \"warm-white-led\"", "spectrum = \"red-safelight-led.csv\"")
            .replacen("\ntransmittance = \"0.8\"", "\nfile = \"filter.csv\"", 1)
            .replace("pupil = \"light\"", "pupil = \"light\"\neye_file = \"mouse.toml\""),
    );
    v.push(viv.replace(
        "leak = \"0.3 lx\"",
        "leak = \"0.3 lx\"\nreadings = \"measurements.csv\"\ncalibrate = \"per-luminaire\"",
    ));
    v.push(
        demo("stimulus-review")
            .replace("spectrum = \"stimulus-460-led\"", "spectrum = \"lamp.toml\"")
            .replace("classify = true", "classify = true\ngeneral_lighting = true\nsources = [\"stimulus\"]"),
    );
    v
}

/// The temporary folder given as the base of relative file names, with the files the seeds
/// refer to. One per test process.
fn base_dir() -> &'static Path {
    static DIR: OnceLock<PathBuf> = OnceLock::new();
    DIR.get_or_init(|| {
        let d = std::env::temp_dir().join(format!("retidose-fuzz-{}", std::process::id()));
        std::fs::create_dir_all(&d).expect("temp folder");
        for (name, text) in LAMPS.iter().chain(EYES.iter()) {
            std::fs::write(d.join(name), text).expect("seed file");
        }
        let lamp =
            "name = \"tabled\"\ntitle = \"t\"\nprovenance = \"p\"\ntable = \"red-safelight-led.csv\"\n";
        for (name, text) in [
            ("filter.csv", FILTER_CSV),
            ("measurements.csv", &measurements_csv()),
            ("lamp.toml", lamp),
            ("pigments.toml", PIGMENTS),
        ] {
            std::fs::write(d.join(name), text).expect("seed file");
        }
        d
    })
}

// ---------------------------------------------------------------------------------------------
// Targets.

/// How far one input got.
enum Reached {
    /// Rejected, with the error's display text.
    Rejected(String),
    /// Accepted by the parser; for targets with a stage after the parser, whether that stage
    /// accepted it too (`Some(Err(message))` when it returned an error).
    Parsed(Option<Result<(), String>>),
}

struct Target {
    name: &'static str,
    /// The origin given to the parser; every error must name it.
    origin: &'static str,
    seeds: fn() -> Vec<String>,
    run: fn(&str, &Path) -> Reached,
}

fn rejected(e: impl std::fmt::Display) -> Reached {
    Reached::Rejected(e.to_string())
}

/// The stage after the parser. `assess` names the scenario file in its errors itself; the retina
/// chain and the bleaching model take no file name, so their errors are given it here as the
/// CLI does (for them the check is that the message is not empty).
fn parsed_then<T>(r: retidose::Result<T>) -> Option<Result<(), String>> {
    Some(r.map(|_| ()).map_err(|e| e.to_string()))
}

static TARGETS: [Target; 10] = [
    Target {
        name: "assess",
        origin: "fuzz-scenario.toml",
        seeds: scenario_seeds,
        run: |t, dir| match parse_scenario_file(t, "fuzz-scenario.toml", Some(dir)) {
            Ok(s) => Reached::Parsed(parsed_then(assess(&s))),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "retina-scenario",
        origin: "fuzz-retina.toml",
        seeds: || scenario_seeds().iter().map(|s| retina_part(s)).collect(),
        run: |t, dir| match parse_scenario(t, "fuzz-retina.toml", Some(dir)) {
            Ok(s) if s.sources.is_empty() => Reached::Parsed(None),
            Ok(s) => Reached::Parsed(parsed_then(
                assess_retina(&s).map_err(|e| e.in_file("fuzz-retina.toml", None)),
            )),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "bleach-scenario",
        origin: "fuzz-bleach.toml",
        seeds: || BLEACH_SEEDS.iter().map(|s| s.to_string()).collect(),
        run: |t, dir| match parse_bleach_scenario(t, "fuzz-bleach.toml", Some(dir)) {
            Ok(s) => {
                let r =
                    retidose::pigment::bleach::assess(&s.pigment, s.model, &s.schedule, s.start, Some(200));
                Reached::Parsed(parsed_then(r.map_err(|e| e.in_file("fuzz-bleach.toml", None))))
            }
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "lamp",
        origin: "fuzz-lamp.toml",
        seeds: || {
            let mut v: Vec<String> =
                LAMPS.iter().filter(|l| l.0.ends_with(".toml")).map(|l| l.1.to_string()).collect();
            v.push(
                "name = \"tabled\"\ntitle = \"t\"\nprovenance = \"p\"\ntable = \"red-safelight-led.csv\"\n"
                    .into(),
            );
            v
        },
        run: |t, dir| match parse_lamp(t, "fuzz-lamp.toml", Some(dir), None) {
            Ok(s) => {
                let _ = photopic(&s);
                Reached::Parsed(None)
            }
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "spectrum",
        origin: "fuzz-spectrum.csv",
        seeds: || vec![LAMPS[6].1.to_string(), D65_CSV.to_string(), FILTER_CSV.to_string()],
        run: |t, _| match read_spectrum(t, "fuzz-spectrum.csv", None, None) {
            Ok(s) => {
                let _ = photopic(&s);
                Reached::Parsed(None)
            }
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "eye",
        origin: "fuzz-eye.toml",
        seeds: || EYES.iter().map(|e| e.1.to_string()).collect(),
        run: |t, _| match Eye::from_toml(t, "fuzz-eye.toml") {
            Ok(_) => Reached::Parsed(None),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "pigments",
        origin: "fuzz-pigments.toml",
        seeds: || vec![PIGMENTS.to_string()],
        run: |t, _| match parse_pigments(t, "fuzz-pigments.toml") {
            Ok(_) => Reached::Parsed(None),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "limit-set",
        origin: "fuzz-limits.toml",
        seeds: || LIMIT_SETS.iter().map(|s| s.to_string()).collect(),
        run: |t, _| match parse_set(t, "fuzz-limits.toml") {
            Ok(_) => Reached::Parsed(None),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "weighting",
        origin: "fuzz-weighting.toml",
        seeds: || WEIGHTINGS.iter().map(|s| s.to_string()).collect(),
        run: |t, _| match parse_weighting(t, "fuzz-weighting.toml") {
            Ok(_) => Reached::Parsed(None),
            Err(e) => rejected(e),
        },
    },
    Target {
        name: "guidance",
        origin: "fuzz-guidance.toml",
        seeds: || GUIDANCE.iter().map(|s| s.to_string()).collect(),
        run: |t, _| match parse_guidance(t, "fuzz-guidance.toml") {
            Ok(_) => Reached::Parsed(None),
            Err(e) => rejected(e),
        },
    },
];

fn target(name: &str) -> &'static Target {
    TARGETS.iter().find(|t| t.name == name).unwrap_or_else(|| panic!("no fuzz target '{name}'"))
}

// ---------------------------------------------------------------------------------------------
// The mutator.

const EXTREMES: &[&str] = &[
    "0",
    "-1",
    "1e308",
    "-1e308",
    "inf",
    "-inf",
    "nan",
    "9223372036854775807",
    "-9223372036854775808",
    "18446744073709551616",
    "1e-308",
    "5e-324",
    "2.5",
    "-0",
    "0.0",
    "1e999",
    "4294967296",
    "65536",
    "1e15",
    "1e9",
    "1e-9",
    "0.999999999",
    "1.000000001",
    "100000",
    "3000",
    "180",
    "1",
    "0x10",
    "1_000",
    "+1",
];

const UNITS: &[&str] = &[
    "m",
    "mm",
    "nm",
    "µm",
    "um",
    "kg",
    "s",
    "ms",
    "min",
    "h",
    "d",
    "y",
    "lx",
    "cd",
    "cd/m2",
    "cd/m²",
    "W/m2",
    "W/m²",
    "mW/cm2",
    "µW/cm²",
    "W/m2/sr",
    "W/sr",
    "W",
    "lm",
    "K",
    "deg",
    "°",
    "rad",
    "mrad",
    "sr",
    "td",
    "scot td",
    "phot td",
    "td s",
    "R*/rod/s",
    "/min",
    "/s",
    "/s2",
    "%",
    "J/m2",
    "photons/cm2/s",
    "log",
    "nm nm",
    "m m",
];

const WORDS: &[&str] = &[
    // species, pigmentation, pupil rules
    "human",
    "mouse",
    "rat",
    "cat",
    "Mouse",
    "albino",
    "pigmented",
    "dark",
    "light",
    "dilated",
    "watson-yellott",
    "de-groot-gebhard",
    "moon-spencer",
    "dark-adapted",
    "light-adapted",
    "2 mm",
    "0 mm",
    "-1 mm",
    "1e308 mm",
    "nan mm",
    "inf mm",
    "1e-308 mm",
    // phases, models, receptors
    "day",
    "evening",
    "night",
    "noon",
    "rate-limited",
    "rushton",
    "human-rod",
    "human-cone",
    "mouse-rod",
    "rat-rod",
    "mouse-cone",
    "led",
    "blackbody",
    // geometry, emission, quantities, forms
    "at-eye",
    "extended",
    "intensity",
    "flux",
    "isotropic",
    "lambertian",
    "illuminance",
    "irradiance",
    "radiance",
    "radiant-intensity",
    "luminance",
    "constant",
    "dose",
    "decade-exponential",
    "power",
    "log-linear",
    "linear",
    "cubic",
    "quantal",
    "shape",
    "rate",
    "watts",
    "mrad",
    "rad",
    "none",
    "cut-off",
    "van-de-kraats-2007",
    "all",
    "confirmed",
    "derived",
    "from memory",
    "common practice, no source",
    "S_UV",
    "B",
    "R",
    "A",
    // sets, lamps, generators, files
    "iec62471-2006",
    "directive-2006-25-ec",
    "icnirp-1997-visible-ir",
    "icnirp-2004-uv",
    "icnirp-2013-visible-ir",
    "nrc-guide-2011",
    "brown-2022",
    "warm-white-led",
    "cool-white-led",
    "neutral-white-led",
    "halogen-3000k",
    "stimulus-460-led",
    "uva-365-led",
    "red-safelight-led",
    "cie:A",
    "cie:D65",
    "blackbody:3000K",
    "blackbody:0K",
    "blackbody:1e308K",
    "blackbody:1e-308K",
    "led:450nm:20nm",
    "led:0nm:0nm",
    "led:450nm:1e-308nm",
    "led:1e308nm:20nm",
    "red-safelight-led.csv",
    "filter.csv",
    "measurements.csv",
    "mouse.toml",
    "human.toml",
    "lamp.toml",
    "warm-white-led.toml",
    "pigments.toml",
    "missing.csv",
    ".",
    "",
    " ",
    // levels, ranges, durations
    "scot td",
    "phot td",
    "R*/rod/s",
    "measured",
    "300–1100 nm",
    "1100–300 nm",
    "0-0 nm",
    "0 s",
    "1e-308 s",
    "1e308 s",
    "-1 s",
    "12 h",
    "100 y",
];

const TOML_VALUES: &[&str] = &[
    "1",
    "-1",
    "true",
    "[]",
    "{}",
    "1e308",
    "nan",
    "[\"a\"]",
    "{ value = \"1\" }",
    "\"\"",
    "'''x'''",
    "1979-05-27",
    "[[]]",
    "\"\\u0000\"",
];

const ODD_CHARS: &[char] = &[
    '\0',
    'é',
    'µ',
    '°',
    '–',
    '²',
    '\u{FEFF}',
    '\u{202E}',
    '\u{1D518}',
    '\u{10FFFF}',
    'Ω',
    '\r',
    '\t',
    '"',
    '\'',
    '[',
    ']',
    '{',
    '}',
    '=',
    '#',
    '\\',
    ',',
    '\n',
    '.',
    ' ',
];

/// A char boundary at or before `i`.
fn boundary(s: &str, mut i: usize) -> usize {
    i = i.min(s.len());
    while !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

fn random_pos(rng: &mut Rng, s: &str) -> usize {
    boundary(s, rng.below(s.len() + 1))
}

/// Byte spans of the numbers in `s` (not those glued to a word, as in `r_1997` or `cd/m2`).
fn number_spans(s: &str) -> Vec<(usize, usize)> {
    let b = s.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < b.len() {
        let starts = b[i].is_ascii_digit()
            || (matches!(b[i], b'-' | b'+' | b'.') && b.get(i + 1).is_some_and(u8::is_ascii_digit));
        let glued = i > 0 && (b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'_');
        if starts && !glued {
            let start = i;
            i += 1;
            while i < b.len() {
                if b[i].is_ascii_digit() || b[i] == b'.' || b[i] == b'_' {
                    i += 1;
                } else if matches!(b[i], b'e' | b'E')
                    && b.get(i + 1).is_some_and(|d| d.is_ascii_digit() || *d == b'-' || *d == b'+')
                {
                    i += 2;
                } else {
                    break;
                }
            }
            out.push((start, i));
        } else {
            i += 1;
        }
    }
    out
}

/// Byte spans of the contents of the one-line double-quoted strings in `s`.
fn quoted_spans(s: &str) -> Vec<(usize, usize)> {
    let b = s.as_bytes();
    let mut out = Vec::new();
    let mut open: Option<usize> = None;
    for (i, &c) in b.iter().enumerate() {
        match (c, open) {
            (b'\n', _) => open = None,
            (b'"', None) => open = Some(i + 1),
            (b'"', Some(o)) if i == 0 || b[i - 1] != b'\\' => {
                out.push((o, i));
                open = None;
            }
            _ => {}
        }
    }
    out
}

/// Byte spans of bare keys (`key =`, also inside inline tables).
fn key_spans(s: &str) -> Vec<(usize, usize)> {
    let b = s.as_bytes();
    let mut out = Vec::new();
    for (i, &c) in b.iter().enumerate() {
        if c != b'=' || b.get(i + 1) == Some(&b'=') || (i > 0 && b[i - 1] == b'=') {
            continue;
        }
        let mut end = i;
        while end > 0 && b[end - 1] == b' ' {
            end -= 1;
        }
        let mut start = end;
        while start > 0 && (b[start - 1].is_ascii_alphanumeric() || matches!(b[start - 1], b'_' | b'-')) {
            start -= 1;
        }
        if start < end {
            out.push((start, end));
        }
    }
    out
}

/// Byte ranges of the lines of `s`, each with its newline.
fn line_spans(s: &str) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut start = 0;
    for (i, c) in s.char_indices() {
        if c == '\n' {
            out.push((start, i + 1));
            start = i + 1;
        }
    }
    if start < s.len() {
        out.push((start, s.len()));
    }
    out
}

fn replace_span(s: &str, (a, b): (usize, usize), with: &str) -> String {
    let mut out = String::with_capacity(s.len() + with.len());
    out.push_str(&s[..a]);
    out.push_str(with);
    out.push_str(&s[b..]);
    out
}

fn insert_at(s: &str, at: usize, what: &str) -> String {
    replace_span(s, (at, at), what)
}

/// A key changed to a near miss.
fn near_miss(rng: &mut Rng, key: &str, others: &[&str]) -> String {
    let chars: Vec<char> = key.chars().collect();
    let i = rng.below(chars.len().max(1));
    match rng.below(9) {
        0 => chars.iter().enumerate().filter(|(j, _)| *j != i).map(|(_, c)| c).collect(),
        1 => {
            let mut c = chars.clone();
            c.insert(i, chars[i]);
            c.into_iter().collect()
        }
        2 if chars.len() > 1 => {
            let mut c = chars.clone();
            let j = (i + 1) % c.len();
            c.swap(i, j);
            c.into_iter().collect()
        }
        3 => key.replace('_', "-").replace("--", "_"),
        4 => key.to_uppercase(),
        5 => format!("{key}s"),
        6 => key.strip_suffix('s').unwrap_or("").to_string(),
        7 if !others.is_empty() => rng.pick_ref(others).to_string(),
        _ => format!("{key}_nm"),
    }
}

/// One edit; its name goes to `ops`.
fn mutate_once(rng: &mut Rng, s: &str, donors: &[String], ops: &mut Vec<&'static str>) -> String {
    let lines = line_spans(s);
    match rng.below(20) {
        0..=3 => {
            let spans = number_spans(s);
            if spans.is_empty() {
                ops.push("number(none)");
                return insert_at(s, random_pos(rng, s), rng.word(EXTREMES));
            }
            let sp = *rng.pick_ref(&spans);
            ops.push("number");
            let with = if rng.one_in(4) {
                let v = f64::from_bits(rng.next_u64());
                if v.is_finite() { format!("{v}") } else { format!("{}", rng.below(2000)) }
            } else {
                rng.pick_ref(EXTREMES).to_string()
            };
            replace_span(s, sp, &with)
        }
        4 | 5 => {
            let spans = number_spans(s);
            if spans.is_empty() {
                ops.push("unit(none)");
                return s.to_string();
            }
            let (a, b) = *rng.pick_ref(&spans);
            let rest = &s[b..];
            let unit_len = if rest.starts_with(' ') {
                rest.find(['"', '\n']).unwrap_or(rest.len())
            } else {
                rest.find(|c: char| c == '"' || c == '\n' || c == ',' || c.is_whitespace())
                    .unwrap_or(rest.len())
            };
            match rng.below(4) {
                0 => {
                    ops.push("unit-drop");
                    replace_span(s, (b, b + unit_len), "")
                }
                1 => {
                    ops.push("unit-swap");
                    replace_span(s, (b, b + unit_len), &format!(" {}", rng.pick_ref(UNITS)))
                }
                2 => {
                    ops.push("unit-glue");
                    if rest.starts_with(' ') { replace_span(s, (b, b + 1), "") } else { s.to_string() }
                }
                _ => {
                    ops.push("unit-without-number");
                    replace_span(s, (a, b), "")
                }
            }
        }
        6 | 7 => {
            if lines.is_empty() {
                ops.push("line(none)");
                return s.to_string();
            }
            let l = *rng.pick_ref(&lines);
            match rng.below(5) {
                0 | 1 => {
                    ops.push("line-delete");
                    replace_span(s, l, "")
                }
                2 => {
                    ops.push("line-duplicate");
                    let mut line = s[l.0..l.1].to_string();
                    if !line.ends_with('\n') {
                        line.push('\n');
                    }
                    insert_at(s, l.0, &line)
                }
                3 => {
                    ops.push("line-swap");
                    let m = *rng.pick_ref(&lines);
                    let (first, second) = if l.0 <= m.0 { (l, m) } else { (m, l) };
                    if first == second {
                        return s.to_string();
                    }
                    let mut out = String::with_capacity(s.len() + 1);
                    out.push_str(&s[..first.0]);
                    out.push_str(s[second.0..second.1].trim_end_matches('\n'));
                    out.push('\n');
                    out.push_str(&s[first.1..second.0]);
                    out.push_str(&s[first.0..first.1]);
                    out.push_str(&s[second.1..]);
                    out
                }
                _ => {
                    ops.push("line-repeat");
                    let mut line = s[l.0..l.1].to_string();
                    if !line.ends_with('\n') {
                        line.push('\n');
                    }
                    insert_at(s, l.0, &line.repeat(2 + rng.below(200)))
                }
            }
        }
        8 | 9 => {
            let at = random_pos(rng, s);
            let ins: String = match rng.below(4) {
                0 => {
                    ops.push("insert-ascii");
                    char::from(rng.below(128) as u8).to_string()
                }
                1 => {
                    ops.push("insert-odd");
                    rng.pick_ref(ODD_CHARS).to_string()
                }
                2 => {
                    ops.push("insert-unicode");
                    char::from_u32(rng.below(0x11_0000) as u32).unwrap_or('\u{FFFD}').to_string()
                }
                _ => {
                    ops.push("insert-bytes");
                    (0..1 + rng.below(16))
                        .map(|_| char::from_u32(rng.below(0x800) as u32).unwrap_or('?'))
                        .collect()
                }
            };
            insert_at(s, at, &ins)
        }
        10 => {
            let a = random_pos(rng, s);
            let b = boundary(s, a + 1 + rng.below(64));
            if rng.one_in(3) {
                ops.push("truncate");
                s[..a].to_string()
            } else {
                ops.push("delete-range");
                replace_span(s, (a, b.max(a)), "")
            }
        }
        11 => {
            let heads: Vec<usize> = (0..lines.len())
                .filter(|&i| s[lines[i].0..lines[i].1].trim_start().starts_with('['))
                .collect();
            if heads.is_empty() {
                ops.push("table(none)");
                return s.to_string();
            }
            let h = *rng.pick_ref(&heads);
            let end = heads.iter().copied().find(|&j| j > h).map_or(s.len(), |j| lines[j].0);
            let mut block = s[lines[h].0..end].to_string();
            if !block.ends_with('\n') {
                block.push('\n');
            }
            if rng.one_in(2) {
                ops.push("table-duplicate");
                insert_at(s, end, &block)
            } else {
                ops.push("table-delete");
                replace_span(s, (lines[h].0, end), "")
            }
        }
        12 | 13 => {
            let spans = key_spans(s);
            if spans.is_empty() {
                ops.push("key(none)");
                return s.to_string();
            }
            let sp = *rng.pick_ref(&spans);
            let others: Vec<&str> = spans.iter().map(|&(a, b)| &s[a..b]).collect();
            ops.push("key-near-miss");
            let key = near_miss(rng, &s[sp.0..sp.1], &others);
            replace_span(s, sp, &key)
        }
        14 | 15 => {
            let spans = quoted_spans(s);
            if spans.is_empty() {
                ops.push("word(none)");
                return s.to_string();
            }
            let sp = *rng.pick_ref(&spans);
            let old = &s[sp.0..sp.1];
            let with = match rng.below(6) {
                0 => old.to_uppercase(),
                1 => format!(" {old} "),
                2 => old.replace('-', "–"),
                _ => rng.pick_ref(WORDS).to_string(),
            };
            ops.push("enum-word");
            replace_span(s, sp, &with)
        }
        16 => {
            let spans = quoted_spans(s);
            ops.push("value-type");
            if spans.is_empty() || rng.one_in(3) {
                let nums = number_spans(s);
                if nums.is_empty() {
                    return s.to_string();
                }
                let sp = *rng.pick_ref(&nums);
                return replace_span(s, sp, rng.word(TOML_VALUES));
            }
            let (a, b) = *rng.pick_ref(&spans);
            replace_span(s, (a - 1, b + 1), rng.word(TOML_VALUES))
        }
        17 => {
            let donor = rng.pick_ref(donors);
            let dl = line_spans(donor);
            if dl.is_empty() {
                ops.push("splice(none)");
                return s.to_string();
            }
            let i = rng.below(dl.len());
            let j = (i + 1 + rng.below(10)).min(dl.len());
            let mut chunk = donor[dl[i].0..dl[j - 1].1].to_string();
            if !chunk.ends_with('\n') {
                chunk.push('\n');
            }
            let at = if lines.is_empty() { 0 } else { rng.pick_ref(&lines).0 };
            ops.push("splice");
            insert_at(s, at, &chunk)
        }
        18 => {
            let sep = *rng.pick_ref(&[";", "\t", " ", ",,", ", ", "", "\u{3001}"]);
            if rng.one_in(2) || lines.is_empty() {
                ops.push("separator-all");
                s.replace(',', sep)
            } else {
                ops.push("separator-line");
                let l = *rng.pick_ref(&lines);
                replace_span(s, l, &s[l.0..l.1].replace(',', sep))
            }
        }
        _ => match rng.below(6) {
            0 => {
                ops.push("nesting");
                let depth = 1 + rng.below(3000);
                let open = if rng.one_in(2) { "[".repeat(depth) } else { "{a=".repeat(depth) };
                insert_at(s, lines.first().map_or(0, |l| l.0), &format!("deep = {open}\n"))
            }
            1 => {
                ops.push("text-repeat");
                s.repeat(2 + rng.below(4))
            }
            2 => {
                ops.push("comment-toggle");
                let Some(&l) = (!lines.is_empty()).then(|| rng.pick_ref(&lines)) else {
                    return s.to_string();
                };
                let line = &s[l.0..l.1];
                match line.trim_start().strip_prefix('#') {
                    Some(rest) => replace_span(s, l, rest.trim_start()),
                    None => insert_at(s, l.0, "# "),
                }
            }
            3 => {
                ops.push("array-element");
                let commas: Vec<usize> = s.match_indices(',').map(|(i, _)| i).collect();
                if commas.len() < 2 {
                    return s.to_string();
                }
                let i = rng.below(commas.len() - 1);
                let (a, b) = (commas[i], commas[i + 1]);
                if s[a..b].contains('\n') {
                    return s.to_string();
                }
                if rng.one_in(2) { replace_span(s, (a, b), "") } else { insert_at(s, b, &s[a..b]) }
            }
            4 => {
                ops.push("empty");
                if rng.one_in(2) { String::new() } else { " \n".repeat(rng.below(4)) }
            }
            _ => {
                ops.push("crlf");
                s.replace('\n', if rng.one_in(2) { "\r\n" } else { "\r" })
            }
        },
    }
}

/// One to four stacked edits of `s`.
fn mutate(rng: &mut Rng, s: &str, donors: &[String], ops: &mut Vec<&'static str>) -> String {
    let n = 1 + rng.below(4);
    let mut out = s.to_string();
    for _ in 0..n {
        out = mutate_once(rng, &out, donors, ops);
        if out.len() > 4 * 1024 * 1024 {
            out.truncate(boundary(&out, 4 * 1024 * 1024));
        }
    }
    out
}

// ---------------------------------------------------------------------------------------------
// Running a case: panics caught with their location, time measured.

thread_local! {
    /// Set while a fuzz case runs on this thread: the panic hook records instead of printing.
    static QUIET: Cell<bool> = const { Cell::new(false) };
    /// The last panic on this thread while quiet: message and location.
    static LAST_PANIC: RefCell<Option<String>> = const { RefCell::new(None) };
}

fn payload_text(p: &(dyn std::any::Any + Send)) -> String {
    p.downcast_ref::<&str>()
        .map(|s| (*s).to_string())
        .or_else(|| p.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "(non-string panic payload)".to_string())
}

/// Chains a hook in front of the one installed (once per process): on fuzz threads it records
/// the panic's message and location; elsewhere it hands over to the previous hook unchanged.
fn install_hook() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        let previous = panic::take_hook();
        panic::set_hook(Box::new(move |info| {
            if QUIET.with(Cell::get) {
                let at =
                    info.location().map_or_else(|| "an unknown location".to_string(), ToString::to_string);
                let text = format!("{} (at {at})", payload_text(info.payload()));
                LAST_PANIC.with(|p| *p.borrow_mut() = Some(text));
            } else {
                previous(info);
            }
        }));
    });
}

enum Outcome {
    Reached(Reached),
    Panicked(String),
}

fn run_case(t: &Target, text: &str) -> (Outcome, Duration) {
    install_hook();
    let dir = base_dir();
    QUIET.with(|q| q.set(true));
    LAST_PANIC.with(|p| p.borrow_mut().take());
    let start = Instant::now();
    let r = panic::catch_unwind(AssertUnwindSafe(|| (t.run)(text, dir)));
    let took = start.elapsed();
    QUIET.with(|q| q.set(false));
    let outcome = match r {
        Ok(reached) => Outcome::Reached(reached),
        Err(payload) => Outcome::Panicked(
            LAST_PANIC.with(|p| p.borrow_mut().take()).unwrap_or_else(|| payload_text(&*payload)),
        ),
    };
    (outcome, took)
}

/// Where the panic happened (`file:line:col`), to tell crashes apart.
fn panic_site(message: &str) -> &str {
    message.rsplit_once("(at ").map_or(message, |(_, at)| at.trim_end_matches(')'))
}

fn regression_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fuzz-regressions")
}

/// Writes `input` as the next `<target>-<n>.txt` (or finds the identical file already there).
fn save_regression(target: &str, input: &str) -> PathBuf {
    let dir = regression_dir();
    std::fs::create_dir_all(&dir).expect("tests/fuzz-regressions");
    for n in 1.. {
        let p = dir.join(format!("{target}-{n}.txt"));
        match std::fs::read_to_string(&p) {
            Ok(old) if old == input => return p,
            Ok(_) => {}
            Err(_) => {
                std::fs::write(&p, input).expect("write the regression file");
                return p;
            }
        }
    }
    unreachable!()
}

/// Shrinks a panicking input by deleting runs of lines (halving the run down to one line) while
/// it still panics at the same site; at most 10 s.
fn shrink(t: &Target, input: &str, site: &str) -> String {
    let still = |s: &str| {
        if known_input(t.name, s, |g| matches!(g, Guard::Hang(_))).is_some() {
            return false;
        }
        running().insert(t.name, (Instant::now(), s.to_string()));
        matches!(run_case(t, s).0, Outcome::Panicked(m) if panic_site(&m) == site)
    };
    let deadline = Instant::now() + Duration::from_secs(10);
    let mut best = input.to_string();
    let mut chunk = line_spans(&best).len().div_ceil(2).max(1);
    while Instant::now() < deadline {
        let mut i = 0;
        let mut progressed = false;
        loop {
            let lines = line_spans(&best);
            if i >= lines.len() || Instant::now() >= deadline {
                break;
            }
            let j = (i + chunk).min(lines.len());
            let candidate = replace_span(&best, (lines[i].0, lines[j - 1].1), "");
            if still(&candidate) {
                best = candidate;
                progressed = true;
            } else {
                i += chunk;
            }
        }
        if !progressed {
            if chunk == 1 {
                break;
            }
            chunk /= 2;
        }
    }
    best
}

fn preview(s: &str) -> String {
    let cut = boundary(s, 3000);
    let more = if cut < s.len() { format!("… ({} more bytes)", s.len() - cut) } else { String::new() };
    format!("{}{more}", s[..cut].escape_debug())
}

fn known_crash(target: &str, message: &str) -> Option<&'static Known> {
    KNOWN_CRASHES
        .iter()
        .find(|k| k.target == target && matches!(k.guard, Guard::Panic(sig) if message.contains(sig)))
}

/// The known hang or slow case (as `kind` picks) that `input` of `target` reaches.
fn known_input(target: &str, input: &str, kind: fn(&Guard) -> bool) -> Option<&'static Known> {
    KNOWN_CRASHES.iter().find(|k| {
        k.target == target
            && kind(&k.guard)
            && match k.guard {
                Guard::Hang(f) | Guard::Slow(f) => f(input),
                Guard::Panic(_) => false,
            }
    })
}

/// A figure of /proc/self/status in KiB (`VmHWM:` the peak resident set, `VmRSS:` the current).
fn rss_kib(field: &str) -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with(field))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

fn env_number(name: &str, default: u64) -> u64 {
    match std::env::var(name) {
        Ok(v) => {
            let v = v.trim().replace('_', "");
            let parsed =
                if let Some(hex) = v.strip_prefix("0x") { u64::from_str_radix(hex, 16) } else { v.parse() };
            parsed.unwrap_or_else(|_| panic!("{name}={v} is not a whole number"))
        }
        Err(_) => default,
    }
}

// ---------------------------------------------------------------------------------------------
// The fuzz loop.

#[derive(Default)]
struct Stats {
    cases: usize,
    parsed: usize,
    deep_ok: usize,
    deep_err: usize,
    total: Duration,
    slowest: Duration,
    slowest_input: String,
    slowest_ops: Vec<&'static str>,
    /// Distinct failures (new panics, slow cases), each described with its saved file.
    failures: Vec<String>,
    /// Panic sites seen (each reported once).
    sites: Vec<String>,
    /// Known crashes hit, by regression file name.
    known: Vec<(&'static str, usize)>,
    /// Errors whose message does not name the file (a few examples).
    unclear: Vec<String>,
    unclear_count: usize,
    /// Known errors without the file's name, by message part.
    known_unclear: Vec<(&'static str, usize)>,
    /// Inputs of a known hang, not run.
    skipped: usize,
}

impl Stats {
    /// A rejected input's message must be non-empty and name the file.
    fn check_clear(&mut self, t: &Target, msg: &str, when: &str, input: &str) {
        if !msg.trim().is_empty() && msg.contains(t.origin) {
            return;
        }
        if let Some(k) = KNOWN_UNCLEAR.iter().find(|k| k.target == t.name && msg.contains(k.message)) {
            count_known(&mut self.known_unclear, k.message);
            return;
        }
        self.unclear_count += 1;
        if self.unclear.len() < 5 {
            self.unclear.push(format!("{msg:?}{when} for input \"{}\"", preview(input)));
        }
    }
}

fn fuzz_loop(t: &'static Target, cases: usize, seed: u64) -> Stats {
    let name_hash = t
        .name
        .bytes()
        .fold(0xcbf2_9ce4_8422_2325_u64, |h, b| (h ^ u64::from(b)).wrapping_mul(0x100_0000_01b3));
    let mut rng = Rng::seeded(seed ^ name_hash);
    let seeds = (t.seeds)();
    assert!(!seeds.is_empty(), "{}: no seeds", t.name);
    let mut pool: Vec<String> = Vec::new();
    let trace = std::env::var_os("RETIDOSE_FUZZ_TRACE").map(PathBuf::from);
    let mut st = Stats::default();
    let mut ops = Vec::new();
    for case in 0..cases {
        ops.clear();
        st.cases += 1;
        // The unmodified seeds first (each must run cleanly), then mutants of seeds and of
        // accepted mutants.
        let input = if case < seeds.len() {
            seeds[case].clone()
        } else {
            let base =
                if pool.is_empty() || rng.one_in(2) { rng.pick_ref(&seeds) } else { rng.pick_ref(&pool) };
            mutate(&mut rng, base, &seeds, &mut ops)
        };
        if let Some(path) = &trace {
            let mut f = std::fs::File::create(path).expect("RETIDOSE_FUZZ_TRACE file");
            writeln!(f, "# target {} case {case}", t.name)
                .and_then(|()| f.write_all(input.as_bytes()))
                .expect("trace");
        }
        if let Some(k) = known_input(t.name, &input, |g| matches!(g, Guard::Hang(_))) {
            count_known(&mut st.known, k.file);
            st.skipped += 1;
            continue;
        }
        running().insert(t.name, (Instant::now(), input.clone()));
        let (outcome, took) = run_case(t, &input);
        st.total += took;
        if took > st.slowest {
            st.slowest = took;
            st.slowest_input.clone_from(&input);
            st.slowest_ops.clone_from(&ops);
        }
        match outcome {
            Outcome::Reached(Reached::Rejected(msg)) => st.check_clear(t, &msg, "", &input),
            Outcome::Reached(Reached::Parsed(deep)) => {
                st.parsed += 1;
                match deep {
                    Some(Ok(())) => st.deep_ok += 1,
                    Some(Err(msg)) => {
                        st.deep_err += 1;
                        st.check_clear(t, &msg, " (after parsing)", &input);
                    }
                    None => {}
                }
                if input.len() <= POOL_TEXT_LIMIT && case >= seeds.len() {
                    if pool.len() < POOL_LIMIT {
                        pool.push(input.clone());
                    } else {
                        let i = rng.below(POOL_LIMIT);
                        pool[i].clone_from(&input);
                    }
                }
            }
            Outcome::Panicked(msg) => {
                if let Some(k) = known_crash(t.name, &msg) {
                    count_known(&mut st.known, k.file);
                    continue;
                }
                let site = panic_site(&msg).to_string();
                if st.sites.contains(&site) {
                    continue;
                }
                st.sites.push(site.clone());
                let small = shrink(t, &input, &site);
                let file = save_regression(t.name, &small);
                st.failures.push(format!(
                    "PANIC in target '{}' (case {case}, edits {ops:?}): {msg}\n  saved (shrunk from {} to {} bytes) as {}\n  \
                     input: \"{}\"",
                    t.name,
                    input.len(),
                    small.len(),
                    file.display(),
                    preview(&small)
                ));
            }
        }
        if took > CASE_LIMIT
            && let Some(k) = known_input(t.name, &input, |g| matches!(g, Guard::Slow(_)))
            && took <= SLOW_ALLOWANCE
        {
            count_known(&mut st.known, k.file);
        } else if took > CASE_LIMIT {
            let file = save_regression(t.name, &input);
            st.failures.push(format!(
                "SLOW case in target '{}' (case {case}, edits {ops:?}): {took:.2?} > {CASE_LIMIT:?}\n  saved as {}\n  \
                 input: \"{}\"",
                t.name,
                file.display(),
                preview(&input)
            ));
        }
    }
    running().remove(t.name);
    st
}

fn count_known(known: &mut Vec<(&'static str, usize)>, file: &'static str) {
    match known.iter_mut().find(|(f, _)| *f == file) {
        Some((_, n)) => *n += 1,
        None => known.push((file, 1)),
    }
}

/// The case each fuzz worker is running, by target: since when, and its input.
fn running() -> std::sync::MutexGuard<'static, BTreeMap<&'static str, (Instant, String)>> {
    static RUNNING: Mutex<BTreeMap<&'static str, (Instant, String)>> = Mutex::new(BTreeMap::new());
    RUNNING.lock().unwrap_or_else(std::sync::PoisonError::into_inner)
}

/// A hang or runaway memory cannot be caught, and the worker cannot be stopped: saves the
/// input of every case running for more than `older_than`, says so on the real standard error
/// (not the captured one) and ends the test process before it takes the machine's memory.
fn stop_the_run(why: &str, older_than: Duration) -> ! {
    let mut report = format!("fuzz: {why}\n");
    for (target, (since, input)) in running().iter() {
        if since.elapsed() >= older_than {
            let file = save_regression(target, input);
            let _ = writeln!(
                report,
                "  target '{target}', running for {:.1?}, saved as {}\n  input: \"{}\"",
                since.elapsed(),
                file.display(),
                preview(input)
            );
        }
    }
    let _ = std::io::stderr().write_all(report.as_bytes());
    std::process::exit(101)
}

/// Runs `cases` of target `name` on a worker thread with a watchdog, prints the figures
/// and fails on any panic, slow case, hang, unclear error or runaway memory.
fn fuzz_target(name: &str) {
    let t = target(name);
    let cases = env_number("RETIDOSE_FUZZ_CASES", DEFAULT_CASES as u64) as usize;
    let seed = env_number("RETIDOSE_FUZZ_SEED", DEFAULT_SEED);
    let (tx, rx) = mpsc::channel();
    let wall = Instant::now();
    std::thread::Builder::new()
        .name(format!("fuzz-{name}"))
        .spawn(move || {
            let _ = tx.send(fuzz_loop(t, cases, seed));
        })
        .expect("spawn the fuzz worker");
    let st = loop {
        match rx.recv_timeout(Duration::from_millis(200)) {
            Ok(st) => break st,
            Err(mpsc::RecvTimeoutError::Disconnected) => panic!("{name}: the fuzz worker died"),
            Err(mpsc::RecvTimeoutError::Timeout) => {
                let since = running().get(name).map(|c| c.0);
                if since.is_some_and(|s| s.elapsed() > HANG_LIMIT) {
                    stop_the_run(
                        &format!("HANG: a '{name}' case has run for more than {HANG_LIMIT:?}"),
                        HANG_LIMIT,
                    );
                }
                if let Some(k) = rss_kib("VmRSS:").filter(|k| *k > PEAK_RSS_LIMIT_KIB) {
                    stop_the_run(
                        &format!(
                            "MEMORY: the test process holds {k} KiB, over {PEAK_RSS_LIMIT_KIB} KiB; cases running for 0.5 s or more:"
                        ),
                        Duration::from_millis(500),
                    );
                }
            }
        }
    };
    let wall = wall.elapsed();
    let slow_dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("fuzz-slowest");
    let slow_file = slow_dir.join(format!("{name}.txt"));
    let _ = std::fs::create_dir_all(&slow_dir).and_then(|()| std::fs::write(&slow_file, &st.slowest_input));
    let rss = rss_kib("VmHWM:");
    let mut report = format!(
        "fuzz {name}: {} cases (seed {seed:#x}) in {wall:.2?} ({:.0} µs mean); {} parsed{}; slowest {:.1?} ({} bytes, \
         edits {:?}, in {}); peak RSS {}",
        st.cases,
        st.total.as_secs_f64() * 1e6 / st.cases.max(1) as f64,
        st.parsed,
        if st.deep_ok + st.deep_err > 0 {
            format!(", then {} assessed without error and {} rejected with an error", st.deep_ok, st.deep_err)
        } else {
            String::new()
        },
        st.slowest,
        st.slowest_input.len(),
        st.slowest_ops,
        slow_file.display(),
        rss.map_or_else(|| "unknown (no /proc)".to_string(), |k| format!("{:.0} MiB", k as f64 / 1024.0)),
    );
    if st.skipped > 0 {
        let _ = write!(report, "\n  {} inputs of a known hang not run", st.skipped);
    }
    for (file, n) in &st.known {
        let _ = write!(report, "\n  known crash {file} hit {n} times (see KNOWN_CRASHES)");
    }
    if !st.known_unclear.is_empty() {
        let parts: Vec<String> =
            st.known_unclear.iter().map(|(part, n)| format!("\"{part}…\" {n}×")).collect();
        let why = KNOWN_UNCLEAR.iter().find(|k| k.target == name).map_or("", |k| k.reason);
        let _ = write!(
            report,
            "\n  known errors without the file's name (KNOWN_UNCLEAR): {}; {why}",
            parts.join(", ")
        );
    }
    println!("{report}");
    for f in &st.failures {
        eprintln!("{f}");
    }
    assert!(
        st.failures.is_empty(),
        "{name}: {} failure(s), see above:\n{}",
        st.failures.len(),
        st.failures.join("\n")
    );
    assert!(
        st.unclear_count == 0,
        "{name}: {} errors do not name the file '{}', e.g.\n{}",
        st.unclear_count,
        t.origin,
        st.unclear.join("\n")
    );
    if let Some(k) = rss {
        assert!(k < PEAK_RSS_LIMIT_KIB, "{name}: peak RSS {k} KiB ≥ {PEAK_RSS_LIMIT_KIB} KiB");
    }
}

#[test]
fn fuzz_assess() {
    fuzz_target("assess");
}

#[test]
fn fuzz_retina_scenario() {
    fuzz_target("retina-scenario");
}

#[test]
fn fuzz_bleach_scenario() {
    fuzz_target("bleach-scenario");
}

#[test]
fn fuzz_lamp() {
    fuzz_target("lamp");
}

#[test]
fn fuzz_spectrum() {
    fuzz_target("spectrum");
}

#[test]
fn fuzz_eye() {
    fuzz_target("eye");
}

#[test]
fn fuzz_pigments() {
    fuzz_target("pigments");
}

#[test]
fn fuzz_limit_set() {
    fuzz_target("limit-set");
}

#[test]
fn fuzz_weighting() {
    fuzz_target("weighting");
}

#[test]
fn fuzz_guidance() {
    fuzz_target("guidance");
}

// ---------------------------------------------------------------------------------------------
// Regressions.

/// Re-runs one regression file: no panic, within the time bound.
fn replay(file: &Path) -> Result<(), String> {
    let fname = file.file_name().and_then(|f| f.to_str()).unwrap_or_default();
    let stem = fname.strip_suffix(".txt").ok_or_else(|| format!("{fname}: not a .txt file"))?;
    let tname =
        stem.rsplit_once('-').map(|(t, _)| t).ok_or_else(|| format!("{fname}: not <target>-<n>.txt"))?;
    let t =
        TARGETS.iter().find(|t| t.name == tname).ok_or_else(|| format!("{fname}: no target '{tname}'"))?;
    let input = std::fs::read_to_string(file).map_err(|e| format!("{fname}: {e}"))?;
    let (outcome, took) = run_case(t, &input);
    if let Outcome::Panicked(m) = outcome {
        return Err(format!("{fname}: still panics: {m}"));
    }
    if took > CASE_LIMIT {
        return Err(format!("{fname}: took {took:.2?} > {CASE_LIMIT:?}"));
    }
    Ok(())
}

/// [`replay`] on its own thread: a hang or runaway memory ends the test process with a message
/// (the thread cannot be stopped).
fn replay_in_time(file: &Path) -> Result<(), String> {
    let (tx, rx) = mpsc::channel();
    let owned = file.to_path_buf();
    std::thread::spawn(move || {
        let _ = tx.send(replay(&owned));
    });
    let start = Instant::now();
    loop {
        match rx.recv_timeout(Duration::from_millis(100)) {
            Ok(r) => return r,
            Err(mpsc::RecvTimeoutError::Disconnected) => {
                return Err(format!("{}: the replay died", file.display()));
            }
            Err(mpsc::RecvTimeoutError::Timeout) => {
                let rss = rss_kib("VmRSS:").unwrap_or(0);
                if start.elapsed() > HANG_LIMIT || rss > PEAK_RSS_LIMIT_KIB {
                    let msg = format!(
                        "fuzz regression {}: no answer after {:.1?}, the process holds {rss} KiB: a hang\n",
                        file.display(),
                        start.elapsed()
                    );
                    let _ = std::io::stderr().write_all(msg.as_bytes());
                    std::process::exit(101);
                }
            }
        }
    }
}

#[test]
fn regressions_replay() {
    let mut files: Vec<PathBuf> = std::fs::read_dir(regression_dir())
        .map(|d| d.filter_map(|e| e.ok().map(|e| e.path())).collect())
        .unwrap_or_default();
    files.retain(|p| p.extension().is_some_and(|e| e == "txt"));
    files.sort();
    let mut failures = Vec::new();
    let mut run = 0;
    for f in &files {
        let fname = f.file_name().and_then(|n| n.to_str()).unwrap_or_default();
        if KNOWN_CRASHES.iter().any(|k| k.file == fname) {
            continue;
        }
        run += 1;
        if let Err(e) = replay_in_time(f) {
            failures.push(e);
        }
    }
    println!("fuzz regressions: {run} replayed, {} known crashes skipped", files.len() - run);
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// Re-runs a known crash (see [`KNOWN_CRASHES`]) from its own `#[ignore]`d test.
#[allow(dead_code, reason = "called by the #[ignore]d test of each known crash; there is none today")]
fn replay_known(file: &str) {
    let k = KNOWN_CRASHES.iter().find(|k| k.file == file).expect("listed in KNOWN_CRASHES");
    if let Err(e) = replay_in_time(&regression_dir().join(file)) {
        panic!("{e}\nknown: {}", k.reason);
    }
}

/// Every known crash names a regression file that exists, gives the reason, and is told again
/// by its guard.
#[test]
fn fuzz_known_crashes_are_listed_with_files() {
    for k in KNOWN_CRASHES {
        let path = regression_dir().join(k.file);
        assert!(path.is_file(), "{} is listed but missing", k.file);
        assert!(!k.reason.is_empty(), "{}: give the reason", k.file);
        assert!(k.file.starts_with(k.target), "{}: named after target {}", k.file, k.target);
        let input = std::fs::read_to_string(&path).unwrap();
        match k.guard {
            Guard::Panic(sig) => assert!(!sig.is_empty(), "{}: give the panic's signature", k.file),
            Guard::Hang(f) | Guard::Slow(f) => {
                assert!(f(&input), "{}: its guard does not recognise it", k.file)
            }
        }
    }
}

#[test]
fn fuzz_seeds_are_accepted() {
    // The unmodified shipped texts parse (the mutants start from valid inputs).
    for t in &TARGETS {
        for (i, s) in (t.seeds)().iter().enumerate() {
            match run_case(t, s).0 {
                Outcome::Reached(Reached::Parsed(None | Some(Ok(())))) => {}
                Outcome::Reached(Reached::Parsed(Some(Err(e)))) => {
                    panic!("{} seed {i}: rejected after parsing: {e}", t.name)
                }
                Outcome::Reached(Reached::Rejected(e)) => panic!("{} seed {i}: rejected: {e}", t.name),
                Outcome::Panicked(m) => panic!("{} seed {i}: panicked: {m}", t.name),
            }
        }
    }
}

#[test]
fn fuzz_generator_is_reproducible() {
    let (mut a, mut b) = (Rng::seeded(7), Rng::seeded(7));
    let mut ops = Vec::new();
    let seeds = scenario_seeds();
    for _ in 0..200 {
        assert_eq!(mutate(&mut a, &seeds[0], &seeds, &mut ops), mutate(&mut b, &seeds[0], &seeds, &mut ops));
    }
}
