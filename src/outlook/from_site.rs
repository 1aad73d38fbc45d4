//! Glue from a loaded site (`site::load_site`) to the outlook's plain inputs.
//!
//! * Every sample with a solved carbonate state becomes a [`ProjectionRecord`] (TA and pCO2
//!   of the solved state, its measured pair for the ensemble's measurement draws; a TA
//!   estimated from salinity carries the TA–salinity fit's prediction standard error at
//!   the row's salinity as its uncertainty), with its station-day as sampling unit.
//! * `[projection]`, `[calcification]`, `[uncertainty]`, `[thresholds]`, `[[scenario]]` and
//!   `[baseline]` become [`ProjectionSettings`].
//!
//! Problems are reported as diagnostics naming the site file and the field.

use std::sync::Arc;

use chrono::{Datelike, Timelike};

use crate::chem::Input;
use crate::diag::{Diagnostic, Diagnostics};
use crate::site::{LoadedSite, Pair, Sample, TaSalinityFit, schema};

use super::ensemble::{EnsembleSettings, MeasurementUncertainty};
use super::pathways::Observed;
use super::projection::{Disequilibrium, Measurement, ProjectionRecord, SamplingUnit};
use super::scenario::{LocalScenario, Offsets};
use super::thresholds::{HabitatClasses, guinotte_2003};
use super::{ProjectionSettings, SiteInput};

/// The outlook's inputs for a loaded site, or diagnostics naming the site file and field.
pub fn from_loaded_site(
    loaded: &LoadedSite,
) -> Result<(SiteInput, ProjectionSettings), Diagnostics> {
    let settings = projection_settings(loaded)?;
    Ok((site_input(loaded), settings))
}

/// The records of a loaded site as the outlook takes them.
pub fn site_input(loaded: &LoadedSite) -> SiteInput {
    let fit = loaded.baseline.ta_salinity.as_ref();
    let mut files = FileLabels::new(site_folder(loaded));
    let mut stations: Vec<&str> = Vec::new();
    // Problems with the source water are reported by `projection_settings`, which runs first.
    let sources = super::source_match::source_table(loaded).ok().flatten();
    let records: Vec<ProjectionRecord> = loaded
        .samples
        .iter()
        .filter_map(|smp| {
            let mut r = projectable(smp, fit, &mut files)?.ok()?;
            if let Some(u) = r.unit.as_mut() {
                u.station = station_number(&mut stations, &smp.station);
            }
            r.source = sources.as_ref().and_then(|t| t.match_sample(smp));
            Some(r)
        })
        .collect();
    SiteInput {
        name: loaded.site.site.name.clone(),
        seasons: loaded.seasons.iter().map(|s| s.name.clone()).collect(),
        records,
        stations: stations.iter().map(|s| s.to_string()).collect(),
        methods: loaded.methods,
        observed: Observed::noaa(),
    }
}

/// The folder of the site file: record labels name their files relative to it, as the site
/// file does (no folder of the machine the run was made on).
fn site_folder(loaded: &LoadedSite) -> &std::path::Path {
    loaded
        .path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(std::path::Path::new("."))
}

/// Record files named relative to the site file's folder, as the site file names them (no
/// folder of the machine the run was made on); worked out once per file, not per row (it
/// may ask the system for the working folder).
struct FileLabels<'a> {
    folder: &'a std::path::Path,
    last: Option<(Arc<std::path::Path>, String)>,
}

impl<'a> FileLabels<'a> {
    fn new(folder: &'a std::path::Path) -> FileLabels<'a> {
        FileLabels { folder, last: None }
    }

    /// The name of `file` for record labels.
    fn of(&mut self, file: &Arc<std::path::Path>) -> &str {
        let known = self.last.as_ref().is_some_and(|(f, _)| f == file);
        if !known {
            let name = crate::fsio::relative_to(self.folder, file)
                .display()
                .to_string();
            self.last = Some((Arc::clone(file), name));
        }
        self.last.as_ref().map_or("", |(_, name)| name.as_str())
    }
}

/// The projection record of a sample the outlook uses (solved, above the site's salinity
/// floor), or why the projection cannot take it; `None` for rows the site left out. `files`:
/// the record files' names for the record's label.
fn projectable(
    smp: &Sample,
    fit: Option<&TaSalinityFit>,
    files: &mut FileLabels<'_>,
) -> Option<Result<ProjectionRecord, String>> {
    if !smp.is_used() {
        return None;
    }
    let r = record_of(smp, fit, files.of(&smp.source_file))?;
    Some(r.validate().map(|()| r).map_err(|e| e.to_string()))
}

/// Rows the outlook leaves out although the site uses them (outside the projection's
/// limits), as warnings naming file and line: the same test [`from_loaded_site`] applies, so
/// that `check` shows what `project` will leave out.
pub fn rows_left_out(loaded: &LoadedSite) -> Diagnostics {
    let fit = loaded.baseline.ta_salinity.as_ref();
    let mut files = FileLabels::new(site_folder(loaded));
    loaded
        .samples
        .iter()
        .filter_map(|smp| match projectable(smp, fit, &mut files)? {
            Ok(_) => None,
            Err(m) => Some(
                Diagnostic::warning(format!("{m}; the row is left out of the outlook"))
                    .with_file(&*smp.source_file)
                    .with_line(smp.line),
            ),
        })
        .collect()
}

/// The projection settings of a loaded site, checked, without building the per-record
/// inputs (so that `check` on a million-row series does not hold a second copy of it).
pub fn projection_settings(loaded: &LoadedSite) -> Result<ProjectionSettings, Diagnostics> {
    let file = loaded.path.as_path();
    let err = |field: &str, message: String, help: &str| {
        let mut d = Diagnostic::error(message).with_file(file).with_field(field);
        if !help.is_empty() {
            d = d.with_help(help);
        }
        Diagnostics::from(d)
    };
    let site_file = &loaded.site;

    let fit = loaded.baseline.ta_salinity.as_ref();
    let mut files = FileLabels::new(site_folder(loaded));
    if !loaded
        .samples
        .iter()
        .any(|smp| matches!(projectable(smp, fit, &mut files), Some(Ok(_))))
    {
        return Err(err(
            "records",
            "no record row has a solved carbonate state the projection can use (above the salinity floor, within the projection's limits), so nothing can be projected".into(),
            "each row needs two of TA, DIC, pH, pCO2/fCO2 (run `calcisite check` for details)",
        ));
    }

    // Pathways, horizon years, ensemble size and calcification ids: checked once, each
    // problem at its key of the site file.
    let specs = super::site_specs::check_specs(loaded)?;
    let pr = &site_file.projection;
    // The source water: covering the reef's seasons, offsets within the plausible range.
    if let Some(table) = super::source_match::source_table(loaded)? {
        let bad = table.check_offsets(&loaded.samples, 10);
        if bad.has_errors() {
            return Err(bad);
        }
    }

    // Uncertainty, thresholds, calcification, scenarios.
    let u = &site_file.uncertainty;
    let ensemble = EnsembleSettings {
        members: pr.members,
        seed: pr.seed,
        constants: true,
        measurement: MeasurementUncertainty {
            ta_umol_kg: u.ta_umol_kg,
            dic_umol_kg: u.dic_umol_kg,
            ph: u.ph,
            pco2_pct: u.pco2_pct,
        },
        threads: None,
    };
    let t = &site_file.thresholds;
    let defaults = schema::ThresholdsSpec::default();
    let classes = if *t == defaults {
        guinotte_2003()
    } else {
        HabitatClasses::user(
            &[
                ("optimal".to_string(), t.omega_ar_optimal_min),
                ("adequate".to_string(), t.omega_ar_adequate_min),
                ("marginal".to_string(), t.omega_ar_marginal_min),
            ],
            "extremely marginal",
            "site file [thresholds] (class names of Guinotte, Buddemeier & Kleypas 2003)",
        )
        .map_err(|e| err("thresholds", e.to_string(), ""))?
    };
    let scenarios = site_file
        .scenario
        .iter()
        .map(|sc| {
            let o = Offsets {
                ta_umol_kg: sc.ta_offset_umol_kg,
                dic_umol_kg: sc.dic_offset_umol_kg,
            };
            match &sc.seasons {
                Some(list) => LocalScenario {
                    name: sc.name.clone(),
                    all_seasons: Offsets::default(),
                    by_season: list.iter().map(|s| (s.clone(), o)).collect(),
                    start_year: None,
                },
                None => LocalScenario {
                    name: sc.name.clone(),
                    all_seasons: o,
                    by_season: Vec::new(),
                    start_year: None,
                },
            }
        })
        .collect();

    let settings = ProjectionSettings {
        pathways: specs.pathways,
        warming: pr.warming,
        years: specs.years,
        mode: match pr.disequilibrium {
            schema::Disequilibrium::Ratio => Disequilibrium::Ratio,
            schema::Disequilibrium::Additive => Disequilibrium::Additive,
            schema::Disequilibrium::SourceOffsets => Disequilibrium::SourceOffsets,
        },
        scenarios,
        ensemble,
        classes,
        calcification: specs.calcification,
        nec: specs.nec,
    };
    Ok(settings)
}

/// The projection record of one sample (`None` when its state was not solved).
fn record_of(smp: &Sample, fit: Option<&TaSalinityFit>, file: &str) -> Option<ProjectionRecord> {
    let st = smp.state?;
    let m = &smp.measured;
    let ta = if smp.ta_estimated {
        Some(st.ta)
    } else {
        m.ta()
    };
    let (a, b) = match smp.pair? {
        Pair::TaDic => (Input::Ta(ta?), Input::Dic(m.dic()?)),
        Pair::TaPh => (Input::Ta(ta?), Input::PhT(m.ph_t()?)),
        Pair::TaPco2 => (Input::Ta(ta?), Input::Pco2(m.pco2()?)),
        Pair::TaFco2 => (Input::Ta(ta?), Input::Fco2(m.fco2()?)),
        Pair::DicPh => (Input::Dic(m.dic()?), Input::PhT(m.ph_t()?)),
        Pair::DicPco2 => (Input::Dic(m.dic()?), Input::Pco2(m.pco2()?)),
        Pair::DicFco2 => (Input::Dic(m.dic()?), Input::Fco2(m.fco2()?)),
        Pair::PhPco2 => (Input::PhT(m.ph_t()?), Input::Pco2(m.pco2()?)),
        Pair::PhFco2 => (Input::PhT(m.ph_t()?), Input::Fco2(m.fco2()?)),
    };
    let sd_a = if smp.ta_estimated {
        fit.map(|f| f.prediction_se_at(smp.salinity))
    } else {
        None
    };
    Some(ProjectionRecord {
        label: format!("{file}:{} (station {})", smp.line, smp.station),
        season: smp.season,
        sample_year: smp.time.year(),
        temp_c: smp.temp_c,
        salinity: smp.salinity,
        pressure_dbar: smp.pressure_dbar,
        silicate: smp.silicate,
        phosphate: smp.phosphate,
        ta: st.ta,
        pco2: st.pco2,
        measured: Some(Measurement {
            a,
            b,
            sd_a,
            sd_b: None,
        }),
        unit: Some(SamplingUnit {
            // Numbered by `site_input`.
            station: 0,
            day: smp.time.date_naive().num_days_from_ce(),
            continuous: smp.kind == schema::RecordKind::Sensor,
            minute: smp.has_time.then(|| {
                let t = smp.time.time();
                u16::try_from(t.hour() * 60 + t.minute()).unwrap_or(0)
            }),
        }),
        // Matched by `site_input` when the site has source water.
        source: None,
    })
}

/// The number of station `name` in order of first appearance.
fn station_number<'a>(seen: &mut Vec<&'a str>, name: &'a str) -> u32 {
    let i = match seen.iter().position(|s| *s == name) {
        Some(i) => i,
        None => {
            seen.push(name);
            seen.len() - 1
        }
    };
    u32::try_from(i).unwrap_or(u32::MAX)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::outlook::{NoProgress, Quantity, ScenarioId, run};
    use crate::site::load_site;

    fn write_site(dir: &std::path::Path, projection: &str) -> std::path::PathBuf {
        // An invented two-season site with six TA + DIC bottle samples.
        let csv = "date,station,temp_c,salinity,depth_m,ta,dic,silicate,phosphate\n\
                   2024-01-10,A,28.2,35.1,3.0,2295.0,1985.0,1.0,0.1\n\
                   2024-02-12,A,28.6,35.0,3.0,2290.0,1982.0,1.0,0.1\n\
                   2024-03-11,A,28.4,35.2,3.0,2300.0,1990.0,1.0,0.1\n\
                   2024-07-09,A,26.1,35.3,3.0,2305.0,2001.0,1.2,0.2\n\
                   2024-08-13,A,25.8,35.3,3.0,2302.0,2003.0,1.2,0.2\n\
                   2024-09-10,A,26.0,35.2,3.0,2298.0,1999.0,1.2,0.2\n";
        std::fs::write(dir.join("bottles.csv"), csv).unwrap();
        let toml = format!(
            "[site]\nname = \"Invented glue-test reef\"\nlatitude_deg = -10.0\n\
             longitude_deg = 150.0\ndepth_min_m = 2.0\ndepth_max_m = 4.0\nutc_offset = \"+10:00\"\n\n\
             [[records]]\npath = \"bottles.csv\"\nkind = \"bottle\"\ndate_format = \"iso\"\n\n\
             [seasons]\nwarm = [11, 12, 1, 2, 3, 4]\ncool = [5, 6, 7, 8, 9, 10]\n\n\
             [[scenario]]\nname = \"alkalinity +20\"\nta_offset_umol_kg = 20.0\nseasons = [\"cool\"]\n\n\
             {projection}\n"
        );
        let path = dir.join("site.toml");
        std::fs::write(&path, toml).unwrap();
        path
    }

    #[test]
    fn loaded_site_becomes_outlook_inputs() {
        let dir = tempfile::tempdir().unwrap();
        let path = write_site(
            dir.path(),
            "[projection]\npathways = [\"SSP2-4.5\", \"local\"]\nmembers = 40\nseed = 7\n\
             [[projection.user_pathways]]\nname = \"local\"\npoints = [[2030, 450.0], [2100, 700.0]]\n",
        );
        let loaded = load_site(&path).map_err(|d| d.render(false)).unwrap();
        let (site, s) = from_loaded_site(&loaded)
            .map_err(|d| d.render(false))
            .unwrap();
        assert_eq!(site.records.len(), 6);
        assert_eq!(site.seasons.len(), 2);
        assert!(site.records.iter().all(|r| matches!(
            r.measured,
            Some(Measurement {
                a: Input::Ta(_),
                b: Input::Dic(_),
                ..
            })
        )));
        assert_eq!(s.pathways.len(), 2);
        assert_eq!(s.pathways[1].pathway.name, "local");
        assert_eq!(s.years.first(), Some(&2025));
        assert_eq!(s.years.last(), Some(&2100));
        assert_eq!((s.ensemble.members, s.ensemble.seed), (40, 7));
        assert!(s.warming, "the site file's default is warming on");
        assert_eq!(s.scenarios.len(), 1);
        assert_eq!(
            s.scenarios[0].by_season,
            vec![(
                "cool".to_string(),
                Offsets {
                    ta_umol_kg: 20.0,
                    dic_umol_kg: 0.0
                }
            )]
        );
        assert_eq!(s.calcification.site_rate, None);
        assert_eq!(s.nec.measured, None);
        assert_eq!(
            s.nec.relationships.len(),
            crate::outlook::nec::builtin().len()
        );
        let o = run(&site, &s, &NoProgress).unwrap();
        // The scenario changes only the cool season.
        let local = o.pathway_id("local").unwrap();
        let omega = |sc, season| {
            let g = o.group_id(season).unwrap();
            o.series(local, sc, g, Quantity::OmegaAr)
                .unwrap()
                .points
                .clone()
        };
        let scenario = ScenarioId::Local(0);
        assert_eq!(omega(ScenarioId::Base, "warm"), omega(scenario, "warm"));
        let (cool_base, cool_sc) = (omega(ScenarioId::Base, "cool"), omega(scenario, "cool"));
        assert!(
            cool_base
                .iter()
                .zip(&cool_sc)
                .all(|(a, b)| b.q.p50 > a.q.p50)
        );
    }

    #[test]
    fn unusable_settings_name_the_field() {
        let dir = tempfile::tempdir().unwrap();
        let path = write_site(
            dir.path(),
            "[projection]\npathways = [\"far\"]\n\
             [[projection.user_pathways]]\nname = \"far\"\npoints = [[2030, 450.0], [2100, 4000.0]]\n",
        );
        // The site keeps pathways as written; the outlook checks them against its own limits
        // (150–3000 ppm) and names the field, file, line and column.
        let loaded = load_site(&path).map_err(|d| d.render(false)).unwrap();
        let e = from_loaded_site(&loaded).unwrap_err().render(false);
        assert!(
            e.contains("CO2 4000 ppm is outside the valid range")
                && e.contains("field `projection.user_pathways[0].points[1]`"),
            "{e}"
        );
        assert!(e.contains("site.toml:"), "{e}");
        // Settings the site check leaves to the outlook are still named by field.
        let path = write_site(
            dir.path(),
            "[calcification.measured_nec]\nvalue = 10\nunit = \"mmol m-2 d-1\"\n\
             method = \"census\"\nsource = \"x\"\nomega_ar = 0.1\n",
        );
        let loaded = load_site(&path).map_err(|d| d.render(false)).unwrap();
        let e = from_loaded_site(&loaded).unwrap_err().render(false);
        assert!(e.contains("calcification.measured_nec.omega_ar"), "{e}");
        let path = write_site(dir.path(), "[projection]\nmembers = 200000\n");
        let loaded = load_site(&path).map_err(|d| d.render(false)).unwrap();
        let e = from_loaded_site(&loaded).unwrap_err().render(false);
        assert!(e.contains("projection.members"), "{e}");
    }
}
