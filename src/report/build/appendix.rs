//! The appendix part of the report model: every sample with the conversions, estimates and QC
//! notes behind its values, and each record file with the conversions applied to it.

use super::{folder_of, shown_path};
use crate::report::model::{RecordFile, RowFlag, SampleRow};
use crate::site::schema::{ConcUnit, PhScaleName, RecordKind};
use crate::site::{Conversions, LoadedSite, RowFlags, Sample};

/// The conversions of a file's values that apply to a row measuring `ta`, `dic`, `ph`, `co2`
/// (all true: every conversion of the file).
fn conversion_flags(c: &Conversions, ta: bool, dic: bool, ph: bool, co2: bool) -> Vec<RowFlag> {
    let mut out = Vec::new();
    if c.depth_as_pressure {
        out.push(RowFlag::DepthAsPressure);
    }
    let unit_of = |measured: bool, unit: ConcUnit| measured.then_some(unit);
    let units = [unit_of(ta, c.ta), unit_of(dic, c.dic)];
    if units.contains(&Some(ConcUnit::UmolPerL)) {
        out.push(RowFlag::PerLitre);
    }
    if units.contains(&Some(ConcUnit::MmolPerKg)) {
        out.push(RowFlag::MmolPerKg);
    }
    if ph && c.ph_scale != PhScaleName::Total {
        out.push(RowFlag::PhScale);
    }
    if co2 && c.xco2 {
        out.push(RowFlag::Xco2);
    }
    out
}

/// The flags of one sample: its file's conversions of the values it has, the TA estimate and
/// the QC notes, in [`RowFlag`] order.
fn row_flags(s: &Sample, c: &Conversions) -> Vec<RowFlag> {
    let m = &s.measured;
    let mut flags = conversion_flags(
        c,
        m.ta().is_some(),
        m.dic().is_some(),
        m.ph_t().is_some(),
        m.pco2().is_some(),
    );
    if s.ta_estimated {
        flags.push(RowFlag::TaEstimated);
    }
    for (bit, flag) in [
        (RowFlags::TA_FIT_EXTRAPOLATED, RowFlag::TaFitExtrapolated),
        (RowFlags::PH_CO2_PAIR, RowFlag::PhCo2Pair),
        (RowFlags::INCONSISTENT, RowFlag::Inconsistent),
        (RowFlags::BRACKISH, RowFlag::Brackish),
        (RowFlags::BELOW_SALINITY_FLOOR, RowFlag::BelowSalinityFloor),
    ] {
        if s.flags.contains(bit) {
            flags.push(flag);
        }
    }
    if !s.is_used() {
        flags.push(RowFlag::NotUsed);
    }
    flags.sort();
    flags
}

/// The site's record files: path relative to the site file, kind, and the conversions of the
/// file's values (estimates of TA are per row and listed with the rows).
pub(super) fn record_files(loaded: &LoadedSite) -> Vec<RecordFile> {
    let folder = folder_of(&loaded.path);
    loaded
        .records
        .iter()
        .map(|r| RecordFile {
            path: shown_path(folder, &r.path),
            sensor: r.kind == RecordKind::Sensor,
            conversions: conversion_flags(&r.conversions, true, true, true, true),
        })
        .collect()
}

/// Every sample for the chemistry appendix (and `--data-out`).
pub(super) fn sample_rows(loaded: &LoadedSite) -> Vec<SampleRow> {
    let folder = folder_of(&loaded.path);
    let none = Conversions::default();
    loaded
        .samples
        .iter()
        .map(|s| {
            let st = s.state.as_ref();
            let mut measured = Vec::new();
            // Names as documented on `SampleRow::measured`.
            for (name, v) in [
                ("ta", s.measured.ta()),
                ("dic", s.measured.dic()),
                ("ph_t", s.measured.ph_t()),
                ("pco2", s.measured.pco2()),
                ("fco2", s.measured.fco2()),
            ] {
                if v.is_some() {
                    measured.push(name.to_string());
                }
            }
            let file = loaded
                .records
                .iter()
                .find(|r| r.path.as_path() == &*s.source_file);
            let conversions = file.map_or(&none, |r| &r.conversions);
            SampleRow {
                file: shown_path(folder, &s.source_file),
                row: s.line as u64,
                date: s.time.format("%Y-%m-%d %H:%M").to_string(),
                station: s.station.to_string(),
                season: loaded
                    .seasons
                    .get(s.season)
                    .map(|x| x.name.clone())
                    .unwrap_or_default(),
                temp_c: s.temp_c,
                salinity: s.salinity,
                pressure_dbar: s.pressure_dbar,
                ta: st.map(|x| x.ta),
                dic: st.map(|x| x.dic),
                ph_t: st.map(|x| x.ph_t),
                pco2: st.map(|x| x.pco2),
                omega_ar: st.map(|x| x.omega_ar),
                omega_ca: st.map(|x| x.omega_ca),
                measured,
                flags: row_flags(s, conversions),
                used: s.is_used(),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_row_is_flagged_only_for_the_conversions_of_values_it_has() {
        // A lab file with TA in µmol/L, pH on the seawater scale and depths: a row with TA and
        // pH carries all three; a row with pH only carries no µmol/L conversion.
        let c = Conversions {
            ta: ConcUnit::UmolPerL,
            ph_scale: PhScaleName::Sws,
            depth_as_pressure: true,
            ..Conversions::default()
        };
        assert_eq!(
            conversion_flags(&c, true, false, true, false),
            [
                RowFlag::DepthAsPressure,
                RowFlag::PerLitre,
                RowFlag::PhScale
            ]
        );
        assert_eq!(
            conversion_flags(&c, false, true, true, false),
            [RowFlag::DepthAsPressure, RowFlag::PhScale]
        );
        // A canonical file converts nothing.
        assert!(conversion_flags(&Conversions::default(), true, true, true, true).is_empty());
    }
}
