//! The outlook part of the report model: read from the typed [`Outlook`] by pathway,
//! scenario, group and quantity, never by formatted names.

use std::collections::BTreeSet;

use super::super::model::*;
use super::SiteRun;
use crate::outlook::result::{
    Criterion, CrossingGroup, GroupId, Note, Outlook, QuantileSeries, Quantity, RelationshipId,
    ScenarioId,
};
use crate::report::fmt;

/// Horizon years shown in the report's tables when the site projects them (the full series
/// stays in the figures and in `--data-out`).
const PREFERRED_HORIZONS: [i32; 5] = [2030, 2040, 2050, 2075, 2100];

pub(super) fn threshold_classes(outlook: &Outlook) -> ThresholdClasses {
    ThresholdClasses {
        levels: outlook
            .classes
            .bands
            .iter()
            .filter_map(|b| b.min_omega_ar)
            .collect(),
        labels: outlook
            .classes
            .bands
            .iter()
            .map(|b| b.name.clone())
            .collect(),
        citation: outlook.classes.source.clone(),
        checked: outlook.classes.checked,
    }
}

/// Table horizons: the preferred years the projection has, else up to five of its years
/// spread evenly (always including the last).
pub(super) fn horizons(years: &[i32]) -> Vec<i32> {
    let preferred: Vec<i32> = PREFERRED_HORIZONS
        .iter()
        .copied()
        .filter(|y| years.contains(y))
        .collect();
    if preferred.len() >= 2 {
        return preferred;
    }
    if years.len() <= 5 {
        return years.to_vec();
    }
    let n = years.len() - 1;
    let mut out: Vec<i32> = (0..5)
        .filter_map(|i| years.get(i * n / 4).copied())
        .collect();
    out.dedup();
    out
}

/// Every pathway of every site, in order of 2100 CO2 (lowest emissions first).
pub(super) fn pathway_list(runs: &[SiteRun<'_>]) -> Vec<PathwayInfo> {
    let mut seen = BTreeSet::new();
    let mut list: Vec<(f64, PathwayInfo)> = Vec::new();
    for run in runs {
        let years = &run.outlook.settings.horizon_years;
        for p in &run.outlook.pathways {
            if !seen.insert(p.name.clone()) {
                continue;
            }
            let at = |y: i32| {
                years
                    .iter()
                    .zip(&p.xco2_ppm)
                    .find(|(v, _)| **v == y)
                    .map(|(_, x)| *x)
            };
            let last = p.xco2_ppm.last().copied().unwrap_or(f64::NAN);
            let description = match (at(2050), years.last()) {
                (Some(v50), Some(&ly)) if ly != 2050 => {
                    Some(format!("{v50:.0} ppm CO2 in 2050, {last:.0} ppm in {ly}"))
                }
                (_, Some(&ly)) => Some(format!("{last:.0} ppm CO2 in {ly}")),
                _ => None,
            };
            list.push((
                last,
                PathwayInfo {
                    id: p.name.clone(),
                    label: p.name.clone(),
                    citation: p.source.clone(),
                    description,
                },
            ));
        }
    }
    list.sort_by(|a, b| a.0.total_cmp(&b.0));
    list.into_iter().map(|(_, p)| p).collect()
}

fn quantiles(q: &crate::outlook::Quantiles) -> Quantiles {
    Quantiles {
        p05: q.p05,
        p25: q.p25,
        p50: q.p50,
        p75: q.p75,
        p95: q.p95,
    }
}

/// The three projection rules compared, per pathway and season (not the all-records
/// aggregate), in 2050 and the last horizon year.
pub(super) fn projection_rules(outlook: &Outlook) -> Vec<crate::report::model::RuleRow> {
    let last = outlook.settings.horizon_years.last().copied();
    outlook
        .rule_comparison
        .iter()
        .filter(|r| matches!(r.group, GroupId::Season(_)))
        .filter(|r| r.year == 2050 || Some(r.year) == last)
        .filter_map(|r| {
            Some(crate::report::model::RuleRow {
                pathway: outlook.pathway(r.pathway)?.name.clone(),
                season: outlook.group_label(r.group).to_string(),
                year: r.year,
                ratio: r.omega_ar[0],
                additive: r.omega_ar[1],
                source_offsets: r.omega_ar[2],
                spread: r.spread(),
            })
        })
        .collect()
}

/// Omega_ar (and pH) quantiles per pathway and season, base case.
pub(super) fn projection(outlook: &Outlook, seasons: &[String]) -> Vec<PathwayProjection> {
    outlook
        .pathway_ids()
        .map(|(pid, p)| PathwayProjection {
            pathway: p.name.clone(),
            seasons: seasons
                .iter()
                .enumerate()
                .filter_map(|(si, season)| {
                    let g = GroupId::Season(si);
                    let omega = outlook.series(pid, ScenarioId::Base, g, Quantity::OmegaAr)?;
                    let ph = outlook.series(pid, ScenarioId::Base, g, Quantity::PhT);
                    Some(SeasonSeries {
                        season: season.clone(),
                        points: omega
                            .points
                            .iter()
                            .map(|pt| ProjectionPoint {
                                year: pt.year,
                                omega_ar: quantiles(&pt.q),
                                ph_t: ph.and_then(|s| s.at(pt.year)).map(|x| quantiles(&x.q)),
                            })
                            .collect(),
                    })
                })
                .collect(),
        })
        .collect()
}

/// Crossing years below each habitat threshold per pathway and season, base case.
pub(super) fn crossings(outlook: &Outlook) -> Vec<Crossing> {
    let last_year = outlook
        .settings
        .horizon_years
        .last()
        .copied()
        .unwrap_or(2100);
    outlook
        .crossings
        .iter()
        .filter(|c| c.scenario == ScenarioId::Base)
        .filter_map(|c| {
            let Criterion::OmegaArBelow {
                threshold_omega_ar, ..
            } = c.criterion
            else {
                return None;
            };
            let CrossingGroup::Group(g @ GroupId::Season(_)) = c.group else {
                return None;
            };
            // Members below the level as sampled cross in the latest sampling year.
            let sampled = outlook.group(g).map_or(i32::MIN, |i| i.sample_year_max);
            let crossing_year = |y: Option<i32>| match y {
                None => CrossingYear::NotBy(last_year),
                Some(y) if y <= sampled => CrossingYear::AlreadyBelow,
                Some(y) => CrossingYear::Year(y),
            };
            Some(Crossing {
                pathway: outlook.pathway(c.pathway)?.name.clone(),
                season: outlook.group_label(g).to_string(),
                threshold: threshold_omega_ar,
                median: if c.met_at_baseline {
                    CrossingYear::AlreadyBelow
                } else {
                    crossing_year(c.first_year.p50)
                },
                early: crossing_year(c.first_year.p05),
                late: crossing_year(c.first_year.p95),
            })
        })
        .collect()
}

/// Share of time below each threshold per season: as sampled, then per pathway and year
/// (base case).
pub(super) fn time_below(outlook: &Outlook) -> Vec<TimeBelow> {
    outlook
        .time_below
        .iter()
        .filter(|t| t.scenario == ScenarioId::Base && matches!(t.group, GroupId::Season(_)))
        .map(|t| TimeBelow {
            pathway: t
                .pathway
                .and_then(|p| outlook.pathway(p))
                .map(|p| p.name.clone()),
            year: t.year,
            season: outlook.group_label(t.group).to_string(),
            threshold: t.threshold_omega_ar,
            percent: t.pct_time_below,
        })
        .collect()
}

/// Chance below each threshold per pathway, season and year, base case.
pub(super) fn probabilities(outlook: &Outlook) -> Vec<BelowProbability> {
    outlook
        .probabilities
        .iter()
        .filter(|p| p.scenario == ScenarioId::Base && matches!(p.group, GroupId::Season(_)))
        .filter_map(|p| {
            Some(BelowProbability {
                pathway: outlook.pathway(p.pathway)?.name.clone(),
                year: p.year,
                season: outlook.group_label(p.group).to_string(),
                threshold: p.threshold_omega_ar,
                percent: p.prob_below_pct,
            })
        })
        .collect()
}

/// The calcification outlook per relationship (relative change over all records), and the
/// site's absolute net calcification at the last year per relationship, worded for the
/// method notes.
pub(super) fn calcification(outlook: &Outlook) -> (Vec<CalcificationOutlook>, Vec<String>) {
    let mut absolute_notes: Vec<String> = Vec::new();
    let all = GroupId::Aggregate;
    let base = ScenarioId::Base;
    let list: Vec<CalcificationOutlook> = outlook
        .relationships
        .iter()
        .map(|rel| {
            let [change, net] = Quantity::of_relationship(rel.rel_id());
            // Absolute rates exist only when the site gave a measured rate.
            let series = calc_series(outlook, all, change);
            let mut last_year = None;
            let at_last: Vec<String> = outlook
                .pathway_ids()
                .filter_map(|(pid, p)| {
                    let pt = outlook.series(pid, base, all, net)?.points.last()?;
                    last_year = Some(pt.year);
                    Some(format!("{} {:.2}", p.name, pt.q.p50))
                })
                .collect();
            let temp = rel
                .temp_range_c
                .map(|(a, b)| format!(", {a}–{b} °C"))
                .unwrap_or_default();
            let name = rel.name.to_string();
            if let Some(y) = last_year
                && !at_last.is_empty()
            {
                absolute_notes.push(format!("{name}: {} in {y}", at_last.join(", ")));
            }
            CalcificationOutlook {
                relationship: name,
                citation: rel.source.to_string(),
                unit: CalcUnit::PercentChange,
                valid_range: format!("{}{temp}", omega_range_text(rel.omega_range)),
                baseline: None,
                series,
                note: Some(format!(
                    "Gives a {}. {} ({}).{}",
                    rel.measures,
                    reader_text(rel.form_text),
                    reader_text(rel.scope),
                    unchecked_text(rel.unchecked),
                )),
            }
        })
        .collect();
    let mut list = list;
    list.extend(nec_outlooks(outlook));
    (list, absolute_notes)
}

/// One calcification quantity of `group` per pathway (base case), with its extrapolation
/// flags.
fn calc_series(outlook: &Outlook, group: GroupId, q: Quantity) -> Vec<CalcSeries> {
    outlook
        .pathway_ids()
        .map(|(pid, p)| CalcSeries {
            pathway: p.name.clone(),
            points: outlook
                .series(pid, ScenarioId::Base, group, q)
                .map(|s| {
                    s.points
                        .iter()
                        .map(|pt| CalcPoint {
                            year: pt.year,
                            value: quantiles(&pt.q),
                            extrapolated: pt.outside_fit_pct.is_some_and(|x| x > 0.0),
                        })
                        .collect()
                })
                .unwrap_or_default(),
        })
        .collect()
}

/// Reef-community NEC per field relationship that gives a value at the site (over all
/// records, base case), with what it is built from, whether it is closest to the site's
/// habitat, and the first year of net dissolution per pathway in the limiting season.
fn nec_outlooks(outlook: &Outlook) -> Vec<CalcificationOutlook> {
    let base = ScenarioId::Base;
    let nec = &outlook.nec;
    outlook
        .quantities
        .iter()
        .filter_map(|q| match q {
            Quantity::Nec(id) => Some(*id),
            _ => None,
        })
        .filter_map(|id| {
            let rel = nec.relationships.iter().find(|r| r.id == id.as_str())?;
            let series = calc_series(outlook, GroupId::Aggregate, Quantity::Nec(id));
            let dissolution: Vec<String> = outlook
                .pathway_ids()
                .filter_map(|(pid, p)| {
                    let c = outlook.crossings.iter().find(|c| {
                        c.pathway == pid
                            && c.scenario == base
                            && c.group == CrossingGroup::WorstSeason
                            && matches!(c.criterion, Criterion::NetDissolution { relationship, .. } if relationship == id)
                    })?;
                    let year = if c.met_at_baseline {
                        "already".to_string()
                    } else {
                        c.first_year
                            .p50
                            .map_or_else(|| "not by the last horizon".to_string(), |y| y.to_string())
                    };
                    Some(format!("{} {year}", p.name))
                })
                .collect();
            let closest = if nec.closest.relationship == rel.id {
                format!(" Closest to this site's habitat: {}.", nec.closest.reason)
            } else {
                String::new()
            };
            let anchored = match &nec.measured {
                Some(m) => format!(
                    " Scaled to pass through the site's measured NEC ({}; {}).",
                    fmt::number(m.mmol_m2_d, 1),
                    m.source
                ),
                None => String::new(),
            };
            let dissolution = if dissolution.is_empty() {
                String::new()
            } else {
                format!(
                    " First year the limiting season's mean lies where this relationship gives \
                     net dissolution (median): {}.",
                    dissolution.join(", ")
                )
            };
            Some(CalcificationOutlook {
                // "Eyre et al. (2018), reef sediments" → "NEC, reef sediments" (panel titles
                // hold about 25 characters; the citation is printed beside the table).
                relationship: format!(
                    "NEC, {}",
                    rel.name.split_once(", ").map_or(rel.name, |(_, what)| what)
                ),
                citation: rel.citation.to_string(),
                unit: CalcUnit::MmolCaco3PerM2Day,
                valid_range: format!("{}; {}", rel.citation, rel.reef_type),
                baseline: None,
                series,
                note: Some(format!(
                    "Net ecosystem calcification of the reef community, with dissolution. {}.{}{}{}",
                    rel.construction.trim_end_matches('.'),
                    anchored,
                    closest,
                    dissolution
                )),
            })
        })
        .collect()
}

/// Local scenarios: the median Omega_ar of `season` (else all records) at the table
/// horizons, beside the base case.
pub(super) fn local_scenarios(
    outlook: &Outlook,
    season: Option<(usize, &str)>,
    horizons: &[i32],
) -> Vec<LocalScenario> {
    let (group, label) = match season {
        Some((i, name)) => (GroupId::Season(i), name.to_string()),
        None => (
            GroupId::Aggregate,
            crate::outlook::ensemble::AGGREGATE_LABEL.to_string(),
        ),
    };
    outlook
        .scenario_ids()
        .filter(|(id, _)| *id != ScenarioId::Base)
        .map(|(sid, name)| {
            let mut rows = Vec::new();
            for (pid, p) in outlook.pathway_ids() {
                let with = outlook.series(pid, sid, group, Quantity::OmegaAr);
                let base = outlook.series(pid, ScenarioId::Base, group, Quantity::OmegaAr);
                for &y in horizons {
                    if let Some(pt) = with.and_then(|s| s.at(y)) {
                        rows.push(ScenarioRow {
                            pathway: p.name.clone(),
                            year: y,
                            season: label.clone(),
                            omega_ar: quantiles(&pt.q),
                            reference_median: base
                                .and_then(|s: &QuantileSeries| s.at(y))
                                .map(|pt| pt.q.p50),
                        });
                    }
                }
            }
            let description = match sid {
                ScenarioId::Local(i) => outlook
                    .scenarios
                    .get(i)
                    .map(|s| {
                        s.offsets
                            .iter()
                            .map(|(season, ta, dic)| {
                                format!("{season}: TA {ta:+} µmol/kg, DIC {dic:+} µmol/kg")
                            })
                            .collect::<Vec<_>>()
                            .join("; ")
                    })
                    .unwrap_or_default(),
                ScenarioId::Base => String::new(),
            };
            LocalScenario {
                name: name.to_string(),
                description,
                rows,
            }
        })
        .collect()
}

/// " Not checked against the original publication: …." for the parts of a source that were
/// not checked, or nothing.
fn unchecked_text(parts: &str) -> String {
    if parts.is_empty() {
        String::new()
    } else {
        format!(" Not checked against the original publication: {parts}.")
    }
}

/// The warming setting in words: off, or on with each pathway's sea-surface warming and where
/// the built-in values come from (their anchors could not be checked against the paper).
pub(super) fn warming_text(outlook: &Outlook) -> String {
    if !outlook.settings.warming {
        return "off".to_string();
    }
    let per_pathway: Vec<String> = outlook
        .pathways
        .iter()
        .map(|p| format!("{} {} °C", p.name, fmt::signed(p.warming_2090_c, 2)))
        .collect();
    format!(
        "on: sea-surface warming from 1995–2014 to 2081–2100 of {}, added to the record \
         temperatures along each pathway's ln CO2 (common practice; a linear ramp for a \
         pathway without annual CO2 over 1995–2100). The built-in values are \
         the IPCC AR6 global-mean sea-surface temperature changes for SSP1-2.6 and SSP5-8.5 \
         (Fox-Kemper et al. 2021, Working Group I chapter 9), not checked against the original \
         publication, and for other pathways interpolated between them by 2100 CO2 (a rule of \
         this tool); values given in the site file are the site's own.",
        per_pathway.join(", ")
    )
}

/// The projection settings for the Methods section.
pub(super) fn settings(outlook: &Outlook) -> Vec<Setting> {
    let st = &outlook.settings;
    let settings = vec![
        super::setting("Observed CO2", st.observed_co2_source.clone()),
        super::setting("Disequilibrium", st.disequilibrium.clone()),
        super::setting("Warming", warming_text(outlook)),
        super::setting(
            "Ensemble",
            format!("{} members, seed {}", st.members, st.seed),
        ),
        super::setting("Constant uncertainties", st.constants_uncertainty.clone()),
        super::setting(
            "Measurement uncertainties",
            st.measurement_uncertainty.clone(),
        ),
        super::setting("Record variability", st.record_variability.clone()),
        super::setting(
            "Site calcification rate",
            match &outlook.site_rate {
                Some(r) => format!("{:.2} kg CaCO₃ m⁻² yr⁻¹ ({})", r.kg_m2_yr, r.source),
                None => crate::outlook::calcification::NO_SITE_RATE.to_string(),
            },
        ),
        super::setting(
            "Not modelled",
            crate::outlook::output::NOT_MODELLED.to_string(),
        ),
    ];
    settings
        .into_iter()
        .map(|s| Setting {
            value: reader_text(&s.value),
            ..s
        })
        .collect()
}

/// The outlook's method notes: the absolute net calcification (when any), then the run's
/// notes, worded for the report.
pub(super) fn notes(outlook: &Outlook, absolute_notes: &[String]) -> Vec<String> {
    let mut notes = Vec::new();
    if let Some(rate) = &outlook.site_rate
        && !absolute_notes.is_empty()
    {
        notes.push(format!(
            "Net calcification at the site's measured rate of {:.2} kg CaCO₃ m⁻² yr⁻¹ ({}), \
             ensemble median in kg CaCO₃ m⁻² yr⁻¹: {}.",
            rate.kg_m2_yr,
            rate.source,
            absolute_notes.join("; ")
        ));
    }
    if !outlook.rule_comparison.is_empty() {
        notes.push(source_water_method());
    }
    notes.extend(outlook.notes.iter().map(|n| note_text(outlook, n)));
    notes
}

/// The methods note of a site with offshore source water: the offset rule and its sources.
fn source_water_method() -> String {
    format!(
        "Source water apart from reef metabolism: {}. Under the source-offsets rule the source \
         water follows the atmosphere and the offsets are held; the reef water is solved again \
         from source TA + dTA and source DIC + dDIC, so that diel extremes of pCO₂ widen as the \
         buffer capacity falls (Shaw, McNeil, Tilbrook, Matear & Bates 2013, Global Change \
         Biology 19:1632–1641; buffer factors of Egleston, Sabine & Morel 2010, Global \
         Biogeochemical Cycles 24, GB1002). The table \"Projection rules compared\" shows how \
         far the ratio, additive and source-offsets rules disagree: structural uncertainty, \
         not part of the ensemble ranges.",
        crate::outlook::source_water::OFFSET_RULE
    )
}

/// One of the outlook's notes in the report's words: relationships by their names, symbols
/// as printed elsewhere in the report.
fn note_text(outlook: &Outlook, note: &Note) -> String {
    let name = |id: &RelationshipId| {
        outlook
            .relationships
            .iter()
            .find(|r| r.rel_id() == *id)
            .map_or("a calcification relationship", |r| r.name)
    };
    match note {
        Note::RelationshipNotScalable {
            relationship,
            group,
            baseline_omega_ar,
        } => format!(
            "{} cannot be scaled for \"{group}\": its present-day Ω_ar of {} gives no positive \
             calcification rate.",
            name(relationship),
            fmt::omega(*baseline_omega_ar)
        ),
        Note::BaselineOutsideFit {
            relationship,
            group,
            baseline_omega_ar,
            baseline_temp_c,
        } => format!(
            "{}: the present-day conditions of \"{group}\" (Ω_ar {}, {} °C) lie outside its \
             fitted range (extrapolation).",
            name(relationship),
            fmt::omega(*baseline_omega_ar),
            fmt::temp(*baseline_temp_c)
        ),
        other => reader_text(&other.to_string()),
    }
}

/// "Ω_ar 1–5", or "Ω_ar ≥ 1" when the fitted range has no upper end.
fn omega_range_text((lo, hi): (f64, f64)) -> String {
    match (lo.is_finite(), hi.is_finite()) {
        (true, true) => format!("Ω_ar {lo}–{hi}"),
        (true, false) => format!("Ω_ar ≥ {lo}"),
        (false, true) => format!("Ω_ar ≤ {hi}"),
        (false, false) => "any Ω_ar".to_string(),
    }
}

/// Plain text from the outlook stage ("G = k x (Omega_ar - 1)", "2 umol/kg") written with
/// the report's symbols and units ("G = k × (Ω_ar − 1)", "2 µmol/kg").
pub(super) fn reader_text(text: &str) -> String {
    text.replace("Omega_ar", "Ω_ar")
        .replace("Omega_b", "Ω_b")
        .replace("Omega", "Ω")
        .replace(" x ", " × ")
        .replace(" - ", " − ")
        .replace("= -", "= −")
        .replace("<=", "≤")
        .replace(">=", "≥")
        .replace("degC", "°C")
        .replace("umol/kg", "µmol/kg")
        .replace("uatm", "µatm")
        .replace("CaCO3", "CaCO₃")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symbols_are_written_for_readers() {
        assert_eq!(omega_range_text((1.0, f64::INFINITY)), "Ω_ar ≥ 1");
        assert_eq!(omega_range_text((1.0, 5.0)), "Ω_ar 1–5");
        assert_eq!(
            reader_text("G = k x (Omega_ar - 1); G = 0 for Omega_ar <= 1, 5-37 degC"),
            "G = k × (Ω_ar − 1); G = 0 for Ω_ar ≤ 1, 5-37 °C"
        );
        assert_eq!(
            reader_text("TA 2 umol/kg, 1.2 kg CaCO3 m-2"),
            "TA 2 µmol/kg, 1.2 kg CaCO₃ m-2"
        );
    }

    #[test]
    fn table_horizons() {
        let every5: Vec<i32> = (2025..=2100).step_by(5).collect();
        assert_eq!(horizons(&every5), vec![2030, 2040, 2050, 2075, 2100]);
        assert_eq!(horizons(&[2027, 2033]), vec![2027, 2033]);
        assert_eq!(
            horizons(&[2031, 2041, 2051, 2061, 2071, 2081, 2091]),
            vec![2031, 2041, 2061, 2071, 2091]
        );
    }
}
