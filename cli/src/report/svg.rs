//! A small line-chart writer producing inline SVG: axes with ticks and unit labels, a
//! right-hand axis in a second unit, several series with colours and dash patterns, a
//! legend below the plot, linear or logarithmic axes and labelled reference lines.
//!
//! Text is drawn with the viewer's generic `sans-serif` font; no font files are needed.
//! Long series are decimated per pixel column ([`super::decimate`]), so a line has at most
//! about 1300 points whatever the run length. The x values of a series must not decrease (time, radius, cycle index). All text passed
//! in is escaped here.

use std::fmt::Write;

use super::decimate::decimate;
use super::escape::esc;
pub use super::ticks::Scale;
use super::ticks::{linear_labels, multiples, nice_step, ticks_for, Tick};

/// Width of every chart, px (the SVG scales to its container).
const WIDTH: f64 = 760.0;
/// Height of the plotting area, px.
const PLOT_H: f64 = 250.0;
/// Space above the plot for the title, px.
const TOP: f64 = 30.0;
/// Space left of the plot for tick labels and the axis label, px.
const LEFT: f64 = 74.0;
/// Space right of the plot without / with a second axis, px.
const RIGHT: [f64; 2] = [22.0, 74.0];
/// Space below the plot for tick labels and the axis label, px.
const BOTTOM: f64 = 44.0;
/// Height of one legend row, px.
const LEGEND_ROW: f64 = 18.0;
/// Mean advance of one character at 12 px sans-serif, px (an estimate: the font is the
/// viewer's).
const CHAR_W: f64 = 6.6;
/// Series with at most this many points are drawn with point markers.
const MARKER_MAX_POINTS: usize = 60;

/// Colour, dash pattern and width of a line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Style {
    /// CSS colour.
    pub color: &'static str,
    /// SVG `stroke-dasharray`, empty for a solid line.
    pub dash: &'static str,
    /// Stroke width, px.
    pub width: f64,
}

/// Readings (field data) drawn as markers only, in the pages that set data against a fit.
pub const READINGS: Style = Style {
    color: "#c0392b",
    dash: "",
    width: 0.0,
};

/// A fitted line, in the pages that set data against a fit.
pub const FITTED: Style = Style {
    color: "#1f5fa8",
    dash: "",
    width: 1.6,
};

/// One line of a chart; x and y in the file's SI units (scaled by the chart's factors).
#[derive(Debug, Clone)]
pub struct Series<'a> {
    /// Legend text; empty to leave it out of the legend.
    pub label: String,
    /// Abscissae.
    pub x: &'a [f64],
    /// Ordinates, as many as `x`.
    pub y: &'a [f64],
    /// Line style.
    pub style: Style,
}

/// A shaded band between a lower and an upper curve (the per-cycle envelope of a series),
/// drawn under the lines; x, lo and hi in the file's SI units, as many each.
#[derive(Debug, Clone)]
pub struct Band<'a> {
    /// Abscissae.
    pub x: &'a [f64],
    /// Lower edge.
    pub lo: &'a [f64],
    /// Upper edge.
    pub hi: &'a [f64],
    /// CSS fill colour (drawn at 30 % opacity).
    pub color: &'static str,
}

/// A second ordinate axis on the right in another unit: value₂ = value × `per_primary`.
#[derive(Debug, Clone, PartialEq)]
pub struct SecondAxis {
    /// Axis label with unit.
    pub label: String,
    /// Display units on the right per display unit on the left.
    pub per_primary: f64,
}

/// A labelled vertical reference line at `x` (display units).
#[derive(Debug, Clone, PartialEq)]
pub struct Mark {
    /// Position, display units.
    pub x: f64,
    /// Label drawn beside the line.
    pub label: String,
}

/// A line chart.
#[derive(Debug, Clone)]
pub struct Chart<'a> {
    /// Unique id in the page (used for the clip path).
    pub id: String,
    /// Title above the plot.
    pub title: String,
    /// x-axis label with unit.
    pub x_label: String,
    /// y-axis label with unit.
    pub y_label: String,
    /// x-axis scale.
    pub x_scale: Scale,
    /// y-axis scale.
    pub y_scale: Scale,
    /// Display x = data x × `x_factor`.
    pub x_factor: f64,
    /// Display y = data y × `y_factor`.
    pub y_factor: f64,
    /// Smallest y drawn (display units); points below are left out. Bounds the range of
    /// a log axis whose data start near zero.
    pub y_min: Option<f64>,
    /// Smallest span of a linear y axis, as a fraction of the largest magnitude drawn (0:
    /// the data's own range): a range narrower than that is widened about its middle, so
    /// that round-off between nearly equal values is not drawn across the whole plot.
    pub y_min_span: f64,
    /// Optional right-hand axis.
    pub y2: Option<SecondAxis>,
    /// The lines.
    pub series: Vec<Series<'a>>,
    /// Shaded bands under the lines.
    pub bands: Vec<Band<'a>>,
    /// Vertical reference lines.
    pub marks: Vec<Mark>,
}

impl<'a> Chart<'a> {
    /// An empty linear chart with unit factors.
    pub fn new(id: &str, title: &str, x_label: &str, y_label: &str) -> Self {
        Chart {
            id: id.to_owned(),
            title: title.to_owned(),
            x_label: x_label.to_owned(),
            y_label: y_label.to_owned(),
            x_scale: Scale::Linear,
            y_scale: Scale::Linear,
            x_factor: 1.0,
            y_factor: 1.0,
            y_min: None,
            y_min_span: 0.0,
            y2: None,
            series: Vec::new(),
            bands: Vec::new(),
            marks: Vec::new(),
        }
    }
}

/// One axis mapping display values to pixels.
#[derive(Debug, Clone, Copy)]
struct Axis {
    scale: Scale,
    /// Range in display units (log10 of them for a log axis).
    lo: f64,
    hi: f64,
    /// Pixel positions of `lo` and `hi`.
    p_lo: f64,
    p_hi: f64,
}

impl Axis {
    fn to_px(self, v: f64) -> Option<f64> {
        let t = match self.scale {
            Scale::Linear => v,
            Scale::Log if v > 0.0 => v.log10(),
            Scale::Log => return None,
        };
        v.is_finite()
            .then(|| self.p_lo + (t - self.lo) / (self.hi - self.lo) * (self.p_hi - self.p_lo))
    }
}

/// The plotting rectangle and its two axes.
struct Frame {
    x0: f64,
    x1: f64,
    top: f64,
    bottom: f64,
    xa: Axis,
    ya: Axis,
}

/// Writes the chart as an `<svg>` element.
pub fn render(chart: &Chart<'_>) -> String {
    let right = RIGHT[usize::from(chart.y2.is_some())];
    let (x0, x1) = (LEFT, WIDTH - right);
    let (top, bottom) = (TOP, TOP + PLOT_H);
    let legend = legend_layout(&chart.series, x1 - x0);
    let height = bottom + BOTTOM + legend.rows as f64 * LEGEND_ROW + 6.0;
    let id = esc(&chart.id);
    let mut s = String::new();
    let _ = write!(
        s,
        r##"<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {height:.0}" role="img" aria-labelledby="{id}-t" font-family="sans-serif" font-size="12"><title id="{id}-t">{title}</title><rect width="100%" height="100%" fill="#fff"/><text x="{x0}" y="18" font-size="14" font-weight="bold">{title}</text>"##,
        title = esc(&chart.title)
    );
    let Some((xr, yr)) = data_ranges(chart) else {
        let _ = write!(
            s,
            r##"<rect x="{x0}" y="{top}" width="{:.0}" height="{PLOT_H}" fill="none" stroke="#444"/><text x="{:.0}" y="{:.0}" text-anchor="middle" fill="#666">no data to plot</text></svg>"##,
            x1 - x0,
            (x0 + x1) / 2.0,
            (top + bottom) / 2.0
        );
        return s;
    };
    let (x_lo, x_hi, x_ticks) = ticks_for(chart.x_scale, xr, false);
    let (y_lo, y_hi, y_ticks) = ticks_for(chart.y_scale, yr, true);
    let f = Frame {
        x0,
        x1,
        top,
        bottom,
        xa: Axis {
            scale: chart.x_scale,
            lo: x_lo,
            hi: x_hi,
            p_lo: x0,
            p_hi: x1,
        },
        ya: Axis {
            scale: chart.y_scale,
            lo: y_lo,
            hi: y_hi,
            p_lo: bottom,
            p_hi: top,
        },
    };
    write_grid(&mut s, &f, &x_ticks, &y_ticks);
    if let (Some(second), Scale::Linear) = (&chart.y2, chart.y_scale) {
        write_second_axis(&mut s, &f, second);
    }
    write_marks(&mut s, &f, &chart.marks);
    let _ = write!(
        s,
        r#"<clipPath id="{id}-clip"><rect x="{x0}" y="{top}" width="{:.0}" height="{PLOT_H}"/></clipPath><g clip-path="url(#{id}-clip)" fill="none" stroke-linejoin="round">"#,
        x1 - x0
    );
    for band in &chart.bands {
        write_band(&mut s, &f, chart, band);
    }
    for series in &chart.series {
        write_series(&mut s, &f, chart, series);
    }
    s.push_str("</g>");
    let _ = write!(
        s,
        r##"<rect x="{x0}" y="{top}" width="{:.0}" height="{PLOT_H}" fill="none" stroke="#444"/><text x="{:.0}" y="{:.0}" text-anchor="middle">{}</text><text transform="translate(16 {:.0}) rotate(-90)" text-anchor="middle">{}</text>"##,
        x1 - x0,
        (x0 + x1) / 2.0,
        bottom + 36.0,
        esc(&chart.x_label),
        (top + bottom) / 2.0,
        esc(&chart.y_label)
    );
    write_legend(&mut s, &f, &chart.series, &legend);
    s.push_str("</svg>");
    s
}

/// Grid lines, tick marks, tick labels and the zero line.
fn write_grid(s: &mut String, f: &Frame, x_ticks: &[Tick], y_ticks: &[Tick]) {
    let grid = |major: bool| if major { "#ddd" } else { "#f0f0f0" };
    let tick_len = |major: bool| if major { 5.0 } else { 3.0 };
    let (x0, x1, top, bottom) = (f.x0, f.x1, f.top, f.bottom);
    for t in x_ticks {
        let Some(px) = f.xa.to_px(t.value) else {
            continue;
        };
        let _ = write!(
            s,
            r##"<line x1="{px:.1}" y1="{top}" x2="{px:.1}" y2="{bottom}" stroke="{}"/><line x1="{px:.1}" y1="{bottom}" x2="{px:.1}" y2="{:.0}" stroke="#444"/>"##,
            grid(t.major),
            bottom + tick_len(t.major)
        );
        if let Some(label) = &t.label {
            let _ = write!(
                s,
                r#"<text x="{px:.1}" y="{:.0}" text-anchor="middle">{}</text>"#,
                bottom + 18.0,
                esc(label)
            );
        }
    }
    for t in y_ticks {
        let Some(py) = f.ya.to_px(t.value) else {
            continue;
        };
        let _ = write!(
            s,
            r##"<line x1="{x0}" y1="{py:.1}" x2="{x1}" y2="{py:.1}" stroke="{}"/><line x1="{:.0}" y1="{py:.1}" x2="{x0}" y2="{py:.1}" stroke="#444"/>"##,
            grid(t.major),
            x0 - tick_len(t.major)
        );
        if let Some(label) = &t.label {
            let _ = write!(
                s,
                r#"<text x="{:.0}" y="{:.1}" text-anchor="end">{}</text>"#,
                x0 - 8.0,
                py + 4.0,
                esc(label)
            );
        }
    }
    if f.ya.scale == Scale::Linear && f.ya.lo < 0.0 && f.ya.hi > 0.0 {
        if let Some(py) = f.ya.to_px(0.0) {
            let _ = write!(
                s,
                r##"<line x1="{x0}" y1="{py:.1}" x2="{x1}" y2="{py:.1}" stroke="#888"/>"##
            );
        }
    }
}

/// Ticks and label of the right-hand axis (linear y only).
fn write_second_axis(s: &mut String, f: &Frame, second: &SecondAxis) {
    let k = second.per_primary;
    let (a, b) = (f.ya.lo * k, f.ya.hi * k);
    let (lo, hi) = (a.min(b), a.max(b));
    let step = nice_step((hi - lo) / 5.0);
    let values = multiples(lo, hi, step);
    for (v, label) in values.iter().zip(linear_labels(&values, step)) {
        if let Some(py) = f.ya.to_px(v / k) {
            let _ = write!(
                s,
                r##"<line x1="{}" y1="{py:.1}" x2="{:.0}" y2="{py:.1}" stroke="#444"/><text x="{:.0}" y="{:.1}">{}</text>"##,
                f.x1,
                f.x1 + 5.0,
                f.x1 + 8.0,
                py + 4.0,
                esc(&label)
            );
        }
    }
    let _ = write!(
        s,
        r#"<text transform="translate({:.0} {:.0}) rotate(90)" text-anchor="middle">{}</text>"#,
        WIDTH - 14.0,
        (f.top + f.bottom) / 2.0,
        esc(&second.label)
    );
}

/// Dashed vertical reference lines; labels are staggered so that close lines stay legible.
fn write_marks(s: &mut String, f: &Frame, marks: &[Mark]) {
    for (k, m) in marks.iter().enumerate() {
        let Some(px) = f.xa.to_px(m.x).filter(|p| (f.x0..=f.x1).contains(p)) else {
            continue;
        };
        let _ = write!(
            s,
            r##"<line x1="{px:.1}" y1="{}" x2="{px:.1}" y2="{}" stroke="#555" stroke-dasharray="3 3"/><text x="{:.1}" y="{:.0}" fill="#333" font-size="11">{}</text>"##,
            f.top,
            f.bottom,
            px + 4.0,
            f.top + 14.0 + 14.0 * (k % 3) as f64,
            esc(&m.label)
        );
    }
}

/// One series as a decimated path, with point markers when it has few points.
/// A band as one filled outline: per pixel column the lowest `lo` and highest `hi` of the
/// points in it (so a band of thousands of cycles stays a few hundred points), along the
/// upper edge and back along the lower.
fn write_band(s: &mut String, f: &Frame, chart: &Chart<'_>, band: &Band<'_>) {
    let mut cols: Vec<(f64, f64, f64)> = Vec::new();
    for ((&x, &lo), &hi) in band.x.iter().zip(band.lo).zip(band.hi) {
        let (Some(px), Some(p_lo), Some(p_hi)) = (
            f.xa.to_px(x * chart.x_factor),
            f.ya.to_px(lo * chart.y_factor),
            f.ya.to_px(hi * chart.y_factor),
        ) else {
            continue;
        };
        let col = px.round();
        match cols.last_mut() {
            // Pixel y grows downward: the lower edge has the larger y.
            Some(c) if c.0 == col => {
                c.1 = c.1.max(p_lo);
                c.2 = c.2.min(p_hi);
            }
            _ => cols.push((col, p_lo, p_hi)),
        }
    }
    if cols.is_empty() {
        return;
    }
    let _ = write!(
        s,
        r#"<path fill="{}" fill-opacity="0.3" stroke="none" d=""#,
        band.color
    );
    for (k, (px, _, p_hi)) in cols.iter().enumerate() {
        let _ = write!(s, "{}{px:.1} {p_hi:.1}", if k == 0 { "M" } else { "L" });
    }
    for (px, p_lo, _) in cols.iter().rev() {
        let _ = write!(s, "L{px:.1} {p_lo:.1}");
    }
    s.push_str(r#"Z"/>"#);
}

fn write_series(s: &mut String, f: &Frame, chart: &Chart<'_>, series: &Series<'_>) {
    let y_min = chart.y_min.unwrap_or(f64::NEG_INFINITY);
    let pixels = series.x.iter().zip(series.y).map(|(&x, &y)| {
        let y = y * chart.y_factor;
        Some((
            f.xa.to_px(x * chart.x_factor)?,
            f.ya.to_px(y).filter(|_| y >= y_min)?,
        ))
    });
    let segments = decimate(pixels);
    let _ = write!(
        s,
        r#"<path stroke="{}" stroke-width="{}"{} d=""#,
        series.style.color,
        series.style.width,
        dash_attr(&series.style)
    );
    for seg in &segments {
        for (k, (px, py)) in seg.iter().enumerate() {
            let _ = write!(s, "{}{px:.1} {py:.1}", if k == 0 { "M" } else { "L" });
        }
    }
    s.push_str(r#""/>"#);
    let n_points: usize = segments.iter().map(Vec::len).sum();
    if n_points <= MARKER_MAX_POINTS {
        for (px, py) in segments.iter().flatten() {
            let _ = write!(
                s,
                r#"<circle cx="{px:.1}" cy="{py:.1}" r="2.5" fill="{}" stroke="none"/>"#,
                series.style.color
            );
        }
    }
}

/// The legend rows below the x-axis label.
fn write_legend(s: &mut String, f: &Frame, series: &[Series<'_>], legend: &LegendLayout) {
    let labelled = series.iter().filter(|se| !se.label.is_empty());
    for (se, (row, offset)) in labelled.zip(&legend.places) {
        let lx = f.x0 + offset;
        let ly = f.bottom + BOTTOM + 8.0 + *row as f64 * LEGEND_ROW;
        let _ = write!(
            s,
            r#"<line x1="{lx:.0}" y1="{ly:.0}" x2="{:.0}" y2="{ly:.0}" stroke="{}" stroke-width="{}"{}/><text x="{:.0}" y="{:.0}">{}</text>"#,
            lx + 28.0,
            se.style.color,
            se.style.width.max(2.0),
            dash_attr(&se.style),
            lx + 34.0,
            ly + 4.0,
            esc(&se.label)
        );
    }
}

fn dash_attr(style: &Style) -> String {
    if style.dash.is_empty() {
        String::new()
    } else {
        format!(r#" stroke-dasharray="{}""#, style.dash)
    }
}

/// Where legend entries go: (row, x offset) per labelled series.
struct LegendLayout {
    rows: usize,
    places: Vec<(usize, f64)>,
}

fn legend_layout(series: &[Series<'_>], width: f64) -> LegendLayout {
    let mut places = Vec::new();
    let (mut row, mut x) = (0, 0.0);
    for se in series.iter().filter(|se| !se.label.is_empty()) {
        let w = 34.0 + se.label.chars().count() as f64 * CHAR_W + 18.0;
        if x > 0.0 && x + w > width {
            row += 1;
            x = 0.0;
        }
        places.push((row, x));
        x += w;
    }
    LegendLayout {
        rows: if places.is_empty() { 0 } else { row + 1 },
        places,
    }
}

/// Ranges (display units) of all drawable points and marks: ((x_min, x_max), (y_min, y_max)).
fn data_ranges(chart: &Chart<'_>) -> Option<((f64, f64), (f64, f64))> {
    let ok = |v: f64, scale: Scale| v.is_finite() && (scale == Scale::Linear || v > 0.0);
    let y_min = chart.y_min.unwrap_or(f64::NEG_INFINITY);
    let mut xr = (f64::INFINITY, f64::NEG_INFINITY);
    let mut yr = xr;
    for se in &chart.series {
        for (&x, &y) in se.x.iter().zip(se.y) {
            let (x, y) = (x * chart.x_factor, y * chart.y_factor);
            if ok(x, chart.x_scale) && ok(y, chart.y_scale) && y >= y_min {
                xr = (xr.0.min(x), xr.1.max(x));
                yr = (yr.0.min(y), yr.1.max(y));
            }
        }
    }
    for b in &chart.bands {
        for ((&x, &lo), &hi) in b.x.iter().zip(b.lo).zip(b.hi) {
            for y in [lo, hi] {
                let (x, y) = (x * chart.x_factor, y * chart.y_factor);
                if ok(x, chart.x_scale) && ok(y, chart.y_scale) && y >= y_min {
                    xr = (xr.0.min(x), xr.1.max(x));
                    yr = (yr.0.min(y), yr.1.max(y));
                }
            }
        }
    }
    if xr.0 > xr.1 {
        return None;
    }
    for m in &chart.marks {
        if ok(m.x, chart.x_scale) {
            xr = (xr.0.min(m.x), xr.1.max(m.x));
        }
    }
    let need = chart.y_min_span * yr.0.abs().max(yr.1.abs());
    if chart.y_scale == Scale::Linear && yr.0 <= yr.1 && yr.1 - yr.0 < need {
        let mid = 0.5 * (yr.0 + yr.1);
        yr = (mid - 0.5 * need, mid + 0.5 * need);
    }
    Some((xr, yr))
}

#[cfg(test)]
mod tests {
    use super::*;

    const STYLE: Style = Style {
        color: "#000",
        dash: "",
        width: 1.5,
    };

    #[test]
    fn render_works() {
        let x: Vec<f64> = (0..5000).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| (v / 100.0).sin()).collect();
        let mut c = Chart::new("c1", "Head <a&b>", "Time [s]", "Head [m]");
        c.y2 = Some(SecondAxis {
            label: "Head [ft]".into(),
            per_primary: 3.28,
        });
        c.series.push(Series {
            label: "run \"A\"".into(),
            x: &x,
            y: &y,
            style: STYLE,
        });
        c.marks.push(Mark {
            x: 2500.0,
            label: "r_b".into(),
        });
        let svg = render(&c);
        assert!(svg.starts_with("<svg") && svg.ends_with("</svg>"));
        assert!(svg.contains("Head &lt;a&amp;b&gt;"));
        assert!(svg.contains("run &quot;A&quot;"));
        assert!(svg.contains("Head [ft]") && svg.contains(">r_b<"));
        let path = svg
            .split(" d=\"")
            .nth(1)
            .unwrap()
            .split('"')
            .next()
            .unwrap();
        let points = path.matches(['M', 'L']).count();
        assert!(points <= 2000 && points > 100, "{points} points");
    }

    #[test]
    fn render_without_data_says_so() {
        let c = Chart::new("e", "Empty", "x", "y");
        assert!(render(&c).contains("no data to plot"));
        let nan = [f64::NAN];
        let mut c = Chart::new("n", "NaN only", "x", "y");
        c.series.push(Series {
            label: String::new(),
            x: &nan,
            y: &nan,
            style: STYLE,
        });
        assert!(render(&c).contains("no data to plot"));
    }

    /// A minimum span widens a y range narrower than it about its middle, and leaves a
    /// wider one alone.
    #[test]
    fn a_minimum_span_widens_a_narrow_y_range() {
        let x = [1.0, 2.0, 3.0];
        let y = [2.999, 2.9995, 3.0];
        let mut c = Chart::new("s", "Span", "x", "y");
        c.series.push(Series {
            label: String::new(),
            x: &x,
            y: &y,
            style: STYLE,
        });
        let (_, yr) = data_ranges(&c).unwrap();
        assert_eq!(yr, (2.999, 3.0));
        c.y_min_span = 0.05;
        let (_, (lo, hi)) = data_ranges(&c).unwrap();
        // 5 % of 3.0 = 0.15 about the middle 2.9995 (hand arithmetic).
        assert!((hi - lo - 0.15).abs() < 1e-12 && (0.5 * (lo + hi) - 2.9995).abs() < 1e-12);
        let wide = [1.0, 2.0, 3.0];
        c.series[0].y = &wide;
        assert_eq!(data_ranges(&c).unwrap().1, (1.0, 3.0));
    }
}
