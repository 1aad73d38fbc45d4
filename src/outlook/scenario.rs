//! Local scenarios: alkalinity (TA) and/or DIC offsets layered on any pathway, so that a
//! planner can see what a local measure (for example alkalinity enhancement, or DIC drawdown
//! by a seagrass meadow upstream) would change.
//!
//! How an offset enters a projected state (see `projection`):
//! 1. **TA offset**: the record's TA plus the offset is solved with the projected seawater
//!    pCO2. This is the state after the added alkalinity has re-equilibrated with the
//!    atmosphere (DIC rises too); the conservative, long-term case.
//! 2. **DIC offset**: after step 1, the state is solved again from its TA and its DIC plus the
//!    offset, at fixed TA. This represents a local departure of DIC from the air-sea state
//!    (pCO2 then differs from the projected value).
//!
//! Offsets apply to horizon years from `start_year` on (all horizon years when unset), never
//! to the baseline used for calcification.

use std::fmt;

/// Largest accepted offset magnitude, µmol/kg (a guard against unit slips: 500 µmol/kg is
/// about a fifth of surface-ocean TA).
pub const MAX_OFFSET_UMOL_KG: f64 = 500.0;

/// Offsets in µmol/kg.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Offsets {
    /// Added to TA, µmol/kg (positive = alkalinity enhancement).
    pub ta_umol_kg: f64,
    /// Added to DIC, µmol/kg (negative = drawdown).
    pub dic_umol_kg: f64,
}

impl Offsets {
    /// True when both offsets are zero.
    pub fn is_zero(&self) -> bool {
        self.ta_umol_kg == 0.0 && self.dic_umol_kg == 0.0
    }
}

/// A local scenario. The default is no scenario.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LocalScenario {
    /// Short label for outputs ("" when none).
    pub name: String,
    /// Offsets for every season without its own entry.
    pub all_seasons: Offsets,
    /// Per-season offsets (season label, offsets); they replace `all_seasons` for that season.
    pub by_season: Vec<(String, Offsets)>,
    /// First horizon year the offsets apply to (`None`: all horizon years).
    pub start_year: Option<i32>,
}

/// A scenario that does not fit the site.
#[derive(Clone, Debug, PartialEq)]
pub struct ScenarioError(pub String);

impl fmt::Display for ScenarioError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "local scenario: {}", self.0)
    }
}

impl std::error::Error for ScenarioError {}

impl LocalScenario {
    /// True when no offset is set anywhere.
    pub fn is_none(&self) -> bool {
        self.all_seasons.is_zero() && self.by_season.iter().all(|(_, o)| o.is_zero())
    }

    /// Checks offsets (finite, |offset| ≤ 500 µmol/kg) and that every per-season label is one
    /// of `seasons`; returns the offsets resolved per season index.
    pub fn resolve(&self, seasons: &[String]) -> Result<Vec<Offsets>, ScenarioError> {
        let check = |o: &Offsets, what: &str| -> Result<(), ScenarioError> {
            for (field, v) in [("ta_offset", o.ta_umol_kg), ("dic_offset", o.dic_umol_kg)] {
                if !v.is_finite() || v.abs() > MAX_OFFSET_UMOL_KG {
                    return Err(ScenarioError(format!(
                        "{what} {field} = {v} umol/kg is outside +/-{MAX_OFFSET_UMOL_KG} umol/kg"
                    )));
                }
            }
            Ok(())
        };
        check(&self.all_seasons, "all seasons:")?;
        let mut out = vec![self.all_seasons; seasons.len()];
        for (label, o) in &self.by_season {
            check(o, &format!("season \"{label}\":"))?;
            let idx = seasons.iter().position(|s| s == label).ok_or_else(|| {
                ScenarioError(format!(
                    "season \"{label}\" is not one of the site's seasons ({})",
                    seasons.join(", ")
                ))
            })?;
            out[idx] = *o;
        }
        Ok(out)
    }

    /// Whether the offsets apply in `year`.
    pub fn applies_in(&self, year: i32) -> bool {
        self.start_year.is_none_or(|s| year >= s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn per_season_offsets_replace_the_default() {
        let sc = LocalScenario {
            name: "enhancement".into(),
            all_seasons: Offsets {
                ta_umol_kg: 20.0,
                dic_umol_kg: 0.0,
            },
            by_season: vec![(
                "wet".into(),
                Offsets {
                    ta_umol_kg: 0.0,
                    dic_umol_kg: -15.0,
                },
            )],
            start_year: Some(2030),
        };
        let seasons = vec!["dry".to_string(), "wet".to_string()];
        let r = sc.resolve(&seasons).unwrap();
        assert_eq!(
            r[0],
            Offsets {
                ta_umol_kg: 20.0,
                dic_umol_kg: 0.0
            }
        );
        assert_eq!(
            r[1],
            Offsets {
                ta_umol_kg: 0.0,
                dic_umol_kg: -15.0
            }
        );
        assert!(!sc.applies_in(2029) && sc.applies_in(2030));
        assert!(!sc.is_none());
        assert!(LocalScenario::default().is_none());
    }

    #[test]
    fn bad_offsets_are_rejected_with_names() {
        let mut sc = LocalScenario::default();
        sc.by_season.push(("monsoon".into(), Offsets::default()));
        let e = sc.resolve(&["dry".to_string()]).unwrap_err().to_string();
        assert!(e.contains("monsoon") && e.contains("dry"), "{e}");
        let sc = LocalScenario {
            all_seasons: Offsets {
                ta_umol_kg: 2000.0,
                dic_umol_kg: 0.0,
            },
            ..Default::default()
        };
        let e = sc.resolve(&["dry".to_string()]).unwrap_err().to_string();
        assert!(e.contains("ta_offset"), "{e}");
    }
}
