//! The key figure: every pathway's median Ω_ar in the limiting season over the years.

use plotters::prelude::*;

use super::fan::{FanData, fan_data};
use super::toolkit::{
    OMEGA_LABEL, configure_axes, draw_band, draw_class_bands, draw_marker, draw_pathway_legend,
    draw_styled_line, finish, legend_height, right_margin, year_range, year_ticks,
};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{PathwayInfo, ReportModel, SiteReport};
use crate::report::palette;

/// The key figure: all pathways' medians with 25–75 % bands in the limiting season, over the
/// labelled threshold classes, on the report's Ω_ar axis `y0..y1`.
pub fn outlook_overview(
    model: &ReportModel,
    site: &SiteReport,
    (y0, y1): (f64, f64),
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
            draw_band(&root, &chart, &u, &l, style.colour, 0.16)?;
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
