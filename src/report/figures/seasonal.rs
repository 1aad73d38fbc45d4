//! (a) The seasonal cycle of the records.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{Area, LABEL, OMEGA_SHORT, TICK, anchored, finish, nice_ticks, text_style};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{SeasonBaseline, SiteReport, Stat};
use crate::report::palette;

/// One panel of the seasonal cycle: axis title, the statistic it shows, the step its axis range
/// snaps to and the least decimals of its tick labels.
pub(super) type PanelSpec = (&'static str, fn(&SeasonBaseline) -> Stat, f64, usize);

/// The three panels, top to bottom.
pub(super) const PANELS: [PanelSpec; 3] = [
    (OMEGA_SHORT, |b| b.omega_ar, 0.1, 2),
    ("pH (total scale)", |b| b.ph_t, 0.02, 2),
    ("Temperature (°C)", |b| b.temp_c, 0.5, 1),
];

/// Lowest and highest value a panel shows for these seasons (range and ±1 sd); infinite when
/// none is finite.
pub(super) fn panel_extent(seasons: &[SeasonBaseline], spec: PanelSpec) -> (f64, f64) {
    let stats: Vec<Stat> = seasons.iter().map(spec.1).collect();
    let lo = stats
        .iter()
        .map(|s| s.min.min(s.mean - s.sd))
        .filter(|v| v.is_finite());
    let hi = stats
        .iter()
        .map(|s| s.max.max(s.mean + s.sd))
        .filter(|v| v.is_finite());
    (
        lo.fold(f64::INFINITY, f64::min),
        hi.fold(f64::NEG_INFINITY, f64::max),
    )
}

/// Seasonal cycle of Ω_ar, pH_T and temperature from the records: three stacked panels with
/// the mean (dot), ±1 sd (thick bar) and the range (thin bar) per season, each on the report's
/// shared axis of its quantity (`axes`, in [`PANELS`] order).
pub fn seasonal_cycle(
    site: &SiteReport,
    axes: [(f64, f64); 3],
    prefix: &str,
) -> FigResult<Option<Figure>> {
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
        for (i, ((panel, spec), axis)) in panels.iter().zip(PANELS).zip(axes).enumerate() {
            draw_panel(&root, panel, seasons, spec, axis, i)?;
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

/// Panel `i` (0 = top; the last one carries the season names) on the axis `y0..y1`.
fn draw_panel(
    root: &Area<'_>,
    panel: &Area<'_>,
    seasons: &[SeasonBaseline],
    (desc, get, _, dec): PanelSpec,
    (y0, y1): (f64, f64),
    i: usize,
) -> FigResult<()> {
    let n = seasons.len();
    let colour = palette::SEASONAL_COLOURS[i];
    let stats: Vec<Stat> = seasons.iter().map(get).collect();
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
    Ok(())
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
