//! (e) Exposure: the mean diel cycle of Ω_ar of one sensor series in the limiting season, as
//! sampled and at two horizon years under one pathway (every reading projected on its own),
//! over the threshold classes.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{
    OMEGA_LABEL, TICK, anchored, configure_axes, draw_class_bands, draw_marker, draw_styled_line,
    finish, legend_height, legend_layout, omega_range, right_margin,
};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{ExposureSeries, PathwayInfo, ReportModel, SiteReport};
use crate::report::palette::{self, Dash, Marker, PathwayStyle};
use crate::report::ranking::ranking_pathway;

/// What the diel figure shows: the limiting season, the first station with a series in it,
/// the ranking pathway and two horizon years (the middle table horizon and the last).
pub struct DielPick<'a> {
    pub season: &'a str,
    pub station: &'a str,
    pub pathway: &'a PathwayInfo,
    pub years: Vec<i32>,
}

/// The figure's choice for a site; `None` without a sensor series in the limiting season.
pub fn diel_pick<'a>(model: &'a ReportModel, site: &'a SiteReport) -> Option<DielPick<'a>> {
    let season = site.limiting_season()?;
    let station = site
        .exposure
        .stations
        .iter()
        .find(|st| site.exposure.find(None, None, season, st).is_some())?;
    let pathway = ranking_pathway(model)?;
    let h = &model.horizons;
    let mid = if h.len() > 2 { h.len() / 2 } else { 0 };
    let mut years: Vec<i32> = [h.get(mid), h.last()]
        .into_iter()
        .flatten()
        .copied()
        .collect();
    years.dedup();
    Some(DielPick {
        season,
        station,
        pathway,
        years,
    })
}

/// The lines of the figure: label, style and the series.
fn lines<'a>(
    site: &'a SiteReport,
    pick: &DielPick<'_>,
) -> Vec<(String, PathwayStyle, &'a ExposureSeries)> {
    let e = &site.exposure;
    let mut out = Vec::new();
    if let Some(s) = e.find(None, None, pick.season, pick.station) {
        let style = PathwayStyle {
            colour: palette::INK,
            dash: Dash::Solid,
            marker: Marker::Circle,
        };
        out.push(("as sampled".to_string(), style, s));
    }
    let colour = palette::pathway_style(2, 5).colour;
    let looks = [
        (Dash::Dashed(8, 4), Marker::Square),
        (Dash::Solid, Marker::Triangle),
    ];
    for (&y, (dash, marker)) in pick.years.iter().zip(looks) {
        if let Some(s) = e.find(Some(&pick.pathway.id), Some(y), pick.season, pick.station) {
            let style = PathwayStyle {
                colour,
                dash,
                marker,
            };
            out.push((format!("{} {y}", pick.pathway.label), style, s));
        }
    }
    out
}

/// The diel-cycle chart of a site; `None` without a sensor series in the limiting season.
pub fn diel_chart(
    model: &ReportModel,
    site: &SiteReport,
    prefix: &str,
) -> FigResult<Option<Figure>> {
    let Some(pick) = diel_pick(model, site) else {
        return Ok(None);
    };
    let lines = lines(site, &pick);
    let values = || {
        lines
            .iter()
            .flat_map(|(_, _, s)| s.diel_omega_ar.iter().copied())
            .filter(|v| v.is_finite())
    };
    let lo = values().fold(f64::INFINITY, f64::min);
    let hi = values().fold(f64::NEG_INFINITY, f64::max);
    if !lo.is_finite() {
        return Ok(None);
    }
    let (y0, y1) = omega_range(lo, hi, &model.thresholds);
    let names: Vec<&str> = lines.iter().map(|(l, _, _)| l.as_str()).collect();
    let legend_h = legend_height(&names, FULL_WIDTH_PX as i32 - 60);
    let (w, h) = (FULL_WIDTH_PX, 215 + legend_h as u32);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        for ((label, style, _), (x, y)) in
            lines
                .iter()
                .zip(legend_layout(&names, (52, 2), w as i32 - 60))
        {
            draw_styled_line(&root, vec![(x, y), (x + 20, y)], style, 2)?;
            draw_marker(&root, (x + 10, y), style.marker, style.colour, true)?;
            root.draw(&Text::new(
                label.clone(),
                (x + 24, y),
                anchored(TICK, palette::INK, HPos::Left, VPos::Center),
            ))
            .map_err(err)?;
        }
        let (_, body) = root.split_vertically(legend_h + 2);
        let mut chart = ChartBuilder::on(&body)
            .margin_top(4)
            .x_label_area_size(34)
            .y_label_area_size(46)
            .margin_right(right_margin(&model.thresholds, true))
            .build_cartesian_2d(0.0f64..23.0, y0..y1)
            .map_err(err)?;
        draw_class_bands(&root, &mut chart, &model.thresholds, true)?;
        configure_axes(
            &mut chart,
            "Local hour",
            OMEGA_LABEL,
            12,
            &|v: &f64| fmt::number(*v, 1),
            6,
        )?;
        for (_, style, s) in &lines {
            let pts: Vec<(i32, i32)> = s
                .diel_omega_ar
                .iter()
                .enumerate()
                .filter(|(_, v)| v.is_finite())
                .map(|(hr, v)| chart.backend_coord(&(hr as f64, *v)))
                .collect();
            draw_styled_line(&root, pts.clone(), style, 2)?;
            for p in pts.into_iter().step_by(3) {
                draw_marker(&root, p, style.marker, style.colour, true)?;
            }
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Mean diel cycle of aragonite saturation at {}, station {}, {} season: as sampled and \
         under {} in {}, by local hour, over the threshold classes.",
        site.name,
        pick.station,
        pick.season,
        pick.pathway.label,
        pick.years
            .iter()
            .map(i32::to_string)
            .collect::<Vec<_>>()
            .join(" and "),
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-diel.svg"),
        alt,
        Placement::Full,
        h,
    )))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    #[test]
    fn chart_names_the_states_hours_and_classes() {
        let model = example_model(2);
        let fig = diel_chart(&model, &model.sites[0], "s0")
            .unwrap()
            .expect("the example's first site has a sensor series");
        assert!(fig.svg.contains("as sampled"));
        assert!(fig.svg.contains("Local hour"));
        let pick = diel_pick(&model, &model.sites[0]).expect("pick");
        // Example horizons 2030, 2050, 2100: the middle one and the last.
        assert_eq!(pick.years, vec![2050, 2100]);
        assert!(fig.svg.contains(&format!("{} 2100", pick.pathway.label)));
        assert!(fig.svg.contains("3.0–3.5"));
        // The second site has bottle samples only: no figure.
        assert!(diel_chart(&model, &model.sites[1], "s1").unwrap().is_none());
    }
}
