//! The figures of the HTML report, drawn with plotters' SVG backend (DEVELOPERS.md, "Figures in
//! the HTML report"): one module per figure, and here what they share: the canvas, fonts,
//! colours, log-axis tick labels, a legend panel and the accessible SVG root.
//!
//! Without plotters' `ttf` feature the SVG backend writes text as `<text>` elements in the
//! generic `sans-serif` family and the browser lays it out; plotters only estimates text sizes
//! (for its own label areas), so every margin here is set explicitly, with room to spare.

pub mod bleach;
pub mod bleach_level;
pub mod dimming;
pub mod distance;
pub mod hazards;
pub mod heatmap;
pub mod margins;
pub mod spectrum;
pub mod sweep;
pub mod threshold;

use plotters::coord::Shift;
use plotters::coord::combinators::LogCoord;
use plotters::coord::ranged1d::Ranged;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// A drawing area of an SVG canvas, in pixels.
pub type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// What drawing can fail with (plotters' errors, boxed: none is expected writing to a string).
pub type PlotResult<T> = Result<T, Box<dyn std::error::Error>>;

/// A figure of the report: inline SVG and its caption (plain text, escaped by the HTML writer).
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// The `<svg>` element.
    pub svg: String,
    /// What the figure shows, for the `<figcaption>`.
    pub caption: String,
}

/// The font family of every text (resolved by the browser).
const FAMILY: &str = "sans-serif";

/// Colour-blind-safe series colours (Okabe & Ito 2008), black first.
pub const PALETTE: [RGBColor; 8] = [
    RGBColor(0, 0, 0),
    RGBColor(0, 114, 178),
    RGBColor(213, 94, 0),
    RGBColor(0, 158, 115),
    RGBColor(204, 121, 167),
    RGBColor(230, 159, 0),
    RGBColor(86, 180, 233),
    RGBColor(120, 120, 120),
];

/// The colour of series `i`, cycling through [`PALETTE`].
pub fn colour(i: usize) -> RGBColor {
    PALETTE[i % PALETTE.len()]
}

/// Dash and gap lengths, px, of dashed series, so overlapping curves stay distinct.
pub const DASHES: [(u32, u32); 4] = [(8, 4), (3, 3), (14, 4), (6, 2)];

/// Grid lines: major and minor.
pub const GRID: RGBColor = RGBColor(200, 200, 200);
/// Minor grid lines.
pub const GRID_LIGHT: RGBColor = RGBColor(235, 235, 235);

/// A font of `px` CSS pixels (plotters writes `font-size` as its size ÷ 1.24).
pub fn font(px: f64) -> FontDesc<'static> {
    (FAMILY, px * 1.24).into_font()
}

/// A text style of `px` pixels in `c`.
pub fn text(px: f64, c: RGBColor) -> TextStyle<'static> {
    font(px).color(&c)
}

/// A bold text style of `px` pixels in `c`.
pub fn bold(px: f64, c: RGBColor) -> TextStyle<'static> {
    font(px).style(FontStyle::Bold).color(&c)
}

/// Draws on an SVG canvas of `size` pixels and returns the `<svg>` element, labelled for
/// screen readers with `label` and scaled to the page width by the browser.
pub fn render(
    size: (u32, u32),
    label: &str,
    draw: impl FnOnce(&Area<'_>) -> PlotResult<()>,
) -> PlotResult<String> {
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, size).into_drawing_area();
        root.fill(&WHITE)?;
        draw(&root)?;
        root.present()?;
    }
    let attrs = format!(
        "<svg role=\"img\" aria-label=\"{}\" style=\"max-width:100%;height:auto\" ",
        crate::cli::render::html::esc(label)
    );
    Ok(out.replacen("<svg ", &attrs, 1))
}

/// A chart with a log x and a log y axis, `x_desc` and `y_desc` as axis titles, decade labels on
/// y (x's ticks are drawn by [`x_ticks`]), on `area` left of a side panel.
pub type LogLog<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<LogCoord<f64>, LogCoord<f64>>>;

/// Builds a [`LogLog`] chart on `area` with its mesh drawn.
pub fn log_log<'a, 'b>(
    area: &'a Area<'b>,
    x: (f64, f64),
    y: (f64, f64),
    x_desc: &str,
    y_desc: &str,
) -> PlotResult<LogLog<'a, 'b>> {
    let mut c = ChartBuilder::on(area)
        .margin(14)
        .x_label_area_size(46)
        .y_label_area_size(70)
        .build_cartesian_2d(log_axis(x), log_axis(y))?;
    c.configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .x_labels(decade_count(x) + 1)
        .y_labels(decade_count(y) + 1)
        .x_label_formatter(&|_| String::new())
        .disable_x_mesh()
        .y_label_formatter(&|v| power_label(*v))
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(GRID_LIGHT)
        .draw()?;
    Ok(c)
}

/// A chart of `n` labelled rows against a log x axis titled `x_desc` (hazard ratios, margins),
/// with `label_px` pixels for the row labels and `top` pixels above the plot.
pub type Rows<'a, 'b> =
    ChartContext<'a, SVGBackend<'b>, Cartesian2d<LogCoord<f64>, plotters::coord::types::RangedCoordf64>>;

/// Builds a [`Rows`] chart on `area` with its mesh drawn.
pub fn log_rows<'a, 'b>(
    area: &'a Area<'b>,
    x: (f64, f64),
    n: f64,
    label_px: f64,
    top: u32,
    x_desc: &str,
) -> PlotResult<Rows<'a, 'b>> {
    let mut c = ChartBuilder::on(area)
        .margin(14)
        .margin_top(top)
        .margin_right(90)
        .x_label_area_size(46)
        .y_label_area_size(label_px as u32)
        .build_cartesian_2d(log_axis(x), 0.0..n)?;
    c.configure_mesh()
        .x_desc(x_desc)
        .x_labels(decade_count(x) + 1)
        .x_label_formatter(&|v| power_label(*v))
        .y_labels(0)
        .disable_y_mesh()
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(if decade_count(x) > 6 { TRANSPARENT } else { GRID_LIGHT.to_rgba() })
        .draw()?;
    Ok(c)
}

/// The powers of ten that enclose `lo`..`hi` (both above 0), at least one decade apart.
pub fn decades(lo: f64, hi: f64) -> (f64, f64) {
    let a = lo.log10().floor();
    let b = hi.log10().ceil().max(a + 1.0);
    (10f64.powf(a), 10f64.powf(b))
}

/// A log axis over `r`, widened by a part in 10⁹ so that plotters' first key point, computed
/// as 10 to the ceiling of a rounded logarithm, is `r.0` itself and gets its label.
pub fn log_axis(r: (f64, f64)) -> LogCoord<f64> {
    (r.0 * (1.0 - 1e-9)..r.1 * (1.0 + 1e-9)).log_scale().into()
}

/// The number of decades of a power-of-ten range (for plotters' label count).
pub fn decade_count(r: (f64, f64)) -> usize {
    (r.1 / r.0).log10().round().max(1.0) as usize
}

/// A log-axis tick label: `10⁻³`, `1`, `10`, `10²`…; empty for the ticks between powers of ten.
pub fn power_label(v: f64) -> String {
    if !(v > 0.0 && v.is_finite()) {
        return String::new();
    }
    let e = v.log10();
    if (e - e.round()).abs() > 1e-6 {
        return String::new();
    }
    match e.round() as i32 {
        0 => "1".into(),
        1 => "10".into(),
        n => format!("10{}", superscript(n)),
    }
}

/// A linear-axis tick label: at most 6 significant digits without trailing zeros, and
/// `2×10⁻⁴` for very small or large values.
pub fn tick_label(v: f64) -> String {
    let a = v.abs();
    if a < 1e-12 {
        return "0".into();
    }
    let trim = |s: String| {
        if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
    };
    if (1e-3..1e5).contains(&a) {
        return trim(format!("{v:.6}"));
    }
    let e = a.log10().floor() as i32;
    format!("{}×10{}", trim(format!("{:.3}", v / 10f64.powi(e))), superscript(e))
}

/// A value with 4 significant digits, as the tables print it, with `×10ⁿ` for very small or
/// large values: `1.06`, `0.01507`, `1.642×10⁻⁹⁶`.
pub fn value_label(v: f64) -> String {
    let a = v.abs();
    if a == 0.0 || !a.is_finite() {
        return format!("{v}");
    }
    let e = a.log10().floor() as i32;
    let trim = |s: String| {
        if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
    };
    if (-3..5).contains(&e) {
        let digits = (3 - e).max(0) as usize;
        return trim(format!("{v:.digits$}"));
    }
    format!("{}×10{}", trim(format!("{:.3}", v / 10f64.powi(e))), superscript(e))
}

/// Ticks of a logarithmic axis from `lo` to `hi`: 1, 2 and 5 times each power of ten over up to
/// three decades, the powers alone over more.
pub fn log_ticks(lo: f64, hi: f64) -> Vec<f64> {
    let few = (hi / lo).log10() < 3.5;
    let (a, b) = (lo.log10().floor() as i32, hi.log10().ceil() as i32);
    let steps: &[f64] = if few { &[1.0, 2.0, 5.0] } else { &[1.0] };
    (a..=b)
        .flat_map(|k| steps.iter().map(move |m| m * 10f64.powi(k)))
        .filter(|v| *v >= lo * (1.0 - 1e-9) && *v <= hi * (1.0 + 1e-9))
        .collect()
}

/// Labelled ticks and grid lines at `at` for an x axis spanning `y` vertically, for a log
/// axis whose plotters labels (powers of ten only) and mesh are hidden.
pub fn x_ticks<X, Y>(
    c: &mut ChartContext<'_, SVGBackend<'_>, Cartesian2d<X, Y>>,
    at: &[f64],
    y: (f64, f64),
) -> PlotResult<()>
where
    X: Ranged<ValueType = f64>,
    Y: Ranged<ValueType = f64>,
{
    c.draw_series(at.iter().map(|&v| PathElement::new(vec![(v, y.0), (v, y.1)], GRID)))?;
    let style = text(12.0, BLACK).pos(Pos::new(HPos::Center, VPos::Top));
    c.draw_series(at.iter().map(|&v| {
        EmptyElement::at((v, y.0))
            + PathElement::new(vec![(0, 0), (0, 5)], BLACK)
            + Text::new(tick_label(v), (0, 8), style.clone())
    }))?;
    Ok(())
}

/// An integer in superscript digits.
fn superscript(n: i32) -> String {
    let digits = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let mut s: String =
        n.unsigned_abs().to_string().chars().map(|c| digits[(c as u8 - b'0') as usize]).collect();
    if n < 0 {
        s.insert(0, '⁻');
    }
    s
}

/// How a legend entry is drawn.
#[derive(Debug, Clone, Copy)]
pub enum Mark {
    /// A solid line.
    Line(RGBColor),
    /// A dashed line, with the pattern [`DASHES`]`[i]`.
    Dashed(RGBColor, usize),
    /// A filled band (translucent).
    Band(RGBAColor),
    /// A dot.
    Dot(RGBColor),
    /// An upward triangle.
    Up(RGBColor),
}

/// Draws a legend in `area`: one entry a row, each text wrapped to the area's width.
pub fn legend(area: &Area<'_>, title: &str, entries: &[(String, Mark)]) -> PlotResult<()> {
    let (w, _) = area.dim_in_pixel();
    let chars = ((w as f64 - 40.0) / 6.4).max(12.0) as usize;
    let mut y = 14;
    area.draw(&Text::new(title.to_string(), (4, y), bold(12.0, BLACK)))?;
    y += 20;
    for (label, mark) in entries {
        let lines = textwrap::wrap(label, chars);
        draw_mark(area, *mark, y)?;
        for l in &lines {
            let style = text(11.0, BLACK).pos(Pos::new(HPos::Left, VPos::Center));
            area.draw(&Text::new(l.to_string(), (32, y), style))?;
            y += 14;
        }
        y += 5;
    }
    Ok(())
}

/// One legend mark at row `y`.
fn draw_mark(area: &Area<'_>, mark: Mark, y: i32) -> PlotResult<()> {
    match mark {
        Mark::Line(c) => area.draw(&PathElement::new(vec![(4, y), (26, y)], c.stroke_width(2)))?,
        Mark::Dashed(c, i) => {
            let (dash, gap) = DASHES[i % DASHES.len()];
            let mut x = 4;
            while x < 26 {
                area.draw(&PathElement::new(
                    vec![(x, y), ((x + dash as i32).min(26), y)],
                    c.stroke_width(2),
                ))?;
                x += (dash + gap) as i32;
            }
        }
        Mark::Band(c) => area.draw(&Rectangle::new([(4, y - 6), (26, y + 6)], c.filled()))?,
        Mark::Dot(c) => area.draw(&Circle::new((15, y), 4, c.filled()))?,
        Mark::Up(c) => area.draw(&TriangleMarker::new((15, y), 5, c.filled()))?,
    }
    Ok(())
}

/// A sequential colour map (viridis, 5 stops interpolated in sRGB): 0 dark purple, 1 yellow.
pub fn viridis(f: f64) -> RGBColor {
    const STOPS: [(u8, u8, u8); 5] =
        [(68, 1, 84), (59, 82, 139), (33, 145, 140), (94, 201, 98), (253, 231, 37)];
    let f = if f.is_finite() { f.clamp(0.0, 1.0) } else { 0.0 } * 4.0;
    let i = (f.floor() as usize).min(3);
    let t = f - i as f64;
    let mix = |a: u8, b: u8| (f64::from(a) + t * (f64::from(b) - f64::from(a))).round() as u8;
    let (a, b) = (STOPS[i], STOPS[i + 1]);
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// Black or white, whichever reads better on `c` (WCAG relative luminance above 0.18: black).
pub fn ink_on(c: RGBColor) -> RGBColor {
    let lin = |v: u8| {
        let s = f64::from(v) / 255.0;
        if s <= 0.04045 { s / 12.92 } else { ((s + 0.055) / 1.055).powf(2.4) }
    };
    let l = 0.2126 * lin(c.0) + 0.7152 * lin(c.1) + 0.0722 * lin(c.2);
    if l > 0.18 { BLACK } else { WHITE }
}

/// A short name of a limits document: "IEC 62471:2006 / CIE S 009:2002", "Directive
/// 2006/25/EC", "ICNIRP Guidelines 2013".
pub fn short_document(document: &str, edition: &str) -> String {
    let cut =
        [", ", " of the ", " on "].iter().filter_map(|p| document.find(p)).min().unwrap_or(document.len());
    let name = document[..cut].trim().to_string();
    if name.chars().any(|c| c.is_ascii_digit()) {
        return name;
    }
    let year: String =
        edition.chars().skip_while(|c| !c.is_ascii_digit()).take_while(char::is_ascii_digit).collect();
    if year.is_empty() { name } else { format!("{name} {year}") }
}

#[cfg(test)]
pub mod test_support {
    //! Reading a figure's SVG back as XML (roxmltree, a dev-dependency of the crate), and the
    //! demos' assessments the figures are drawn from.

    /// The assessment of the built-in demo `name`.
    pub fn demo(name: &str) -> retidose::assess::Assessment {
        let s =
            retidose::assess::parse_scenario_file(retidose::assess::demo(name).unwrap(), name, None).unwrap();
        retidose::assess::assess(&s).unwrap()
    }

    /// Panics unless `svg` parses as XML with an `<svg>` root.
    pub fn assert_well_formed(svg: &str) {
        let doc =
            roxmltree::Document::parse(svg).unwrap_or_else(|e| panic!("the SVG does not parse as XML: {e}"));
        assert_eq!(doc.root_element().tag_name().name(), "svg");
    }

    /// The text of every `<text>` element, trimmed.
    pub fn texts(svg: &str) -> Vec<String> {
        let doc =
            roxmltree::Document::parse(svg).unwrap_or_else(|e| panic!("the SVG does not parse as XML: {e}"));
        doc.descendants()
            .filter(|n| n.tag_name().name() == "text")
            .map(|n| n.text().unwrap_or("").trim().to_string())
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn power_labels_mark_only_powers_of_ten() {
        assert_eq!(power_label(1e-3), "10⁻³");
        assert_eq!(power_label(1.0), "1");
        assert_eq!(power_label(100.0), "10²");
        assert_eq!(power_label(20.0), "");
        assert_eq!(power_label(0.0), "");
    }

    #[test]
    fn tick_labels_are_short() {
        assert_eq!(tick_label(0.5), "0.5");
        assert_eq!(tick_label(20.0), "20");
        assert_eq!(tick_label(2e-4), "2×10⁻⁴");
        assert_eq!(tick_label(1e-15), "0");
    }

    #[test]
    fn values_keep_four_digits_at_any_magnitude() {
        assert_eq!(value_label(1.059918), "1.06");
        assert_eq!(value_label(0.015069), "0.01507");
        assert_eq!(value_label(1.6415e-96), "1.642×10⁻⁹⁶");
    }

    #[test]
    fn decades_enclose_the_range() {
        assert_eq!(decades(0.03, 4.0), (0.01, 10.0));
        assert_eq!(decades(1.0, 1.0), (1.0, 10.0));
        assert_eq!(decade_count((1e-3, 10.0)), 4);
    }

    #[test]
    fn ink_is_legible_on_both_ends_of_the_colour_map() {
        assert_eq!(ink_on(viridis(0.0)), WHITE);
        assert_eq!(ink_on(viridis(1.0)), BLACK);
    }

    #[test]
    fn short_documents_are_user_facing_names() {
        assert_eq!(
            short_document("IEC 62471:2006 / CIE S 009:2002, Photobiological safety of lamps", "2006"),
            "IEC 62471:2006 / CIE S 009:2002"
        );
        assert_eq!(
            short_document("Directive 2006/25/EC of the European Parliament (x), Annex I", "2006"),
            "Directive 2006/25/EC"
        );
        assert_eq!(
            short_document("ICNIRP Guidelines on limits of exposure, Health Phys", "2013, with errata"),
            "ICNIRP Guidelines 2013"
        );
    }

    #[test]
    fn render_gives_a_labelled_well_formed_svg() {
        let svg = render((200, 100), "a <test>", |root| {
            root.draw(&Text::new("x & y", (10, 10), text(11.0, BLACK)))?;
            Ok(())
        })
        .unwrap();
        test_support::assert_well_formed(&svg);
        assert!(svg.contains("aria-label=\"a &lt;test&gt;\""));
        assert_eq!(test_support::texts(&svg), vec!["x & y"]);
    }
}
