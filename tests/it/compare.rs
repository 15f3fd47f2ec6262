//! `retidose compare`: a variant identical to the base gives identical columns, ranking by
//! margin, the table's figures, rooms side by side, and bad input naming the file.

use crate::completeness::num4;
use std::path::PathBuf;

use assert_cmd::Command;
use retidose::assess::{assess, demo, parse_scenario_file};
use retidose::compare::compare;
use serde_json::Value;

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

/// A folder of this test's own (the tests of the binary run in parallel).
fn folder(test: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-compare-{}-{test}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn write(dir: &std::path::Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    crate::files::write(&p, text);
    p.display().to_string()
}

fn stimulus() -> &'static str {
    demo("stimulus-review").unwrap()
}

/// The stimulus-review demo with its LED at half the luminous intensity.
fn half_stimulus() -> String {
    let full = stimulus();
    assert!(full.contains("luminous_intensity = \"2 cd\""), "the demo's LED is 2 cd");
    full.replace("luminous_intensity = \"2 cd\"", "luminous_intensity = \"1 cd\"")
}

fn json(args: &[&str]) -> (Value, i32) {
    let out = retidose().arg("compare").args(args).args(["--format", "json"]).output().unwrap();
    let code = out.status.code().unwrap();
    assert!(code == 0 || code == 1, "{}", String::from_utf8_lossy(&out.stderr));
    (serde_json::from_slice(&out.stdout).unwrap(), code)
}

#[test]
fn a_variant_identical_to_the_base_gives_identical_columns() {
    let dir = folder("identical");
    let base = write(&dir, "base.toml", stimulus());
    let same = write(&dir, "same.toml", stimulus());
    let (doc, code) = json(&[&base, &same]);
    assert_eq!(code, 1, "the demo LED exceeds the IEC 62471 blue-light limit over 8 h");
    let c = &doc["comparison"];
    let mut cols: Vec<Value> = c["columns"].as_array().unwrap().clone();
    assert_eq!(cols.len(), 2);
    assert_eq!(cols[0]["label"], Value::String(base.clone()), "a tie keeps the input order");
    for col in &mut cols {
        let o = col.as_object_mut().unwrap();
        o.remove("label");
        o.remove("input");
    }
    assert_eq!(cols[0], cols[1]);
    for section in ["hazards", "groups"] {
        let rows = c[section].as_array().unwrap();
        assert!(!rows.is_empty(), "{section}");
        for r in rows {
            let cells = r["cells"].as_array().unwrap();
            assert!(!cells[0].is_null(), "{section} {}", r["key"]);
            assert_eq!(cells[0], cells[1], "{section} {}", r["key"]);
        }
    }
}

#[test]
fn columns_are_ranked_by_margin_and_half_the_light_halves_every_ratio() {
    let full = parse_scenario_file(stimulus(), "full", None).unwrap();
    let half_text = half_stimulus();
    let half = parse_scenario_file(&half_text, "half", None).unwrap();
    let (a_full, a_half) = (assess(&full).unwrap(), assess(&half).unwrap());
    let c = compare(&[("full", &a_full), ("half", &a_half)]);
    let labels: Vec<&str> = c.columns.iter().map(|x| x.label.as_str()).collect();
    assert_eq!(labels, ["half", "full"], "the weaker lamp has the larger margin");
    // Every hazard here is a radiance or irradiance dose or rate at a fixed 8 h against a limit
    // that does not depend on the exposure: halving the intensity halves the radiance and the
    // irradiance at the eye, so each ratio halves and the margin (1 / worst ratio) doubles.
    let mut compared = 0;
    for row in &c.hazards {
        let ratio = |i: usize| row.cells[i].as_ref().and_then(|x| x.ratio);
        if let (Some(rh), Some(rf)) = (ratio(0), ratio(1)) {
            assert!((rh - rf / 2.0).abs() <= 1e-9 * rf, "{}: {rh} vs {rf}/2", row.key);
            compared += 1;
        }
    }
    assert!(compared >= 8, "{compared} hazards compared");
    let (mh, mf) = (c.columns[0].margin.unwrap(), c.columns[1].margin.unwrap());
    assert!((mh - 2.0 * mf).abs() <= 1e-9 * mh, "{mh} vs 2 × {mf}");
    // The full-strength LED exceeds the blue-light limit (ratio 1.060, margin 0.9435); at half
    // strength it is within it (0.5300, margin 1.887).
    assert!(mf < 1.0 && mh > 1.0);
    assert!(c.columns[1].limit_exceeded && !c.columns[0].limit_exceeded);
    let w = c.columns[1].worst.as_ref().unwrap();
    assert!(w.hazard.starts_with("retinal blue light (photochemical)"), "{}", w.hazard);
}

#[test]
fn the_table_lists_each_scenarios_risk_group_and_worst_hazard() {
    let dir = folder("table");
    let full = write(&dir, "full.toml", stimulus());
    let half = write(&dir, "half.toml", &half_stimulus());
    let out = retidose().args(["compare", &full, &half]).env("COLUMNS", "100").output().unwrap();
    assert_eq!(out.status.code(), Some(1), "the full-strength LED exceeds a limit");
    let text = String::from_utf8(out.stdout).unwrap();
    for l in text.lines() {
        assert!(l.chars().count() <= 100, "{l}");
    }
    let row = |name: &str| -> Vec<String> {
        let l = text
            .lines()
            .find(|l| l.starts_with(&format!("│ {name}")))
            .unwrap_or_else(|| panic!("{name}: {text}"));
        l.split('│').map(|c| c.trim().to_string()).filter(|c| !c.is_empty()).collect()
    };
    assert_eq!(row("risk group  "), ["risk group", "Exempt", "RG1"]);
    // The hazard's name is wrapped to the column's width: its first line.
    let binding = row("binding hazard");
    assert_eq!(binding.len(), 3, "{binding:?}");
    assert!(binding[1..].iter().all(|c| c.starts_with("retinal blue")), "{binding:?}");
    assert_eq!(row("worst ratio"), ["worst ratio to limit", "0.5300", "1.060"]);
    assert_eq!(row("margin"), ["margin (factor to the limit)", "1.887", "0.9435"]);
    assert_eq!(row("t_max"), ["t_max (binding hazard)", "never reached", "2 h 47 min"]);
    assert!(text.contains("E_thr: stimulus (iec62471-2006) (lx)"), "{text}");

    let csv = retidose().args(["compare", &full, &half, "--format", "csv"]).output().unwrap();
    let csv = String::from_utf8(csv.stdout).unwrap();
    assert!(csv.starts_with("scenario,figure,value,unit\n"));
    assert!(csv.contains(&format!("{half},outcome,\"within limits, no flag\",\n")), "{csv}");
    assert!(csv.contains(&format!("{full},risk group,RG1,\n")), "{csv}");
    assert!(csv.contains(&format!("{half},risk group,Exempt,\n")), "{csv}");
}

#[test]
fn the_vivarium_compared_with_itself_shows_the_rooms_figures() {
    let dir = folder("vivarium");
    write(&dir, "room.toml", demo("vivarium").unwrap());
    let variants = write(
        &dir,
        "variants.toml",
        "[[variant]]\nname = \"as built\"\nfile = \"room.toml\"\n\n[[variant]]\nname = \"copy\"\nfile = \"room.toml\"\n",
    );
    let (doc, code) = json(&["--variants", &variants]);
    assert_eq!(code, 1, "the vivarium raises guidance flags");
    let c = &doc["comparison"];
    let labels: Vec<&str> =
        c["columns"].as_array().unwrap().iter().map(|x| x["label"].as_str().unwrap()).collect();
    assert_eq!(labels, ["as built", "copy"]);
    let racks = c["racks"].as_array().unwrap();
    assert!(!racks.is_empty());
    for r in racks {
        let cells = r["cells"].as_array().unwrap();
        assert!(cells[0]["positions"].as_u64().unwrap() > 0);
        assert_eq!(cells[0], cells[1], "{}", r["key"]);
    }
    let text = retidose().args(["compare", "--variants", &variants]).output().unwrap().stdout;
    let text = String::from_utf8(text).unwrap();
    for figure in ["rack A: positions", "rack A: in range", "rack A: lever factor", "peak bleached (%)"] {
        assert!(text.contains(figure), "{figure}: {text}");
    }
}

#[test]
fn bad_input_names_the_file() {
    let dir = folder("bad");
    let base = write(&dir, "base.toml", stimulus());
    let missing = dir.join("nowhere.toml").display().to_string();
    let out = retidose().args(["compare", &base, &missing]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("nowhere.toml"), "{err}");

    let variants = write(
        &dir,
        "variants.toml",
        "[[variant]]\nname = \"base\"\nfile = \"base.toml\"\n\n[[variant]]\nname = \"gone\"\nfile = \"gone.toml\"\n",
    );
    let out = retidose().args(["compare", "--variants", &variants]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("gone.toml"), "{err}");

    let unknown =
        write(&dir, "unknown.toml", "[[variant]]\nname = \"a\"\nfile = \"base.toml\"\npath = \"x\"\n");
    let out = retidose().args(["compare", "--variants", &unknown]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("unknown.toml") && err.contains("path"), "{err}");

    let out = retidose().args(["compare", &base]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "one scenario is nothing to compare");
}

// ---- Variants inside a scenario file ([[variant]] patches, src/scenario/variant.rs) ----

use retidose::assess::Assessment;
use retidose::scenario::variant::{Variant, parse_with_variants};

/// The base and the variants of `text`, each assessed, labelled by the base's name and the
/// variants' names.
fn assessed(text: &str) -> Vec<(String, Assessment)> {
    let (base, variants) = parse_with_variants(text, "v.toml", None).unwrap_or_else(|e| panic!("{e}"));
    let mut out = vec![(base.name.clone(), assess(&base).unwrap())];
    for Variant { name, scenario } in variants {
        out.push((name, assess(&scenario).unwrap()));
    }
    out
}

/// The ratio of the hazard `key` in the assessment, if it has one.
fn ratio_of(a: &Assessment, key: &str) -> Option<f64> {
    a.limits.iter().flat_map(|l| l.hazards.iter().map(move |h| (l, h))).find_map(|(l, h)| {
        (format!("{}/{}/{}", l.source, l.set_id, h.id) == key).then_some(h.ratio).flatten()
    })
}

/// Every (key, ratio, quantity unit) of an assessment's hazards with a ratio.
fn ratios(a: &Assessment) -> Vec<(String, f64, &'static str)> {
    let mut out = Vec::new();
    for l in &a.limits {
        for h in &l.hazards {
            if let Some(r) = h.ratio {
                out.push((format!("{}/{}/{}", l.source, l.set_id, h.id), r, h.quantity_unit));
            }
        }
    }
    out
}

#[test]
fn a_variant_with_an_empty_patch_gives_a_column_identical_to_the_base() {
    let text = format!("{}\n[[variant]]\nname = \"unchanged\"\n", stimulus());
    let all = assessed(&text);
    assert_eq!(all.len(), 2);
    let items: Vec<(&str, &Assessment)> = all.iter().map(|(l, a)| (l.as_str(), a)).collect();
    let c = compare(&items);
    let mut cols: Vec<Value> = c.columns.iter().map(|x| serde_json::to_value(x).unwrap()).collect();
    assert_eq!(cols[0]["label"], "stimulus-review", "a tie keeps the input order: the base first");
    for col in &mut cols {
        let o = col.as_object_mut().unwrap();
        o.remove("label");
        o.remove("input");
    }
    assert_eq!(cols[0], cols[1]);
    assert!(!c.hazards.is_empty());
    for row in &c.hazards {
        assert_eq!(row.cells[0], row.cells[1], "{}", row.key);
    }
    for row in &c.groups {
        assert_eq!(row.cells[0], row.cells[1], "{}", row.key);
    }
}

#[test]
fn a_variant_scaling_the_only_source_by_half_halves_every_ratio_and_ranks_first() {
    let text = format!(
        "{}\n[[variant]]\nname = \"half\"\n[[variant.source]]\nid = \"stimulus\"\nscale = 0.5\n",
        stimulus()
    );
    let all = assessed(&text);
    let (base, half) = (&all[0].1, &all[1].1);
    // Each ratio is exposure ÷ limit at a fixed 8 h; the exposure (radiance or irradiance at
    // the eye) is linear in the source's luminous intensity and the limit does not depend on it,
    // so scaling the level by 0.5 scales every ratio by 0.5 (IEC 62471:2006 §4.3, ratios of
    // weighted sums).
    let mut compared = 0;
    for (key, r, _) in ratios(base) {
        let h = ratio_of(half, &key).unwrap_or_else(|| panic!("{key} missing in the variant"));
        assert!((h - r / 2.0).abs() <= 1e-9 * r, "{key}: {h} vs {r}/2");
        compared += 1;
    }
    assert!(compared >= 8, "{compared}");
    let c = compare(&[("base", base), ("half", half)]);
    assert_eq!(c.columns[0].label, "half", "the halved lamp has twice the margin and ranks first");
    let (mh, mb) = (c.columns[0].margin.unwrap(), c.columns[1].margin.unwrap());
    assert!((mh - 2.0 * mb).abs() <= 1e-9 * mh, "{mh} vs 2 × {mb}");
}

#[test]
fn a_variant_moving_a_small_source_from_d_to_2d_quarters_every_irradiance_ratio() {
    // A point source (no size): the irradiance at the eye is E = I / d² (inverse-square law), so
    // at 2d it is E / 4 and each irradiance hazard's ratio (E_weighted ÷ a limit that depends
    // only on the duration) is a quarter. Radiance hazards need the source's size: not assessed.
    let text = r#"
[scenario]
name = "point"
title = "a 2 cd stimulus LED with no stated size (invented)"
[subject]
species = "human"
pupil = "3 mm"
[[source]]
id = "led"
spectrum = "stimulus-460-led"
luminous_intensity = "2 cd"
distance = "200 mm"
[limits]
sets = ["iec62471-2006"]
duration = "8 h"

[[variant]]
name = "at twice the distance"
[[variant.source]]
id = "led"
distance = "400 mm"
"#;
    let all = assessed(text);
    let (near, far) = (&all[0].1, &all[1].1);
    let mut compared = 0;
    for (key, r, unit) in ratios(near) {
        assert_eq!(unit, "W/m²", "{key}: only irradiance hazards are assessed for a point source");
        let f = ratio_of(far, &key).unwrap();
        assert!((f - r / 4.0).abs() <= 1e-9 * r, "{key}: {f} vs {r}/4");
        compared += 1;
    }
    assert!(compared >= 3, "{compared}");
}

/// A scenario with a flat filter and one source, for the patches below.
fn filtered() -> String {
    format!("{}\n[[filter]]\nname = \"grey\"\ntransmittance = \"0.5\"\n", stimulus())
}

#[test]
fn patches_match_entries_by_id_or_name_and_add_and_remove_them() {
    let text = format!(
        "{}\n{}",
        filtered(),
        r#"
[[variant]]
name = "no filter"
[[variant.filter]]
name = "grey"
remove = true

[[variant]]
name = "darker filter"
[[variant.filter]]
name = "grey"
transmittance = "0.1"

[[variant]]
name = "and a diffuser"
[[variant.filter]]
name = "diffuser"
add = true
transmittance = "0.25"

[[variant]]
name = "a second lamp"
[[variant.source]]
id = "twin"
add = true
spectrum = "stimulus-460-led"
luminous_intensity = "2 cd"
distance = "200 mm"
size = "5 mm"
"#
    );
    let (base, variants) = parse_with_variants(&text, "v.toml", None).unwrap();
    let names: Vec<&str> = variants.iter().map(|v| v.name.as_str()).collect();
    assert_eq!(names, ["no filter", "darker filter", "and a diffuser", "a second lamp"]);
    assert_eq!(variants[3].scenario.source_ids, ["stimulus", "twin"]);
    let a = assess(&base).unwrap();
    // A flat filter multiplies the spectral irradiance at the eye by its transmittance at every
    // wavelength, so each ratio scales by the ratio of the transmittances:
    // none 1 / 0.5 = 2, 0.1 / 0.5 = 0.2, 0.5 × 0.25 / 0.5 = 0.25.
    for (v, factor) in variants.iter().take(3).zip([2.0, 0.2, 0.25]) {
        let b = assess(&v.scenario).unwrap();
        for (key, r, _) in ratios(&a) {
            let got = ratio_of(&b, &key).unwrap();
            assert!(
                (got - r * factor).abs() <= 1e-9 * r * factor,
                "{}: {key}: {got} vs {r} × {factor}",
                v.name
            );
        }
    }
    let twin = assess(&variants[3].scenario).unwrap();
    for (key, r, _) in ratios(&a) {
        let other = key.replacen("stimulus/", "twin/", 1);
        assert_eq!(ratio_of(&twin, &other), Some(r), "the added lamp is the same lamp: {other}");
    }
}

#[test]
fn bad_variants_name_the_file_the_variant_the_key_and_its_line() {
    let base = filtered();
    let first = base.lines().count() + 2; // the line of the first [[variant]]
    let cases: [(&str, &str, usize, &[&str]); 9] = [
        (
            "[[variant]]\nname = \"a\"\n[variant.sourc]\nid = \"x\"\n",
            "variant[0].sourc",
            2,
            &["variant 'a'", "unknown section", "`source`"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant.source]]\nid = \"stimulu\"\ndistance = \"1 m\"\n",
            "variant[0].source[0].id",
            3,
            &["variant 'a'", "no source with id 'stimulu'", "'stimulus'", "add = true"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant.source]]\nid = \"stimulus\"\ndistanse = \"1 m\"\n",
            "variant[0].source[0].distanse",
            4,
            &["variant 'a'", "unknown field `distanse`", "did you mean `distance`?"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant.source]]\nid = \"stimulus\"\ndistance = \"1\"\n",
            "variant[0].source[0].distance",
            4,
            &["variant 'a'", "no unit"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant.filter]]\nname = \"gray\"\nremove = true\n",
            "variant[0].filter[0].name",
            3,
            &["variant 'a'", "no filter with name 'gray'", "'grey'"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant.source]]\nid = \"stimulus\"\nscale = -1\n",
            "variant[0].source[0].scale",
            4,
            &["variant 'a'", "above 0"],
        ),
        (
            "[[variant]]\nname = \"a\"\n[[variant]]\nname = \"a\"\n",
            "variant[1].name",
            3,
            &["'a'", "names must differ"],
        ),
        ("[[variant]]\n[variant.subject]\nage = \"30 y\"\n", "variant[0]", 0, &["no name"]),
        (
            "[[variant]]\nname = \"a\"\n[[variant.filter]]\nname = \"new\"\nadd = true\ntransmitance = \"0.5\"\n",
            "variant[0].filter[0].transmitance",
            5,
            &["variant 'a'", "did you mean `transmittance`?"],
        ),
    ];
    for (patch, key, offset, words) in cases {
        let text = format!("{base}\n{patch}");
        let e = parse_with_variants(&text, "v.toml", None).unwrap_err();
        let loc = e.location().unwrap_or_else(|| panic!("{e}"));
        assert_eq!(loc.file.as_deref(), Some("v.toml"), "{e}");
        assert_eq!(loc.key.as_deref(), Some(key), "{e}");
        assert_eq!(loc.line, Some(first + offset), "{e}\n{text}");
        for w in words {
            assert!(e.to_string().contains(w), "{w} missing: {e}");
        }
    }
}

#[test]
fn compare_expands_a_file_with_variants_and_assess_takes_its_base() {
    let dir = folder("expand");
    let text = format!(
        "{}\n[[variant]]\nname = \"half\"\n[[variant.source]]\nid = \"stimulus\"\nscale = 0.5\n",
        stimulus()
    );
    let file = write(&dir, "lamp.toml", &text);
    let (doc, code) = json(&[&file]);
    assert_eq!(code, 1, "the base exceeds the blue-light limit");
    let labels: Vec<&str> = doc["comparison"]["columns"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x["label"].as_str().unwrap())
        .collect();
    assert_eq!(labels, ["half", "stimulus-review"]);
    // Two files, each with its variant: four columns, labelled by file.
    let other = write(&dir, "other.toml", &text);
    let (doc, _) = json(&[&file, &other]);
    let labels: Vec<&str> = doc["comparison"]["columns"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x["label"].as_str().unwrap())
        .collect();
    assert_eq!(labels, [format!("{file}: half"), format!("{other}: half"), file.clone(), other.clone()]);

    let out = retidose().args(["assess", &file, "--format", "json"]).output().unwrap();
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("1 variant(s)") && err.contains(&format!("retidose compare {file}")), "{err}");
    let doc: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(doc.to_string().contains("stimulus-review"), "the base only");
}

/// Every number of a comparison's JSON that the reports show: margins, worst ratios, hazard
/// ratios, E_thr (lx), threshold distances (mm), lever factors, bleached peaks (%) and rack
/// counts.
fn json_figures(c: &Value) -> Vec<String> {
    let mut out = Vec::new();
    for col in c["columns"].as_array().unwrap() {
        out.extend(col["margin"].as_f64().map(num4));
        out.extend(col["worst"]["ratio"].as_f64().map(num4));
        out.extend(col["bleach"]["peak"].as_f64().map(|p| num4(100.0 * p)));
    }
    for r in c["hazards"].as_array().unwrap() {
        out.extend(r["cells"].as_array().unwrap().iter().filter_map(|x| x["ratio"].as_f64()).map(num4));
    }
    for r in c["groups"].as_array().unwrap() {
        for x in r["cells"].as_array().unwrap() {
            // uom serialises SI values: lux, and metres for the distance.
            out.extend(x["e_thr"].as_f64().map(num4));
            out.extend(x["threshold_distance"].as_f64().map(|m| num4(m * 1e3)));
        }
    }
    for r in c["racks"].as_array().unwrap() {
        for x in r["cells"].as_array().unwrap() {
            out.extend(x["lever_factor"].as_f64().map(num4));
            // uom serialises SI values: lux, and R*/rod/s as 1/s; the bleach is a fraction, shown in %.
            for v in x["room_lux"].as_array().unwrap() {
                out.push(num4(v.as_f64().unwrap()));
            }
            out.push(num4(x["rod_rate_max"].as_f64().unwrap()));
            out.push(num4(x["leak_rod_rate_max"].as_f64().unwrap()));
            out.push(num4(100.0 * x["bleach_max"].as_f64().unwrap()));
            for k in ["positions", "below", "above", "in_range"] {
                out.extend(x[k].as_u64().map(|n| n.to_string()));
            }
        }
    }
    out
}

#[test]
fn markdown_and_html_carry_every_figure_of_the_json_and_escape_hostile_names() {
    let dir = folder("documents");
    let hostile = "<script>alert(1)</script> | # [x](javascript:y) *bold*";
    let lamp = format!(
        "{}\n[[variant]]\nname = \"{}\"\n[[variant.source]]\nid = \"stimulus\"\ndistance = \"400 mm\"\n",
        stimulus(),
        hostile.replace('"', "\\\"")
    );
    let room = format!(
        "{}\n[[variant]]\nname = \"dimmed to 60 %\"\n[[variant.source]]\nid = \"panels\"\nscale = 0.6\n\
         [[variant.room.luminaire]]\nid = \"panel west\"\nscale = 0.6\n[[variant.room.luminaire]]\nid = \"panel east\"\nscale = 0.6\n",
        demo("vivarium").unwrap()
    );
    for (name, text) in [("lamp.toml", lamp), ("room.toml", room)] {
        let file = write(&dir, name, &text);
        let (doc, _) = json(&[&file]);
        let figures = json_figures(&doc["comparison"]);
        assert!(figures.len() >= 6, "{name}: {figures:?}");
        let run = |format: &str| {
            let out = retidose().args(["compare", &file, "--format", format]).output().unwrap();
            String::from_utf8(out.stdout).unwrap()
        };
        let (md, html) = (run("markdown"), run("html"));
        for f in &figures {
            assert!(md.contains(f.as_str()), "{name}: {f} missing from the Markdown");
            assert!(html.contains(f.as_str()), "{name}: {f} missing from the HTML");
        }
        for (doc, mark) in [(&md, "> **Caution.**"), (&html, "<p class=\"caution\">")] {
            assert!(doc.find(mark).unwrap() < doc.find("Ranking").unwrap(), "{name}: cautions first");
        }
        assert_eq!(html.matches("<svg").count(), html.matches("</svg>").count(), "{name}");
        let margins =
            doc["comparison"]["columns"].as_array().unwrap().iter().any(|c| c["margin"].is_number());
        assert_eq!(html.matches("<svg").count(), usize::from(margins), "{name}: the margins figure");
        if let Some(start) = html.find("<svg") {
            let end = html.find("</svg>").unwrap() + "</svg>".len();
            let svg = roxmltree::Document::parse(&html[start..end]).unwrap_or_else(|e| panic!("{name}: {e}"));
            let texts: Vec<&str> = svg.descendants().filter_map(|n| n.text()).map(str::trim).collect();
            assert!(
                texts.contains(&hostile),
                "{name}: the variant's name, as itself, in the figure: {texts:?}"
            );
        }
        // Raw HTML only where Markdown's escape (a backslash) is not in front of it.
        assert!(!html.contains("<script") && !md.replace("\\<", "").contains("<script"), "{name}");
    }
    let md = retidose()
        .args(["compare", &dir.join("lamp.toml").display().to_string(), "--format", "markdown"])
        .output()
        .unwrap();
    let md = String::from_utf8(md.stdout).unwrap();
    // The hostile name, escaped for Markdown (src/cli/render/escape.rs): no raw HTML, no link, no
    // emphasis, no extra table cell.
    assert!(md.contains(r"\<script\>alert(1)\</script\> \| # \[x\](javascript:y) \*bold\*"), "{md}");
    // Cell separators: pipes without a backslash in front.
    let pipes = |l: &str| l.char_indices().filter(|&(k, c)| c == '|' && !l[..k].ends_with('\\')).count();
    let head = md.lines().find(|l| l.starts_with("| label")).unwrap();
    let row = md.lines().find(|l| l.starts_with("| \\<script")).unwrap();
    assert_eq!(pipes(row), pipes(head), "{row}");
}

#[test]
fn the_example_compares_a_lamp_with_its_four_variants() {
    let out = retidose().args(["compare", "--example"]).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Fenwick Institute"), "invented, and says so");
    let dir = folder("example");
    let file = write(&dir, "lamp-variants.toml", &text);
    let (doc, _) = json(&[&file]);
    let cols = doc["comparison"]["columns"].as_array().unwrap();
    assert_eq!(cols.len(), 5);
    let margin =
        |label: &str| cols.iter().find(|c| c["label"] == label).and_then(|c| c["margin"].as_f64()).unwrap();
    // Half the luminous intensity halves every ratio (linear in the level), so twice the margin.
    let (fitted, dimmed) = (margin("as fitted"), margin("dimmed to 50 %"));
    assert!((dimmed - 2.0 * fitted).abs() <= 1e-9 * dimmed, "{dimmed} vs 2 × {fitted}");
}

#[test]
fn dimming_every_luminaire_of_a_room_divides_its_lever_factor_by_the_dimming() {
    // Light at a cage is a sum of I·cos θ / r² over the luminaires times the cage wall and
    // shelf factors (inverse-square law), so it is linear in every luminaire's intensity: with
    // each dimmed by 0.6, the dimming factor that puts the most positions in range is the base
    // factor ÷ 0.6.
    let text = format!(
        "{}\n[[variant]]\nname = \"dimmed\"\n[[variant.room.luminaire]]\nid = \"panel west\"\nscale = 0.6\n\
         [[variant.room.luminaire]]\nid = \"panel east\"\nscale = 0.6\n",
        demo("vivarium").unwrap()
    );
    let all = assessed(&text);
    let items: Vec<(&str, &Assessment)> = all.iter().map(|(l, a)| (l.as_str(), a)).collect();
    let c = compare(&items);
    let rack = c.racks.iter().find(|r| r.key == "A").unwrap();
    let lever = |i: usize| rack.cells[i].as_ref().and_then(|x| x.lever_factor).unwrap();
    let (base, dimmed) = (lever(0), lever(1));
    assert!((dimmed - base / 0.6).abs() <= 1e-9 * dimmed, "{dimmed} vs {base} / 0.6");
}

#[test]
fn a_tinted_cage_wall_scales_the_rod_rates_but_not_the_guidance_lux() {
    // The NRC Guide's quantity is room light at cage level, taken before the cage wall, so a
    // tinted wall leaves the lux and the counts in range alone. The rod R*/rod/s inside is
    // linear in the light through the wall: a wall passing 0.4 instead of 0.8 halves it, by day
    // and from the leak.
    let text = format!(
        "{}\n[[variant]]\nname = \"tinted\"\n[[variant.room.rack]]\nid = \"A\"\ncage_transmittance = \"0.4\"\n",
        demo("vivarium").unwrap()
    );
    let all = assessed(&text);
    let items: Vec<(&str, &Assessment)> = all.iter().map(|(l, a)| (l.as_str(), a)).collect();
    let c = compare(&items);
    let rack = c.racks.iter().find(|r| r.key == "A").unwrap();
    let (base, tinted) = (rack.cells[0].as_ref().unwrap(), rack.cells[1].as_ref().unwrap());
    assert_eq!(base.room_lux, tinted.room_lux);
    assert_eq!((base.below, base.above), (tinted.below, tinted.above));
    for (b, t) in
        [(base.rod_rate_max, tinted.rod_rate_max), (base.leak_rod_rate_max, tinted.leak_rod_rate_max)]
    {
        let (b, t) = (b.get::<uom::si::frequency::hertz>(), t.get::<uom::si::frequency::hertz>());
        assert!((t - b / 2.0).abs() <= 1e-9 * b, "{t} vs {b} / 2");
    }
    assert!(tinted.bleach_max < base.bleach_max);
}
