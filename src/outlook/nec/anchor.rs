//! The site's own measured NEC (`[calcification.measured_nec]`), its validation, and the
//! anchoring of a relationship to it.
//!
//! Anchoring is our construction, not any paper's: a relationship is multiplied by one factor
//! k = NEC_site / NEC_row(Omega_site) so that it passes through the site's value at the
//! Omega_ar where it was measured. Scaling keeps the row's own zero-NEC Omega_ar. For a row
//! that publishes only its zero point, the anchored line runs through that zero point and the
//! site's value.

use serde::Serialize;

use crate::site::schema::MeasuredNecSpec;

use super::{KG_M2_YR_PER_MMOL_M2_D, Line, NecForm, NecRelationship, NecUnavailable};

/// Accepted size of a measured NEC, mmol CaCO3 m⁻² d⁻¹ (either sign): published daily reef
/// NEC reaches a few hundred (174–331 on the Kaneohe Bay barrier reef, Shamberger et al. 2011
/// abstract); 1000 (≈ 36.6 kg CaCO3 m⁻² yr⁻¹) leaves room and catches unit slips.
pub const MEASURED_NEC_LIMIT_MMOL_M2_D: f64 = 1000.0;

/// Accepted Omega_ar at which a NEC was measured (common practice: open-ocean and reef
/// waters lie well inside 0.5–10).
pub const MEASURED_OMEGA_RANGE: (f64, f64) = (0.5, 10.0);

/// Unit of a measured NEC as written in the site file.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum NecUnit {
    /// "mmol m-2 d-1" (mmol CaCO3 per m² per day).
    MmolPerM2PerDay,
    /// "kg m-2 yr-1" (kg CaCO3 per m² per year).
    KgPerM2PerYear,
}

impl NecUnit {
    /// The spellings accepted in the site file.
    pub const NAMES: [(&'static str, NecUnit); 2] = [
        ("mmol m-2 d-1", NecUnit::MmolPerM2PerDay),
        ("kg m-2 yr-1", NecUnit::KgPerM2PerYear),
    ];

    /// The value in mmol CaCO3 m⁻² d⁻¹.
    pub fn to_mmol_m2_d(self, value: f64) -> f64 {
        match self {
            NecUnit::MmolPerM2PerDay => value,
            NecUnit::KgPerM2PerYear => value / KG_M2_YR_PER_MMOL_M2_D,
        }
    }
}

/// How the site's NEC was measured.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum NecMethod {
    /// Alkalinity anomaly (chemistry-based, from TA drawdown and residence time).
    AlkalinityAnomaly,
    /// Census-based carbonate budget.
    Census,
}

impl NecMethod {
    /// The spellings accepted in the site file.
    pub const NAMES: [(&'static str, NecMethod); 2] = [
        ("alkalinity anomaly", NecMethod::AlkalinityAnomaly),
        ("census", NecMethod::Census),
    ];
}

/// A NEC measured at the site, checked.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SiteNec {
    /// mmol CaCO3 m⁻² d⁻¹ (converted from the unit written).
    pub mmol_m2_d: f64,
    /// The unit the site file used.
    pub unit_written: NecUnit,
    pub method: NecMethod,
    pub source: String,
    /// Omega_ar at which it was measured; `None` means the site's present-day baseline.
    pub omega_ar: Option<f64>,
}

/// One problem with `[calcification.measured_nec]`: the key (below the table), the message
/// and a hint.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SpecProblem {
    pub key: &'static str,
    pub message: String,
    pub help: String,
}

fn lookup<T: Copy>(names: &[(&'static str, T)], written: &str) -> Option<T> {
    let w = written.trim();
    names
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(w))
        .map(|(_, v)| *v)
}

fn listed<T>(names: &[(&'static str, T)]) -> String {
    names
        .iter()
        .map(|(n, _)| format!("\"{n}\""))
        .collect::<Vec<_>>()
        .join(" or ")
}

/// Checks the site file's measured NEC; every problem is returned.
pub fn site_nec(spec: &MeasuredNecSpec) -> Result<SiteNec, Vec<SpecProblem>> {
    let mut problems = Vec::new();
    let mut problem = |key, message: String, help: String| {
        problems.push(SpecProblem { key, message, help });
    };
    let unit = lookup(&NecUnit::NAMES, &spec.unit);
    if unit.is_none() {
        problem(
            "unit",
            format!("unknown unit \"{}\" for the measured NEC", spec.unit),
            format!("write {}", listed(&NecUnit::NAMES)),
        );
    }
    let method = lookup(&NecMethod::NAMES, &spec.method);
    if method.is_none() {
        problem(
            "method",
            format!("unknown NEC method \"{}\"", spec.method),
            format!("write {}", listed(&NecMethod::NAMES)),
        );
    }
    if spec.source.trim().is_empty() {
        problem(
            "source",
            "the measured NEC has no source".to_string(),
            "name the study or survey it comes from".to_string(),
        );
    }
    let mmol = unit.map(|u| u.to_mmol_m2_d(spec.value));
    let lim = MEASURED_NEC_LIMIT_MMOL_M2_D;
    if mmol.is_some_and(|v| !v.is_finite() || v.abs() > lim) || !spec.value.is_finite() {
        problem(
            "value",
            format!(
                "measured NEC {} {} is outside the valid range",
                spec.value, spec.unit
            ),
            format!(
                "give a value between -{lim} and {lim} mmol m-2 d-1 (-{:.1} to {:.1} kg m-2 yr-1)",
                lim * KG_M2_YR_PER_MMOL_M2_D,
                lim * KG_M2_YR_PER_MMOL_M2_D
            ),
        );
    }
    let (lo, hi) = MEASURED_OMEGA_RANGE;
    if let Some(om) = spec.omega_ar
        && !(om.is_finite() && (lo..=hi).contains(&om))
    {
        problem(
            "omega_ar",
            format!("Omega_ar {om} of the measured NEC is outside {lo}-{hi}"),
            "give the Omega_ar at which the NEC was measured, or leave it out to use the \
             site's present-day baseline"
                .to_string(),
        );
    }
    match (mmol, method, problems.is_empty()) {
        (Some(mmol_m2_d), Some(method), true) => Ok(SiteNec {
            mmol_m2_d,
            unit_written: unit.unwrap_or(NecUnit::MmolPerM2PerDay),
            method,
            source: spec.source.trim().to_string(),
            omega_ar: spec.omega_ar,
        }),
        _ => Err(problems),
    }
}

/// Why a relationship could not be anchored to the site's NEC.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum AnchorError {
    /// The row's NEC at the site's Omega_ar is zero or of the other sign than the site's.
    SignDiffers { row_nec: f64 },
    /// The site's NEC is zero: no scale can be set.
    SiteZero,
    /// The row publishes only a zero point and the site's Omega_ar lies on it.
    AtZeroPoint,
    /// The site's NEC and Omega_ar lie on the side of the published zero point where NEC
    /// would have to rise as Omega_ar falls.
    WrongSideOfZero { omega_zero: f64 },
}

impl std::fmt::Display for AnchorError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            AnchorError::SignDiffers { row_nec } => write!(
                f,
                "the relationship gives {row_nec:.1} mmol m-2 d-1 at the Omega_ar where the \
                 site's NEC was measured, of the other sign than the measurement"
            ),
            AnchorError::SiteZero => f.write_str("the site's measured NEC is zero"),
            AnchorError::WrongSideOfZero { omega_zero } => write!(
                f,
                "the site's measured NEC has the other sign than the relationship gives on that \
                 side of its zero point (Omega_ar {omega_zero})"
            ),
            AnchorError::AtZeroPoint => f.write_str(
                "the site's NEC was measured at the relationship's own zero point, so no \
                 slope follows from it",
            ),
        }
    }
}

/// A relationship ready to evaluate at one site: a line in Omega_ar, anchored to the site's
/// measured NEC when it gives one.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NecModel {
    pub relationship: &'static str,
    pub line: Line,
    /// The scale factor applied (1 when not anchored; for a zero-point row, the slope).
    pub scale: f64,
    pub anchored: bool,
}

impl NecModel {
    /// The row at cover `cover`, anchored to `site` when given: `Some((nec, omega_site))`
    /// with `omega_site` the Omega_ar at which it was measured (the site file's, or the
    /// site's present-day baseline). A zero-point row needs the anchor.
    pub fn for_site(
        rel: &NecRelationship,
        cover: Option<f64>,
        site: Option<(&SiteNec, f64)>,
    ) -> Result<NecModel, NecModelError> {
        let Some((nec, omega_site)) = site else {
            let line = rel.line(cover).map_err(NecModelError::Unavailable)?;
            return Ok(NecModel {
                relationship: rel.id,
                line,
                scale: 1.0,
                anchored: false,
            });
        };
        let v = nec.mmol_m2_d;
        if v == 0.0 {
            return Err(NecModelError::Anchor(AnchorError::SiteZero));
        }
        let (line, scale) = match rel.form {
            NecForm::ZeroPoint { omega_zero } => {
                let run = omega_site - omega_zero;
                if run == 0.0 {
                    return Err(NecModelError::Anchor(AnchorError::AtZeroPoint));
                }
                let s = v / run;
                if !(s.is_finite() && s > 0.0) {
                    // NEC would rise as Omega_ar falls: the site's value sits on the wrong side
                    // of the published zero point.
                    return Err(NecModelError::Anchor(AnchorError::WrongSideOfZero {
                        omega_zero,
                    }));
                }
                let line = Line {
                    slope: s,
                    intercept: -s * omega_zero,
                };
                (line, s)
            }
            _ => {
                let base = rel.line(cover).map_err(NecModelError::Unavailable)?;
                let row_nec = base.at(omega_site);
                let k = v / row_nec;
                if !(k.is_finite() && k > 0.0) {
                    return Err(NecModelError::Anchor(AnchorError::SignDiffers { row_nec }));
                }
                (base.scaled(k), k)
            }
        };
        Ok(NecModel {
            relationship: rel.id,
            line,
            scale,
            anchored: true,
        })
    }

    /// NEC, mmol CaCO3 m⁻² d⁻¹, at `omega` (no relationship has a temperature term).
    pub fn nec(&self, omega: f64, _temp_c: f64) -> f64 {
        self.line.at(omega)
    }

    /// The Omega_ar at which NEC = 0 (net dissolution below it).
    pub fn zero_omega(&self) -> Option<f64> {
        self.line.zero()
    }
}

/// Why no [`NecModel`] can be built for a row at a site.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NecModelError {
    Unavailable(NecUnavailable),
    Anchor(AnchorError),
}

impl std::fmt::Display for NecModelError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            NecModelError::Unavailable(u) => u.fmt(f),
            NecModelError::Anchor(a) => a.fmt(f),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::outlook::nec::by_id;

    fn spec(value: f64, unit: &str, method: &str, source: &str) -> MeasuredNecSpec {
        MeasuredNecSpec {
            value,
            unit: unit.to_string(),
            method: method.to_string(),
            source: source.to_string(),
            omega_ar: None,
        }
    }

    fn site(v: f64) -> SiteNec {
        SiteNec {
            mmol_m2_d: v,
            unit_written: NecUnit::MmolPerM2PerDay,
            method: NecMethod::AlkalinityAnomaly,
            source: "test".into(),
            omega_ar: None,
        }
    }

    /// Worked arithmetic: 1 kg CaCO3 m⁻² yr⁻¹ = 1e6 mg / 100.086 mg per mmol / 365.25 d
    /// = 27.355 mmol m⁻² d⁻¹.
    #[test]
    fn units_convert_by_molar_mass_and_year_length() {
        let s = site_nec(&spec(1.0, "kg m-2 yr-1", "census", "survey")).unwrap();
        assert!((s.mmol_m2_d - 27.355).abs() < 5e-4, "{}", s.mmol_m2_d);
        assert_eq!(s.method, NecMethod::Census);
        let s = site_nec(&spec(-12.0, "MMOL m-2 d-1", "Alkalinity anomaly", " a ")).unwrap();
        assert_eq!((s.mmol_m2_d, s.source.as_str()), (-12.0, "a"));
    }

    #[test]
    fn every_problem_is_reported_at_its_key() {
        let mut bad = spec(f64::NAN, "g/m2", "guess", " ");
        bad.omega_ar = Some(12.0);
        let keys: Vec<_> = site_nec(&bad).unwrap_err().iter().map(|p| p.key).collect();
        assert_eq!(keys, ["unit", "method", "source", "value", "omega_ar"]);
        let e = site_nec(&spec(2000.0, "mmol m-2 d-1", "census", "x")).unwrap_err();
        assert_eq!(e.len(), 1);
        assert!(e[0].message.contains("outside the valid range"), "{e:?}");
        // 40 kg m⁻² yr⁻¹ = 1094 mmol m⁻² d⁻¹, over the limit of 1000.
        assert!(site_nec(&spec(40.0, "kg m-2 yr-1", "census", "x")).is_err());
    }

    /// Anchoring reproduces the site's measured value at its Omega_ar, for every row, and
    /// keeps each row's own zero point (worked: a line scaled by k has the same root).
    #[test]
    fn anchoring_reproduces_the_site_value_and_keeps_the_zero() {
        for id in ["eyre2018_sediment", "eyre2018_community", "eyre2018_global"] {
            let rel = by_id(id).unwrap();
            let m = NecModel::for_site(&rel, Some(0.3), Some((&site(120.0), 3.4))).unwrap();
            assert!((m.nec(3.4, 27.0) - 120.0).abs() < 1e-9, "{id}");
            let z0 = rel.zero_omega(Some(0.3)).unwrap();
            assert_eq!(
                m.zero_omega().map(|z| (z * 1e9).round()),
                z0.map(|z| (z * 1e9).round())
            );
            assert!(m.anchored);
        }
        let shaw = by_id("shaw_onetree").unwrap();
        let m = NecModel::for_site(&shaw, None, Some((&site(33.0), 3.6))).unwrap();
        assert!((m.nec(3.6, 27.0) - 33.0).abs() < 1e-12);
        assert!((m.zero_omega().unwrap() - 2.5).abs() < 1e-12);
        // Worked: slope 33 / (3.6 - 2.5) = 30 per unit Omega_ar.
        assert!((m.scale - 30.0).abs() < 1e-12);
    }

    #[test]
    fn anchoring_refuses_inconsistent_signs() {
        let shaw = by_id("shaw_onetree").unwrap();
        // Net calcifying below the published zero point: no rising slope fits.
        let e = NecModel::for_site(&shaw, None, Some((&site(20.0), 2.3))).unwrap_err();
        assert!(matches!(
            e,
            NecModelError::Anchor(AnchorError::WrongSideOfZero { .. })
        ));
        // Net dissolving below it is consistent: slope -10 / (2.3 - 2.5) = 50.
        let m = NecModel::for_site(&shaw, None, Some((&site(-10.0), 2.3))).unwrap();
        assert!((m.scale - 50.0).abs() < 1e-9);
        let e = NecModel::for_site(&shaw, None, Some((&site(20.0), 2.5))).unwrap_err();
        assert_eq!(e, NecModelError::Anchor(AnchorError::AtZeroPoint));
        let sed = by_id("eyre2018_sediment").unwrap();
        // The sediment line is negative at Omega_ar 2.5 (11.51 x 2.5 - 33.683 = -4.9).
        let e = NecModel::for_site(&sed, None, Some((&site(10.0), 2.5))).unwrap_err();
        assert!(
            matches!(e, NecModelError::Anchor(AnchorError::SignDiffers { .. })),
            "{e}"
        );
        assert!(NecModel::for_site(&sed, None, Some((&site(0.0), 3.0))).is_err());
        // Unanchored: a zero-point row gives no rate.
        assert_eq!(
            NecModel::for_site(&shaw, None, None).unwrap_err(),
            NecModelError::Unavailable(NecUnavailable::NeedsAnchor)
        );
    }
}
