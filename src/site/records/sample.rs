//! The row types: what was measured on a row and what became of it.

use std::path::Path;
use std::sync::Arc;

use chrono::{DateTime, FixedOffset};
use serde::{Serialize, Serializer};

use crate::chem::CarbonateState;
use crate::site::schema::RecordKind;

/// The carbonate-system quantities measured on a row, in canonical units (µmol/kg, pH total
/// scale, µatm). Stored compactly (not-measured as NaN); read them with the accessors.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Measured {
    ta: f64,
    dic: f64,
    ph_t: f64,
    pco2: f64,
    fco2: f64,
}

fn opt(v: f64) -> Option<f64> {
    (!v.is_nan()).then_some(v)
}

impl Default for Measured {
    fn default() -> Self {
        Measured {
            ta: f64::NAN,
            dic: f64::NAN,
            ph_t: f64::NAN,
            pco2: f64::NAN,
            fco2: f64::NAN,
        }
    }
}

impl Measured {
    pub fn new(
        ta: Option<f64>,
        dic: Option<f64>,
        ph_t: Option<f64>,
        pco2: Option<f64>,
        fco2: Option<f64>,
    ) -> Self {
        let n = |v: Option<f64>| v.unwrap_or(f64::NAN);
        Measured {
            ta: n(ta),
            dic: n(dic),
            ph_t: n(ph_t),
            pco2: n(pco2),
            fco2: n(fco2),
        }
    }
    /// Total alkalinity, µmol/kg.
    pub fn ta(&self) -> Option<f64> {
        opt(self.ta)
    }
    /// Dissolved inorganic carbon, µmol/kg.
    pub fn dic(&self) -> Option<f64> {
        opt(self.dic)
    }
    /// pH on the total scale.
    pub fn ph_t(&self) -> Option<f64> {
        opt(self.ph_t)
    }
    /// pCO2, µatm (measured directly or converted from xCO2).
    pub fn pco2(&self) -> Option<f64> {
        opt(self.pco2)
    }
    /// fCO2, µatm.
    pub fn fco2(&self) -> Option<f64> {
        opt(self.fco2)
    }
    /// How many distinct carbonate quantities were measured (pCO2 and fCO2 count as one).
    pub fn count(&self) -> usize {
        usize::from(self.ta().is_some())
            + usize::from(self.dic().is_some())
            + usize::from(self.ph_t().is_some())
            + usize::from(self.pco2().is_some() || self.fco2().is_some())
    }
}

impl Serialize for Measured {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Measured", 5)?;
        st.serialize_field("ta_umol_kg", &self.ta())?;
        st.serialize_field("dic_umol_kg", &self.dic())?;
        st.serialize_field("ph_t", &self.ph_t())?;
        st.serialize_field("pco2_uatm", &self.pco2())?;
        st.serialize_field("fco2_uatm", &self.fco2())?;
        st.end()
    }
}

/// The pair of quantities a sample's carbonate state was solved from, in order of preference.
/// TA+DIC is best conditioned; pH with pCO2/fCO2 is used only when nothing else is available
/// (small errors in either give large errors in TA and DIC).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Pair {
    TaDic,
    TaPh,
    TaPco2,
    TaFco2,
    DicPh,
    DicPco2,
    DicFco2,
    PhPco2,
    PhFco2,
}

impl Pair {
    pub fn label(self) -> &'static str {
        match self {
            Pair::TaDic => "TA+DIC",
            Pair::TaPh => "TA+pH",
            Pair::TaPco2 => "TA+pCO2",
            Pair::TaFco2 => "TA+fCO2",
            Pair::DicPh => "DIC+pH",
            Pair::DicPco2 => "DIC+pCO2",
            Pair::DicFco2 => "DIC+fCO2",
            Pair::PhPco2 => "pH+pCO2",
            Pair::PhFco2 => "pH+fCO2",
        }
    }
}

/// One row of a record file after conversion, QC and solving.
#[derive(Clone, Debug, Serialize)]
pub struct Sample {
    #[serde(serialize_with = "ser_path")]
    pub source_file: Arc<Path>,
    /// 1-based line in the source file (the header is line 1).
    pub line: usize,
    #[serde(serialize_with = "ser_str")]
    pub station: Arc<str>,
    #[serde(serialize_with = "ser_time")]
    pub time: DateTime<FixedOffset>,
    /// Whether the record gave a time of day (sub-daily series); date-only rows are at 00:00.
    pub has_time: bool,
    /// Index into the site's seasons (`LoadedSite::seasons`).
    pub season: usize,
    pub kind: RecordKind,
    pub temp_c: f64,
    pub salinity: f64,
    pub pressure_dbar: f64,
    /// µmol/kg (0 when not measured).
    pub silicate: f64,
    /// µmol/kg (0 when not measured).
    pub phosphate: f64,
    pub measured: Measured,
    /// The pair the state was solved from.
    pub pair: Option<Pair>,
    /// True when TA was not measured on this row but estimated from the site's TA–salinity
    /// relationship (then `pair` is TA+pH, TA+pCO2 or TA+fCO2 with the estimated TA).
    pub ta_estimated: bool,
    pub state: Option<CarbonateState>,
    /// QC notes on this row that did not stop it from being used.
    pub flags: RowFlags,
}

impl Sample {
    /// True when the row feeds the baseline and the outlook: solved, and not below the site's
    /// salinity floor.
    pub fn is_used(&self) -> bool {
        self.state.is_some() && !self.flags.contains(RowFlags::BELOW_SALINITY_FLOOR)
    }
}

/// QC notes on a kept row, as a compact bit set (a million-row series stays small).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct RowFlags(u8);

impl RowFlags {
    /// TA was estimated at a salinity outside the range of the bottle samples it was fitted to.
    pub const TA_FIT_EXTRAPOLATED: RowFlags = RowFlags(1);
    /// Solved from pH with pCO2 or fCO2, a poorly conditioned pair.
    pub const PH_CO2_PAIR: RowFlags = RowFlags(2);
    /// Measured and calculated values disagree beyond the documented tolerance.
    pub const INCONSISTENT: RowFlags = RowFlags(4);
    /// Salinity below the site's floor: left out of the baseline and the outlook.
    pub const BELOW_SALINITY_FLOOR: RowFlags = RowFlags(8);
    /// Brackish (S below [`crate::site::brackish::BRACKISH_SALINITY`]): the constant sets are
    /// fitted for seawater, so Omega_ar is indicative at best.
    pub const BRACKISH: RowFlags = RowFlags(16);

    const LABELS: [(RowFlags, &'static str); 5] = [
        (
            Self::TA_FIT_EXTRAPOLATED,
            "salinity outside the TA–salinity fit range",
        ),
        (
            Self::PH_CO2_PAIR,
            "solved from pH with pCO2/fCO2 (poorly conditioned)",
        ),
        (Self::INCONSISTENT, "internally inconsistent"),
        (
            Self::BELOW_SALINITY_FLOOR,
            "salinity below the site's floor: not in the baseline or outlook",
        ),
        (
            Self::BRACKISH,
            "brackish: Omega_ar indicative only (constants fitted for seawater)",
        ),
    ];

    pub fn contains(self, f: RowFlags) -> bool {
        self.0 & f.0 == f.0
    }
    pub fn insert(&mut self, f: RowFlags) {
        self.0 |= f.0;
    }
    pub fn is_empty(self) -> bool {
        self.0 == 0
    }
    /// Human-readable labels of the flags set.
    pub fn labels(self) -> Vec<&'static str> {
        Self::LABELS
            .iter()
            .filter(|(f, _)| self.contains(*f))
            .map(|(_, l)| *l)
            .collect()
    }
}

impl Serialize for RowFlags {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(self.labels())
    }
}

fn ser_path<S: Serializer>(p: &Arc<Path>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&p.display().to_string())
}
/// RFC 3339 text for a timestamp in JSON output.
pub fn ser_time<S: Serializer>(t: &DateTime<FixedOffset>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&t.to_rfc3339())
}
/// RFC 3339 text for an optional timestamp in JSON output.
pub fn ser_opt_time<S: Serializer>(
    t: &Option<DateTime<FixedOffset>>,
    s: S,
) -> Result<S::Ok, S::Error> {
    match t {
        Some(t) => s.serialize_str(&t.to_rfc3339()),
        None => s.serialize_none(),
    }
}
fn ser_str<S: Serializer>(p: &Arc<str>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(p)
}
