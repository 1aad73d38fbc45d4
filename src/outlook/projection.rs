//! The projection of one record to one horizon year under one pathway (design notes,
//! "Projection method").
//!
//! For a record sampled in year `y0` at temperature `T` and salinity `S`:
//! 1. `pCO2_air(y, T) = xCO2(y) × (1 − pH2O(T, S))` at 1 atm, with the water vapour pressure
//!    of Weiss & Price (1980) (`chem::gas::vapour_pressure_atm`).
//! 2. The disequilibrium of the record is taken against the sampling-year atmosphere:
//!    ratio mode (default) `r = pCO2_sea / pCO2_air(y0, T)`, additive mode
//!    `d = pCO2_sea − pCO2_air(y0, T)`.
//! 3. In year `y` the temperature is `T + ΔSST(y) − ΔSST(y0)` when warming is on (else `T`),
//!    and `pCO2_sea(y) = r × pCO2_air(y, T_y)` or `pCO2_air(y, T_y) + d`.
//! 4. TA stays at the record's value (plus a local TA offset, see `scenario`); TA and
//!    `pCO2_sea(y)` are solved at the in-situ temperature, salinity and pressure; a local DIC
//!    offset is then applied by re-solving from TA and DIC + offset.
//!
//! A third rule, "source offsets", holds the record's TA and DIC offsets from its offshore
//! source water while the source water follows the atmosphere ([`super::source_water`]).
//! [`project_state`] is the one function that projects a record's state in a year under any
//! of the three; every per-record projection goes through it.
//!
//! The sampling-year atmosphere is the observed record when the sampling year lies in it;
//! otherwise it is the pathway's own value, so that under every pathway the projection for
//! the sampling year returns the measured pCO2 (ratio and additive modes alike).

use std::fmt;
use std::str::FromStr;

use crate::chem::{self, CarbonateState, Conditions, Constants, Input, MethodSet, Perturbation};

use super::OutlookError;
use super::pathways::{Observed, Pathway};
use super::scenario::Offsets;
use super::source_water::{
    HeldOffsets, HeldStart, SourceAnchor, SourceWater, SourceYear, offsets_held_state,
};
use super::warming::Warming;

/// How the record's air–sea disequilibrium is carried into the future.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Disequilibrium {
    /// `pCO2_sea(y) = pCO2_air(y) × pCO2_sea/pCO2_air` at sampling (the default: a source or
    /// sink of a given relative strength keeps its strength as the atmosphere rises).
    #[default]
    Ratio,
    /// `pCO2_sea(y) = pCO2_air(y) + (pCO2_sea − pCO2_air)` at sampling.
    Additive,
    /// The record's TA and DIC offsets from its offshore source water are held while the
    /// source water follows the atmosphere ([`super::source_water`]); needs a source water
    /// for every record.
    SourceOffsets,
}

impl Disequilibrium {
    /// Name used in files and outputs.
    pub fn name(self) -> &'static str {
        match self {
            Disequilibrium::Ratio => "ratio",
            Disequilibrium::Additive => "additive",
            Disequilibrium::SourceOffsets => "source offsets",
        }
    }

    /// The three rules, in the order outputs list them.
    pub const ALL: [Disequilibrium; 3] = [
        Disequilibrium::Ratio,
        Disequilibrium::Additive,
        Disequilibrium::SourceOffsets,
    ];
}

impl fmt::Display for Disequilibrium {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Disequilibrium {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "ratio" => Ok(Disequilibrium::Ratio),
            "additive" => Ok(Disequilibrium::Additive),
            "source offsets" | "source-offsets" | "source_offsets" => {
                Ok(Disequilibrium::SourceOffsets)
            }
            other => Err(format!(
                "unknown disequilibrium mode \"{other}\" (expected \"ratio\", \"additive\" or \"source offsets\")"
            )),
        }
    }
}

/// Smallest projected seawater pCO2 accepted, µatm (additive mode can drive a strongly
/// undersaturated record below zero under a falling pathway).
pub const MIN_PROJECTED_PCO2_UATM: f64 = 10.0;

/// The pair a record was solved from, so that the ensemble can draw measurement errors on
/// what was actually measured and re-solve the record with each member's constants.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Measurement {
    /// First measured parameter (µmol/kg, pH total scale, µatm).
    pub a: Input,
    /// Second measured parameter.
    pub b: Input,
    /// Standard uncertainty of `a` in its own unit (`None`: the site's default for that
    /// kind of measurement; e.g. a TA estimated from salinity carries the fit's residual).
    pub sd_a: Option<f64>,
    /// Standard uncertainty of `b`.
    pub sd_b: Option<f64>,
}

/// `input` shifted by `delta` in its own unit.
pub fn shifted(input: Input, delta: f64) -> Input {
    match input {
        Input::Ta(v) => Input::Ta(v + delta),
        Input::Dic(v) => Input::Dic(v + delta),
        Input::PhT(v) => Input::PhT(v + delta),
        Input::Pco2(v) => Input::Pco2(v + delta),
        Input::Fco2(v) => Input::Fco2(v + delta),
        Input::Co3(v) => Input::Co3(v + delta),
    }
}

/// One record as the projection needs it: in-situ conditions, the sampling year, the season
/// and the record's TA and seawater pCO2 (from its measured pair).
#[derive(Clone, Debug, PartialEq)]
pub struct ProjectionRecord {
    /// Where the record came from, for messages (e.g. "records.csv line 12, station A").
    pub label: String,
    /// Index into the site's season list.
    pub season: usize,
    /// Calendar year of sampling.
    pub sample_year: i32,
    /// In-situ temperature, °C.
    pub temp_c: f64,
    /// Practical salinity.
    pub salinity: f64,
    /// Gauge pressure, dbar.
    pub pressure_dbar: f64,
    /// Total silicate, µmol/kg.
    pub silicate: f64,
    /// Total phosphate, µmol/kg.
    pub phosphate: f64,
    /// Total alkalinity, µmol/kg.
    pub ta: f64,
    /// Seawater pCO2 at the in-situ temperature and 1 atm, µatm.
    pub pco2: f64,
    /// The measured pair behind `ta` and `pco2` (`None`: taken as measured TA and pCO2).
    pub measured: Option<Measurement>,
    /// The station-day the record belongs to (`None`: the record is a unit of its own).
    pub unit: Option<SamplingUnit>,
    /// The offshore source water the record is measured against (`None`: the site has none).
    pub source: Option<SourceWater>,
}

/// One station on one local calendar day. Seasonal means weight every sampling unit
/// equally and the records inside a unit equally (time weighting), so that an hourly sensor
/// series does not outweigh bottles taken once a day.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct SamplingUnit {
    /// Station number within the site (in order of first appearance).
    pub station: u32,
    /// Local calendar day, days from 0001-01-01 (chrono's `num_days_from_ce`).
    pub day: i32,
    /// True for a unit of a continuous (sensor) series: consecutive days are then
    /// autocorrelated and the seasonal-mean bootstrap draws them in blocks.
    pub continuous: bool,
    /// Local clock time of the record, minutes after midnight (`None`: date only).
    pub minute: Option<u16>,
}

impl ProjectionRecord {
    /// The chemistry conditions at a given temperature.
    pub fn conditions_at(&self, temp_c: f64) -> Conditions {
        Conditions {
            temp_c,
            salinity: self.salinity,
            pressure_dbar: self.pressure_dbar,
            silicate: self.silicate,
            phosphate: self.phosphate,
        }
    }

    /// Checks the fields the projection relies on (finite, physically plausible).
    pub fn validate(&self) -> Result<(), OutlookError> {
        let checks: [(&str, f64, f64, f64); 7] = [
            ("temp_c", self.temp_c, -2.0, 45.0),
            ("salinity", self.salinity, 1.0, 50.0),
            ("pressure_dbar", self.pressure_dbar, 0.0, 11_000.0),
            ("silicate", self.silicate, 0.0, 500.0),
            ("phosphate", self.phosphate, 0.0, 50.0),
            ("ta", self.ta, 100.0, 5000.0),
            ("pco2", self.pco2, MIN_PROJECTED_PCO2_UATM, 10_000.0),
        ];
        for (field, v, lo, hi) in checks {
            if !v.is_finite() || v < lo || v > hi {
                return Err(OutlookError::Input(format!(
                    "{}: {field} = {v} is outside the range the projection accepts ({lo} to {hi})",
                    self.label
                )));
            }
        }
        if let Some(sw) = &self.source {
            let checks: [(&str, f64, f64, f64); 4] = [
                ("source-water temp_c", sw.temp_c, -2.0, 45.0),
                ("source-water salinity", sw.salinity, 1.0, 50.0),
                ("source-water ta", sw.ta, 100.0, 5000.0),
                (
                    "source-water pco2",
                    sw.pco2,
                    MIN_PROJECTED_PCO2_UATM,
                    10_000.0,
                ),
            ];
            for (field, v, lo, hi) in checks {
                if !v.is_finite() || v < lo || v > hi {
                    return Err(OutlookError::Input(format!(
                        "{}: {field} = {v} is outside the range the projection accepts ({lo} to {hi})",
                        self.label
                    )));
                }
            }
        }
        if let Some(m) = &self.measured {
            for (inp, sd) in [(m.a, m.sd_a), (m.b, m.sd_b)] {
                let v = inp.value();
                if !v.is_finite() {
                    return Err(OutlookError::Input(format!(
                        "{}: measured {} = {v} is not a number",
                        self.label,
                        inp.column()
                    )));
                }
                if let Some(sd) = sd.filter(|sd| !sd.is_finite() || *sd < 0.0) {
                    return Err(OutlookError::Input(format!(
                        "{}: uncertainty of {} = {sd} must be a non-negative number",
                        self.label,
                        inp.column()
                    )));
                }
            }
        }
        Ok(())
    }
}

/// Seawater-equilibrium pCO2 of air, µatm: `xCO2 × (1 − pH2O(T, S))` at 1 atm total pressure
/// (pH2O of Weiss & Price 1980, in atm).
pub fn pco2_air_uatm(xco2_ppm: f64, temp_c: f64, salinity: f64) -> f64 {
    xco2_ppm * (1.0 - chem::gas::vapour_pressure_atm(temp_c, salinity))
}

/// The central constants of a record with source water at its sampling conditions and of
/// its source water at the source's: the same under every pathway.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SamplingConstants {
    pub source: Constants,
    pub reef: Constants,
}

impl SamplingConstants {
    /// The sampling constants of `rec` (`None`: the record has no source water).
    pub fn of(rec: &ProjectionRecord, methods: &MethodSet) -> Option<SamplingConstants> {
        rec.source.as_ref().map(|sw| SamplingConstants {
            source: Constants::new(&sw.conditions_at(sw.temp_c), methods),
            reef: Constants::new(&rec.conditions_at(rec.temp_c), methods),
        })
    }
}

/// What a record brings to every horizon year of one pathway, computed once.
#[derive(Clone, Debug)]
pub struct RecordAnchor {
    /// Atmospheric CO2 in the sampling year, ppm.
    pub xco2_sample_ppm: f64,
    /// pCO2 of air in equilibrium with the record's water in the sampling year, µatm.
    pub pco2_air_sample: f64,
    /// The source water's air pCO2 values (`None`: the record has no source water).
    pub source: Option<SourceAnchor>,
}

impl RecordAnchor {
    /// The anchor of `rec` under `pathway` (`methods`: the constant set, for the source
    /// water's sampling constants).
    pub fn new(
        rec: &ProjectionRecord,
        pathway: &Pathway,
        observed: &Observed,
        methods: &MethodSet,
    ) -> Result<RecordAnchor, OutlookError> {
        let sampling = SamplingConstants::of(rec, methods);
        RecordAnchor::with_constants(rec, pathway, observed, &sampling)
    }

    /// [`RecordAnchor::new`] with the sampling constants worked out already (they do not
    /// depend on the pathway).
    pub fn with_constants(
        rec: &ProjectionRecord,
        pathway: &Pathway,
        observed: &Observed,
        sampling: &Option<SamplingConstants>,
    ) -> Result<RecordAnchor, OutlookError> {
        let x = pathway.xco2_ppm(observed, rec.sample_year).map_err(|e| {
            OutlookError::Input(format!("{}: sampling-year atmosphere: {e}", rec.label))
        })?;
        let source = match (&rec.source, sampling) {
            (Some(sw), Some(k)) => {
                let own = pathway.xco2_ppm(observed, sw.sample_year).map_err(|e| {
                    OutlookError::Input(format!(
                        "{}: source-water sampling-year atmosphere: {e}",
                        rec.label
                    ))
                })?;
                Some(SourceAnchor {
                    air_own_sample: pco2_air_uatm(own, sw.temp_c, sw.salinity),
                    air_reef_sample: pco2_air_uatm(x, sw.temp_c, sw.salinity),
                    k_sample: k.source,
                    k_reef_sample: k.reef,
                })
            }
            _ => None,
        };
        Ok(RecordAnchor {
            xco2_sample_ppm: x,
            pco2_air_sample: pco2_air_uatm(x, rec.temp_c, rec.salinity),
            source,
        })
    }

    /// Projected seawater pCO2 from the record's seawater pCO2 (possibly perturbed by a
    /// measurement draw) and the air pCO2 of the horizon year, by the ratio or additive rule.
    /// The source-offsets rule projects no pCO2 of the record on its own (the record's state
    /// comes from [`project_state`]); it is given the ratio value here.
    pub fn project_pco2(&self, pco2_record: f64, pco2_air_year: f64, mode: Disequilibrium) -> f64 {
        match mode {
            Disequilibrium::Ratio | Disequilibrium::SourceOffsets => {
                pco2_air_year * (pco2_record / self.pco2_air_sample)
            }
            Disequilibrium::Additive => pco2_air_year + (pco2_record - self.pco2_air_sample),
        }
    }
}

/// The conditions of one record in one horizon year under one pathway.
#[derive(Clone, Debug)]
pub struct YearConditions {
    /// Horizon year.
    pub year: i32,
    /// Atmospheric CO2, ppm.
    pub xco2_ppm: f64,
    /// In-situ temperature in that year, °C.
    pub temp_c: f64,
    /// pCO2 of air in equilibrium with the water at `temp_c`, µatm.
    pub pco2_air: f64,
    /// All constants at `temp_c`, S, P (central values).
    pub constants: Constants,
    /// The source water in that year, warmed by the same change (`None`: no source water).
    pub source: Option<SourceYear>,
}

impl YearConditions {
    /// Conditions of `rec` in `year`.
    pub fn new(
        rec: &ProjectionRecord,
        pathway: &Pathway,
        observed: &Observed,
        warming: Option<&Warming>,
        methods: &MethodSet,
        year: i32,
        mode: Disequilibrium,
    ) -> Result<YearConditions, OutlookError> {
        let change = warming.map_or(0.0, |w| w.change_between(rec.sample_year, year));
        YearConditions::with_change(rec, pathway, observed, change, methods, year, mode)
    }

    /// Conditions of `rec` in `year` with `change_c` °C added to its temperature. The source
    /// water's conditions (one more constant set) are worked out only for the rule that
    /// uses them, [`Disequilibrium::SourceOffsets`].
    pub fn with_change(
        rec: &ProjectionRecord,
        pathway: &Pathway,
        observed: &Observed,
        change_c: f64,
        methods: &MethodSet,
        year: i32,
        mode: Disequilibrium,
    ) -> Result<YearConditions, OutlookError> {
        let xco2 = pathway
            .xco2_ppm(observed, year)
            .map_err(OutlookError::Pathway)?;
        Ok(YearConditions::at(
            rec,
            xco2,
            change_c,
            methods,
            year,
            mode,
            &mut |c: &Conditions| Constants::new(c, methods),
        ))
    }

    /// Conditions of `rec` in `year`, whose atmosphere holds `xco2_ppm`, with `change_c` °C
    /// added to its temperature. `source_constants` gives the source water's constants at
    /// given conditions (many records share a source water: a cache may answer).
    pub fn at(
        rec: &ProjectionRecord,
        xco2_ppm: f64,
        change_c: f64,
        methods: &MethodSet,
        year: i32,
        mode: Disequilibrium,
        source_constants: &mut dyn FnMut(&Conditions) -> Constants,
    ) -> YearConditions {
        let temp_c = rec.temp_c + change_c;
        let constants = Constants::new(&rec.conditions_at(temp_c), methods);
        let needs_source = mode == Disequilibrium::SourceOffsets;
        let source = rec.source.as_ref().filter(|_| needs_source).map(|sw| {
            let t = sw.temp_c + change_c;
            SourceYear {
                air: pco2_air_uatm(xco2_ppm, t, sw.salinity),
                k_year: source_constants(&sw.conditions_at(t)),
            }
        });
        YearConditions {
            year,
            xco2_ppm,
            temp_c,
            pco2_air: pco2_air_uatm(xco2_ppm, temp_c, rec.salinity),
            constants,
            source,
        }
    }
}

/// A projected state with the numbers that led to it.
#[derive(Clone, Debug, PartialEq)]
pub struct ProjectedPoint {
    /// Pathway name.
    pub pathway: String,
    /// Horizon year.
    pub year: i32,
    /// Atmospheric CO2, ppm.
    pub xco2_ppm: f64,
    /// pCO2 of air in equilibrium with the water, µatm.
    pub pco2_air: f64,
    /// Projected seawater pCO2 before any DIC offset, µatm (source offsets: of the state).
    pub pco2_sea: f64,
    /// Temperature used, °C.
    pub temp_c: f64,
    /// The solved state (TA, DIC, pH_T, Omega...).
    pub state: CarbonateState,
}

/// Solves one projected state: TA (+ offset) with the projected pCO2, then, if a DIC offset is
/// set, TA with DIC + offset. `k` are the constants to use (central or perturbed).
pub fn solve_projected(
    ta: f64,
    pco2_sea: f64,
    offsets: Option<&Offsets>,
    k: &Constants,
) -> Result<CarbonateState, String> {
    if !pco2_sea.is_finite() || pco2_sea < MIN_PROJECTED_PCO2_UATM {
        return Err(format!(
            "projected seawater pCO2 {pco2_sea:.1} uatm is below {MIN_PROJECTED_PCO2_UATM} uatm \
             (additive disequilibrium larger than the atmosphere; use ratio mode)"
        ));
    }
    let ta_used = ta + offsets.map_or(0.0, |o| o.ta_umol_kg);
    let state = chem::solve_pair(Input::Ta(ta_used), Input::Pco2(pco2_sea), k)
        .map_err(|e| e.to_string())?;
    match offsets {
        Some(o) if o.dic_umol_kg != 0.0 => {
            chem::solve_pair(Input::Ta(ta_used), Input::Dic(state.dic + o.dic_umol_kg), k)
                .map_err(|e| format!("after the DIC offset: {e}"))
        }
        _ => Ok(state),
    }
}

/// What a record's projection starts from: its TA and seawater pCO2 at sampling and, with a
/// source water, the source's TA and pCO2; central values or one member's measurement draws.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Start {
    pub ta: f64,
    pub pco2: f64,
    /// Source water (TA, pCO2) at sampling.
    pub source: Option<(f64, f64)>,
    /// The offsets from the source water, worked out once for every year by
    /// [`Start::holding_offsets`] (`None`: [`project_state`] works them out each time).
    pub held: Option<HeldOffsets>,
}

impl Start {
    /// The record's central values.
    pub fn central(rec: &ProjectionRecord) -> Start {
        Start {
            ta: rec.ta,
            pco2: rec.pco2,
            source: rec.source.as_ref().map(|s| (s.ta, s.pco2)),
            held: None,
        }
    }

    /// This start with its source-water offsets worked out once, for projecting it to many
    /// years under `mode` with the same `pt` (the sampling-time states do not depend on the
    /// year). Unchanged under the other rules, or when the offsets cannot be worked out (each
    /// year's [`project_state`] then gives the reason).
    pub fn holding_offsets(
        self,
        rec: &ProjectionRecord,
        anchor: &RecordAnchor,
        mode: Disequilibrium,
        pt: Option<&Perturbation>,
    ) -> Start {
        if mode != Disequilibrium::SourceOffsets {
            return self;
        }
        let held = held_start(rec, anchor, &self)
            .and_then(|(sw, sa, hs)| HeldOffsets::new(&hs, sw, sa, pt).ok());
        Start { held, ..self }
    }
}

/// The reef and source-water values a source-offsets projection of `start` needs.
fn held_start<'a>(
    rec: &'a ProjectionRecord,
    anchor: &'a RecordAnchor,
    start: &Start,
) -> Option<(&'a SourceWater, &'a SourceAnchor, HeldStart)> {
    let (sw, sa, (source_ta, source_pco2)) =
        (rec.source.as_ref()?, anchor.source.as_ref()?, start.source?);
    let held = HeldStart {
        reef_ta: start.ta,
        reef_pco2: start.pco2,
        source_ta,
        source_pco2,
    };
    Some((sw, sa, held))
}

/// The state of one record in the year of `yc` under `mode`: the one per-record projection
/// (the ensemble's central values, its members, the share of time below and
/// [`project_record`] all come through here). `pt`: a member's shift of the constants
/// (`None`: central constants); `offsets`: a local scenario's offsets.
pub fn project_state(
    rec: &ProjectionRecord,
    anchor: &RecordAnchor,
    start: &Start,
    yc: &YearConditions,
    pt: Option<&Perturbation>,
    mode: Disequilibrium,
    offsets: Option<&Offsets>,
) -> Result<CarbonateState, String> {
    match mode {
        Disequilibrium::Ratio | Disequilibrium::Additive => {
            let k = pt.map_or(yc.constants, |p| yc.constants.perturbed(p));
            let pco2 = anchor.project_pco2(start.pco2, yc.pco2_air, mode);
            solve_projected(start.ta, pco2, offsets, &k)
        }
        Disequilibrium::SourceOffsets => {
            let (Some((sw, sa, hs)), Some(sy)) =
                (held_start(rec, anchor, start), yc.source.as_ref())
            else {
                return Err(
                    "the source-offsets rule needs the record's offshore source water, and the site has none"
                        .to_string(),
                );
            };
            let held = match start.held {
                Some(h) => h,
                None => HeldOffsets::new(&hs, sw, sa, pt)?,
            };
            offsets_held_state(&held, sw, sa, sy, &yc.constants, pt, offsets)
        }
    }
}

/// Projects one record to one year without any random draw (the "ensemble off" path, also
/// used for outside checks).
#[allow(clippy::too_many_arguments)]
pub fn project_record(
    rec: &ProjectionRecord,
    pathway: &Pathway,
    observed: &Observed,
    warming: Option<&Warming>,
    methods: &MethodSet,
    mode: Disequilibrium,
    offsets: Option<&Offsets>,
    year: i32,
) -> Result<ProjectedPoint, OutlookError> {
    rec.validate()?;
    let anchor = RecordAnchor::new(rec, pathway, observed, methods)?;
    let yc = YearConditions::new(rec, pathway, observed, warming, methods, year, mode)?;
    let state = project_state(rec, &anchor, &Start::central(rec), &yc, None, mode, offsets)
        .map_err(|message| OutlookError::Solve {
            record: rec.label.clone(),
            pathway: pathway.name.clone(),
            year,
            message,
        })?;
    let pco2_sea = match mode {
        Disequilibrium::SourceOffsets => state.pco2,
        _ => anchor.project_pco2(rec.pco2, yc.pco2_air, mode),
    };
    Ok(ProjectedPoint {
        pathway: pathway.name.clone(),
        year,
        xco2_ppm: yc.xco2_ppm,
        pco2_air: yc.pco2_air,
        pco2_sea,
        temp_c: yc.temp_c,
        state,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{BoronTotal, K1K2, KfSource};

    fn record(ta: f64, temp_c: f64, salinity: f64, pco2: f64, year: i32) -> ProjectionRecord {
        ProjectionRecord {
            label: "test record".into(),
            season: 0,
            sample_year: year,
            temp_c,
            salinity,
            pressure_dbar: 0.0,
            silicate: 0.0,
            phosphate: 0.0,
            ta,
            pco2,
            measured: None,
            unit: None,
            source: None,
        }
    }

    /// Outside check (fact sheet §7e, status C: PyCO2SYS 1.8.3 with Lueker K1/K2, Dickson 1990
    /// KB, Perez & Fraga KF, Uppström boron): AT 2300 µmol/kg, 27 °C, S 35, P 0, seawater pCO2
    /// = xCO2 × (1 − pH2O). A record in equilibrium with the 2024 atmosphere projected in ratio
    /// mode gives exactly that pCO2 in 2100, so Omega_ar must match the table's 2100 rows.
    #[test]
    fn equilibrium_record_reproduces_fact_sheet_7e() {
        let methods = MethodSet {
            k1k2: K1K2::Lueker2000,
            boron: BoronTotal::Uppstrom1974,
            kf: KfSource::PerezFraga1987,
        };
        let obs = Observed::noaa();
        let rec = record(2300.0, 27.0, 35.0, pco2_air_uatm(422.80, 27.0, 35.0), 2024);
        // (pathway, Omega_ar 2100, pH_T 2100, DIC 2100) from §7e.
        let table = [
            ("SSP1-1.9", 3.702, 8.0593, 1973.7),
            ("SSP1-2.6", 3.429, 8.0157, 2000.1),
            ("SSP2-4.5", 2.814, 7.9071, 2060.7),
            ("SSP3-7.0", 2.169, 7.7716, 2126.4),
            ("SSP5-8.5", 1.763, 7.6681, 2170.3),
        ];
        for (name, om, ph, dic) in table {
            let p = Pathway::builtin(name).unwrap();
            for mode in [Disequilibrium::Ratio, Disequilibrium::Additive] {
                let pt = project_record(&rec, &p, &obs, None, &methods, mode, None, 2100).unwrap();
                assert!(
                    (pt.state.omega_ar - om).abs() <= 0.0015 + 1e-9,
                    "{name}: {}",
                    pt.state.omega_ar
                );
                assert!(
                    (pt.state.ph_t - ph).abs() <= 0.0006,
                    "{name}: {}",
                    pt.state.ph_t
                );
                assert!(
                    (pt.state.dic - dic).abs() <= 0.1,
                    "{name}: {}",
                    pt.state.dic
                );
            }
        }
        // The 2024 row of §7e (NOAA 2024): Omega_ar 3.543, pH_T 8.0342.
        let p = Pathway::builtin("steady").unwrap();
        let pt = project_record(
            &rec,
            &p,
            &obs,
            None,
            &methods,
            Disequilibrium::Ratio,
            None,
            2024,
        )
        .unwrap();
        assert!(
            (pt.state.omega_ar - 3.543).abs() <= 0.0015,
            "{}",
            pt.state.omega_ar
        );
        assert!((pt.state.ph_t - 8.0342).abs() <= 0.0006);
    }

    #[test]
    fn sampling_year_returns_the_measured_pco2_in_both_modes() {
        let obs = Observed::noaa();
        let m = MethodSet::default();
        let rec = record(2290.0, 27.5, 35.1, 430.0, 2024);
        for name in ["SSP1-1.9", "SSP5-8.5", "steady"] {
            let p = Pathway::builtin(name).unwrap();
            for mode in [Disequilibrium::Ratio, Disequilibrium::Additive] {
                let pt = project_record(&rec, &p, &obs, None, &m, mode, None, 2024).unwrap();
                assert!((pt.pco2_sea - 430.0).abs() < 1e-9);
                assert!((pt.state.pco2 - 430.0).abs() < 1e-6);
            }
        }
        // A sampling year after the observed record takes the pathway's own value.
        let late = record(2290.0, 27.5, 35.1, 430.0, 2026);
        let p = Pathway::builtin("SSP2-4.5").unwrap();
        let pt =
            project_record(&late, &p, &obs, None, &m, Disequilibrium::Ratio, None, 2026).unwrap();
        assert!((pt.pco2_sea - 430.0).abs() < 1e-9);
    }

    /// Common practice: Omega_ar falls as atmospheric CO2 rises (TA fixed).
    #[test]
    fn omega_falls_as_co2_rises() {
        let obs = Observed::noaa();
        let m = MethodSet::default();
        let rec = record(2290.0, 27.5, 35.1, 430.0, 2024);
        let p = Pathway::builtin("SSP5-8.5").unwrap();
        let mut last = f64::INFINITY;
        for year in (2030..=2100).step_by(10) {
            let pt = project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, year)
                .unwrap();
            assert!(pt.state.omega_ar < last);
            last = pt.state.omega_ar;
        }
    }

    /// Common practice: tropical surface water (TA ≈ 2300, 27 °C, S 35) near 400 µatm lies
    /// around Omega_ar 3.5–4.
    #[test]
    fn tropical_water_near_400_uatm_has_omega_3_5_to_4() {
        let k = Constants::new(&Conditions::surface(27.0, 35.0), &MethodSet::default());
        let st = chem::solve_pair(Input::Ta(2300.0), Input::Pco2(400.0), &k).unwrap();
        assert!(st.omega_ar > 3.5 && st.omega_ar < 4.0, "{}", st.omega_ar);
    }

    #[test]
    fn offsets_shift_ta_and_dic_as_documented() {
        let k = Constants::new(&Conditions::surface(27.0, 35.0), &MethodSet::default());
        let base = solve_projected(2300.0, 450.0, None, &k).unwrap();
        let ta_up = solve_projected(
            2300.0,
            450.0,
            Some(&Offsets {
                ta_umol_kg: 50.0,
                dic_umol_kg: 0.0,
            }),
            &k,
        )
        .unwrap();
        assert!((ta_up.ta - 2350.0).abs() < 1e-6);
        assert!(
            (ta_up.pco2 - 450.0).abs() < 1e-6,
            "TA offset is applied at the projected pCO2"
        );
        assert!(ta_up.omega_ar > base.omega_ar);
        let dic_down = solve_projected(
            2300.0,
            450.0,
            Some(&Offsets {
                ta_umol_kg: 0.0,
                dic_umol_kg: -30.0,
            }),
            &k,
        )
        .unwrap();
        assert!((dic_down.dic - (base.dic - 30.0)).abs() < 1e-6);
        assert!((dic_down.ta - 2300.0).abs() < 1e-6);
        assert!(dic_down.omega_ar > base.omega_ar && dic_down.pco2 < 450.0);
    }

    #[test]
    fn warming_raises_temperature_by_the_ramp_difference() {
        let obs = Observed::noaa();
        let m = MethodSet::default();
        let rec = record(2290.0, 27.5, 35.1, 430.0, 2024);
        let p = Pathway::builtin("SSP5-8.5").unwrap();
        let w = Warming::default_for(&p, &obs);
        let pt = project_record(
            &rec,
            &p,
            &obs,
            Some(&w),
            &m,
            Disequilibrium::Ratio,
            None,
            2090,
        )
        .unwrap();
        let expect = 27.5 + w.sst_change_c(2090) - w.sst_change_c(2024);
        assert!((pt.temp_c - expect).abs() < 1e-12);
        let cold =
            project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, 2090).unwrap();
        assert!(pt.temp_c > cold.temp_c);
    }

    /// Check: a record sampled in 2010 takes the NOAA 2010 global marine-surface annual mean,
    /// 388.75 ppm (`data/co2-annual.csv`, NOAA GML co2_annmean_gl), as its sampling-year
    /// atmosphere; in ratio mode its seawater pCO2 in 2050 scales with the air pCO2 from there.
    #[test]
    fn record_sampled_in_2010_uses_the_noaa_2010_mean() {
        let obs = Observed::noaa();
        let m = MethodSet::default();
        let p = Pathway::builtin("SSP2-4.5").unwrap();
        let rec = record(2290.0, 27.5, 35.1, 400.0, 2010);
        let at = |y| project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, y);
        let pt = at(2010).unwrap();
        assert_eq!(pt.xco2_ppm, 388.75);
        assert!((pt.pco2_sea - 400.0).abs() < 1e-9);
        let air_2010 = pco2_air_uatm(388.75, 27.5, 35.1);
        let pt = at(2050).unwrap();
        assert!((pt.pco2_sea / 400.0 - pt.pco2_air / air_2010).abs() < 1e-12);
    }

    #[test]
    fn bad_records_and_years_give_named_errors() {
        let obs = Observed::noaa();
        let m = MethodSet::default();
        let p = Pathway::builtin("SSP2-4.5").unwrap();
        let mut rec = record(2290.0, 27.5, 35.1, 430.0, 2024);
        rec.ta = f64::NAN;
        let e = project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, 2050)
            .unwrap_err()
            .to_string();
        assert!(e.contains("test record") && e.contains("ta"), "{e}");
        let rec = record(2290.0, 27.5, 35.1, 430.0, 1975);
        let e = project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, 2050)
            .unwrap_err()
            .to_string();
        assert!(e.contains("1975") && e.contains("1979"), "{e}");
        let rec = record(2290.0, 27.5, 35.1, 430.0, 2024);
        assert!(
            project_record(&rec, &p, &obs, None, &m, Disequilibrium::Ratio, None, 2301).is_err()
        );
        // Additive mode under a falling atmosphere with a strongly undersaturated record.
        let low = record(2290.0, 27.5, 35.1, 15.0, 2024);
        let e = project_record(
            &low,
            &p,
            &obs,
            None,
            &m,
            Disequilibrium::Additive,
            None,
            2024,
        );
        assert!(e.is_ok());
        let p19 = Pathway::user("crash", &[(2100, 150.0)]).unwrap();
        let e = project_record(
            &low,
            &p19,
            &obs,
            None,
            &m,
            Disequilibrium::Additive,
            None,
            2100,
        )
        .unwrap_err()
        .to_string();
        assert!(e.contains("ratio mode"), "{e}");
    }

    mod props {
        use super::*;
        use proptest::prelude::*;

        proptest! {
            #![proptest_config(ProptestConfig::with_cases(64))]
            /// In ratio mode the projected pCO2 scales with the air pCO2, and Omega_ar never
            /// rises when the horizon year's atmosphere is higher (warming off).
            #[test]
            fn ratio_projection_is_monotone(
                ta in 2000.0f64..2500.0, t in 20.0f64..32.0, s in 30.0f64..38.0,
                pco2 in 250.0f64..700.0, year in 2030i32..=2100
            ) {
                let obs = Observed::noaa();
                let m = MethodSet::default();
                let rec = record(ta, t, s, pco2, 2024);
                let lo = Pathway::builtin("SSP1-2.6").unwrap();
                let hi = Pathway::builtin("SSP5-8.5").unwrap();
                let a = project_record(&rec, &lo, &obs, None, &m, Disequilibrium::Ratio, None, year).unwrap();
                let b = project_record(&rec, &hi, &obs, None, &m, Disequilibrium::Ratio, None, year).unwrap();
                prop_assert!((a.pco2_sea / a.pco2_air - b.pco2_sea / b.pco2_air).abs() < 1e-12);
                prop_assert!(b.state.omega_ar <= a.state.omega_ar + 1e-12);
            }
        }
    }
}
