//! The `retidose compare` report, shared by every format: [`figures`] turns a [`Comparison`]
//! into rows of formatted figures (4 significant digits, the same words as the assessment), read
//! by the terminal table and the CSV (`src/cli/compare.rs`) and by the Markdown ([`markdown`])
//! and HTML ([`html`]) documents here: the cautions first, the ranking (margin, binding hazard,
//! worst ratio, t_max, risk group, outcome per column), a figure of the margins (HTML), then
//! every aligned row side by side.

use std::fmt::Write;

use retidose::base::quantity::SiValue;
use retidose::compare::{Aligned, Column, Comparison, Recovery90};
use uom::si::illuminance::lux;
use uom::si::length::millimeter;
use uom::si::time::second;

use super::html::esc;
use super::{CAUTION, duration, escape, num, t_max_words};

/// How many of [`figures`]' rows are the headline of each column (rank to risk group), shown as
/// the ranking table.
pub const HEADLINE: usize = 8;

/// Most scenario columns in one table of the Markdown and HTML documents; more are split.
const PER_TABLE: usize = 4;

/// One figure: its label, its unit ("" when none) and one value per column ("absent" where the
/// scenario has no such row).
pub struct Figure {
    /// What the row shows.
    pub label: String,
    /// Its unit, "" when none.
    pub unit: &'static str,
    /// One value per column, in the order of the ranked columns.
    pub values: Vec<String>,
    /// True when the values may quote the user's files (escaped in full in Markdown); the
    /// others are numbers and fixed words.
    pub user: bool,
}

impl Figure {
    fn per_column(label: &str, unit: &'static str, c: &Comparison, f: impl Fn(&Column) -> String) -> Self {
        Figure { label: label.to_string(), unit, values: c.columns.iter().map(f).collect(), user: false }
    }

    fn aligned<T>(label: String, unit: &'static str, row: &Aligned<T>, f: impl Fn(&T) -> String) -> Self {
        let values = row.cells.iter().map(|x| x.as_ref().map_or_else(|| "absent".to_string(), &f)).collect();
        Figure { label, unit, values, user: false }
    }
}

/// Every figure of the comparison, in the order the reports show them.
pub fn figures(c: &Comparison) -> Vec<Figure> {
    let dash = || "—".to_string();
    let mut out = vec![
        Figure::per_column("rank", "", c, |_| String::new()),
        Figure { user: true, ..Figure::per_column("scenario", "", c, |col| col.scenario.clone()) },
        Figure::per_column("outcome", "", c, outcome),
        Figure::per_column("margin (factor to the limit)", "", c, |col| col.margin.map_or_else(dash, num)),
        Figure {
            user: true,
            ..Figure::per_column("binding hazard", "", c, |col| {
                col.worst.as_ref().map_or_else(dash, |w| w.hazard.clone())
            })
        },
        Figure::per_column("worst ratio to limit", "", c, |col| {
            col.worst
                .as_ref()
                .map_or_else(dash, |w| format!("{}{}", if w.lower_bound { "≥ " } else { "" }, num(w.ratio)))
        }),
        Figure::per_column("t_max (binding hazard)", "", c, |col| {
            col.worst.as_ref().map_or_else(dash, |w| t_max_words(&w.t_max, w.lower_bound))
        }),
        Figure::per_column("risk group", "", c, |col| {
            col.risk_group.map_or_else(dash, |(g, lb)| {
                format!("{}{}", g.name(), if lb { " (lower bound)" } else { "" })
            })
        }),
    ];
    for (i, v) in out[0].values.iter_mut().enumerate() {
        *v = (i + 1).to_string();
    }
    for g in &c.groups {
        out.push(Figure::aligned(format!("risk group: {}", g.label), "", g, |x| match (x.group, &x.error) {
            (Some(r), _) => format!("{}{}", r.name(), if x.lower_bound { " (lower bound)" } else { "" }),
            (None, Some(_)) => "not assessed".into(),
            (None, None) => dash(),
        }));
        out.push(Figure::aligned(format!("E_thr: {}", g.label), "lx", g, |x| {
            x.e_thr.map_or_else(dash, |e| num(e.get::<lux>()))
        }));
        out.push(Figure::aligned(format!("threshold distance: {}", g.label), "mm", g, |x| {
            x.threshold_distance.map_or_else(dash, |d| num(d.get::<millimeter>()))
        }));
    }
    for h in &c.hazards {
        out.push(Figure::aligned(format!("ratio: {}", h.label), "", h, |x| x.ratio.map_or_else(dash, num)));
    }
    out.extend(room_and_bleach(c));
    out
}

/// The figures of the rooms' racks and of bleaching.
fn room_and_bleach(c: &Comparison) -> Vec<Figure> {
    let dash = || "—".to_string();
    let mut out = Vec::new();
    for r in &c.racks {
        let n = |f: fn(&retidose::compare::RackCell) -> usize| {
            move |x: &retidose::compare::RackCell| f(x).to_string()
        };
        out.push(Figure::aligned(format!("{}: positions", r.label), "", r, n(|x| x.positions)));
        out.push(Figure::aligned(format!("{}: below range", r.label), "", r, n(|x| x.below)));
        out.push(Figure::aligned(format!("{}: in range", r.label), "", r, |x| {
            x.in_range.map_or_else(dash, |v| v.to_string())
        }));
        out.push(Figure::aligned(format!("{}: above range", r.label), "", r, n(|x| x.above)));
        out.push(Figure::aligned(format!("{}: lever factor", r.label), "", r, |x| {
            x.lever_factor.map_or_else(dash, num)
        }));
        out.push(Figure::aligned(format!("{}: dimmest cage, room light", r.label), "lx", r, |x| {
            num(x.room_lux.0.get::<lux>())
        }));
        out.push(Figure::aligned(format!("{}: brightest cage, room light", r.label), "lx", r, |x| {
            num(x.room_lux.1.get::<lux>())
        }));
        out.push(Figure::aligned(
            format!("{}: highest rod rate, light phase", r.label),
            "R*/rod/s",
            r,
            |x| num(x.rod_rate_max.si()),
        ));
        out.push(Figure::aligned(format!("{}: highest steady bleach", r.label), "%", r, |x| {
            num(100.0 * x.bleach_max)
        }));
        out.push(Figure::aligned(
            format!("{}: highest rod rate from the leak", r.label),
            "R*/rod/s",
            r,
            |x| num(x.leak_rod_rate_max.si()),
        ));
    }
    if c.columns.iter().any(|col| col.bleach.is_some()) {
        let absent = || "absent".to_string();
        out.push(Figure::per_column("peak bleached", "%", c, |col| {
            col.bleach.as_ref().map_or_else(absent, |b| num(100.0 * b.peak))
        }));
        out.push(Figure::per_column("recovery to 90 % after the last lights-off", "", c, |col| {
            col.bleach.as_ref().map_or_else(absent, |b| match b.recovery_90 {
                Recovery90::NoLightsOff => "no lights-off".into(),
                Recovery90::NotReached => "not reached".into(),
                Recovery90::After(t) => duration(t.get::<second>()),
            })
        }));
    }
    out
}

fn outcome(col: &Column) -> String {
    match (col.limit_exceeded, col.flag_raised) {
        (false, false) => "within limits, no flag",
        (true, false) => "LIMIT EXCEEDED",
        (false, true) => "FLAG RAISED",
        (true, true) => "LIMIT EXCEEDED, FLAG RAISED",
    }
    .to_string()
}

/// Text that may quote the user's files: escaped for Markdown, table pipes included.
fn md(s: &str) -> String {
    escape::markdown(s)
}

/// A value of `f` for Markdown: escaped in full when it may quote the user's files, otherwise
/// (numbers and fixed words) only its table pipes.
fn md_value(f: &Figure, v: &str) -> String {
    if f.user { md(v) } else { v.replace('|', "\\|") }
}

/// A figure's label with its unit.
fn label_with_unit(f: &Figure) -> String {
    if f.unit.is_empty() { f.label.clone() } else { format!("{} ({})", f.label, f.unit) }
}

/// The comparison in Markdown: the cautions, the ranking, then every aligned figure in tables
/// of at most four scenarios, and the general caution.
pub fn markdown(c: &Comparison) -> String {
    let figs = figures(c);
    let mut o = format!("# Comparison of {} scenarios\n\n", c.columns.len());
    for caution in &c.cautions {
        let _ = writeln!(o, "> **Caution.** {}\n", md(caution));
    }
    let _ = writeln!(o, "{}\n\n## Ranking\n", RANKED);
    let head: Vec<String> = figs[..HEADLINE].iter().map(|f| md(&label_with_unit(f))).collect();
    let _ = writeln!(o, "| label | {} |\n|---|{}", head.join(" | "), "---|".repeat(HEADLINE));
    for (i, col) in c.columns.iter().enumerate() {
        let cells: Vec<String> = figs[..HEADLINE].iter().map(|f| md_value(f, &f.values[i])).collect();
        let _ = writeln!(o, "| {} | {} |", md(&col.label), cells.join(" | "));
    }
    if figs.len() > HEADLINE {
        let _ = writeln!(o, "\n## Side by side\n");
        for (chunk, cols) in c.columns.chunks(PER_TABLE).enumerate() {
            let first = chunk * PER_TABLE;
            let names: Vec<String> = cols.iter().map(|col| md(&col.label)).collect();
            let _ = writeln!(o, "| figure | {} |\n|---|{}", names.join(" | "), "---:|".repeat(cols.len()));
            for f in &figs[HEADLINE..] {
                let v: Vec<String> =
                    f.values[first..first + cols.len()].iter().map(|v| md_value(f, v)).collect();
                let _ = writeln!(o, "| {} | {} |", md(&label_with_unit(f)), v.join(" | "));
            }
            o.push('\n');
        }
    } else {
        o.push('\n');
    }
    let _ = writeln!(o, "{}", md(CAUTION));
    o
}

/// How the columns are ordered, in words.
const RANKED: &str = "Ranked by margin, the factor to the limit (1 ÷ the worst hazard ratio), largest first; \
ties keep the order given. A margin below 1 means the binding hazard exceeds its limit.";

/// The comparison as one self-contained HTML page, in the assessment's style: the cautions, the
/// ranking, the margins figure, every aligned figure, the general caution.
pub fn html(c: &Comparison) -> String {
    let figs = figures(c);
    let mut o =
        super::html::HEAD.replace("<title>retidose assessment</title>", "<title>retidose comparison</title>");
    let _ = write!(o, "<section><h1>Comparison of {} scenarios</h1>", c.columns.len());
    for caution in &c.cautions {
        let _ = write!(o, "<p class=\"caution\">{}</p>", esc(caution));
    }
    let _ = write!(o, "<p>{}</p><h2>Ranking</h2><table><tr><th>label</th>", esc(RANKED));
    for f in &figs[..HEADLINE] {
        let _ = write!(o, "<th>{}</th>", esc(&label_with_unit(f)));
    }
    o.push_str("</tr>");
    for (i, col) in c.columns.iter().enumerate() {
        let _ = write!(o, "<tr><td>{}</td>", esc(&col.label));
        for f in &figs[..HEADLINE] {
            let flag = f.values[i].contains("EXCEEDED") || f.values[i].contains("FLAG");
            let cls = if flag { " class=\"flag\"" } else { "" };
            let _ = write!(o, "<td{cls}>{}</td>", esc(&f.values[i]));
        }
        o.push_str("</tr>");
    }
    o.push_str("</table>");
    if let Some(f) = super::svg::margins(c) {
        o.push_str(&super::svg::html(&f));
    }
    if figs.len() > HEADLINE {
        o.push_str("<h2>Side by side</h2>");
        for (chunk, cols) in c.columns.chunks(PER_TABLE).enumerate() {
            let first = chunk * PER_TABLE;
            o.push_str("<table><tr><th>figure</th>");
            for col in cols {
                let _ = write!(o, "<th>{}</th>", esc(&col.label));
            }
            o.push_str("</tr>");
            for f in &figs[HEADLINE..] {
                let _ = write!(o, "<tr><td>{}</td>", esc(&label_with_unit(f)));
                for v in &f.values[first..first + cols.len()] {
                    let _ = write!(o, "<td>{}</td>", esc(v));
                }
                o.push_str("</tr>");
            }
            o.push_str("</table>");
        }
    }
    let _ = writeln!(o, "<p class=\"caution\">{}</p></section></body></html>", esc(CAUTION));
    o
}
