//! (b) Fan charts: one pathway's Ω_ar ensemble in the limiting season over the years; also the
//! series extraction the key figure and the shared scales use.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{
    OMEGA_SHORT, TITLE, anchored, configure_axes, draw_band, draw_class_bands, draw_marker, finish,
    finite_all, right_margin, year_range, year_ticks,
};
use super::{FigResult, Figure, HALF_WIDTH_PX, Placement, err};
use crate::report::fmt;
use crate::report::model::{Quantiles, ReportModel, SiteReport};
use crate::report::palette;

/// The finite Ω_ar quantiles of one pathway and season, by year.
pub(super) struct FanData {
    pub(super) years: Vec<f64>,
    pub(super) q: Vec<Quantiles>,
}

pub(super) fn fan_data(site: &SiteReport, pathway: &str, season: &str) -> Option<FanData> {
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

/// Fan chart of Ω_ar in the limiting season under one pathway: median line, 25–75 % and 5–95 %
/// bands, over the threshold classes, on the report's Ω_ar axis `y0..y1` (the same in every
/// panel and at every site, so that they can be compared at a glance).
pub fn fan_chart(
    model: &ReportModel,
    site: &SiteReport,
    k: usize,
    (y0, y1): (f64, f64),
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
        draw_band(&root, &chart, &outer_u, &outer_l, c, 0.22)?;
        draw_band(&root, &chart, &inner_u, &inner_l, c, 0.45)?;
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
