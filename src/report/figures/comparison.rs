//! (d) Side-by-side comparison of several sites: dot-and-whisker panels per horizon year.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::toolkit::{
    Area, Chart, LABEL, OMEGA_SHORT, TICK, anchored, draw_class_bands, draw_marker_styled,
    draw_pathway_legend, finish, finite_all, legend_height, right_margin, text_style,
    wrap_two_lines,
};
use super::{FULL_WIDTH_PX, FigResult, Figure, Placement, err};
use crate::report::fmt;
use crate::report::model::{PathwayInfo, Quantiles, ReportModel, SiteReport};
use crate::report::palette;
use crate::report::ranking::rank_sites;

/// Most sites in one comparison chart; more sites are split over several charts.
pub const SITES_PER_COMPARISON_CHART: usize = 6;

/// Sites shown in detail, in ranking order with their rank (1 = first).
fn ranked_sites(model: &ReportModel) -> Vec<(usize, &SiteReport)> {
    rank_sites(model)
        .iter()
        .enumerate()
        .filter(|(_, e)| model.in_detail(e.site))
        .filter_map(|(rank, e)| model.sites.get(e.site).map(|s| (rank + 1, s)))
        .collect()
}

/// Dot-and-whisker charts of several sites, in ranking order, at most
/// [`SITES_PER_COMPARISON_CHART`] sites each, one panel per horizon year, all on the report's
/// Ω_ar axis `range`.
pub fn comparison_charts(model: &ReportModel, range: (f64, f64)) -> FigResult<Vec<Figure>> {
    let sites = ranked_sites(model);
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
/// ranked) at the last horizon year, one taller panel, on the report's Ω_ar axis `range`.
pub fn comparison_key_chart(model: &ReportModel, range: (f64, f64)) -> FigResult<Option<Figure>> {
    let Some(&last) = model.horizons.last() else {
        return Ok(None);
    };
    let sites = ranked_sites(model);
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
    let values = horizon_values(model, sites, horizons);
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
            draw_whiskers(&root, &chart, &values[hi_idx], count)?;
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

/// Ω_ar quantiles per horizon year, site and pathway (`values[horizon][site][pathway]`) in each
/// site's limiting season; `None` where not projected or not finite.
fn horizon_values(
    model: &ReportModel,
    sites: &[(usize, &SiteReport)],
    horizons: &[i32],
) -> Vec<Vec<Vec<Option<Quantiles>>>> {
    horizons
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
        .collect()
}

/// One panel's whiskers: per site (x = its index) one slot per pathway with the 5–95 % (thin)
/// and 25–75 % (thick) range and the median marker.
fn draw_whiskers(
    root: &Area<'_>,
    chart: &Chart<'_, '_>,
    values: &[Vec<Option<Quantiles>>],
    count: usize,
) -> FigResult<()> {
    let slot = 0.8 / count as f64;
    for (s, site_values) in values.iter().enumerate() {
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
            draw_marker_styled(root, m, style.marker, style.colour, palette::INK)?;
        }
    }
    Ok(())
}
