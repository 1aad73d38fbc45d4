//! The chart toolkit shared by every figure: fonts and text sizes, axis ranges and ticks,
//! pathway lines, markers and legends, threshold-class bands, and the finished [`Figure`].

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::{FONT, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{PathwayInfo, Quantiles, ThresholdClasses};
use crate::report::palette::{self, Dash, Marker, PathwayStyle};

pub(super) type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;
/// The chart type of every figure: years or categories on x, a quantity on y.
pub(super) type Chart<'a, 'b> =
    ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

// plotters writes `font-size = size / 1.24` into the SVG; these give 9.4, 10 and 11 px.
pub(super) const TICK: f64 = 11.6;
pub(super) const LABEL: f64 = 12.4;
pub(super) const TITLE: f64 = 13.6;

pub(super) fn font(size: f64) -> FontDesc<'static> {
    FontDesc::new(FontFamily::Name(FONT), size, FontStyle::Normal)
}

pub(super) fn text_style(size: f64, colour: RGBColor) -> TextStyle<'static> {
    font(size).color(&colour)
}

pub(super) fn anchored(size: f64, colour: RGBColor, h: HPos, v: VPos) -> TextStyle<'static> {
    text_style(size, colour).pos(Pos::new(h, v))
}

/// Approximate rendered width of a text in DejaVu Sans, px (about 0.6 em per character).
pub(super) fn text_width(text: &str, size: f64) -> i32 {
    let em = size / 1.24;
    (text.chars().count() as f64 * em * 0.6).round() as i32
}

pub(super) fn finite_all(q: &Quantiles) -> bool {
    [q.p05, q.p25, q.p50, q.p75, q.p95]
        .iter()
        .all(|v| v.is_finite())
}

/// A "nice" axis range covering `lo..hi` with some padding, snapped to `step`.
pub(super) fn nice_range(lo: f64, hi: f64, step: f64) -> (f64, f64) {
    let (lo, hi) = if lo.is_finite() && hi.is_finite() && hi > lo {
        (lo, hi)
    } else if lo.is_finite() {
        (lo - step, lo + step)
    } else {
        (0.0, 1.0)
    };
    let pad = (hi - lo) * 0.04;
    let a = ((lo - pad) / step).floor() * step;
    let b = ((hi + pad) / step).ceil() * step;
    if b > a { (a, b) } else { (a, a + step) }
}

/// Ω_ar range for charts with threshold bands: the data plus the band edges near them.
pub(super) fn omega_range(data_lo: f64, data_hi: f64, classes: &ThresholdClasses) -> (f64, f64) {
    let mut lo = data_lo;
    let mut hi = data_hi;
    if let (Some(top), Some(bottom)) = (classes.levels.first(), classes.levels.last())
        && lo.is_finite()
        && hi.is_finite()
    {
        // Show every level with a margin around the data, so that the bands are visible.
        lo = lo.min(bottom - 0.25);
        hi = hi.max(top + 0.25);
    }
    nice_range(lo, hi, 0.5)
}

pub(super) fn year_range(years: impl Iterator<Item = i32>) -> (f64, f64) {
    let (mut lo, mut hi) = (i32::MAX, i32::MIN);
    for y in years {
        lo = lo.min(y);
        hi = hi.max(y);
    }
    if lo > hi {
        return (2020.0, 2100.0);
    }
    if lo == hi {
        return (f64::from(lo) - 1.0, f64::from(hi) + 1.0);
    }
    (f64::from(lo), f64::from(hi))
}

pub(super) fn year_ticks(lo: f64, hi: f64) -> usize {
    let span = hi - lo;
    let step = if span > 60.0 {
        20.0
    } else if span > 25.0 {
        10.0
    } else {
        5.0
    };
    ((span / step).floor() as usize + 1).max(2)
}

/// Tick values for `lo..=hi`: multiples of the smallest 1-2-5 step that gives at most
/// `max_ticks` ticks (at least two when the range allows), and the decimals that step needs.
pub(super) fn nice_ticks(lo: f64, hi: f64, max_ticks: usize) -> (Vec<f64>, usize) {
    if !(lo.is_finite() && hi.is_finite() && hi > lo) || max_ticks < 2 {
        return (Vec::new(), 0);
    }
    let span = hi - lo;
    let mut exp = (span / max_ticks as f64).log10().floor() as i32 - 1;
    loop {
        for m in [1.0, 2.0, 5.0] {
            let step = m * 10f64.powi(exp);
            let first = (lo / step - 1e-9).ceil();
            let last = (hi / step + 1e-9).floor();
            let count = (last - first) as i64 + 1;
            if count >= 1 && count as usize <= max_ticks {
                let decimals = (-exp).max(0) as usize;
                let f = 10f64.powi(decimals as i32);
                let ticks = (0..count)
                    .map(|i| (((first + i as f64) * step) * f).round() / f)
                    .collect();
                return (ticks, decimals);
            }
        }
        exp += 1;
        if exp > 308 {
            return (Vec::new(), 0);
        }
    }
}

/// A label broken into at most two lines of about `max_chars` characters at spaces; the second
/// line is shortened with an ellipsis when the label is longer still.
pub(super) fn wrap_two_lines(label: &str, max_chars: usize) -> Vec<String> {
    let max_chars = max_chars.max(4);
    if label.chars().count() <= max_chars {
        return vec![label.to_string()];
    }
    let mut first = String::new();
    let mut words = label.split(' ').peekable();
    while let Some(w) = words.peek() {
        let len = first.chars().count() + usize::from(!first.is_empty()) + w.chars().count();
        if len > max_chars && !first.is_empty() {
            break;
        }
        if !first.is_empty() {
            first.push(' ');
        }
        first.push_str(w);
        words.next();
    }
    let rest: Vec<&str> = words.collect();
    if rest.is_empty() {
        return vec![shorten(&first, max_chars)];
    }
    vec![
        shorten(&first, max_chars),
        shorten(&rest.join(" "), max_chars),
    ]
}

/// Outline points of a marker centred on a backend pixel (`None` for the circle).
pub(super) fn marker_points(marker: Marker, (x, y): (i32, i32)) -> Option<Vec<(i32, i32)>> {
    let r = 3;
    match marker {
        Marker::Circle => None,
        Marker::Square => Some(vec![
            (x - 3, y - 3),
            (x + 3, y - 3),
            (x + 3, y + 3),
            (x - 3, y + 3),
        ]),
        Marker::Triangle => Some(vec![
            (x, y - r - 1),
            (x + r + 1, y + r - 1),
            (x - r - 1, y + r - 1),
        ]),
        Marker::TriangleDown => Some(vec![
            (x, y + r + 1),
            (x + r + 1, y - r + 1),
            (x - r - 1, y - r + 1),
        ]),
        Marker::Diamond => Some(vec![
            (x, y - r - 1),
            (x + r + 1, y),
            (x, y + r + 1),
            (x - r - 1, y),
        ]),
    }
}

/// Draws a marker centred on a backend pixel: filled with `fill` (white when hollow) and
/// outlined with `outline`.
pub(super) fn draw_marker_styled(
    root: &Area<'_>,
    at: (i32, i32),
    marker: Marker,
    fill: RGBColor,
    outline: RGBColor,
) -> FigResult<()> {
    match marker_points(marker, at) {
        None => {
            root.draw(&Circle::new(at, 3, fill.filled())).map_err(err)?;
            root.draw(&Circle::new(at, 3, outline.stroke_width(1)))
                .map_err(err)
        }
        Some(pts) => {
            root.draw(&Polygon::new(pts.clone(), fill.filled()))
                .map_err(err)?;
            let mut closed = pts.clone();
            closed.extend(pts.first().copied());
            root.draw(&PathElement::new(closed, outline.stroke_width(1)))
                .map_err(err)
        }
    }
}

/// Draws a pathway marker: solid in the pathway colour, or hollow (white inside) when
/// `filled` is false.
pub(super) fn draw_marker(
    root: &Area<'_>,
    at: (i32, i32),
    marker: Marker,
    colour: RGBColor,
    filled: bool,
) -> FigResult<()> {
    if filled {
        draw_marker_styled(root, at, marker, colour, colour)
    } else {
        draw_marker_styled(root, at, marker, WHITE, colour)
    }
}

/// Draws a polyline in backend pixels with the pathway's dash pattern.
pub(super) fn draw_styled_line(
    root: &Area<'_>,
    points: Vec<(i32, i32)>,
    style: &PathwayStyle,
    width: u32,
) -> FigResult<()> {
    if points.len() < 2 {
        return Ok(());
    }
    // A white edge under the line keeps it readable over the bands and the class shading.
    root.draw(&PathElement::new(
        points.clone(),
        WHITE.stroke_width(width + 2),
    ))
    .map_err(err)?;
    let shape = style.colour.stroke_width(width);
    match style.dash {
        Dash::Solid => root.draw(&PathElement::new(points, shape)).map_err(err),
        Dash::Dashed(len, gap) => root
            .draw(&DashedPathElement::new(points, len, gap, shape))
            .map_err(err),
    }
}

pub(super) const LEGEND_ROW_H: i32 = 16;

/// Positions of legend items (x, y of the row centre) for labels laid out across `width` px
/// from `origin`, wrapping to more rows when needed.
pub(super) fn legend_layout(labels: &[&str], origin: (i32, i32), width: i32) -> Vec<(i32, i32)> {
    let (x0, y0) = origin;
    let (mut x, mut y) = (x0, y0 + LEGEND_ROW_H / 2);
    let mut out = Vec::with_capacity(labels.len());
    for label in labels {
        let item_w = 24 + text_width(label, TICK) + 12;
        if x > x0 && x + item_w > x0 + width {
            x = x0;
            y += LEGEND_ROW_H;
        }
        out.push((x, y));
        x += item_w;
    }
    out
}

/// Height a legend needs, px (rows × row height + a small gap).
pub(super) fn legend_height(labels: &[&str], width: i32) -> i32 {
    let rows = legend_layout(labels, (0, 0), width)
        .iter()
        .map(|p| p.1)
        .collect::<std::collections::BTreeSet<_>>()
        .len()
        .max(1) as i32;
    rows * LEGEND_ROW_H + 4
}

/// A legend of pathway samples (line + marker + label) across `width` px from `origin`.
pub(super) fn draw_pathway_legend(
    root: &Area<'_>,
    pathways: &[&PathwayInfo],
    count: usize,
    indices: &[usize],
    origin: (i32, i32),
    width: i32,
) -> FigResult<()> {
    let labels: Vec<&str> = pathways.iter().map(|p| p.label.as_str()).collect();
    let positions = legend_layout(&labels, origin, width);
    for ((p, &k), (x, y)) in pathways.iter().zip(indices).zip(positions) {
        let style = palette::pathway_style(k, count);
        draw_styled_line(root, vec![(x, y), (x + 20, y)], &style, 2)?;
        draw_marker(root, (x + 10, y), style.marker, style.colour, true)?;
        root.draw(&Text::new(
            p.label.clone(),
            (x + 24, y),
            anchored(TICK, palette::INK, HPos::Left, VPos::Center),
        ))
        .map_err(err)?;
    }
    Ok(())
}

/// Shades the threshold classes as horizontal bands over the x range, with a thin line at each
/// level, and writes the class labels in the right margin (`long`: level and name).
pub(super) fn draw_class_bands(
    root: &Area<'_>,
    chart: &mut Chart<'_, '_>,
    classes: &ThresholdClasses,
    long: bool,
) -> FigResult<()> {
    let xr = chart.x_range();
    let yr = chart.y_range();
    let n = classes.levels.len();
    for k in 0..=n {
        let upper = if k == 0 {
            yr.end
        } else {
            classes.levels[k - 1]
        };
        let lower = if k == n { yr.start } else { classes.levels[k] };
        let (lo, hi) = (lower.max(yr.start), upper.min(yr.end));
        if hi <= lo {
            continue;
        }
        // Limits not checked against their source shade nothing (the dashed lines below
        // still mark them).
        if classes.checked {
            chart
                .draw_series(std::iter::once(Rectangle::new(
                    [(xr.start, lo), (xr.end, hi)],
                    palette::class_fill(k).filled(),
                )))
                .map_err(err)?;
        }
        // Label in the right margin, centred on the visible part of the band.
        let label = class_label(classes, k, long);
        let (px, py) = chart.backend_coord(&(xr.end, (lo + hi) / 2.0));
        let (_, top) = chart.backend_coord(&(xr.end, hi));
        let (_, bottom) = chart.backend_coord(&(xr.end, lo));
        if bottom - top >= 11 {
            root.draw(&Text::new(
                label,
                (px + 8, py),
                anchored(TICK, palette::MUTED, HPos::Left, VPos::Center),
            ))
            .map_err(err)?;
        }
    }
    for level in &classes.levels {
        if *level > yr.start && *level < yr.end {
            // Dashed, so that a class boundary is not mistaken for a data line.
            let a = chart.backend_coord(&(xr.start, *level));
            let b = chart.backend_coord(&(xr.end, *level));
            root.draw(&DashedPathElement::new(
                vec![a, b],
                4,
                3,
                palette::MUTED.mix(0.7).stroke_width(1),
            ))
            .map_err(err)?;
        }
    }
    Ok(())
}

/// A class's band label: its Ω_ar range ("3.5–4.0"); with `long` the class name follows.
pub(super) fn class_label(classes: &ThresholdClasses, k: usize, long: bool) -> String {
    let range = fmt::class_range_text(classes, k);
    match (long, classes.labels.get(k)) {
        (true, Some(name)) if !name.is_empty() => format!("{range} {name}"),
        _ => range,
    }
}

pub(super) fn right_margin(classes: &ThresholdClasses, long: bool) -> u32 {
    let widest = (0..=classes.levels.len())
        .map(|k| text_width(&class_label(classes, k, long), TICK))
        .max()
        .unwrap_or(0);
    (widest + 13).clamp(14, 200) as u32
}

pub(super) fn configure_axes(
    chart: &mut Chart<'_, '_>,
    x_desc: &str,
    y_desc: &str,
    x_ticks: usize,
    y_fmt: &dyn Fn(&f64) -> String,
    y_ticks: usize,
) -> FigResult<()> {
    let year_fmt = |v: &f64| format!("{v:.0}");
    chart
        .configure_mesh()
        .disable_x_mesh()
        .light_line_style(TRANSPARENT)
        .bold_line_style(palette::GRID.stroke_width(1))
        .axis_style(palette::INK.stroke_width(1))
        .label_style(text_style(TICK, palette::INK))
        .axis_desc_style(text_style(LABEL, palette::INK))
        .x_labels(x_ticks)
        .y_labels(y_ticks)
        .x_label_formatter(&year_fmt)
        .y_label_formatter(y_fmt)
        .x_desc(x_desc)
        .y_desc(y_desc)
        .draw()
        .map_err(err)
}

/// Fills the band between two curves (data coordinates, same x in the same order) with
/// `colour` at `opacity` and outlines it thinly in the same colour, so that its edge stays visible
/// over the class shading and in greyscale print.
pub(super) fn draw_band(
    root: &Area<'_>,
    chart: &Chart<'_, '_>,
    upper: &[(f64, f64)],
    lower: &[(f64, f64)],
    colour: RGBColor,
    opacity: f64,
) -> FigResult<()> {
    let outline = band_polygon(chart, upper, lower);
    if outline.len() < 3 {
        return Ok(());
    }
    root.draw(&Polygon::new(outline.clone(), colour.mix(opacity).filled()))
        .map_err(err)?;
    let mut closed = outline.clone();
    closed.extend(outline.first().copied());
    root.draw(&PathElement::new(closed, colour.mix(0.7).stroke_width(1)))
        .map_err(err)
}

pub(super) fn band_polygon(
    chart: &Chart<'_, '_>,
    upper: &[(f64, f64)],
    lower: &[(f64, f64)],
) -> Vec<(i32, i32)> {
    upper
        .iter()
        .chain(lower.iter().rev())
        .map(|p| chart.backend_coord(p))
        .collect()
}

pub(super) fn finish(
    svg: String,
    name: String,
    alt: String,
    placement: Placement,
    h: u32,
) -> Figure {
    Figure {
        name,
        svg,
        alt,
        placement,
        width_px: placement.width_px(),
        height_px: h,
    }
}

pub(super) const OMEGA_LABEL: &str = "Ωₐᵣ (aragonite saturation)";
pub(super) const OMEGA_SHORT: &str = "Ωₐᵣ";

pub(super) fn shorten(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_string()
    } else {
        let mut out: String = s.chars().take(max.saturating_sub(1)).collect();
        out.push('…');
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nice_ticks_use_one_two_five_steps_within_the_range() {
        let (t, d) = nice_ticks(3.5, 3.9, 4);
        assert_eq!(t, vec![3.6, 3.8]);
        assert_eq!(d, 1);
        let (t, d) = nice_ticks(8.02, 8.08, 4);
        assert_eq!(t, vec![8.02, 8.04, 8.06, 8.08]);
        assert_eq!(d, 2);
        let (t, _) = nice_ticks(26.0, 29.5, 4);
        assert_eq!(t, vec![26.0, 27.0, 28.0, 29.0]);
        assert!(nice_ticks(f64::NAN, 1.0, 4).0.is_empty());
        assert!(nice_ticks(1.0, 1.0, 4).0.is_empty());
    }

    #[test]
    fn long_site_names_wrap_over_two_lines() {
        assert_eq!(wrap_two_lines("1. Short", 20), vec!["1. Short"]);
        assert_eq!(
            wrap_two_lines("1. Tala Vesi back-reef lagoon", 20),
            vec!["1. Tala Vesi", "back-reef lagoon"]
        );
        let w = wrap_two_lines("Averyveryverylongsinglewordname and more words here", 10);
        assert_eq!(w.len(), 2);
        assert!(w.iter().all(|l| l.chars().count() <= 10), "{w:?}");
    }

    #[test]
    fn nice_range_pads_and_snaps() {
        assert_eq!(nice_range(3.1, 3.9, 0.5), (3.0, 4.0));
        let (a, b) = nice_range(f64::NAN, f64::NAN, 0.5);
        assert!(a.is_finite() && b > a);
        let (a, b) = nice_range(2.0, 2.0, 0.5);
        assert!(b > a);
    }
}
