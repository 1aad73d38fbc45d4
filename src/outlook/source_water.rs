//! Source water apart from reef metabolism: the third way of carrying a record into the
//! future ("source offsets", next to the ratio and additive rules of [`super::projection`]).
//!
//! A site may mark record files (or a station) as offshore source water. Each reef record is
//! then its source water plus metabolic offsets: `dTA = TA_reef − TA_source` and
//! `dDIC = DIC_reef − DIC_source`, against the source water's state at the same season and
//! local clock hour when the source has readings in that hour, else against the source's
//! season mean (else, for a season the source never sampled, against the mean of all its
//! rows; or against an offshore TA/DIC stated in the site file). Under a pathway:
//! 1. the source water follows the atmosphere by the ratio or additive rule ([`Follows`]),
//!    its TA held: `DIC_source(y)` is solved from `TA_source` and `pCO2_source(y)` at the
//!    source's temperature (plus the warming) and salinity;
//! 2. the offsets are held: the reef water in year `y` is solved from `TA_source + dTA` and
//!    `DIC_source(y) + dDIC` at the record's own temperature (plus the warming), salinity and
//!    pressure.
//!
//! Because the buffer capacity of seawater falls as DIC rises, a held dDIC moves pCO2 and
//! [H+] further and CO3²⁻ and Omega_ar less in a high-CO2 year than today: diel extremes of
//! pCO2 widen. Shaw, McNeil, Tilbrook, Matear & Bates (2013), Global Change Biology
//! 19(5):1632–1641, doi:10.1111/gcb.12154, found a threefold nonlinear amplification of the
//! reef-flat pCO2 signal by 2100 under RCP8.5 on a Great Barrier Reef flat in this way. The
//! direction follows the buffer factors of Egleston, Sabine & Morel (2010), Global
//! Biogeochem. Cycles 24, GB1002 (checked in the tests below).

use crate::chem::{self, CarbonateState, Conditions, Constants, Input, Perturbation};

use super::scenario::Offsets;

/// How the source water follows the atmosphere (the rules of
/// [`super::projection::Disequilibrium`] applied to the source water).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Follows {
    /// `pCO2_source(y) = pCO2_air(y) × pCO2_source / pCO2_air` at sampling.
    #[default]
    Ratio,
    /// `pCO2_source(y) = pCO2_air(y) + (pCO2_source − pCO2_air)` at sampling.
    Additive,
}

impl Follows {
    /// Name used in files and outputs.
    pub fn name(self) -> &'static str {
        match self {
            Follows::Ratio => "ratio",
            Follows::Additive => "additive",
        }
    }

    /// The source water's pCO2 under air pCO2 `air_year`, from its pCO2 `pco2` sampled
    /// under air pCO2 `air_sample`.
    pub fn apply(self, pco2: f64, air_sample: f64, air_year: f64) -> f64 {
        match self {
            Follows::Ratio => air_year * (pco2 / air_sample),
            Follows::Additive => air_year + (pco2 - air_sample),
        }
    }
}

/// Which part of the source water a reef record was measured against.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MatchRule {
    /// Source rows of the same season in the same local clock hour.
    SameHour,
    /// All source rows of the same season (the source has no reading in that hour, or the
    /// reef record has no time of day).
    SeasonMean,
    /// All source rows: the source never sampled the record's season.
    AllRows,
    /// The offshore TA and DIC stated in the site file.
    SiteFile,
}

impl MatchRule {
    /// Plain words for outputs.
    pub fn describe(self) -> &'static str {
        match self {
            MatchRule::SameHour => "same season and local hour",
            MatchRule::SeasonMean => "season mean",
            MatchRule::AllRows => "mean of all source rows (season not sampled)",
            MatchRule::SiteFile => "offshore TA/DIC of the site file",
        }
    }
}

/// The offset rule, stated once: the report's methods and `docs/site-format.md` repeat it
/// verbatim (`tests/docs_agree.rs`).
pub const OFFSET_RULE: &str = "each reef record's TA and DIC offsets are taken against the \
     source water of the same season and local clock hour when the source has readings in that \
     hour, else against the source's season mean (else, for a season the source never sampled, \
     against the mean of all its rows)";

/// Plausible magnitude of a reef record's TA offset from its source water, µmol/kg.
/// Common practice: a guard against a wrong source file or unit slip, wider than the
/// reef-flat departures from offshore water reported in reef metabolism studies (diel TA
/// drawdown by calcification of up to about 100–200 µmol/kg on shallow flats at low tide,
/// from memory; not a published bound).
pub const MAX_TA_OFFSET_UMOL_KG: f64 = 300.0;

/// Plausible magnitude of a reef record's DIC offset from its source water, µmol/kg.
/// Common practice, as [`MAX_TA_OFFSET_UMOL_KG`]: reef-flat diel DIC swings reach a few
/// hundred µmol/kg (the pCO2 range of roughly 100–1000 µatm on the flat studied by Shaw et
/// al. 2013 corresponds to that, from memory).
pub const MAX_DIC_OFFSET_UMOL_KG: f64 = 500.0;

/// The offshore source water one reef record is measured against: its state at sampling
/// (central values), where it comes from and how it follows the atmosphere.
#[derive(Clone, Debug, PartialEq)]
pub struct SourceWater {
    /// How the source was matched to the record.
    pub rule: MatchRule,
    /// How the source water follows the atmosphere.
    pub follows: Follows,
    /// Calendar year of the source sampling (the latest of the rows averaged).
    pub sample_year: i32,
    /// Temperature, °C.
    pub temp_c: f64,
    /// Practical salinity.
    pub salinity: f64,
    /// Gauge pressure, dbar.
    pub pressure_dbar: f64,
    /// Total silicate, µmol/kg.
    pub silicate: f64,
    /// Total phosphate, µmol/kg.
    pub phosphate: f64,
    /// Total alkalinity, µmol/kg (mean of the rows matched).
    pub ta: f64,
    /// DIC, µmol/kg (mean of the rows matched).
    pub dic: f64,
    /// pCO2 of the mean TA and DIC at the mean conditions, µatm.
    pub pco2: f64,
    /// Source rows averaged (1 for a site-file value): measurement errors of the mean are
    /// divided by √rows.
    pub rows: usize,
}

impl SourceWater {
    /// The chemistry conditions of the source water at a given temperature.
    pub fn conditions_at(&self, temp_c: f64) -> Conditions {
        Conditions {
            temp_c,
            salinity: self.salinity,
            pressure_dbar: self.pressure_dbar,
            silicate: self.silicate,
            phosphate: self.phosphate,
        }
    }
}

/// What a record's projection under one pathway needs of its source water, worked out once
/// per record: the air pCO2 values (µatm, at the source's temperature and salinity) and the
/// central constants at the two sampling states.
#[derive(Clone, Debug, PartialEq)]
pub struct SourceAnchor {
    /// Air in the source's own sampling year.
    pub air_own_sample: f64,
    /// Air in the reef record's sampling year (the source's state at the reef's sampling
    /// time is the source followed to that year).
    pub air_reef_sample: f64,
    /// Constants of the source water at its sampling conditions.
    pub k_sample: Constants,
    /// Constants of the reef record at its sampling conditions.
    pub k_reef_sample: Constants,
}

/// The source water's conditions in one horizon year (central constants).
#[derive(Clone, Debug)]
pub struct SourceYear {
    /// Air pCO2 at the source's temperature in that year, µatm.
    pub air: f64,
    /// Constants of the source water in that year.
    pub k_year: Constants,
}

/// A reef record's TA and pCO2 at sampling and its source water's, central or with one
/// member's measurement draws.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HeldStart {
    pub reef_ta: f64,
    pub reef_pco2: f64,
    pub source_ta: f64,
    pub source_pco2: f64,
}

/// The offsets a reef record holds from its source water, and the source water they are
/// held against: the same in every year, so worked out once per record (and member).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HeldOffsets {
    /// Source-water TA at sampling, µmol/kg.
    pub source_ta: f64,
    /// Source-water pCO2 at its own sampling, µatm.
    pub source_pco2: f64,
    /// `TA_reef − TA_source` at the reef's sampling time, µmol/kg.
    pub d_ta: f64,
    /// `DIC_reef − DIC_source` at the reef's sampling time, µmol/kg.
    pub d_dic: f64,
}

impl HeldOffsets {
    /// The offsets of `start` from its source water at the reef's sampling time: the source
    /// water followed to the reef's sampling year and the reef water, each solved from its
    /// TA and pCO2 with its sampling constants (shifted by `pt`, a member's draw).
    pub fn new(
        start: &HeldStart,
        sw: &SourceWater,
        anchor: &SourceAnchor,
        pt: Option<&Perturbation>,
    ) -> Result<HeldOffsets, String> {
        let p_base = sw.follows.apply(
            start.source_pco2,
            anchor.air_own_sample,
            anchor.air_reef_sample,
        );
        let source_then = solve_pco2(
            start.source_ta,
            p_base,
            &anchor.k_sample,
            pt,
            "source water at sampling",
        )?;
        let reef_then = solve_pco2(
            start.reef_ta,
            start.reef_pco2,
            &anchor.k_reef_sample,
            pt,
            "reef water at sampling",
        )?;
        Ok(HeldOffsets {
            source_ta: start.source_ta,
            source_pco2: start.source_pco2,
            d_ta: start.reef_ta - start.source_ta,
            d_dic: reef_then.dic - source_then.dic,
        })
    }
}

/// The state of TA and pCO2 with constants `k` shifted by `pt`; an error names `what`.
fn solve_pco2(
    ta: f64,
    pco2: f64,
    k: &Constants,
    pt: Option<&Perturbation>,
    what: &str,
) -> Result<CarbonateState, String> {
    let k = pt.map_or(*k, |p| k.perturbed(p));
    chem::solve_pair(Input::Ta(ta), Input::Pco2(pco2), &k).map_err(|e| format!("{what}: {e}"))
}

/// The reef record's state in a year with its offsets from the source water held.
/// `k_reef_year`: the record's constants in that year; `pt`: a member's shift of the
/// constants, applied to every constant used (reef and source, at sampling and in the year:
/// `held` must come from the same `pt`).
/// A local scenario's TA offset is added to the source water at its projected pCO2 (as the
/// other rules add it at the record's projected pCO2), its DIC offset to the reef DIC.
pub fn offsets_held_state(
    held: &HeldOffsets,
    sw: &SourceWater,
    anchor: &SourceAnchor,
    year: &SourceYear,
    k_reef_year: &Constants,
    pt: Option<&Perturbation>,
    offsets: Option<&Offsets>,
) -> Result<CarbonateState, String> {
    let p_year = sw
        .follows
        .apply(held.source_pco2, anchor.air_own_sample, year.air);
    if !p_year.is_finite() || p_year < super::projection::MIN_PROJECTED_PCO2_UATM {
        return Err(format!(
            "projected source-water pCO2 {p_year:.1} uatm is below {} uatm (use the ratio rule for the source water)",
            super::projection::MIN_PROJECTED_PCO2_UATM
        ));
    }
    let (off_ta, off_dic) = offsets.map_or((0.0, 0.0), |o| (o.ta_umol_kg, o.dic_umol_kg));
    let source_now = solve_pco2(
        held.source_ta + off_ta,
        p_year,
        &year.k_year,
        pt,
        "source water in the year",
    )?;
    let k = pt.map_or(*k_reef_year, |p| k_reef_year.perturbed(p));
    chem::solve_pair(
        Input::Ta(source_now.ta + held.d_ta),
        Input::Dic(source_now.dic + held.d_dic + off_dic),
        &k,
    )
    .map_err(|e| format!("reef water with its offsets held: {e}"))
}

#[cfg(test)]
#[path = "source_water_tests.rs"]
mod tests;
