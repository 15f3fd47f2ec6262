//! Speed of room surveys (run with `cargo bench --bench survey`): a room of albino mice on racks
//! under four ceiling luminaires, 12 h : 12 h for 7 days with a nightly 10-minute red-safelight
//! check; 10⁵ and 10⁶ cage positions. The scenario is resolved once, in the setup, as `assess`
//! does; the benchmark runs the plan (per-lux spectral figures once per rack), the per-rack
//! summaries and levers on every core, and streams every row once (as the CSV and JSON do).

use retidose::assess::{assess, parse_scenario_file};
use retidose::housing::summary::stream;

fn main() {
    divan::main();
}

/// A room scenario with `racks` racks of `shelves` × 100 columns.
pub fn room(racks: usize, shelves: usize) -> String {
    let mut t = String::from(
        r#"[scenario]
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
[[room.event]]
name = "check"
spectrum = "red-safelight-led"
lux = "5 lx"
start = "6 h"
duration = "10 min"
"#,
    );
    for (x, y) in [(2.0, 1.0), (6.0, 1.0), (2.0, 3.0), (6.0, 3.0)] {
        t.push_str(&format!(
            "[[room.luminaire]]\nx = \"{x} m\"\ny = \"{y} m\"\nz = \"2.8 m\"\nintensity = \"900 cd\"\n"
        ));
    }
    for r in 0..racks {
        t.push_str(&format!(
            "[[room.rack]]\nid = \"R{r}\"\nshelves = {shelves}\ncolumns = 100\nfirst_column_x = \"0.2 m\"\ncolumn_spacing = \
             \"0.08 m\"\nrack_y = \"{} m\"\nbottom_shelf = \"0.2 m\"\nshelf_spacing = \"0.002 m\"\ncage_transmittance = \"0.8\"\n\
             shelf_shading = \"0.999\"\n",
            0.5 + 0.3 * r as f64
        ));
    }
    t
}

fn survey(bencher: divan::Bencher, racks: usize, shelves: usize, rows: bool) {
    let s = parse_scenario_file(&room(racks, shelves), "bench.toml", None).unwrap();
    bencher.bench(|| {
        if !rows {
            return assess(divan::black_box(&s)).unwrap().room.unwrap().flagged;
        }
        let a = assess(divan::black_box(&s)).unwrap();
        let room = a.room.unwrap();
        let mut n = 0usize;
        stream(&room.rows.0, |rows| -> Result<(), ()> {
            n += rows.iter().filter(|r| r.flags.any()).count();
            Ok(())
        })
        .unwrap();
        n
    });
}

/// The assessment alone: per-rack summaries, flags and levers over every position.
#[divan::bench(sample_count = 20)]
fn survey_100_000_positions(bencher: divan::Bencher) {
    survey(bencher, 10, 100, false);
}

/// As above, 10⁶ positions.
#[divan::bench(sample_count = 10)]
fn survey_1_000_000_positions(bencher: divan::Bencher) {
    survey(bencher, 10, 1000, false);
}

/// The assessment and every row streamed once (what the CSV and JSON reports do).
#[divan::bench(sample_count = 10)]
fn survey_and_rows_1_000_000_positions(bencher: divan::Bencher) {
    survey(bencher, 10, 1000, true);
}
