//! The report's figures, drawn with plotters to SVG strings.
//!
//! Every text element names the font family explicitly ("DejaVu Sans"): the typesetter ignores
//! generic CSS families in SVG text and would silently fall back to a serif face. Sizes are
//! chosen for the placed width: a full-width figure is [`FULL_WIDTH_PX`] px wide and is placed
//! at the text width of 170 mm ≈ 482 pt, a half-width one is [`HALF_WIDTH_PX`] px wide and is
//! placed in a two-column grid, so one SVG px is about one pt and the smallest text (9.4 px) is
//! printed at ≥ 9 pt. [`Figure::min_printed_font_pt`] checks this.

//!
//! Layout: [`toolkit`] holds what every chart shares (fonts, axes, ticks, legends, threshold
//! bands, markers); each chart has its own file and reads only the report model.

mod calcification;
mod comparison;
mod exposure;
mod fan;
mod overview;
mod scales;
mod seasonal;
mod thermal;
mod toolkit;

pub use calcification::{calcification_chart, calcification_legend};
pub use comparison::{SITES_PER_COMPARISON_CHART, comparison_charts, comparison_key_chart};
pub use exposure::{DielPick, diel_chart, diel_pick};
pub use fan::fan_chart;
pub use overview::outlook_overview;
pub use seasonal::seasonal_cycle;
pub use thermal::heat_chart;

use super::model::ReportModel;

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
    /// Annual maximum DHW per pathway (sites with a temperature record).
    pub heat: Option<Figure>,
    /// Mean diel cycle of Ω_ar of a sensor series (sites with one).
    pub diel: Option<Figure>,
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
            out.extend(s.heat.iter());
            out.extend(s.diel.iter());
        }
        out.extend(self.comparison.iter());
        out.extend(self.comparison_key.iter());
        out
    }
}

/// Draws every figure of the report.
pub fn build_all(model: &ReportModel) -> FigResult<ReportFigures> {
    let scales = scales::Scales::of(model);
    let mut figs = ReportFigures::default();
    for (i, site) in model.sites.iter().enumerate() {
        if !model.in_detail(i) {
            // Ranked only: no figures, but keep the indices of `figs.sites` those of the model.
            figs.sites.push(SiteFigures::default());
            continue;
        }
        let prefix = format!("s{i}");
        let mut sf = SiteFigures {
            seasonal: seasonal_cycle(site, scales.seasonal, &prefix)?,
            overview: outlook_overview(model, site, scales.omega, &prefix)?,
            ..SiteFigures::default()
        };
        for (k, p) in model.pathways.iter().enumerate() {
            if let Some(f) = fan_chart(model, site, k, scales.omega, &prefix)? {
                sf.fans.push((p.id.clone(), f));
            }
        }
        for (k, c) in site.calcification.iter().enumerate() {
            let Some(axis) = scales.calcification(&c.relationship, c.unit) else {
                continue;
            };
            if let Some(f) = calcification_chart(model, c, axis, &format!("{prefix}-calc{k}"))? {
                sf.calcification.push(f);
            }
        }
        if !sf.calcification.is_empty() {
            sf.calcification_legend = calcification_legend(model, site, &prefix)?;
        }
        sf.heat = heat_chart(model, site, &prefix)?;
        sf.diel = diel_chart(model, site, &prefix)?;
        figs.sites.push(sf);
    }
    if model.sites.len() > 1 {
        figs.comparison = comparison_charts(model, scales.omega)?;
        figs.comparison_key = comparison_key_chart(model, scales.omega)?;
    }
    Ok(figs)
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
}
