//! An invented report model for the report's own tests (test builds only). Every value here is
//! made up to exercise the figures and templates; none is a measurement or a projection.

use super::model::*;

impl ReportModel {
    /// A one-site example with invented values.
    pub fn example() -> Self {
        example_model(1)
    }
}

const SEASONS: [(&str, &str); 4] = [
    ("Summer", "Dec–Feb"),
    ("Autumn", "Mar–May"),
    ("Winter", "Jun–Aug"),
    ("Spring", "Sep–Nov"),
];

/// Invented atmospheric CO2 (ppm) of pathway `k` in `year`: a smooth curve from 420 ppm in 2025
/// to an invented 2100 value per pathway.
fn co2(k: usize, year: i32) -> f64 {
    let end = [440.0, 560.0, 700.0, 900.0, 1100.0][k.min(4)];
    let t = f64::from(year - 2025) / 75.0;
    420.0 + (end - 420.0) * t.powf(1.4)
}

fn q(median: f64, spread: f64) -> Quantiles {
    Quantiles {
        p05: median - 1.645 * spread,
        p25: median - 0.674 * spread,
        p50: median,
        p75: median + 0.674 * spread,
        p95: median + 1.645 * spread,
    }
}

fn stat(mean: f64, sd: f64) -> Stat {
    Stat {
        mean,
        sd,
        min: mean - 2.1 * sd,
        max: mean + 1.9 * sd,
    }
}

/// An invented model with `n_sites` sites (1 gives a single-site report).
pub fn example_model(n_sites: usize) -> ReportModel {
    let pathways: Vec<PathwayInfo> = [
        ("ssp1-1.9", "SSP1-1.9"),
        ("ssp1-2.6", "SSP1-2.6"),
        ("ssp2-4.5", "SSP2-4.5"),
        ("ssp3-7.0", "SSP3-7.0"),
        ("ssp5-8.5", "SSP5-8.5"),
    ]
    .iter()
    .map(|(id, label)| PathwayInfo {
        id: id.to_string(),
        label: label.to_string(),
        citation: "Meinshausen et al. (2020), Geosci. Model Dev. 13:3571–3605 (example entry)"
            .to_string(),
        description: None,
    })
    .collect();
    let site_names = [
        "Coral Garden North",
        "Lagoon Patch East",
        "Outer Slope South",
        "Bay Four",
    ];
    let base_omega = [3.95, 3.55, 4.15, 3.3];
    let sites = (0..n_sites)
        .map(|i| example_site(i, site_names[i % 4], base_omega[i % 4], &pathways))
        .collect();
    ReportModel {
        title: "Aragonite saturation outlook".to_string(),
        subtitle: Some("Screening assessment for coral restoration planning".to_string()),
        prepared_for: Some("Example Reef Restoration Trust (invented)".to_string()),
        prepared_by: Some("Example field team (invented)".to_string()),
        tool: ToolInfo {
            name: "calcisite".to_string(),
            version: "0.1.0".to_string(),
        },
        timestamp: ReportTime {
            year: 2025,
            month: 3,
            day: 14,
            hour: 0,
            minute: 0,
            second: 0,
        },
        thresholds: ThresholdClasses {
            levels: vec![4.0, 3.5, 3.0],
            labels: vec![
                "optimal".to_string(),
                "adequate".to_string(),
                "marginal".to_string(),
                "extremely marginal".to_string(),
            ],
            citation: "Guinotte, Buddemeier & Kleypas (2003), Coral Reefs 22:551–558".to_string(),
            // The example shows shaded classes, as a site's own checked [thresholds] would.
            checked: true,
        },
        horizons: vec![2030, 2050, 2100],
        pathways,
        sites,
        ranking_pathway: None,
        extra_limitations: vec!["Example limitation added by the caller.".to_string()],
        reproducibility: Reproducibility {
            command: Some("calcisite report example.toml -o example.pdf".to_string()),
            inputs: vec![
                InputFile {
                    role: "site".to_string(),
                    path: "examples/site.toml".to_string(),
                    sha256: "a".repeat(64),
                    bytes: 1234,
                },
                InputFile {
                    role: "records".to_string(),
                    path: "examples/records.csv".to_string(),
                    sha256: "b".repeat(64),
                    bytes: 56789,
                },
            ],
            settings: vec![Setting {
                name: "disequilibrium".into(),
                value: "ratio".into(),
            }],
            seed: 20250314,
            ensemble_members: 1000,
        },
        include_appendix: true,
        data_out: None,
        summary_only: Vec::new(),
    }
}

fn example_site(i: usize, name: &str, omega0: f64, pathways: &[PathwayInfo]) -> SiteReport {
    let baseline = example_baseline(i, omega0);
    let years: Vec<i32> = (2025..=2100).step_by(5).collect();
    let projection = example_projection(&baseline, pathways, &years);
    let mut site = SiteReport {
        id: format!("site-{i}"),
        name: name.to_string(),
        location: Some("Invented Atoll, Example Sea".to_string()),
        latitude: Some(-17.25 - i as f64),
        longitude: Some(146.0 + i as f64 * 0.4),
        depth_m: Some(6.0 + i as f64 * 2.0),
        habitat: Some("Fore-reef slope, branching Acropora nursery candidate".to_string()),
        data_notice: Some("Demo data: an invented scenario, not measurements.".to_string()),
        coverage: Coverage {
            record_files: vec!["examples/records.csv".to_string()],
            n_records: 52 + i,
            n_used: 50 + i,
            first_date: "2022-01-10".to_string(),
            last_date: "2024-11-28".to_string(),
            stations: vec!["N1".to_string(), "N2".to_string()],
            seasons: SEASONS
                .iter()
                .enumerate()
                .map(|(k, (s, m))| SeasonCoverage {
                    season: s.to_string(),
                    months: m.to_string(),
                    // Dec–Feb, Mar–May, Jun–Aug, Sep–Nov.
                    month_numbers: (0..3).map(|j| ((3 * k + j + 11) % 12 + 1) as u32).collect(),
                    n_records: 13,
                    n_used: 12 + i,
                    n_years: 3,
                    first_date: Some("2022-01-10".to_string()),
                    last_date: Some("2024-11-28".to_string()),
                })
                .collect(),
        },
        qc: vec![
            QcFinding {
                level: QcLevel::Excluded,
                count: 2,
                message: "TA and DIC disagree with the measured pH by more than 0.05".to_string(),
                location: Some("examples/records.csv rows 17, 33".to_string()),
            },
            QcFinding {
                level: QcLevel::Warning,
                count: 3,
                message: "Temperature above the fitted range of the K1, K2 set".to_string(),
                location: None,
            },
        ],
        baseline,
        limiting_season: None,
        projection,
        crossings: Vec::new(),
        probabilities: Vec::new(),
        time_below: Vec::new(),
        calcification: Vec::new(),
        thermal: Some(example_thermal(i, pathways, &years)),
        projection_rules: Vec::new(),
        exposure: example_exposure(i, pathways, omega0),
        local_scenarios: vec![LocalScenario {
            name: "Alkalinity +50 µmol/kg".to_string(),
            description: "Invented example of a local alkalinity addition.".to_string(),
            rows: vec![ScenarioRow {
                pathway: "ssp2-4.5".to_string(),
                year: 2050,
                season: "Winter".to_string(),
                omega_ar: q(3.6, 0.1),
                reference_median: Some(3.35),
            }],
        }],
        methods: example_methods(),
        record_files: vec![RecordFile {
            path: "examples/records.csv".to_string(),
            sensor: false,
            conversions: vec![RowFlag::DepthAsPressure],
        }],
        samples: example_samples(),
        plan: SitePlan {
            start_year: Some(2025),
            end_year: Some(2035),
            target_groups: vec!["branching Acropora".to_string()],
            outplanting_area_m2: Some(800.0 + 200.0 * i as f64),
            coral_cover_fraction: Some(0.2),
        },
        data_basis: DataBasis {
            bottle_used: 50 + i,
            sensor_used: 0,
            first_year: Some(2022),
            last_year: Some(2024),
            ta_measured: 50 + i,
            ta_estimated: 0,
        },
    };
    let season = site.limiting_season().unwrap_or("Winter").to_string();
    site.crossings = example_crossings(&site, pathways, &season);
    site.probabilities = example_probabilities(&site, pathways, &season);
    site.calcification = example_calcification(&site, pathways, &years);
    site
}

/// An invented thermal outlook: annual maximum DHW rising with the pathway and the year
/// (steeper at the later sites), three observed years with one hot year.
/// An invented sensor series at the first site (station N1), a diel swing of ±0.4 around a
/// mean that falls with CO2; the other sites have bottle samples only. Hours below a level
/// follow from the sinusoid: below `l` while sin < (l − mean)/0.4.
fn example_exposure(i: usize, pathways: &[PathwayInfo], omega0: f64) -> SiteExposure {
    if i > 0 {
        return SiteExposure {
            unavailable: Some(ExposureUnavailable::NeedsSubDaily),
            ..SiteExposure::default()
        };
    }
    let states = std::iter::once((None, None)).chain(
        pathways
            .iter()
            .flat_map(|p| [2030, 2050, 2100].map(|y| (Some(p.id.clone()), Some(y)))),
    );
    let mut series = Vec::new();
    for (pathway, year) in states {
        let k = pathways
            .iter()
            .position(|p| Some(&p.id) == pathway.as_ref())
            .map_or(0.0, |k| k as f64 + 1.0);
        let mean = omega0 - 0.25 * k * f64::from(year.unwrap_or(2024) - 2024) / 76.0;
        for (season, _) in SEASONS {
            let hours = |l: f64| {
                let x = ((l - mean) / 0.4).clamp(-1.0, 1.0);
                24.0 * (0.5 + x.asin() / std::f64::consts::PI)
            };
            series.push(ExposureSeries {
                pathway: pathway.clone(),
                year,
                season: season.to_string(),
                station: "N1".to_string(),
                days: 60,
                diel_omega_ar: (0..24)
                    .map(|h| {
                        mean + 0.4 * (std::f64::consts::TAU * (f64::from(h) - 9.0) / 24.0).sin()
                    })
                    .collect(),
                daily_min_omega_ar: mean - 0.4,
                hours_below: [4.0, 3.5, 3.0]
                    .map(|l| HoursBelow {
                        threshold: l,
                        hours_per_day: hours(l),
                    })
                    .to_vec(),
            });
        }
    }
    SiteExposure {
        unavailable: None,
        stations: vec!["N1".to_string()],
        series,
    }
}

fn example_thermal(i: usize, pathways: &[PathwayInfo], years: &[i32]) -> ThermalOutlook {
    let pathways = pathways
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let rate = (0.05 + 0.06 * k as f64) * (1.0 + 0.2 * i as f64);
            let median = |y: i32| rate * f64::from(y - 2024);
            let onset = years.iter().copied().find(|y| median(*y) >= 10.0);
            HeatSeries {
                pathway: p.id.clone(),
                points: years
                    .iter()
                    .map(|&y| HeatPoint {
                        year: y,
                        max_dhw: [0.5 * median(y), median(y), 1.6 * median(y) + 1.0],
                        significant_pct: (12.0 * median(y)).min(100.0),
                        severe_pct: (6.0 * median(y)).min(100.0),
                    })
                    .collect(),
                severe_most_years: [onset.map(|y| y - 10), onset, onset.map(|y| y + 15)],
                searched_to: 2100,
            }
        })
        .collect();
    ThermalOutlook {
        record: "temperature logger file examples/temperature.csv".to_string(),
        first_day: "2021-10-01".to_string(),
        last_day: "2024-12-31".to_string(),
        mmm_c: 28.4 + 0.1 * i as f64,
        mmm_source: if i == 0 {
            MmmSource::Stated {
                source: "invented example climatology".to_string(),
                base_period: (1985, 2012),
            }
        } else {
            MmmSource::Record { years: 3 }
        },
        allowance_c_per_decade: 0.0,
        levels: [4.0, 8.0],
        observed: vec![
            ObservedDhw {
                year: 2022,
                max_dhw: 6.3,
            },
            ObservedDhw {
                year: 2023,
                max_dhw: 0.0,
            },
            ObservedDhw {
                year: 2024,
                max_dhw: 1.2,
            },
        ],
        pathways,
        findings: vec!["gap of 2 day(s) from 2023-06-10 filled by linear interpolation".into()],
    }
}

/// Invented per-season statistics around `omega0`.
fn example_baseline(i: usize, omega0: f64) -> Vec<SeasonBaseline> {
    let season_offsets = [0.25, 0.05, -0.3, -0.05];
    SEASONS
        .iter()
        .zip(season_offsets)
        .map(|((s, _), off)| SeasonBaseline {
            season: s.to_string(),
            n: 12 + i,
            omega_ar: stat(omega0 + off, 0.12),
            ph_t: stat(8.03 + off * 0.05, 0.02),
            temp_c: stat(26.0 + off * 8.0, 0.6),
            salinity: Some(stat(35.1, 0.15)),
            ta: Some(stat(2290.0, 12.0)),
            dic: Some(stat(1960.0 - off * 40.0, 15.0)),
            pco2: Some(stat(405.0 - off * 60.0, 18.0)),
            omega_ca: Some(stat((omega0 + off) * 1.5, 0.18)),
        })
        .collect()
}

/// Invented projections: each season's mean scaled down with the pathway's invented CO2.
fn example_projection(
    baseline: &[SeasonBaseline],
    pathways: &[PathwayInfo],
    years: &[i32],
) -> Vec<PathwayProjection> {
    pathways
        .iter()
        .enumerate()
        .map(|(k, p)| PathwayProjection {
            pathway: p.id.clone(),
            seasons: baseline
                .iter()
                .map(|b| SeasonSeries {
                    season: b.season.clone(),
                    points: years
                        .iter()
                        .map(|&y| {
                            let factor = (420.0 / co2(k, y)).powf(0.6);
                            let m = b.omega_ar.mean * factor;
                            let spread = 0.08 + 0.002 * f64::from(y - 2025);
                            ProjectionPoint {
                                year: y,
                                omega_ar: q(m, spread),
                                ph_t: Some(q(b.ph_t.mean - 0.35 * (1.0 - factor), 0.015)),
                            }
                        })
                        .collect(),
                })
                .collect(),
        })
        .collect()
}

fn example_methods() -> Methods {
    Methods {
        chemistry: vec![
            MethodEntry {
                quantity: "K1, K2".into(),
                method: "Lueker et al. (2000)".into(),
                citation: "Lueker, Dickson & Keeling (2000), Mar. Chem. 70:105–119".into(),
            },
            MethodEntry {
                quantity: "Aragonite solubility".into(),
                method: "Mucci (1983)".into(),
                citation: "Mucci (1983), Am. J. Sci. 283:780–799".into(),
            },
        ],
        projection: vec![
            Setting {
                name: "Disequilibrium".into(),
                value: "ratio (pCO2 sea/air kept)".into(),
            },
            Setting {
                name: "Warming".into(),
                value: "off".into(),
            },
        ],
        notes: vec!["Depth in m taken as pressure in dbar.".to_string()],
    }
}

/// Forty invented samples of one record file; the 17th is not used.
fn example_samples() -> Vec<SampleRow> {
    (0..40)
        .map(|r| SampleRow {
            file: "examples/records.csv".to_string(),
            row: r + 1,
            date: format!("2023-{:02}-{:02}", r % 12 + 1, r % 27 + 1),
            station: if r % 2 == 0 { "N1".into() } else { "N2".into() },
            season: SEASONS[(r as usize / 10) % 4].0.to_string(),
            temp_c: 25.0 + (r % 7) as f64 * 0.4,
            salinity: 35.0 + (r % 3) as f64 * 0.1,
            pressure_dbar: 6.0,
            ta: Some(2290.0 + r as f64),
            dic: Some(1960.0 - r as f64),
            ph_t: Some(8.03),
            pco2: Some(400.0 + r as f64),
            omega_ar: Some(3.8 - r as f64 * 0.01),
            omega_ca: Some(5.7 - r as f64 * 0.015),
            measured: vec!["ta".into(), "dic".into()],
            flags: if r == 16 {
                vec![RowFlag::Inconsistent, RowFlag::NotUsed]
            } else {
                vec![RowFlag::DepthAsPressure]
            },
            used: r != 16,
        })
        .collect()
}

/// Crossing years derived from the invented series (median, 5 %, 95 % curves).
fn example_crossings(site: &SiteReport, pathways: &[PathwayInfo], season: &str) -> Vec<Crossing> {
    let mut crossings = Vec::new();
    for p in pathways {
        for level in [4.0, 3.5, 3.0] {
            let series = site
                .series(&p.id, season)
                .map(|s| s.points.clone())
                .unwrap_or_default();
            let cross = |f: fn(&Quantiles) -> f64| {
                let last = series.last().map_or(2100, |pt| pt.year);
                match series.iter().position(|pt| f(&pt.omega_ar) < level) {
                    Some(0) => CrossingYear::AlreadyBelow,
                    Some(k) => CrossingYear::Year(series[k].year),
                    None => CrossingYear::NotBy(last),
                }
            };
            crossings.push(Crossing {
                pathway: p.id.clone(),
                season: season.to_string(),
                threshold: level,
                median: cross(|q| q.p50),
                early: cross(|q| q.p05),
                late: cross(|q| q.p95),
            });
        }
    }
    crossings
}

/// Chance below each level, from a normal approximation of the invented quantiles.
fn example_probabilities(
    site: &SiteReport,
    pathways: &[PathwayInfo],
    season: &str,
) -> Vec<BelowProbability> {
    let mut probabilities = Vec::new();
    for p in pathways {
        for &y in &[2030, 2050, 2100] {
            let Some(pt) = site.series(&p.id, season).and_then(|s| s.at(y)) else {
                continue;
            };
            let sd = (pt.omega_ar.p95 - pt.omega_ar.p05) / 3.29;
            for level in [4.0, 3.5, 3.0] {
                let z = (level - pt.omega_ar.p50) / sd;
                let percent = 100.0 / (1.0 + (-1.702 * z).exp());
                probabilities.push(BelowProbability {
                    pathway: p.id.clone(),
                    year: y,
                    season: season.to_string(),
                    threshold: level,
                    percent,
                });
            }
        }
    }
    probabilities
}

/// Calcification: an invented linear % change per unit Ω and an invented rate law in kg.
fn example_calcification(
    site: &SiteReport,
    pathways: &[PathwayInfo],
    years: &[i32],
) -> Vec<CalcificationOutlook> {
    let omega_now = site.baseline.iter().map(|b| b.omega_ar.mean).sum::<f64>() / 4.0;
    let mut lin = CalcificationOutlook {
        relationship: "Linear change per unit Ωₐᵣ (example)".to_string(),
        citation: "Chan & Connolly (2013), Glob. Change Biol. 19:282–290 (example entry)"
            .to_string(),
        unit: CalcUnit::PercentChange,
        valid_range: "Ωₐᵣ 1–5".to_string(),
        baseline: Some(0.0),
        series: Vec::new(),
        note: None,
    };
    let mut rate = CalcificationOutlook {
        relationship: "Rate law (example)".to_string(),
        citation: "Silverman et al. (2009), Geophys. Res. Lett. 36:L05606 (example entry)"
            .to_string(),
        unit: CalcUnit::KgCaco3PerM2Year,
        valid_range: "Ωₐᵣ 2.5–4.5 (example)".to_string(),
        baseline: Some(1.6),
        series: Vec::new(),
        note: Some("Scaled by an invented live coral cover of 30 %.".to_string()),
    };
    for (k, p) in pathways.iter().enumerate() {
        let mut a = CalcSeries {
            pathway: p.id.clone(),
            points: Vec::new(),
        };
        let mut b = CalcSeries {
            pathway: p.id.clone(),
            points: Vec::new(),
        };
        for &y in years {
            let om = omega_now * (420.0 / co2(k, y)).powf(0.6);
            let pct = -15.0 * (omega_now - om);
            a.points.push(CalcPoint {
                year: y,
                value: q(pct, 2.0 + 0.05 * f64::from(y - 2025)),
                extrapolated: false,
            });
            let kg = 1.6 * ((om - 1.0) / (omega_now - 1.0)).max(0.0).powf(1.7);
            b.points.push(CalcPoint {
                year: y,
                value: q(kg, 0.15),
                extrapolated: om < 2.5,
            });
        }
        lin.series.push(a);
        rate.series.push(b);
    }
    vec![lin, rate]
}
