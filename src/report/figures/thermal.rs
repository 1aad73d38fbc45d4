//! (d) Thermal stress: the annual maximum DHW per pathway over the years (median line and
//! 5–95 % band), the observed years' maxima as crosses, and the two stress levels as shaded
//! zones with dashed edges, labelled in numbers and plain words.

use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{
    Area, Chart, TICK, anchored, configure_axes, draw_band, draw_marker, draw_pathway_legend,
    draw_styled_line, finish, legend_height, legend_layout, text_width, year_range, year_ticks,
};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{HeatPoint, PathwayInfo, ReportModel, SiteReport, ThermalOutlook};
use crate::report::palette;

/// Legend text of the observed years' crosses.
const OBSERVED: &str = "observed year (record)";

/// The y axis label.
pub(super) const DHW_LABEL: &str = "Annual maximum DHW (°C-weeks)";

/// The stress zones' labels in the right margin, from the lowest level up.
fn zone_labels(levels: [f64; 2]) -> [String; 2] {
    [
        format!(
            "{}–{} significant",
            fmt::number(levels[0], 0),
            fmt::number(levels[1], 0)
        ),
        format!("≥ {} severe", fmt::number(levels[1], 0)),
    ]
}

/// The pathways with finite projected points, in pathway order.
fn finite_series<'a>(
    model: &'a ReportModel,
    t: &'a ThermalOutlook,
) -> Vec<(usize, &'a PathwayInfo, Vec<&'a HeatPoint>)> {
    model
        .pathways
        .iter()
        .enumerate()
        .filter_map(|(k, p)| {
            let pts: Vec<&HeatPoint> = t
                .series(&p.id)?
                .points
                .iter()
                .filter(|pt| pt.max_dhw.iter().all(|v| v.is_finite()))
                .collect();
            (!pts.is_empty()).then_some((k, p, pts))
        })
        .collect()
}

/// The annual maximum DHW chart of a site; `None` without a thermal outlook or any finite
/// point.
pub fn heat_chart(
    model: &ReportModel,
    site: &SiteReport,
    prefix: &str,
) -> FigResult<Option<Figure>> {
    let Some(t) = &site.thermal else {
        return Ok(None);
    };
    let series = finite_series(model, t);
    if series.is_empty() {
        return Ok(None);
    }
    let observed: Vec<(f64, f64)> = t
        .observed
        .iter()
        .filter(|o| o.max_dhw.is_finite())
        .map(|o| (f64::from(o.year), o.max_dhw))
        .collect();
    let count = model.pathways.len();
    let mut names: Vec<&str> = series.iter().map(|(_, p, _)| p.label.as_str()).collect();
    if !observed.is_empty() {
        names.push(OBSERVED);
    }
    let legend_h = legend_height(&names, FULL_WIDTH_PX as i32 - 60);
    let (w, h) = (FULL_WIDTH_PX, 215 + legend_h as u32);
    let (x0, x1) = year_range(
        series
            .iter()
            .flat_map(|(_, _, pts)| pts.iter().map(|p| p.year))
            .chain(t.observed.iter().map(|o| o.year)),
    );
    // A little room left of the first observed year, so that its cross clears the axis.
    let x0 = x0 - 2.0;
    let top = series
        .iter()
        .flat_map(|(_, _, pts)| pts.iter().map(|p| p.max_dhw[2]))
        .chain(observed.iter().map(|o| o.1))
        .fold(t.levels[1] + 2.0, f64::max);
    let y1 = (top * 1.05 / 4.0).ceil() * 4.0;
    let labels = zone_labels(t.levels);
    let margin = labels
        .iter()
        .map(|l| text_width(l, TICK))
        .max()
        .unwrap_or(0)
        + 13;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (w, h)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let shown: Vec<&PathwayInfo> = series.iter().map(|(_, p, _)| *p).collect();
        let idx: Vec<usize> = series.iter().map(|(k, _, _)| *k).collect();
        draw_pathway_legend(&root, &shown, count, &idx, (52, 2), w as i32 - 60)?;
        if !observed.is_empty()
            && let Some(&(x, y)) = legend_layout(&names, (52, 2), w as i32 - 60).last()
        {
            draw_cross(&root, (x + 10, y))?;
            root.draw(&Text::new(
                OBSERVED,
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
            .margin_right(margin.clamp(14, 200) as u32)
            .build_cartesian_2d(x0..x1, 0.0..y1)
            .map_err(err)?;
        draw_zones(&root, &mut chart, t.levels, &labels)?;
        configure_axes(
            &mut chart,
            "Year",
            DHW_LABEL,
            year_ticks(x0, x1),
            &|v: &f64| fmt::number(*v, 0),
            6,
        )?;
        for (k, _, pts) in &series {
            let style = palette::pathway_style(*k, count);
            let u: Vec<(f64, f64)> = pts
                .iter()
                .map(|p| (f64::from(p.year), p.max_dhw[2]))
                .collect();
            let l: Vec<(f64, f64)> = pts
                .iter()
                .map(|p| (f64::from(p.year), p.max_dhw[0]))
                .collect();
            draw_band(&root, &chart, &u, &l, style.colour, 0.14)?;
        }
        for (k, _, pts) in &series {
            let style = palette::pathway_style(*k, count);
            let line: Vec<(i32, i32)> = pts
                .iter()
                .map(|p| chart.backend_coord(&(f64::from(p.year), p.max_dhw[1])))
                .collect();
            draw_styled_line(&root, line.clone(), &style, 2)?;
            for px in line {
                draw_marker(&root, px, style.marker, style.colour, true)?;
            }
        }
        for o in &observed {
            draw_cross(&root, chart.backend_coord(o))?;
        }
        root.present().map_err(err)?;
    }
    let alt = format!(
        "Projected annual maximum Degree Heating Weeks at {} under {} pathways: median and \
         5–95 % band per pathway over the years {:.0}–{:.0}, the observed years' maxima as \
         crosses, and the levels {} and {} °C-weeks drawn as dashed lines.",
        site.name,
        series.len(),
        x0,
        x1,
        fmt::number(t.levels[0], 0),
        fmt::number(t.levels[1], 0),
    );
    Ok(Some(finish(
        svg,
        format!("{prefix}-heat.svg"),
        alt,
        Placement::Full,
        h,
    )))
}

/// An observed year: an ink "×" on a white halo, unlike every pathway marker.
fn draw_cross(root: &Area<'_>, (x, y): (i32, i32)) -> FigResult<()> {
    let r = 4;
    for style in [WHITE.stroke_width(4), palette::INK.stroke_width(2)] {
        root.draw(&PathElement::new(
            vec![(x - r, y - r), (x + r, y + r)],
            style,
        ))
        .map_err(err)?;
        root.draw(&PathElement::new(
            vec![(x - r, y + r), (x + r, y - r)],
            style,
        ))
        .map_err(err)?;
    }
    Ok(())
}

/// Shades the stress zones (between the two levels, and above the upper one) in the class
/// greys, draws each level as a dashed line and labels the zones in the right margin.
fn draw_zones(
    root: &Area<'_>,
    chart: &mut Chart<'_, '_>,
    levels: [f64; 2],
    labels: &[String; 2],
) -> FigResult<()> {
    let xr = chart.x_range();
    let yr = chart.y_range();
    let zones = [(levels[0], levels[1]), (levels[1], yr.end)];
    for (k, ((lo, hi), label)) in zones.iter().zip(labels).enumerate() {
        let (lo, hi) = (lo.max(yr.start), hi.min(yr.end));
        if hi <= lo {
            continue;
        }
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(xr.start, lo), (xr.end, hi)],
                // The class greys, lighter than in the Ω_ar charts: the bands must read over them.
                palette::class_fill(1).mix(0.5 + 0.5 * k as f64).filled(),
            )))
            .map_err(err)?;
        let (px, py) = chart.backend_coord(&(xr.end, (lo + hi) / 2.0));
        root.draw(&Text::new(
            label.clone(),
            (px + 8, py),
            anchored(TICK, palette::MUTED, HPos::Left, VPos::Center),
        ))
        .map_err(err)?;
    }
    for level in levels {
        if level > yr.start && level < yr.end {
            let a = chart.backend_coord(&(xr.start, level));
            let b = chart.backend_coord(&(xr.end, level));
            root.draw(&DashedPathElement::new(
                vec![a, b],
                4,
                3,
                palette::MUTED.stroke_width(1),
            ))
            .map_err(err)?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    #[test]
    fn chart_names_levels_pathways_and_observed_years_in_plain_words() {
        let model = example_model(1);
        let fig = heat_chart(&model, &model.sites[0], "s0")
            .unwrap()
            .expect("the example site has a thermal outlook");
        for p in &model.pathways {
            assert!(fig.svg.contains(&p.label), "{} missing", p.label);
        }
        assert!(fig.svg.contains(DHW_LABEL));
        // The levels of the example, 4 and 8 °C-weeks, in numbers and our own words.
        assert!(fig.svg.contains("4–8 significant"));
        assert!(fig.svg.contains("≥ 8 severe"));
        assert!(fig.svg.contains(OBSERVED));
    }

    #[test]
    fn no_thermal_outlook_gives_no_chart() {
        let mut model = example_model(1);
        model.sites[0].thermal = None;
        assert!(heat_chart(&model, &model.sites[0], "s0").unwrap().is_none());
    }
}
