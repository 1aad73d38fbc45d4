//! The report's figures, drawn with plotters to SVG strings.
//!
//! Every text element names the font family explicitly ("DejaVu Sans"): the typesetter ignores
//! generic CSS families in SVG text and would silently fall back to a serif face. Sizes are
//! chosen for the placed width: a full-width figure is [`FULL_WIDTH_PX`] px wide and is placed
//! at the text width of 170 mm ≈ 482 pt, a half-width one is [`HALF_WIDTH_PX`] px wide and is
//! placed in a two-column grid, so one SVG px is about one pt and the smallest text (9.4 px) is
//! printed at ≥ 9 pt. [`Figure::min_printed_font_pt`] checks this.

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::fmt;
use super::model::{
    CalcUnit, CalcificationOutlook, PathwayInfo, Quantiles, ReportModel, SiteReport,
    ThresholdClasses,
};
use super::palette::{self, Dash, Marker, PathwayStyle};

/// Font family of all figure text; loaded into the typesetter's font book.
pub const FONT: &str = "DejaVu Sans";
/// Width of a full-width figure, px (placed at the 170 mm text width).
pub const FULL_WIDTH_PX: u32 = 480;
/// Width of a half-width figure, px (placed in one column of a two-column grid).
pub const HALF_WIDTH_PX: u32 = 236;
/// Width of a third-width figure, px (placed in one column of a three-column grid).
pub const THIRD_WIDTH_PX: u32 = 154;
/// Text width of the page, pt (170 mm).
pub const TEXT_WIDTH_PT: f64 = 170.0 / 25.4 * 72.0;
/// Gap between the two columns of a figure grid, pt (the template uses the same).
pub const GRID_GUTTER_PT: f64 = 10.0;

// plotters writes `font-size = size / 1.24` into the SVG; these give 9.4, 10 and 11 px.
const TICK: f64 = 11.6;
const LABEL: f64 = 12.4;
const TITLE: f64 = 13.6;

/// How wide a figure is placed on the page.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Placement {
    Full,
    Half,
    /// One column of a three-column grid (the calcification panels).
    Third,
}

impl Placement {
    /// Printed width, pt.
    pub fn width_pt(self) -> f64 {
        match self {
            Placement::Full => TEXT_WIDTH_PT,
            Placement::Half => (TEXT_WIDTH_PT - GRID_GUTTER_PT) / 2.0,
            Placement::Third => (TEXT_WIDTH_PT - 2.0 * GRID_GUTTER_PT) / 3.0,
        }
    }

    fn width_px(self) -> u32 {
        match self {
            Placement::Full => FULL_WIDTH_PX,
            Placement::Half => HALF_WIDTH_PX,
            Placement::Third => THIRD_WIDTH_PX,
        }
    }
}

/// One figure: an SVG document plus what the template needs to place it.
#[derive(Debug, Clone)]
pub struct Figure {
    /// File name under `/plots/` in the typesetter's file system.
    pub name: String,
    pub svg: String,
    /// Alternative text for accessibility (tagged PDF).
    pub alt: String,
    pub placement: Placement,
    pub width_px: u32,
    pub height_px: u32,
}

impl Figure {
    /// Path of the figure in the typesetter's file system.
    pub fn path(&self) -> String {
        format!("/plots/{}", self.name)
    }

    /// Smallest font size in the SVG once placed on the page, pt (`None` without text).
    pub fn min_printed_font_pt(&self) -> Option<f64> {
        let scale = self.placement.width_pt() / f64::from(self.width_px);
        self.svg
            .split("font-size=\"")
            .skip(1)
            .filter_map(|rest| rest.split('"').next()?.parse::<f64>().ok())
            .map(|px| px * scale)
            .min_by(f64::total_cmp)
    }
}

/// An error while drawing a figure (plotters only fails on internal problems).
#[derive(Debug, Clone)]
pub struct FigureError(pub String);

impl std::fmt::Display for FigureError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "could not draw figure: {}", self.0)
    }
}

impl std::error::Error for FigureError {}

fn err<E: std::fmt::Display>(e: E) -> FigureError {
    FigureError(e.to_string())
}

type FigResult<T> = Result<T, FigureError>;
type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// All figures of a site.
#[derive(Debug, Clone, Default)]
pub struct SiteFigures {
    /// Seasonal cycle of Ω_ar, pH_T and temperature from the records.
    pub seasonal: Option<Figure>,
    /// Key figure: all pathways in the limiting season.
    pub overview: Option<Figure>,
    /// One fan chart per pathway (pathway id, figure), in pathway order.
    pub fans: Vec<(String, Figure)>,
    /// One chart per calcification relationship, in model order.
    pub calcification: Vec<Figure>,
    /// The pathway legend shared by the calcification charts.
    pub calcification_legend: Option<Figure>,
}

/// All figures of a report.
#[derive(Debug, Clone, Default)]
pub struct ReportFigures {
    pub sites: Vec<SiteFigures>,
    /// Side-by-side charts of several sites (comparison reports only; one per
    /// [`SITES_PER_COMPARISON_CHART`] sites).
    pub comparison: Vec<Figure>,
    /// The comparison's key figure for the first page: every site at the last horizon year
    /// only (comparison reports only).
    pub comparison_key: Option<Figure>,
}

impl ReportFigures {
    /// Every figure, for registering in the typesetter's file system.
    pub fn all(&self) -> Vec<&Figure> {
        let mut out = Vec::new();
        for s in &self.sites {
            out.extend(s.seasonal.iter());
            out.extend(s.overview.iter());
            out.extend(s.fans.iter().map(|(_, f)| f));
            out.extend(s.calcification.iter());
            out.extend(s.calcification_legend.iter());
        }
        out.extend(self.comparison.iter());
        out.extend(self.comparison_key.iter());
        out
    }
}

/// Draws every figure of the report.
pub fn build_all(model: &ReportModel) -> FigResult<ReportFigures> {
    let mut figs = ReportFigures::default();
    for (i, site) in model.sites.iter().enumerate() {
        let prefix = format!("s{i}");
        let mut sf = SiteFigures {
            seasonal: seasonal_cycle(site, &prefix)?,
            overview: outlook_overview(model, site, &prefix)?,
            ..SiteFigures::default()
        };
        for (k, p) in model.pathways.iter().enumerate() {
            if let Some(f) = fan_chart(model, site, k, &prefix)? {
                sf.fans.push((p.id.clone(), f));
            }
        }
        for (k, c) in site.calcification.iter().enumerate() {
            if let Some(f) = calcification_chart(model, c, &format!("{prefix}-calc{k}"))? {
                sf.calcification.push(f);
            }
        }
        if !sf.calcification.is_empty() {
            sf.calcification_legend = calcification_legend(model, site, &prefix)?;
        }
        figs.sites.push(sf);
    }
    if model.sites.len() > 1 {
        figs.comparison = comparison_charts(model)?;
        figs.comparison_key = comparison_key_chart(model)?;
    }
    Ok(figs)
}

// ---------------------------------------------------------------------------------------------
// Drawing helpers

fn font(size: f64) -> FontDesc<'static> {
    FontDesc::new(FontFamily::Name(FONT), size, FontStyle::Normal)
}

fn text_style(size: f64, colour: RGBColor) -> TextStyle<'static> {
    font(size).color(&colour)
}

fn anchored(size: f64, colour: RGBColor, h: HPos, v: VPos) -> TextStyle<'static> {
    text_style(size, colour).pos(Pos::new(h, v))
}

/// Approximate rendered width of a text in DejaVu Sans, px (about 0.6 em per character).
fn text_width(text: &str, size: f64) -> i32 {
    let em = size / 1.24;
    (text.chars().count() as f64 * em * 0.6).round() as i32
}

fn finite_all(q: &Quantiles) -> bool {
    [q.p05, q.p25, q.p50, q.p75, q.p95]
        .iter()
        .all(|v| v.is_finite())
}

/// A "nice" axis range covering `lo..hi` with some padding, snapped to `step`.
fn nice_range(lo: f64, hi: f64, step: f64) -> (f64, f64) {
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
fn omega_range(data_lo: f64, data_hi: f64, classes: &ThresholdClasses) -> (f64, f64) {
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

fn year_range(years: impl Iterator<Item = i32>) -> (f64, f64) {
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

fn year_ticks(lo: f64, hi: f64) -> usize {
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
fn nice_ticks(lo: f64, hi: f64, max_ticks: usize) -> (Vec<f64>, usize) {
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
fn wrap_two_lines(label: &str, max_chars: usize) -> Vec<String> {
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
fn marker_points(marker: Marker, (x, y): (i32, i32)) -> Option<Vec<(i32, i32)>> {
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
fn draw_marker_styled(
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
fn draw_marker(
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
fn draw_styled_line(
    root: &Area<'_>,
    points: Vec<(i32, i32)>,
    style: &PathwayStyle,
    width: u32,
) -> FigResult<()> {
    if points.len() < 2 {
        return Ok(());
    }
    let shape = style.colour.stroke_width(width);
    match style.dash {
        Dash::Solid => root.draw(&PathElement::new(points, shape)).map_err(err),
        Dash::Dashed(len, gap) => root
            .draw(&DashedPathElement::new(points, len, gap, shape))
            .map_err(err),
    }
}

const LEGEND_ROW_H: i32 = 16;

/// Positions of legend items (x, y of the row centre) for labels laid out across `width` px
/// from `origin`, wrapping to more rows when needed.
fn legend_layout(labels: &[&str], origin: (i32, i32), width: i32) -> Vec<(i32, i32)> {
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
fn legend_height(labels: &[&str], width: i32) -> i32 {
    let rows = legend_layout(labels, (0, 0), width)
        .iter()
        .map(|p| p.1)
        .collect::<std::collections::BTreeSet<_>>()
        .len()
        .max(1) as i32;
    rows * LEGEND_ROW_H + 4
}

/// A legend of pathway samples (line + marker + label) across `width` px from `origin`.
fn draw_pathway_legend(
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
fn draw_class_bands(
    root: &Area<'_>,
    chart: &mut ChartContext<'_, SVGBackend<'_>, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
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
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(xr.start, lo), (xr.end, hi)],
                palette::class_fill(k).filled(),
            )))
            .map_err(err)?;
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

/// "≥ 4.0", "3.5–4.0", "< 3.0"; with `long` the class name follows on the same line.
pub fn class_range_text(classes: &ThresholdClasses, k: usize) -> String {
    let n = classes.levels.len();
    if n == 0 {
        return String::new();
    }
    if k == 0 {
        format!("≥ {}", fmt::level(classes.levels[0]))
    } else if k >= n {
        format!("< {}", fmt::level(classes.levels[n - 1]))
    } else {
        format!(
            "{}–{}",
            fmt::level(classes.levels[k]),
            fmt::level(classes.levels[k - 1])
        )
    }
}

fn class_label(classes: &ThresholdClasses, k: usize, long: bool) -> String {
    let range = class_range_text(classes, k);
    match (long, classes.labels.get(k)) {
        (true, Some(name)) if !name.is_empty() => format!("{range} {name}"),
        _ => range,
    }
}

fn right_margin(classes: &ThresholdClasses, long: bool) -> u32 {
    let widest = (0..=classes.levels.len())
        .map(|k| text_width(&class_label(classes, k, long), TICK))
        .max()
        .unwrap_or(0);
    (widest + 13).clamp(14, 200) as u32
}

fn configure_axes(
    chart: &mut ChartContext<'_, SVGBackend<'_>, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
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

fn band_polygon(
    chart: &ChartContext<'_, SVGBackend<'_>, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    upper: &[(f64, f64)],
    lower: &[(f64, f64)],
) -> Vec<(i32, i32)> {
    upper
        .iter()
        .chain(lower.iter().rev())
        .map(|p| chart.backend_coord(p))
        .collect()
}

fn finish(svg: String, name: String, alt: String, placement: Placement, h: u32) -> Figure {
    Figure {
        name,
        svg,
        alt,
        placement,
        width_px: placement.width_px(),
        height_px: h,
    }
}

const OMEGA_LABEL: &str = "Ωₐᵣ (aragonite saturation)";
const OMEGA_SHORT: &str = "Ωₐᵣ";

// ---------------------------------------------------------------------------------------------
// (a) Seasonal cycle

/// Seasonal cycle of Ω_ar, pH_T and temperature from the records: three stacked panels with
/// the mean (dot), ±1 sd (thick bar) and the range (thin bar) per season.
pub fn seasonal_cycle(site: &SiteReport, prefix: &str) -> FigResult<Option<Figure>> {
    let seasons = &site.baseline;
    if seasons.is_empty() {
        return Ok(None);
    }
    // Each panel must be tall enough for its rotated axis title ("Temperature (°C)").
    let (w, h) = (FULL_WIDTH_PX, 360u32);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let (legend, body) = root.split_vertically(24);
        draw_seasonal_legend(&root, &legend)?;
        let panels = body.split_evenly((3, 1));
        type Getter = fn(&super::model::SeasonBaseline) -> super::model::Stat;
        let specs: [(&str, Getter, f64, usize); 3] = [
            (OMEGA_SHORT, |b| b.omega_ar, 0.1, 2),
            ("pH (total scale)", |b| b.ph_t, 0.02, 2),
            ("Temperature (°C)", |b| b.temp_c, 0.5, 1),
        ];
        let n = seasons.len();
        for (i, (panel, (desc, get, step, dec))) in panels.iter().zip(specs).enumerate() {
            let colour = palette::SEASONAL_COLOURS[i];
            let stats: Vec<super::model::Stat> = seasons.iter().map(get).collect();
            let lo = stats
                .iter()
                .map(|s| s.min.min(s.mean - s.sd))
                .filter(|v| v.is_finite());
            let hi = stats
                .iter()
                .map(|s| s.max.max(s.mean + s.sd))
                .filter(|v| v.is_finite());
            let lo = lo.fold(f64::INFINITY, f64::min);
            let hi = hi.fold(f64::NEG_INFINITY, f64::max);
            let (y0, y1) = nice_range(lo, hi, step);
            // Ticks chosen here (three or four per panel) rather than by plotters, whose choice
            // can leave a narrow panel with a single label.
            let (ticks, tick_decimals) = nice_ticks(y0, y1, 4);
            let dec = dec.max(tick_decimals);
            let last = i == 2;
            let mut chart = ChartBuilder::on(panel)
                .margin_top(6)
                .margin_right(12)
                .margin_bottom(if last { 0 } else { 6 })
                .x_label_area_size(if last { 24 } else { 4 })
                .y_label_area_size(62)
                .build_cartesian_2d(-0.5f64..(n as f64 - 0.5), y0..y1)
                .map_err(err)?;
            chart
                .configure_mesh()
                .disable_x_mesh()
                .disable_y_mesh()
                .x_labels(0)
                .y_labels(0)
                .axis_style(palette::INK.stroke_width(1))
                .axis_desc_style(text_style(LABEL, palette::INK))
                .y_desc(desc)
                .draw()
                .map_err(err)?;
            // Grid lines, tick marks and labels at our own ticks.
            let x_lo = -0.5f64;
            let x_hi = n as f64 - 0.5;
            for t in &ticks {
                let a = chart.backend_coord(&(x_lo, *t));
                let b = chart.backend_coord(&(x_hi, *t));
                root.draw(&PathElement::new(vec![a, b], palette::GRID.stroke_width(1)))
                    .map_err(err)?;
                root.draw(&PathElement::new(
                    vec![(a.0 - 4, a.1), a],
                    palette::INK.stroke_width(1),
                ))
                .map_err(err)?;
                root.draw(&Text::new(
                    fmt::number(*t, dec),
                    (a.0 - 7, a.1),
                    anchored(TICK, palette::INK, HPos::Right, VPos::Center),
                ))
                .map_err(err)?;
            }
            for (k, s) in stats.iter().enumerate() {
                let x = k as f64;
                if s.min.is_finite() && s.max.is_finite() {
                    chart
                        .draw_series(std::iter::once(PathElement::new(
                            vec![(x, s.min), (x, s.max)],
                            colour.stroke_width(1),
                        )))
                        .map_err(err)?;
                    for v in [s.min, s.max] {
                        let (px, py) = chart.backend_coord(&(x, v));
                        root.draw(&PathElement::new(
                            vec![(px - 4, py), (px + 4, py)],
                            colour.stroke_width(1),
                        ))
                        .map_err(err)?;
                    }
                }
                if s.mean.is_finite() && s.sd.is_finite() {
                    let (px, a) = chart.backend_coord(&(x, s.mean - s.sd));
                    let (_, b) = chart.backend_coord(&(x, s.mean + s.sd));
                    root.draw(&Rectangle::new(
                        [(px - 3, b), (px + 3, a)],
                        colour.mix(0.45).filled(),
                    ))
                    .map_err(err)?;
                }
                if s.mean.is_finite() {
                    let p = chart.backend_coord(&(x, s.mean));
                    root.draw(&Circle::new(p, 4, colour.filled()))
                        .map_err(err)?;
                    root.draw(&Circle::new(p, 4, WHITE.stroke_width(1)))
                        .map_err(err)?;
                }
            }
            if last {
                for (k, b) in seasons.iter().enumerate() {
                    let (px, _) = chart.backend_coord(&(k as f64, y0));
                    let (_, py) = chart.backend_coord(&(k as f64, y0));
                    root.draw(&Text::new(
                        b.season.clone(),
                        (px, py + 6),
                        anchored(LABEL, palette::INK, HPos::Center, VPos::Top),
                    ))
                    .map_err(err)?;
                }
            }
        }
        root.present().map_err(err)?;
    }
    let names: Vec<&str> = seasons.iter().map(|b| b.season.as_str()).collect();
    let alt = format!(
        "Seasonal cycle at {}: mean, ±1 standard deviation and range of aragonite saturation, \
         pH (total scale) and temperature for the seasons {}.",
        site.name,
        names.join(", ")
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-seasonal.svg"),
        alt,
        Placement::Full,
        h,
    )))
}

fn draw_seasonal_legend(root: &Area<'_>, legend: &Area<'_>) -> FigResult<()> {
    let (x_range, y_range) = legend.get_pixel_range();
    let y = (y_range.start + y_range.end) / 2;
    let mut x = x_range.start + 66;
    let c = palette::INK;
    root.draw(&Circle::new((x, y), 4, c.filled()))
        .map_err(err)?;
    root.draw(&Text::new(
        "mean",
        (x + 9, y),
        anchored(TICK, c, HPos::Left, VPos::Center),
    ))
    .map_err(err)?;
    x += 70;
    root.draw(&Rectangle::new(
        [(x - 3, y - 7), (x + 3, y + 7)],
        c.mix(0.45).filled(),
    ))
    .map_err(err)?;
    root.draw(&Text::new(
        "±1 standard deviation",
        (x + 9, y),
        anchored(TICK, c, HPos::Left, VPos::Center),
    ))
    .map_err(err)?;
    x += 160;
    root.draw(&PathElement::new(
        vec![(x, y - 8), (x, y + 8)],
        c.stroke_width(1),
    ))
    .map_err(err)?;
    root.draw(&PathElement::new(
        vec![(x - 4, y - 8), (x + 4, y - 8)],
        c.stroke_width(1),
    ))
    .map_err(err)?;
    root.draw(&PathElement::new(
        vec![(x - 4, y + 8), (x + 4, y + 8)],
        c.stroke_width(1),
    ))
    .map_err(err)?;
    root.draw(&Text::new(
        "range (min–max)",
        (x + 9, y),
        anchored(TICK, c, HPos::Left, VPos::Center),
    ))
    .map_err(err)?;
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// (b) Fan charts

struct FanData {
    years: Vec<f64>,
    q: Vec<Quantiles>,
}

fn fan_data(site: &SiteReport, pathway: &str, season: &str) -> Option<FanData> {
    let series = site.series(pathway, season)?;
    let (years, q): (Vec<f64>, Vec<Quantiles>) = series
        .points
        .iter()
        .filter(|p| finite_all(&p.omega_ar))
        .map(|p| (f64::from(p.year), p.omega_ar))
        .unzip();
    if years.is_empty() {
        None
    } else {
        Some(FanData { years, q })
    }
}

/// Ω_ar range over every pathway of a site in its limiting season (shared by all fan charts so
/// that panels can be compared at a glance).
fn site_omega_extent(model: &ReportModel, site: &SiteReport) -> (f64, f64) {
    let season = site.limiting_season().unwrap_or_default();
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for p in &model.pathways {
        if let Some(d) = fan_data(site, &p.id, season) {
            for q in &d.q {
                lo = lo.min(q.p05);
                hi = hi.max(q.p95);
            }
        }
    }
    omega_range(lo, hi, &model.thresholds)
}

/// Fan chart of Ω_ar in the limiting season under one pathway: median line, 25–75 % and 5–95 %
/// bands, over the threshold classes.
pub fn fan_chart(
    model: &ReportModel,
    site: &SiteReport,
    k: usize,
    prefix: &str,
) -> FigResult<Option<Figure>> {
    let Some(pathway) = model.pathways.get(k) else {
        return Ok(None);
    };
    let Some(season) = site.limiting_season() else {
        return Ok(None);
    };
    let Some(data) = fan_data(site, &pathway.id, season) else {
        return Ok(None);
    };
    let style = palette::pathway_style(k, model.pathways.len());
    let (w, h) = (HALF_WIDTH_PX, 176u32);
    let (y0, y1) = site_omega_extent(model, site);
    let (x0, x1) = year_range(data.years.iter().map(|y| *y as i32));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        root.draw(&Text::new(
            pathway.label.clone(),
            (46, 4),
            anchored(TITLE, palette::INK, HPos::Left, VPos::Top),
        ))
        .map_err(err)?;
        let mut chart = ChartBuilder::on(&root)
            .margin_top(22)
            .x_label_area_size(34)
            .y_label_area_size(40)
            .margin_right(right_margin(&model.thresholds, false))
            .build_cartesian_2d(x0..x1, y0..y1)
            .map_err(err)?;
        draw_class_bands(&root, &mut chart, &model.thresholds, false)?;
        configure_axes(
            &mut chart,
            "Year",
            OMEGA_SHORT,
            year_ticks(x0, x1).min(4),
            &|v: &f64| fmt::number(*v, 1),
            6,
        )?;
        let c = style.colour;
        let outer_u: Vec<(f64, f64)> = data
            .years
            .iter()
            .zip(&data.q)
            .map(|(y, q)| (*y, q.p95))
            .collect();
        let outer_l: Vec<(f64, f64)> = data
            .years
            .iter()
            .zip(&data.q)
            .map(|(y, q)| (*y, q.p05))
            .collect();
        let inner_u: Vec<(f64, f64)> = data
            .years
            .iter()
            .zip(&data.q)
            .map(|(y, q)| (*y, q.p75))
            .collect();
        let inner_l: Vec<(f64, f64)> = data
            .years
            .iter()
            .zip(&data.q)
            .map(|(y, q)| (*y, q.p25))
            .collect();
        root.draw(&Polygon::new(
            band_polygon(&chart, &outer_u, &outer_l),
            c.mix(0.22).filled(),
        ))
        .map_err(err)?;
        root.draw(&Polygon::new(
            band_polygon(&chart, &inner_u, &inner_l),
            c.mix(0.45).filled(),
        ))
        .map_err(err)?;
        let median: Vec<(i32, i32)> = data
            .years
            .iter()
            .zip(&data.q)
            .map(|(y, q)| chart.backend_coord(&(*y, q.p50)))
            .collect();
        // The median is drawn solid and dark-edged so it reads on the bands.
        root.draw(&PathElement::new(median.clone(), WHITE.stroke_width(4)))
            .map_err(err)?;
        root.draw(&PathElement::new(median, palette::INK.stroke_width(2)))
            .map_err(err)?;
        for hy in &model.horizons {
            if let Some(i) = data.years.iter().position(|y| *y == f64::from(*hy)) {
                let p = chart.backend_coord(&(data.years[i], data.q[i].p50));
                draw_marker(&root, p, style.marker, c, true)?;
            }
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Fan chart of projected aragonite saturation at {} in the {} season under {}: median \
         with 25–75 % and 5–95 % bands over the years {:.0}–{:.0}, drawn over the threshold \
         classes.",
        site.name, season, pathway.label, x0, x1
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-fan{k}.svg"),
        alt,
        Placement::Half,
        h,
    )))
}

/// The key figure: all pathways' medians with 25–75 % bands in the limiting season, over the
/// labelled threshold classes.
pub fn outlook_overview(
    model: &ReportModel,
    site: &SiteReport,
    prefix: &str,
) -> FigResult<Option<Figure>> {
    let Some(season) = site.limiting_season() else {
        return Ok(None);
    };
    let series: Vec<(usize, &PathwayInfo, FanData)> = model
        .pathways
        .iter()
        .enumerate()
        .filter_map(|(k, p)| fan_data(site, &p.id, season).map(|d| (k, p, d)))
        .collect();
    if series.is_empty() {
        return Ok(None);
    }
    let count = model.pathways.len();
    let names: Vec<&str> = series.iter().map(|(_, p, _)| p.label.as_str()).collect();
    let legend_h = legend_height(&names, FULL_WIDTH_PX as i32 - 60);
    let (w, h) = (FULL_WIDTH_PX, 215 + legend_h as u32);
    let (y0, y1) = site_omega_extent(model, site);
    let (x0, x1) = year_range(
        series
            .iter()
            .flat_map(|(_, _, d)| d.years.iter().map(|y| *y as i32)),
    );
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let labels: Vec<&PathwayInfo> = series.iter().map(|(_, p, _)| *p).collect();
        let idx: Vec<usize> = series.iter().map(|(k, _, _)| *k).collect();
        draw_pathway_legend(&root, &labels, count, &idx, (52, 2), w as i32 - 60)?;
        let (_, body) = root.split_vertically(legend_h + 2);
        let mut chart = ChartBuilder::on(&body)
            .margin_top(4)
            .x_label_area_size(34)
            .y_label_area_size(46)
            .margin_right(right_margin(&model.thresholds, true))
            .build_cartesian_2d(x0..x1, y0..y1)
            .map_err(err)?;
        draw_class_bands(&root, &mut chart, &model.thresholds, true)?;
        configure_axes(
            &mut chart,
            "Year",
            OMEGA_LABEL,
            year_ticks(x0, x1),
            &|v: &f64| fmt::number(*v, 1),
            6,
        )?;
        for (k, _, d) in &series {
            let style = palette::pathway_style(*k, count);
            let u: Vec<(f64, f64)> = d.years.iter().zip(&d.q).map(|(y, q)| (*y, q.p75)).collect();
            let l: Vec<(f64, f64)> = d.years.iter().zip(&d.q).map(|(y, q)| (*y, q.p25)).collect();
            root.draw(&Polygon::new(
                band_polygon(&chart, &u, &l),
                style.colour.mix(0.16).filled(),
            ))
            .map_err(err)?;
        }
        for (k, _, d) in &series {
            let style = palette::pathway_style(*k, count);
            let pts: Vec<(i32, i32)> = d
                .years
                .iter()
                .zip(&d.q)
                .map(|(y, q)| chart.backend_coord(&(*y, q.p50)))
                .collect();
            draw_styled_line(&root, pts, &style, 2)?;
            for hy in &model.horizons {
                if let Some(i) = d.years.iter().position(|y| *y == f64::from(*hy)) {
                    let p = chart.backend_coord(&(d.years[i], d.q[i].p50));
                    draw_marker(&root, p, style.marker, style.colour, true)?;
                }
            }
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Projected median aragonite saturation at {} in the {} season under {} pathways, with \
         25–75 % bands, over the threshold classes.",
        site.name,
        season,
        series.len()
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-overview.svg"),
        alt,
        Placement::Full,
        h,
    )))
}

// ---------------------------------------------------------------------------------------------
// (c) Calcification outlook

/// Calcification outlook of one relationship: median per pathway with a 25–75 % band; open
/// markers where the relationship is used outside its fitted range. A third-width panel (placed
/// three per row, one per relationship) titled with the relationship's name; the legend is
/// [`calcification_legend`], shared by the panels.
pub fn calcification_chart(
    model: &ReportModel,
    c: &CalcificationOutlook,
    name: &str,
) -> FigResult<Option<Figure>> {
    let count = model.pathways.len();
    let mut series = Vec::new();
    for (k, p) in model.pathways.iter().enumerate() {
        if let Some(s) = c.series.iter().find(|s| s.pathway == p.id) {
            let pts: Vec<_> = s.points.iter().filter(|pt| finite_all(&pt.value)).collect();
            if !pts.is_empty() {
                series.push((k, p, pts));
            }
        }
    }
    if series.is_empty() {
        return Ok(None);
    }
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for (_, _, pts) in &series {
        for p in pts {
            lo = lo.min(p.value.p25);
            hi = hi.max(p.value.p75);
        }
    }
    let reference = match c.unit {
        CalcUnit::PercentChange => Some(0.0),
        CalcUnit::KgCaco3PerM2Year => c.baseline.filter(|b| b.is_finite()),
    };
    if let Some(r) = reference {
        lo = lo.min(r);
        hi = hi.max(r);
    }
    let step = match c.unit {
        CalcUnit::PercentChange => 10.0,
        CalcUnit::KgCaco3PerM2Year => 0.5,
    };
    let (y0, y1) = nice_range(lo, hi, step);
    let (x0, x1) = year_range(
        series
            .iter()
            .flat_map(|(_, _, p)| p.iter().map(|pt| pt.year)),
    );
    let y_desc = match c.unit {
        CalcUnit::PercentChange => "Change (%)",
        CalcUnit::KgCaco3PerM2Year => "kg CaCO₃ m⁻² yr⁻¹",
    };
    let w = THIRD_WIDTH_PX;
    let title_h = 20;
    let h = 150 + title_h as u32;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        // About 25 characters fit at the title size; longer names are shortened (the table
        // and the caption carry them in full).
        root.draw(&Text::new(
            shorten(&c.relationship, 25),
            (4, 4),
            anchored(LABEL, palette::INK, HPos::Left, VPos::Top),
        ))
        .map_err(err)?;
        let (_, body) = root.split_vertically(title_h);
        let mut chart = ChartBuilder::on(&body)
            .margin_top(4)
            .margin_right(10)
            .x_label_area_size(34)
            .y_label_area_size(44)
            .build_cartesian_2d(x0..x1, y0..y1)
            .map_err(err)?;
        let dec = if step >= 1.0 { 0 } else { 1 };
        configure_axes(
            &mut chart,
            "Year",
            y_desc,
            year_ticks(x0, x1).min(3),
            &|v: &f64| fmt::number(*v, dec),
            6,
        )?;
        if let Some(r) = reference {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    vec![(x0, r), (x1, r)],
                    palette::MUTED.stroke_width(1),
                )))
                .map_err(err)?;
        }
        for (k, _, pts) in &series {
            let style = palette::pathway_style(*k, count);
            let u: Vec<(f64, f64)> = pts
                .iter()
                .map(|p| (f64::from(p.year), p.value.p75))
                .collect();
            let l: Vec<(f64, f64)> = pts
                .iter()
                .map(|p| (f64::from(p.year), p.value.p25))
                .collect();
            root.draw(&Polygon::new(
                band_polygon(&chart, &u, &l),
                style.colour.mix(0.16).filled(),
            ))
            .map_err(err)?;
        }
        for (k, _, pts) in &series {
            let style = palette::pathway_style(*k, count);
            let line: Vec<(i32, i32)> = pts
                .iter()
                .map(|p| chart.backend_coord(&(f64::from(p.year), p.value.p50)))
                .collect();
            draw_styled_line(&root, line, &style, 2)?;
            for p in pts {
                let at_horizon = model.horizons.contains(&p.year);
                if at_horizon || p.extrapolated {
                    let px = chart.backend_coord(&(f64::from(p.year), p.value.p50));
                    draw_marker(&root, px, style.marker, style.colour, !p.extrapolated)?;
                }
            }
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Calcification outlook from {}: median and 25–75 % band per pathway, {}.",
        c.relationship,
        y_desc.to_lowercase()
    );
    Ok(Some(finish(
        svg,
        format!("{name}.svg"),
        alt,
        Placement::Third,
        h,
    )))
}

/// The legend of a site's calcification panels: one sample per pathway and, when any point is
/// extrapolated, the open marker that flags it.
pub fn calcification_legend(
    model: &ReportModel,
    site: &SiteReport,
    prefix: &str,
) -> FigResult<Option<Figure>> {
    let count = model.pathways.len();
    let shown: Vec<(usize, &PathwayInfo)> = model
        .pathways
        .iter()
        .enumerate()
        .filter(|(_, p)| {
            site.calcification.iter().any(|c| {
                c.series
                    .iter()
                    .any(|s| s.pathway == p.id && !s.points.is_empty())
            })
        })
        .collect();
    if shown.is_empty() {
        return Ok(None);
    }
    let any_extrapolated = site
        .calcification
        .iter()
        .flat_map(|c| c.series.iter())
        .any(|s| s.points.iter().any(|p| p.extrapolated));
    const OPEN: &str = "open marker: outside fitted range (extrapolated)";
    let names: Vec<&str> = shown.iter().map(|(_, p)| p.label.as_str()).collect();
    let mut all: Vec<&str> = names.clone();
    if any_extrapolated {
        all.push(OPEN);
    }
    let w = FULL_WIDTH_PX;
    let h = legend_height(&all, w as i32 - 8) as u32 + 2;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let labels: Vec<&PathwayInfo> = shown.iter().map(|(_, p)| *p).collect();
        let idx: Vec<usize> = shown.iter().map(|(k, _)| *k).collect();
        draw_pathway_legend(&root, &labels, count, &idx, (4, 1), w as i32 - 8)?;
        if any_extrapolated && let Some(&(x, y)) = legend_layout(&all, (4, 1), w as i32 - 8).last()
        {
            draw_marker(&root, (x + 10, y), Marker::Circle, palette::MUTED, false)?;
            root.draw(&Text::new(
                OPEN,
                (x + 24, y),
                anchored(TICK, palette::INK, HPos::Left, VPos::Center),
            ))
            .map_err(err)?;
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Legend of the calcification panels: {}{}.",
        names.join(", "),
        if any_extrapolated {
            "; open markers are extrapolated"
        } else {
            ""
        }
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-calc-legend.svg"),
        alt,
        Placement::Full,
        h,
    )))
}

// ---------------------------------------------------------------------------------------------
// (d) Side-by-side comparison

/// Most sites in one comparison chart; more sites are split over several charts.
pub const SITES_PER_COMPARISON_CHART: usize = 6;

/// Sites in ranking order with their rank (1 = first) and the common Ω_ar range of every
/// horizon year (so that all comparison charts share one scale).
fn ranked_sites(model: &ReportModel) -> (Vec<(usize, &SiteReport)>, (f64, f64)) {
    let order = super::view::rank_sites(model);
    let sites: Vec<(usize, &SiteReport)> = order
        .iter()
        .enumerate()
        .filter_map(|(rank, e)| model.sites.get(e.site).map(|s| (rank + 1, s)))
        .collect();
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for (_, site) in &sites {
        let season = site.limiting_season().unwrap_or_default();
        for p in &model.pathways {
            for &year in &model.horizons {
                if let Some(pt) = site.series(&p.id, season).and_then(|s| s.at(year))
                    && finite_all(&pt.omega_ar)
                {
                    lo = lo.min(pt.omega_ar.p05);
                    hi = hi.max(pt.omega_ar.p95);
                }
            }
        }
    }
    (sites, omega_range(lo, hi, &model.thresholds))
}

/// Dot-and-whisker charts of several sites, in ranking order, at most
/// [`SITES_PER_COMPARISON_CHART`] sites each, one panel per horizon year, all on the same Ω_ar
/// scale.
pub fn comparison_charts(model: &ReportModel) -> FigResult<Vec<Figure>> {
    let (sites, range) = ranked_sites(model);
    let chunks: Vec<&[(usize, &SiteReport)]> = sites.chunks(SITES_PER_COMPARISON_CHART).collect();
    let mut out = Vec::new();
    for (i, chunk) in chunks.iter().enumerate() {
        let name = if chunks.len() == 1 {
            "comparison.svg".to_string()
        } else {
            format!("comparison-{}.svg", i + 1)
        };
        if let Some(f) = comparison_chart(model, chunk, range, &model.horizons, 96, name)? {
            out.push(f);
        }
    }
    Ok(out)
}

/// The comparison's key figure: every site (up to [`SITES_PER_COMPARISON_CHART`], the best
/// ranked) at the last horizon year, one taller panel.
pub fn comparison_key_chart(model: &ReportModel) -> FigResult<Option<Figure>> {
    let Some(&last) = model.horizons.last() else {
        return Ok(None);
    };
    let (sites, range) = ranked_sites(model);
    let shown = &sites[..sites.len().min(SITES_PER_COMPARISON_CHART)];
    comparison_chart(
        model,
        shown,
        range,
        &[last],
        100,
        "comparison-key.svg".to_string(),
    )
}

/// Dot-and-whisker chart of several sites: median Ω_ar in each site's limiting season at the
/// given years (one panel each), per pathway, with 25–75 % (thick) and 5–95 % (thin) whiskers.
/// Sites are labelled with their rank and name (wrapped over two lines).
fn comparison_chart(
    model: &ReportModel,
    sites: &[(usize, &SiteReport)],
    (y0, y1): (f64, f64),
    horizons: &[i32],
    panel_h: i32,
    name: String,
) -> FigResult<Option<Figure>> {
    if sites.is_empty() || horizons.is_empty() || model.pathways.is_empty() {
        return Ok(None);
    }
    let count = model.pathways.len();
    // values[horizon][site][pathway]
    let values: Vec<Vec<Vec<Option<Quantiles>>>> = horizons
        .iter()
        .map(|&year| {
            sites
                .iter()
                .map(|(_, site)| {
                    let season = site.limiting_season().unwrap_or_default();
                    model
                        .pathways
                        .iter()
                        .map(|p| {
                            let q = site.series(&p.id, season)?.at(year)?.omega_ar;
                            finite_all(&q).then_some(q)
                        })
                        .collect()
                })
                .collect()
        })
        .collect();
    if !values.iter().flatten().flatten().any(|q| q.is_some()) {
        return Ok(None);
    }
    let n_sites = sites.len();
    // Site labels: "rank. name" over at most two lines.
    let max_chars = ((f64::from(FULL_WIDTH_PX - 110) / n_sites as f64) / 6.4) as usize;
    let site_labels: Vec<Vec<String>> = sites
        .iter()
        .map(|(rank, s)| wrap_two_lines(&format!("{rank}. {}", s.name), max_chars))
        .collect();
    let label_lines = site_labels.iter().map(Vec::len).max().unwrap_or(1) as i32;
    let site_label_h = 10 + 14 * label_lines;
    let names: Vec<&str> = model.pathways.iter().map(|p| p.label.as_str()).collect();
    let legend_h = legend_height(&names, FULL_WIDTH_PX as i32 - 60);
    // Gap between panels so that the top tick of one panel clears the bottom tick of the
    // one above.
    let gap = 10i32;
    // Horizon years come from the site description: keep the arithmetic overflow-free.
    let n_h = i32::try_from(horizons.len()).unwrap_or(i32::MAX);
    let h = (legend_h + 2)
        .saturating_add(panel_h.saturating_add(gap).saturating_mul(n_h))
        .saturating_add(site_label_h);
    let (w, h) = (FULL_WIDTH_PX, u32::try_from(h).unwrap_or(u32::MAX));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let labels: Vec<&PathwayInfo> = model.pathways.iter().collect();
        let idx: Vec<usize> = (0..count).collect();
        draw_pathway_legend(&root, &labels, count, &idx, (52, 2), w as i32 - 60)?;
        let (_, mut rest) = root.split_vertically(legend_h + 2);
        let mut panels = Vec::new();
        for i in 0..n_h {
            if i + 1 == n_h {
                panels.push(rest.clone());
            } else {
                let (top, bottom) = rest.split_vertically(panel_h + gap);
                panels.push(top);
                rest = bottom;
            }
        }
        let slot = 0.8 / count as f64;
        for (hi_idx, panel) in panels.iter().enumerate() {
            let last = hi_idx + 1 == horizons.len();
            let mut chart = ChartBuilder::on(panel)
                .margin_top(gap / 2 + 2)
                .margin_bottom(gap / 2)
                .x_label_area_size(if last { site_label_h - gap / 2 } else { 2 })
                .y_label_area_size(46)
                .margin_right(right_margin(&model.thresholds, false))
                .build_cartesian_2d(-0.5f64..(n_sites as f64 - 0.5), y0..y1)
                .map_err(err)?;
            draw_class_bands(&root, &mut chart, &model.thresholds, false)?;
            chart
                .configure_mesh()
                .disable_x_mesh()
                .x_labels(0)
                .light_line_style(TRANSPARENT)
                .bold_line_style(palette::GRID.stroke_width(1))
                .axis_style(palette::INK.stroke_width(1))
                .label_style(text_style(TICK, palette::INK))
                .axis_desc_style(text_style(LABEL, palette::INK))
                .y_labels(5)
                .y_label_formatter(&|v: &f64| fmt::number(*v, 1))
                .y_desc(format!("{OMEGA_SHORT} in {}", horizons[hi_idx]))
                .draw()
                .map_err(err)?;
            for (s, site_values) in values[hi_idx].iter().enumerate() {
                for (k, q) in site_values.iter().enumerate() {
                    let Some(q) = q else { continue };
                    let style = palette::pathway_style(k, count);
                    let x = s as f64 - 0.4 + slot * (k as f64 + 0.5);
                    let (px, a) = chart.backend_coord(&(x, q.p05));
                    let (_, b) = chart.backend_coord(&(x, q.p95));
                    root.draw(&PathElement::new(
                        vec![(px, a), (px, b)],
                        style.colour.stroke_width(1),
                    ))
                    .map_err(err)?;
                    let (_, c25) = chart.backend_coord(&(x, q.p25));
                    let (_, c75) = chart.backend_coord(&(x, q.p75));
                    root.draw(&PathElement::new(
                        vec![(px, c25), (px, c75)],
                        style.colour.stroke_width(4),
                    ))
                    .map_err(err)?;
                    let m = chart.backend_coord(&(x, q.p50));
                    draw_marker_styled(&root, m, style.marker, style.colour, palette::INK)?;
                }
            }
            if last {
                for (s, lines) in site_labels.iter().enumerate() {
                    let (px, py) = chart.backend_coord(&(s as f64, y0));
                    for (li, line) in lines.iter().enumerate() {
                        root.draw(&Text::new(
                            line.clone(),
                            (px, py + 6 + 14 * li as i32),
                            anchored(LABEL, palette::INK, HPos::Center, VPos::Top),
                        ))
                        .map_err(err)?;
                    }
                }
            }
        }
        root.present().map_err(err)?;
    }
    let names: Vec<&str> = sites.iter().map(|(_, s)| s.name.as_str()).collect();
    let alt = format!(
        "Side-by-side comparison of projected aragonite saturation (median, 25–75 % and 5–95 %) \
         in each site's limiting season at {} for the sites {} (in ranking order).",
        horizons
            .iter()
            .map(|y| y.to_string())
            .collect::<Vec<_>>()
            .join(", "),
        names.join(", ")
    );
    Ok(Some(finish(svg, name, alt, Placement::Full, h)))
}

fn shorten(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_string()
    } else {
        let mut out: String = s.chars().take(max.saturating_sub(1)).collect();
        out.push('…');
        out
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::report::example::example_model;

    fn all_figs() -> ReportFigures {
        build_all(&example_model(3)).expect("figures")
    }

    #[test]
    fn every_figure_names_the_embedded_font_and_no_generic_family() {
        let figs = all_figs();
        let all = figs.all();
        assert!(all.len() > 3 * 4, "only {} figures", all.len());
        for f in all {
            assert!(
                f.svg.contains("font-family=\"DejaVu Sans\""),
                "{} lacks the font",
                f.name
            );
            for generic in ["sans-serif", "\"serif\"", "monospace"] {
                assert!(
                    !f.svg.contains(generic),
                    "{} uses generic family {generic}",
                    f.name
                );
            }
            assert!(f.svg.starts_with("<svg"), "{}", f.name);
        }
    }

    #[test]
    fn text_is_at_least_nine_points_at_the_placed_width() {
        for f in all_figs().all() {
            let min = f.min_printed_font_pt().expect("figure has text");
            assert!(min >= 9.0, "{}: smallest text {min:.2} pt", f.name);
        }
    }

    #[test]
    fn figures_carry_axis_labels_with_units_and_pathway_names() {
        let model = example_model(2);
        let figs = build_all(&model).unwrap();
        let s = &figs.sites[0];
        let seasonal = &s.seasonal.as_ref().unwrap().svg;
        assert!(seasonal.contains("pH (total scale)"));
        assert!(seasonal.contains("Temperature (°C)"));
        assert!(seasonal.contains("Ωₐᵣ"));
        for b in &model.sites[0].baseline {
            assert!(seasonal.contains(&b.season), "season {} missing", b.season);
        }
        let overview = &s.overview.as_ref().unwrap().svg;
        assert!(overview.contains("Year"));
        for p in &model.pathways {
            assert!(
                overview.contains(&p.label),
                "{} missing from key figure",
                p.label
            );
        }
        // Threshold classes are labelled with their levels and names.
        assert!(overview.contains("≥ 4.0"));
        assert!(overview.contains("3.0–3.5"));
        assert!(overview.contains(&model.thresholds.labels[0]));
        assert_eq!(s.fans.len(), model.pathways.len());
        let calc = &s.calcification[0].svg;
        assert!(calc.contains("Change (%)") || calc.contains("kg CaCO₃"));
        assert_eq!(figs.comparison.len(), 1);
        let cmp = &figs.comparison[0].svg;
        for site in &model.sites {
            // Names may be wrapped over two lines: every word is there.
            for word in site.name.split(' ') {
                assert!(cmp.contains(word), "{word} of {} missing", site.name);
            }
        }
        let key = &figs.comparison_key.as_ref().expect("key figure").svg;
        let last = model.horizons.last().unwrap();
        assert!(key.contains(&format!("in {last}")));
        for y in &model.horizons {
            assert!(cmp.contains(&format!("in {y}")));
        }
    }

    #[test]
    fn extrapolated_points_are_explained() {
        let model = example_model(1);
        let figs = build_all(&model).unwrap();
        let _extrapolated_site = model.sites[0]
            .calcification
            .iter()
            .zip(&figs.sites[0].calcification)
            .find(|(c, _)| {
                c.series
                    .iter()
                    .any(|s| s.points.iter().any(|p| p.extrapolated))
            })
            .expect("example has an extrapolated relationship");
        let legend = figs.sites[0].calcification_legend.as_ref().expect("legend");
        assert!(legend.svg.contains("outside fitted range"));
    }

    #[test]
    fn empty_or_non_finite_data_give_no_figure_and_no_panic() {
        let mut model = example_model(1);
        let site = &mut model.sites[0];
        for p in &mut site.projection {
            for s in &mut p.seasons {
                for pt in &mut s.points {
                    pt.omega_ar.p50 = f64::NAN;
                }
            }
        }
        site.baseline.clear();
        let figs = build_all(&model).unwrap();
        assert!(figs.sites[0].seasonal.is_none());
        assert!(figs.sites[0].overview.is_none());
        assert!(figs.sites[0].fans.is_empty());
    }

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
