//! What the caller chooses for the ensemble, and the checks run once before a projection.

use crate::chem::Input;

use super::super::{OutlookError, ProjectionSettings, SiteInput};

/// Largest ensemble accepted (memory grows linearly with it).
pub const MAX_MEMBERS: usize = 100_000;

/// Default Monte Carlo seed.
pub const DEFAULT_SEED: u64 = 20_240_601;

/// Standard uncertainties of the site's measurements, by kind of measurement.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MeasurementUncertainty {
    /// TA, µmol/kg. Default 2 (the value Orr et al. 2018 used for CRM-referenced TA).
    pub ta_umol_kg: f64,
    /// DIC, µmol/kg. Default 2 (as TA).
    pub dic_umol_kg: f64,
    /// pH (total scale). Default 0.01 (spectrophotometric accuracy; from memory, fact sheet
    /// §2c).
    pub ph: f64,
    /// Seawater pCO2 or fCO2, percent of the value. Default 0.5 % (about 2 µatm at 400 µatm;
    /// from memory, fact sheet §2c).
    pub pco2_pct: f64,
}

impl Default for MeasurementUncertainty {
    fn default() -> Self {
        MeasurementUncertainty {
            ta_umol_kg: 2.0,
            dic_umol_kg: 2.0,
            ph: 0.01,
            pco2_pct: 0.5,
        }
    }
}

impl MeasurementUncertainty {
    /// Standard uncertainty of one measured value in its own unit (carbonate ion, rarely
    /// measured, takes 2 % of the value).
    pub fn sd_of(&self, input: &Input) -> f64 {
        match *input {
            Input::Ta(_) => self.ta_umol_kg,
            Input::Dic(_) => self.dic_umol_kg,
            Input::PhT(_) => self.ph,
            Input::Pco2(v) | Input::Fco2(v) => v.abs() * self.pco2_pct / 100.0,
            Input::Co3(v) => v.abs() * 0.02,
        }
    }

    fn validate(&self) -> Result<(), OutlookError> {
        for (what, v, hi) in [
            ("TA uncertainty (umol/kg)", self.ta_umol_kg, 100.0),
            ("DIC uncertainty (umol/kg)", self.dic_umol_kg, 100.0),
            ("pH uncertainty", self.ph, 0.5),
            ("pCO2 uncertainty (%)", self.pco2_pct, 50.0),
        ] {
            if !v.is_finite() || !(0.0..=hi).contains(&v) {
                return Err(input_err(format!("{what} {v} is outside 0-{hi}")));
            }
        }
        Ok(())
    }
}

/// Ensemble settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EnsembleSettings {
    /// Members per pathway and season; 0 turns the ensemble off (each record once, central
    /// constants, no measurement errors; quantiles are then across records).
    pub members: usize,
    /// Seed of every stream.
    pub seed: u64,
    /// Draw the constants' uncertainties (Orr et al. 2018).
    pub constants: bool,
    /// Measurement standard uncertainties (set to zero to leave them out).
    pub measurement: MeasurementUncertainty,
    /// Worker threads (`None`: rayon's default pool).
    pub threads: Option<usize>,
}

impl Default for EnsembleSettings {
    fn default() -> Self {
        EnsembleSettings {
            members: 1000,
            seed: DEFAULT_SEED,
            constants: true,
            measurement: MeasurementUncertainty::default(),
            threads: None,
        }
    }
}

/// Receives progress of a run (member-years solved). Implementations must be cheap and
/// thread-safe; the default methods do nothing.
pub trait Progress: Sync {
    /// Called once with the total number of member-years.
    fn start(&self, _total: u64) {}
    /// Called as members finish.
    fn advance(&self, _n: u64) {}
}

/// A [`Progress`] that ignores everything.
pub struct NoProgress;

impl Progress for NoProgress {}

pub(super) fn input_err(m: impl Into<String>) -> OutlookError {
    OutlookError::Input(m.into())
}

/// Checks the site's seasons and records, the horizon, the pathways, the ensemble and the
/// calcification rate, once, before anything is computed.
pub(super) fn validate(site: &SiteInput, s: &ProjectionSettings) -> Result<(), OutlookError> {
    validate_site(site)?;
    validate_horizon(&s.years)?;
    // Pathways.
    if s.pathways.is_empty() {
        return Err(input_err("no CO2 pathway selected"));
    }
    for (i, p) in s.pathways.iter().enumerate() {
        if s.pathways
            .iter()
            .skip(i + 1)
            .any(|q| q.pathway.name == p.pathway.name)
        {
            return Err(input_err(format!(
                "pathway \"{}\" is listed twice",
                p.pathway.name
            )));
        }
        let d = p.warming.delta_c;
        if !d.is_finite() || !(-5.0..=10.0).contains(&d) {
            return Err(input_err(format!(
                "pathway \"{}\": warming {d} degC at 2090 is outside -5 to 10 degC",
                p.pathway.name
            )));
        }
    }
    // Ensemble.
    let e = &s.ensemble;
    if e.members > MAX_MEMBERS {
        return Err(input_err(format!(
            "{} ensemble members requested; the limit is {MAX_MEMBERS}",
            e.members
        )));
    }
    if e.threads == Some(0) {
        return Err(input_err("threads must be at least 1"));
    }
    e.measurement.validate()?;
    if let Some(rate) = s.calcification.site_rate.as_ref().map(|r| r.kg_m2_yr)
        && (!rate.is_finite() || rate <= 0.0)
    {
        return Err(input_err(format!(
            "the site's calcification rate {rate} kg CaCO3 m-2 yr-1 must be positive"
        )));
    }
    Ok(())
}

fn validate_site(site: &SiteInput) -> Result<(), OutlookError> {
    if site.seasons.is_empty() {
        return Err(input_err("the site defines no seasons"));
    }
    for (i, a) in site.seasons.iter().enumerate() {
        if a.trim().is_empty() {
            return Err(input_err(format!("season {} has an empty name", i + 1)));
        }
        if site.seasons.iter().skip(i + 1).any(|b| b == a) {
            return Err(input_err(format!("season \"{a}\" is listed twice")));
        }
    }
    if site.records.is_empty() {
        return Err(input_err("no usable records to project"));
    }
    for r in &site.records {
        r.validate()?;
        if r.season >= site.seasons.len() {
            return Err(input_err(format!(
                "{}: season index {} but the site has {} seasons",
                r.label,
                r.season,
                site.seasons.len()
            )));
        }
    }
    Ok(())
}

fn validate_horizon(years: &[i32]) -> Result<(), OutlookError> {
    if years.is_empty() {
        return Err(input_err(
            "no horizon years (the records may already be at or after the last horizon year)",
        ));
    }
    for w in years.windows(2) {
        if w[1] <= w[0] {
            return Err(input_err(format!(
                "horizon years must increase: {} follows {}",
                w[1], w[0]
            )));
        }
    }
    Ok(())
}
