//! Reef-community net calcification (NEC) against Omega_ar, from published field
//! relationships that carry dissolution, so NEC can fall to zero and below (net dissolution)
//! while seawater is still supersaturated.
//!
//! Each relationship is one row of [`builtin`] ([`table`]): its id, citation, form,
//! coefficients, unit (mmol CaCO3 m⁻² d⁻¹), the Omega_ar span it may be used over, the kind
//! of reef it came from and what part of it is our construction rather than the paper's.
//! `docs/nec-sources.md` says for each number which public text it was checked against.
//!
//! Every relationship here is a straight line in Omega_ar at a given coral cover, so each has
//! a closed-form Omega_ar at which NEC = 0. A site's own measured NEC ([`SiteNec`]) anchors a
//! relationship by one scale factor ([`NecModel::for_site`]), which keeps the relationship's
//! zero point. [`closest_to_habitat`] picks the row nearest the site's `habitat`, with a reason.
//!
//! None of the relationships has a temperature term; the temperature argument is accepted so
//! every row is called the same way, and is only checked against a row's stated range.
//! Screening-level estimates: field relationships carry each reef's own light, flow, depth and
//! community, and ecosystem NEC is only weakly predicted by Omega_ar.

mod anchor;
mod habitat;
mod site;
mod table;

use serde::Serialize;

pub use anchor::{
    AnchorError, NecMethod, NecModel, NecModelError, NecUnit, SiteNec, SpecProblem, site_nec,
};
pub use habitat::{HabitatChoice, closest_to_habitat};
pub use site::NecSettings;
pub use table::{
    EYRE2018_CORAL_POINTS, EYRE2018_GLOBAL_NEC_POINTS, EYRE2018_SEDIMENT_INTERCEPT,
    EYRE2018_SEDIMENT_SLOPE, SHAW_ONETREE_ZERO_OMEGA, builtin, eyre2018_coral_line,
    eyre2018_global_line, eyre2018_sediment_line,
};

/// Grams of CaCO3 per mole: standard atomic weights Ca 40.078, C 12.011, O 15.999
/// (40.078 + 12.011 + 3 × 15.999 = 100.086).
pub const CACO3_G_PER_MOL: f64 = 100.086;

/// kg CaCO3 m⁻² yr⁻¹ per mmol CaCO3 m⁻² d⁻¹: 100.086 mg per mmol × 365.25 days per year.
pub const KG_M2_YR_PER_MMOL_M2_D: f64 = CACO3_G_PER_MOL * 1e-6 * 365.25;

/// NEC = `slope` · Omega_ar + `intercept`, mmol CaCO3 m⁻² d⁻¹.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Line {
    pub slope: f64,
    pub intercept: f64,
}

impl Line {
    /// The straight line through two (Omega_ar, NEC) points; `None` when the Omega_ar values
    /// are equal.
    pub fn through(p0: (f64, f64), p1: (f64, f64)) -> Option<Line> {
        let run = p1.0 - p0.0;
        if run == 0.0 || !run.is_finite() {
            return None;
        }
        let slope = (p1.1 - p0.1) / run;
        Some(Line {
            slope,
            intercept: p0.1 - slope * p0.0,
        })
    }

    /// NEC at `omega`.
    pub fn at(&self, omega: f64) -> f64 {
        self.slope * omega + self.intercept
    }

    /// The Omega_ar at which NEC = 0; `None` for a flat line.
    pub fn zero(&self) -> Option<f64> {
        (self.slope != 0.0).then(|| -self.intercept / self.slope)
    }

    /// `w0 · a + w1 · b`, the line of a weighted sum of two rates.
    fn weighted(a: Line, w0: f64, b: Line, w1: f64) -> Line {
        Line {
            slope: w0 * a.slope + w1 * b.slope,
            intercept: w0 * a.intercept + w1 * b.intercept,
        }
    }

    /// This line multiplied by `k`.
    fn scaled(self, k: f64) -> Line {
        Line {
            slope: k * self.slope,
            intercept: k * self.intercept,
        }
    }
}

/// How a relationship computes NEC from Omega_ar (and coral cover).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum NecForm {
    /// NEC is the line itself, per m² of the habitat the row was measured on.
    Linear { line: Line },
    /// NEC = c · coral(Omega) + (1 − c) · sediment(Omega), c the live coral cover (0–1); the
    /// rest of the bottom is taken as carbonate sediment.
    CoverWeighted { coral: Line, sediment: Line },
    /// Only the Omega_ar at which NEC = 0 is published: NEC = s · (Omega − `omega_zero`), with
    /// the slope s taken from the site's own measured NEC (our construction).
    ZeroPoint { omega_zero: f64 },
}

/// The Omega_ar span outside which a row's values are extrapolation.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum OmegaSpan {
    /// The Omega_ar range of the data the relationship was fitted to.
    Fitted { lo: f64, hi: f64 },
    /// The fitted range was not verified; the span over which the paper itself states values.
    PaperEvaluated { lo: f64, hi: f64 },
    /// Neither was verified: every value is marked as "range not checked".
    NotVerified,
}

/// Where a value lies against a row's span.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Extrapolation {
    Inside,
    BelowSpan,
    AboveSpan,
    /// Temperature outside the row's stated range (Omega_ar inside or not checked).
    TemperatureOutside,
    /// The row's range is not verified, so inside/outside cannot be said.
    RangeNotChecked,
}

/// Why a relationship gives no NEC value.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NecUnavailable {
    /// The row weights by coral cover and the site gives none.
    NeedsCover,
    /// The row publishes only a zero point; a rate needs the site's measured NEC.
    NeedsAnchor,
}

impl std::fmt::Display for NecUnavailable {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            NecUnavailable::NeedsCover => {
                "this relationship weights coral and sediment by live coral cover, and the site \
                 file gives no [baseline] coral_cover_fraction"
            }
            NecUnavailable::NeedsAnchor => {
                "the paper publishes only the Omega_ar at which NEC is zero, so a rate needs the \
                 site's own measured NEC ([calcification.measured_nec])"
            }
        })
    }
}

/// The kind of reef bottom a row was measured on, for [`closest_to_habitat`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ReefKind {
    /// Permeable carbonate sands (lagoon floors, sand aprons).
    Sediment,
    /// Coral plus sediment, weighted by the site's cover.
    CoralAndSediment,
    /// A global average over reef types.
    GlobalAverage,
    /// A shallow reef flat.
    ReefFlat,
}

/// One published NEC–Omega_ar relationship (a table row).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NecRelationship {
    /// Short id used in quantity names, e.g. "eyre2018_sediment".
    pub id: &'static str,
    /// Authors and year for readers.
    pub name: &'static str,
    /// Full citation, with the part of the paper the numbers come from.
    pub citation: &'static str,
    /// The form as text.
    pub form_text: &'static str,
    /// Coefficients as text, with units.
    pub coefficients: &'static str,
    /// Unit of NEC.
    pub unit: &'static str,
    /// The Omega_ar span (see [`OmegaSpan`]).
    pub omega_span: OmegaSpan,
    /// Temperature range of the fit, °C, when verified.
    pub temp_range_c: Option<(f64, f64)>,
    /// The reef it came from, in words.
    pub reef_type: &'static str,
    /// The reef kind, for the habitat choice.
    pub reef_kind: ReefKind,
    /// What of this row is our construction rather than a printed equation.
    pub construction: &'static str,
    /// The public texts its numbers were checked against.
    pub verified_from: &'static str,
    /// The form used in computation.
    pub form: NecForm,
}

impl NecRelationship {
    /// The row as a line in Omega_ar at coral cover `cover` (0–1), before any anchoring.
    pub fn line(&self, cover: Option<f64>) -> Result<Line, NecUnavailable> {
        match self.form {
            NecForm::Linear { line } => Ok(line),
            NecForm::CoverWeighted { coral, sediment } => {
                let c = cover.ok_or(NecUnavailable::NeedsCover)?.clamp(0.0, 1.0);
                Ok(Line::weighted(coral, c, sediment, 1.0 - c))
            }
            NecForm::ZeroPoint { .. } => Err(NecUnavailable::NeedsAnchor),
        }
    }

    /// NEC, mmol CaCO3 m⁻² d⁻¹, at `omega` and coral cover `cover`. `_temp_c` is not used:
    /// no row has a temperature term (see [`NecRelationship::extrapolation`] for its range).
    pub fn nec(&self, omega: f64, _temp_c: f64, cover: Option<f64>) -> Result<f64, NecUnavailable> {
        self.line(cover).map(|l| l.at(omega))
    }

    /// The Omega_ar at which this row's NEC is zero (net dissolution below it).
    pub fn zero_omega(&self, cover: Option<f64>) -> Result<Option<f64>, NecUnavailable> {
        match self.form {
            NecForm::ZeroPoint { omega_zero } => Ok(Some(omega_zero)),
            _ => self.line(cover).map(|l| l.zero()),
        }
    }

    /// Where `omega` and `temp_c` lie against the row's span and temperature range.
    pub fn extrapolation(&self, omega: f64, temp_c: f64) -> Extrapolation {
        let omega_flag = match self.omega_span {
            OmegaSpan::Fitted { lo, hi } | OmegaSpan::PaperEvaluated { lo, hi } => {
                if omega < lo {
                    Extrapolation::BelowSpan
                } else if omega > hi {
                    Extrapolation::AboveSpan
                } else {
                    Extrapolation::Inside
                }
            }
            OmegaSpan::NotVerified => Extrapolation::RangeNotChecked,
        };
        let temp_out = self
            .temp_range_c
            .is_some_and(|(lo, hi)| !(lo..=hi).contains(&temp_c));
        match omega_flag {
            Extrapolation::Inside | Extrapolation::RangeNotChecked if temp_out => {
                Extrapolation::TemperatureOutside
            }
            f => f,
        }
    }
}

/// The row with id `id`.
pub fn by_id(id: &str) -> Option<NecRelationship> {
    builtin().into_iter().find(|r| r.id == id)
}

#[cfg(test)]
mod tests;
