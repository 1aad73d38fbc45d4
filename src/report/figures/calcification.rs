//! (c) The calcification outlook: one small panel per relationship and their shared legend.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{
    LABEL, TICK, anchored, configure_axes, draw_band, draw_marker, draw_pathway_legend,
    draw_styled_line, finish, finite_all, legend_height, legend_layout, shorten, year_range,
    year_ticks,
};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, THIRD_WIDTH_PX, err};
use crate::report::fmt;
use crate::report::model::{
    CalcPoint, CalcUnit, CalcificationOutlook, PathwayInfo, ReportModel, SiteReport,
};
use crate::report::palette::{self, Marker};

/// Calcification outlook of one relationship: median per pathway with a 25–75 % band; open
/// markers where the relationship is used outside its fitted range. A third-width panel (placed
/// three per row, one per relationship) titled with the relationship's name; the legend is
/// [`calcification_legend`], shared by the panels.
pub fn calcification_chart(
    model: &ReportModel,
    c: &CalcificationOutlook,
    (y0, y1): (f64, f64),
    name: &str,
) -> FigResult<Option<Figure>> {
    let count = model.pathways.len();
    let series = finite_series(model, c);
    if series.is_empty() {
        return Ok(None);
    }
    let reference = reference_line(c);
    let step = match c.unit {
        CalcUnit::PercentChange => 10.0,
        CalcUnit::KgCaco3PerM2Year => 0.5,
        CalcUnit::MmolCaco3PerM2Day => 10.0,
    };
    let (x0, x1) = year_range(
        series
            .iter()
            .flat_map(|(_, _, p)| p.iter().map(|pt| pt.year)),
    );
    let y_desc = match c.unit {
        CalcUnit::PercentChange => "Change (%)",
        CalcUnit::KgCaco3PerM2Year => "kg CaCO₃ m⁻² yr⁻¹",
        CalcUnit::MmolCaco3PerM2Day => "NEC, mmol CaCO₃ m⁻² d⁻¹",
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
            draw_band(&root, &chart, &u, &l, style.colour, 0.16)?;
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

/// The pathways of a relationship with their finite points, in pathway order.
fn finite_series<'a>(
    model: &'a ReportModel,
    c: &'a CalcificationOutlook,
) -> Vec<(usize, &'a PathwayInfo, Vec<&'a CalcPoint>)> {
    let mut series = Vec::new();
    for (k, p) in model.pathways.iter().enumerate() {
        if let Some(s) = c.series.iter().find(|s| s.pathway == p.id) {
            let pts: Vec<_> = s.points.iter().filter(|pt| finite_all(&pt.value)).collect();
            if !pts.is_empty() {
                series.push((k, p, pts));
            }
        }
    }
    series
}

/// The present-day level drawn as a grey line: no change, or the baseline rate.
fn reference_line(c: &CalcificationOutlook) -> Option<f64> {
    match c.unit {
        CalcUnit::PercentChange => Some(0.0),
        CalcUnit::KgCaco3PerM2Year => c.baseline.filter(|b| b.is_finite()),
        // Zero NEC: net dissolution below the line.
        CalcUnit::MmolCaco3PerM2Day => Some(0.0),
    }
}

/// Lowest and highest value a relationship's panel shows (25–75 % bands and the reference
/// line); `None` without a finite point.
pub(super) fn calc_extent(model: &ReportModel, c: &CalcificationOutlook) -> Option<(f64, f64)> {
    let series = finite_series(model, c);
    if series.is_empty() {
        return None;
    }
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for (_, _, pts) in &series {
        for p in pts {
            lo = lo.min(p.value.p25);
            hi = hi.max(p.value.p75);
        }
    }
    if let Some(r) = reference_line(c) {
        lo = lo.min(r);
        hi = hi.max(r);
    }
    Some((lo, hi))
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
