//! The template's view of a report: the model with every number formatted as a string, plus the
//! derived tables (verdicts, ranking) and the figure paths. This is what the template reads as
//! `/data.json`; its shape is documented in `templates/README.md`.

use serde_json::{Value, json};

use super::figures::{Figure, ReportFigures, SiteFigures, class_range_text};
use super::fmt;
use super::model::{
    CalcUnit, CalcificationOutlook, CrossingYear, QcLevel, Quantiles, ReportModel, ReportTime,
    SampleRow, SiteReport, Stat,
};
use super::palette;

/// Version of the embedded typesetter, shown in the Reproducibility section.
pub const TYPESETTER: &str = "Typst 0.15.1";

/// Builds the template data. `date` is the effective report date (after `SOURCE_DATE_EPOCH`).
pub fn build(model: &ReportModel, figures: &ReportFigures, date: ReportTime) -> Value {
    let n = model.pathways.len();
    let pathways: Vec<Value> = model
        .pathways
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let style = palette::pathway_style(k, n);
            json!({
                "id": p.id,
                "label": p.label,
                "citation": p.citation,
                "description": p.description,
                "colour": palette::hex(style.colour),
            })
        })
        .collect();
    let classes: Vec<Value> = (0..=model.thresholds.levels.len())
        .map(|k| {
            json!({
                "range": class_range_text(&model.thresholds, k),
                "label": model.thresholds.labels.get(k).cloned().unwrap_or_default(),
                "fill": palette::hex(palette::class_fill(k)),
            })
        })
        .collect();
    let empty = SiteFigures::default();
    let sites: Vec<Value> = model
        .sites
        .iter()
        .enumerate()
        .map(|(i, s)| site_view(model, s, figures.sites.get(i).unwrap_or(&empty)))
        .collect();
    let comparison = if model.sites.len() > 1 {
        Some(comparison_view(model, figures))
    } else {
        None
    };
    let repro = &model.reproducibility;
    let kind = if model.sites.len() > 1 {
        "comparison"
    } else {
        "single"
    };
    json!({
        "kind": kind,
        "title": model.title,
        "subtitle": model.subtitle,
        "prepared_for": model.prepared_for,
        "prepared_by": model.prepared_by,
        "date": date.iso_date(),
        "tool": format!("{} {}", model.tool.name, model.tool.version),
        "typesetter": TYPESETTER,
        "thresholds": {
            "levels": model.thresholds.levels.iter().map(|l| fmt::level(*l)).collect::<Vec<_>>(),
            "classes": classes,
            "citation": model.thresholds.citation,
        },
        "horizons": model.horizons.iter().map(|y| y.to_string()).collect::<Vec<_>>(),
        "pathways": pathways,
        "sites": sites,
        "comparison": comparison,
        "extra_limitations": model.extra_limitations,
        "thermal_computed": model.sites.iter().any(|s| s.thermal.is_some()),
        "appendix": model.include_appendix,
        "reproducibility": {
            "command": repro.command,
            "seed": repro.seed.to_string(),
            "members": repro.ensemble_members.to_string(),
            "inputs": repro.inputs.iter().map(|f| json!({
                "role": f.role, "path": f.path, "sha256": f.sha256, "bytes": f.bytes.to_string(),
            })).collect::<Vec<_>>(),
            "settings": repro.settings.iter().map(|s| json!({"name": s.name, "value": s.value}))
                .collect::<Vec<_>>(),
            "timestamp": date.iso_datetime(),
        },
    })
}

fn pathway_label<'a>(model: &'a ReportModel, id: &'a str) -> &'a str {
    model
        .pathways
        .iter()
        .find(|p| p.id == id)
        .map_or(id, |p| p.label.as_str())
}

fn fig(f: &Figure) -> Value {
    json!({ "path": f.path(), "alt": f.alt })
}

fn stat_view(s: &Stat, f: fn(f64) -> String) -> Value {
    let mean_sd = if s.sd.is_finite() {
        format!("{} ± {}", f(s.mean), f(s.sd))
    } else {
        f(s.mean)
    };
    json!({
        "mean": f(s.mean),
        "sd": f(s.sd),
        "min": f(s.min),
        "max": f(s.max),
        "mean_sd": mean_sd,
        "range": fmt::range(&f(s.min), &f(s.max)),
    })
}

fn quant_cell(q: &Quantiles, f: fn(f64) -> String) -> Value {
    json!({
        "median": f(q.p50),
        "range": fmt::range(&f(q.p05), &f(q.p95)),
        "iqr": fmt::range(&f(q.p25), &f(q.p75)),
    })
}

fn missing_cell() -> Value {
    json!({ "median": fmt::MISSING, "range": "", "iqr": "", "class": Value::Null })
}

fn qc_level(level: QcLevel) -> &'static str {
    match level {
        QcLevel::Note => "note",
        QcLevel::Warning => "warning",
        QcLevel::Excluded => "excluded",
    }
}

fn crossing_text(c: CrossingYear) -> String {
    match c {
        CrossingYear::AlreadyBelow => "already below".to_string(),
        CrossingYear::Year(y) => y.to_string(),
        CrossingYear::NotBy(y) => format!("not by {y}"),
    }
}

/// Ω_ar quantiles of a site's limiting season under a pathway in a year.
fn limiting_q(site: &SiteReport, pathway: &str, year: i32) -> Option<Quantiles> {
    let season = site.limiting_season()?;
    let q = site.series(pathway, season)?.at(year)?.omega_ar;
    q.p50.is_finite().then_some(q)
}

fn verdict_view(model: &ReportModel, site: &SiteReport) -> Value {
    let rows: Vec<Value> = model
        .pathways
        .iter()
        .map(|p| {
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match limiting_q(site, &p.id, y) {
                    Some(q) => {
                        let class = model.thresholds.classify(q.p50);
                        let mut c = quant_cell(&q, fmt::omega);
                        c["class"] = json!(class);
                        c["class_label"] =
                            json!(class.and_then(|k| model.thresholds.labels.get(k)).cloned());
                        c["fill"] = json!(class.map(|k| palette::hex(palette::class_fill(k))));
                        c
                    }
                    None => missing_cell(),
                })
                .collect();
            json!({ "pathway": p.label, "cells": cells })
        })
        .collect();
    json!({ "season": site.limiting_season(), "rows": rows })
}

fn coverage_view(site: &SiteReport) -> Value {
    let c = &site.coverage;
    json!({
        "files": c.record_files,
        "records": c.n_records.to_string(),
        "used": c.n_used.to_string(),
        "first": c.first_date,
        "last": c.last_date,
        "stations": c.stations.join(", "),
        "n_stations": c.stations.len().to_string(),
        "seasons": c.seasons.iter().map(|s| json!({
            "season": s.season,
            "months": s.months,
            "records": s.n_records.to_string(),
            "used": s.n_used.to_string(),
            "years": s.n_years.to_string(),
            "first": s.first_date.clone().unwrap_or_else(|| fmt::MISSING.to_string()),
            "last": s.last_date.clone().unwrap_or_else(|| fmt::MISSING.to_string()),
            "thin": s.n_used < 3,
        })).collect::<Vec<_>>(),
    })
}

fn calc_view(model: &ReportModel, c: &CalcificationOutlook, figure: Option<&Figure>) -> Value {
    let f = move |x: f64| fmt::calc(x, c.unit);
    let unit = match c.unit {
        CalcUnit::PercentChange => "% change from present",
        CalcUnit::KgCaco3PerM2Year => "kg CaCO₃ m⁻² yr⁻¹",
    };
    let mut any_extrapolated = false;
    let rows: Vec<Value> = model
        .pathways
        .iter()
        .filter_map(|p| {
            let s = c.series.iter().find(|s| s.pathway == p.id)?;
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match s.points.iter().find(|pt| pt.year == y) {
                    Some(pt) if pt.value.p50.is_finite() => {
                        any_extrapolated |= pt.extrapolated;
                        json!({
                            "median": f(pt.value.p50),
                            "range": fmt::range(&f(pt.value.p05), &f(pt.value.p95)),
                            "extrapolated": pt.extrapolated,
                        })
                    }
                    _ => json!({ "median": fmt::MISSING, "range": "", "extrapolated": false }),
                })
                .collect();
            Some(json!({ "pathway": p.label, "cells": cells }))
        })
        .collect();
    json!({
        "relationship": c.relationship,
        "citation": c.citation,
        "unit": unit,
        "valid_range": c.valid_range,
        "baseline": c.baseline.map(f),
        "note": c.note,
        "rows": rows,
        "any_extrapolated": any_extrapolated,
        "figure": figure.map(fig),
    })
}

/// Short names of the measured parameters of a sample ("TA DIC", "pH pCO2").
fn measured_text(s: &SampleRow) -> String {
    s.measured
        .iter()
        .map(|m| match m.as_str() {
            "ta" => "TA",
            "dic" => "DIC",
            "ph_t" => "pH",
            "pco2" => "pCO2",
            "fco2" => "fCO2",
            other => other,
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// The cells of one appendix row, formatted, in column order (see [`APPENDIX_COLUMNS`]).
fn sample_cells(s: &SampleRow) -> [String; 15] {
    let flags = s.flags.join("; ");
    let flags = if s.used {
        flags
    } else if flags.is_empty() {
        "NOT USED".to_string()
    } else {
        format!("NOT USED: {flags}")
    };
    [
        s.row.to_string(),
        s.date.clone(),
        s.station.clone(),
        s.season.clone(),
        fmt::temp(s.temp_c),
        fmt::salinity(s.salinity),
        fmt::pressure(s.pressure_dbar),
        fmt::opt(s.ta, 0),
        fmt::opt(s.dic, 0),
        fmt::opt(s.ph_t, 3),
        fmt::opt(s.pco2, 0),
        fmt::opt(s.omega_ar, 2),
        fmt::opt(s.omega_ca, 2),
        measured_text(s),
        flags,
    ]
}

/// Appendix columns: (heading, unit line, right-aligned).
const APPENDIX_COLUMNS: [(&str, &str, bool); 15] = [
    ("Line", "", true),
    ("Date and time", "", false),
    ("Station", "", false),
    ("Season", "", false),
    ("T", "°C", true),
    ("S", "", true),
    ("p", "dbar", true),
    ("TA", "µmol/kg", true),
    ("DIC", "µmol/kg", true),
    ("pH", "total", true),
    ("pCO2", "µatm", true),
    ("Ωar", "", true),
    ("Ωca", "", true),
    ("Measured", "", false),
    ("QC flags", "", false),
];

/// One record file's rows for the appendix: the structured rows and the same rows laid out as
/// fixed-width text (a data listing: one padded text per sample typesets quickly even for a
/// year of hourly sensor data), each as [columns up to "Measured", QC flags], with a two-line
/// header of the same shape.
fn sample_group(file: &str, rows: &[&SampleRow]) -> Value {
    let cells: Vec<[String; 15]> = rows.iter().map(|s| sample_cells(s)).collect();
    let n = APPENDIX_COLUMNS.len();
    let mut widths: Vec<usize> = APPENDIX_COLUMNS
        .iter()
        .map(|(h, u, _)| h.chars().count().max(u.chars().count()))
        .collect();
    for row in &cells {
        for (w, c) in widths.iter_mut().zip(row.iter()) {
            *w = (*w).max(c.chars().count());
        }
    }
    // Every column but the last (the QC flags, which may wrap in their own cell) padded to a
    // common width; returns [fixed-width part, flags].
    let line = |items: &[&str]| -> [String; 2] {
        let mut out = String::new();
        for (k, item) in items.iter().enumerate().take(n - 1) {
            let (_, _, right) = APPENDIX_COLUMNS[k];
            let pad = widths[k].saturating_sub(item.chars().count());
            if k > 0 {
                out.push_str("  ");
            }
            if right {
                out.extend(std::iter::repeat_n(' ', pad));
                out.push_str(item);
            } else {
                out.push_str(item);
                out.extend(std::iter::repeat_n(' ', pad));
            }
        }
        [
            out,
            items.get(n - 1).copied().unwrap_or_default().to_string(),
        ]
    };
    let heads: Vec<&str> = APPENDIX_COLUMNS.iter().map(|(h, _, _)| *h).collect();
    let units: Vec<&str> = APPENDIX_COLUMNS.iter().map(|(_, u, _)| *u).collect();
    let lines: Vec<[String; 2]> = cells
        .iter()
        .map(|c| line(&c.iter().map(String::as_str).collect::<Vec<_>>()))
        .collect();
    let structured: Vec<Value> = rows
        .iter()
        .zip(&cells)
        .map(|(s, c)| {
            json!({
                "row": c[0], "date": c[1], "station": c[2], "season": c[3],
                "temp": c[4], "sal": c[5], "p": c[6], "ta": c[7], "dic": c[8], "ph": c[9],
                "pco2": c[10], "omega_ar": c[11], "omega_ca": c[12], "measured": c[13],
                "flags": s.flags.join("; "), "used": s.used,
            })
        })
        .collect();
    json!({
        "file": file,
        "count": rows.len().to_string(),
        "header": [line(&heads), line(&units)],
        "lines": lines,
        "rows": structured,
    })
}

fn site_view(model: &ReportModel, site: &SiteReport, figs: &SiteFigures) -> Value {
    let coords = match (site.latitude, site.longitude) {
        (Some(lat), Some(lon)) => Some(format!(
            "{}, {}",
            fmt::coordinate(lat, 'N', 'S'),
            fmt::coordinate(lon, 'E', 'W')
        )),
        _ => None,
    };
    let baseline: Vec<Value> = site
        .baseline
        .iter()
        .map(|b| {
            json!({
                "season": b.season,
                "n": b.n.to_string(),
                "omega": stat_view(&b.omega_ar, fmt::omega),
                "ph": stat_view(&b.ph_t, fmt::ph),
                "temp": stat_view(&b.temp_c, fmt::temp),
                "salinity": b.salinity.as_ref().map(|s| stat_view(s, fmt::salinity)),
                "ta": b.ta.as_ref().map(|s| stat_view(s, fmt::micro)),
                "dic": b.dic.as_ref().map(|s| stat_view(s, fmt::micro)),
                "pco2": b.pco2.as_ref().map(|s| stat_view(s, fmt::micro)),
                "omega_ca": b.omega_ca.as_ref().map(|s| stat_view(s, fmt::omega)),
                "limiting": Some(b.season.as_str()) == site.limiting_season(),
            })
        })
        .collect();
    let seasons: Vec<&str> = site.baseline.iter().map(|b| b.season.as_str()).collect();
    let mut projection_rows = Vec::new();
    for p in &model.pathways {
        let Some(proj) = site.projection.iter().find(|x| x.pathway == p.id) else {
            continue;
        };
        // Seasons in baseline order first, then any others the projection has.
        let mut order: Vec<&str> = seasons.clone();
        for s in &proj.seasons {
            if !order.contains(&s.season.as_str()) {
                order.push(&s.season);
            }
        }
        for (i, season) in order.iter().enumerate() {
            let Some(series) = proj.seasons.iter().find(|s| s.season == *season) else {
                continue;
            };
            let cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match series.at(y) {
                    Some(pt) if pt.omega_ar.p50.is_finite() => {
                        let mut c = quant_cell(&pt.omega_ar, fmt::omega);
                        c["class"] = json!(model.thresholds.classify(pt.omega_ar.p50));
                        c["ph"] = json!(pt.ph_t.map(|q| fmt::ph(q.p50)));
                        c
                    }
                    _ => missing_cell(),
                })
                .collect();
            projection_rows.push(json!({
                "pathway": p.label,
                "first": i == 0,
                "season": season,
                "limiting": Some(*season) == site.limiting_season(),
                "cells": cells,
            }));
        }
    }
    let crossings: Vec<Value> = site
        .crossings
        .iter()
        .map(|c| {
            json!({
                "pathway": pathway_label(model, &c.pathway),
                "season": c.season,
                "level": fmt::level(c.threshold),
                "median": crossing_text(c.median),
                "early": crossing_text(c.early),
                "late": crossing_text(c.late),
            })
        })
        .collect();
    // The same crossings as a table: one row per pathway and season, one cell per level
    // (median year, with the early and late estimates), so that a site with twelve seasons
    // gets 36 rows rather than 108.
    let mut crossing_rows = Vec::new();
    for p in &model.pathways {
        let mut first = true;
        for season in &seasons {
            let cells: Vec<Value> = model
                .thresholds
                .levels
                .iter()
                .map(|level| {
                    site.crossings
                        .iter()
                        .find(|c| c.pathway == p.id && c.season == *season && c.threshold == *level)
                        .map_or_else(
                            || json!({ "median": fmt::MISSING, "early": "", "late": "" }),
                            |c| {
                                json!({
                                    "median": crossing_text(c.median),
                                    "early": crossing_text(c.early),
                                    "late": crossing_text(c.late),
                                })
                            },
                        )
                })
                .collect();
            if cells.iter().all(|c| c["median"] == fmt::MISSING) {
                continue;
            }
            crossing_rows.push(json!({
                "pathway": p.label,
                "first": first,
                "season": season,
                "limiting": Some(*season) == site.limiting_season(),
                "cells": cells,
            }));
            first = false;
        }
    }
    // Chance below each level: rows pathway × horizon (limiting season), columns levels.
    let season = site.limiting_season().unwrap_or_default();
    let mut probability_rows = Vec::new();
    for p in &model.pathways {
        for &y in &model.horizons {
            let cells: Vec<String> = model
                .thresholds
                .levels
                .iter()
                .map(|level| {
                    site.probabilities
                        .iter()
                        .find(|b| {
                            b.pathway == p.id
                                && b.year == y
                                && b.season == season
                                && b.threshold == *level
                        })
                        .map_or_else(
                            || fmt::MISSING.to_string(),
                            |b| format!("{} %", fmt::number(b.percent, 0)),
                        )
                })
                .collect();
            if cells.iter().any(|c| c != fmt::MISSING) {
                probability_rows.push(json!({
                    "pathway": p.label, "year": y.to_string(), "cells": cells,
                }));
            }
        }
    }
    let calcification: Vec<Value> = site
        .calcification
        .iter()
        .enumerate()
        .map(|(k, c)| calc_view(model, c, figs.calcification.get(k)))
        .collect();
    let scenarios: Vec<Value> = site
        .local_scenarios
        .iter()
        .map(|s| {
            json!({
                "name": s.name,
                "description": s.description,
                "rows": s.rows.iter().map(|r| {
                    let delta = r.reference_median.map(|m| fmt::signed(r.omega_ar.p50 - m, 2));
                    json!({
                        "pathway": pathway_label(model, &r.pathway),
                        "year": r.year.to_string(),
                        "season": r.season,
                        "median": fmt::omega(r.omega_ar.p50),
                        "range": fmt::range(&fmt::omega(r.omega_ar.p05), &fmt::omega(r.omega_ar.p95)),
                        "reference": r.reference_median.map(fmt::omega),
                        "delta": delta,
                    })
                }).collect::<Vec<_>>(),
            })
        })
        .collect();
    let thermal = site.thermal.as_ref().map(|t| {
        json!({
            "method": t.method,
            "citation": t.citation,
            "rows": t.rows.iter().map(|r| json!({
                "pathway": pathway_label(model, &r.pathway),
                "year": r.year.to_string(),
                "median": fmt::dhw(r.max_dhw.p50),
                "range": fmt::range(&fmt::dhw(r.max_dhw.p05), &fmt::dhw(r.max_dhw.p95)),
                "alert": r.alert,
            })).collect::<Vec<_>>(),
        })
    });
    // The appendix: one group per record file (in the order the files first appear), rows in
    // file order.
    let mut groups: Vec<(&str, Vec<&SampleRow>)> = Vec::new();
    if model.include_appendix {
        for s in &site.samples {
            match groups.iter_mut().find(|(file, _)| *file == s.file) {
                Some((_, rows)) => rows.push(s),
                None => groups.push((s.file.as_str(), vec![s])),
            }
        }
    }
    let sample_files: Vec<Value> = groups
        .into_iter()
        .map(|(file, mut rows)| {
            rows.sort_by_key(|r| r.row);
            sample_group(file, &rows)
        })
        .collect();
    json!({
        "id": site.id,
        "name": site.name,
        "location": site.location,
        "coords": coords,
        "depth": site.depth_m.map(|d| format!("{} m", fmt::number(d, 1))),
        "habitat": site.habitat,
        "data_notice": site.data_notice,
        "limiting_season": site.limiting_season(),
        "coverage": coverage_view(site),
        "qc": site.qc.iter().map(|q| json!({
            "level": qc_level(q.level),
            "count": q.count.to_string(),
            "message": q.message,
            "location": q.location,
        })).collect::<Vec<_>>(),
        "baseline": baseline,
        "verdict": verdict_view(model, site),
        "projection": projection_rows,
        "crossings": crossings,
        "crossing_table": crossing_rows,
        "probabilities": probability_rows,
        "calcification": calcification,
        "scenarios": scenarios,
        "thermal": thermal,
        "methods": {
            "chemistry": site.methods.chemistry.iter().map(|m| json!({
                "quantity": m.quantity, "method": m.method, "citation": m.citation,
            })).collect::<Vec<_>>(),
            "projection": site.methods.projection.iter().map(|s| json!({
                "name": s.name, "value": s.value,
            })).collect::<Vec<_>>(),
            "notes": site.methods.notes,
        },
        "figures": {
            "seasonal": figs.seasonal.as_ref().map(fig),
            "overview": figs.overview.as_ref().map(fig),
            "fans": figs.fans.iter().map(|(id, f)| json!({
                "pathway": pathway_label(model, id), "path": f.path(), "alt": f.alt,
            })).collect::<Vec<_>>(),
            "calcification_legend": figs.calcification_legend.as_ref().map(fig),
        },
        "sample_files": sample_files,
    })
}

/// The pathway used to rank sites: the model's choice, else the middle pathway.
pub fn ranking_pathway(model: &ReportModel) -> Option<&super::model::PathwayInfo> {
    if let Some(id) = &model.ranking_pathway
        && let Some(p) = model.pathways.iter().find(|p| &p.id == id)
    {
        return Some(p);
    }
    model
        .pathways
        .get(model.pathways.len().saturating_sub(1) / 2)
}

/// One site's ranking key, in display order.
#[derive(Debug, Clone)]
pub struct RankEntry {
    /// Index into `model.sites`.
    pub site: usize,
    /// Median Ω_ar of the limiting season at the last horizon under the ranking pathway.
    pub end_median: Option<f64>,
    /// Lowest seasonal baseline mean Ω_ar.
    pub now_min: Option<f64>,
}

/// Ranks the sites: by the median Ω_ar of each site's limiting season in the last horizon
/// year under the ranking pathway (higher first), ties and missing values broken by the
/// present-day seasonal minimum, then by the order given.
pub fn rank_sites(model: &ReportModel) -> Vec<RankEntry> {
    let pathway = ranking_pathway(model)
        .map(|p| p.id.as_str())
        .unwrap_or_default();
    let last = model.horizons.last().copied();
    let mut entries: Vec<RankEntry> = model
        .sites
        .iter()
        .enumerate()
        .map(|(i, s)| RankEntry {
            site: i,
            end_median: last.and_then(|y| limiting_q(s, pathway, y)).map(|q| q.p50),
            now_min: s
                .baseline
                .iter()
                .map(|b| b.omega_ar.mean)
                .filter(|v| v.is_finite())
                .min_by(f64::total_cmp),
        })
        .collect();
    let key = |v: Option<f64>| v.unwrap_or(f64::NEG_INFINITY);
    entries.sort_by(|a, b| {
        key(b.end_median)
            .total_cmp(&key(a.end_median))
            .then(key(b.now_min).total_cmp(&key(a.now_min)))
            .then(a.site.cmp(&b.site))
    });
    entries
}

fn comparison_view(model: &ReportModel, figures: &ReportFigures) -> Value {
    let pathway = ranking_pathway(model);
    let pathway_id = pathway.map(|p| p.id.as_str()).unwrap_or_default();
    let pathway_name = pathway.map(|p| p.label.as_str()).unwrap_or_default();
    let last = model
        .horizons
        .last()
        .map(|y| y.to_string())
        .unwrap_or_default();
    let ranked = rank_sites(model);
    let first_calc_name = model
        .sites
        .iter()
        .find_map(|s| s.calcification.first().map(|c| c.relationship.clone()));
    let rows: Vec<Value> = ranked
        .iter()
        .enumerate()
        .map(|(rank, e)| {
            let site = &model.sites[e.site];
            let horizon_cells: Vec<Value> = model
                .horizons
                .iter()
                .map(|&y| match limiting_q(site, pathway_id, y) {
                    Some(q) => {
                        let mut c = quant_cell(&q, fmt::omega);
                        c["class"] = json!(model.thresholds.classify(q.p50));
                        c["fill"] = json!(
                            model
                                .thresholds
                                .classify(q.p50)
                                .map(|k| palette::hex(palette::class_fill(k)))
                        );
                        c
                    }
                    None => missing_cell(),
                })
                .collect();
            let calc = site
                .calcification
                .iter()
                .find(|c| Some(&c.relationship) == first_calc_name.as_ref());
            let calc_text = calc
                .and_then(|c| {
                    let s = c.series.iter().find(|s| s.pathway == pathway_id)?;
                    let y = *model.horizons.last()?;
                    let pt = s.points.iter().find(|p| p.year == y)?;
                    let mut t = fmt::calc(pt.value.p50, c.unit);
                    if c.unit == CalcUnit::PercentChange {
                        t.push_str(" %");
                    }
                    if pt.extrapolated {
                        t.push_str(" †");
                    }
                    Some(t)
                })
                .unwrap_or_else(|| fmt::MISSING.to_string());
            json!({
                "rank": (rank + 1).to_string(),
                "site": site.name,
                "season": site.limiting_season(),
                "now": e.now_min.map_or_else(|| fmt::MISSING.to_string(), fmt::omega),
                "horizons": horizon_cells,
                "calc": calc_text,
            })
        })
        .collect();
    // First year below each level, per site and pathway (limiting season, median): one row
    // per site and level, and the same grouped per site (`crossing_groups`: one row per site
    // whose cells hold one line per level, so that a site's rows never split over pages).
    let mut crossing_rows = Vec::new();
    let mut crossing_groups = Vec::new();
    for e in &ranked {
        let site = &model.sites[e.site];
        let season = site.limiting_season().unwrap_or_default();
        let mut per_pathway: Vec<Vec<String>> = vec![Vec::new(); model.pathways.len()];
        for (li, level) in model.thresholds.levels.iter().enumerate() {
            let cells: Vec<String> = model
                .pathways
                .iter()
                .map(|p| {
                    site.crossings
                        .iter()
                        .find(|c| c.pathway == p.id && c.season == season && c.threshold == *level)
                        .map_or_else(|| fmt::MISSING.to_string(), |c| crossing_text(c.median))
                })
                .collect();
            for (k, c) in cells.iter().enumerate() {
                if let Some(col) = per_pathway.get_mut(k) {
                    col.push(c.clone());
                }
            }
            crossing_rows.push(json!({
                "site": site.name,
                "first": li == 0,
                "level": fmt::level(*level),
                "cells": cells,
            }));
        }
        crossing_groups.push(json!({
            "site": site.name,
            "season": season,
            "levels": model.thresholds.levels.iter().map(|l| fmt::level(*l)).collect::<Vec<_>>(),
            "cells": per_pathway,
        }));
    }
    let criteria = vec![
        format!(
            "Order: median Ω_ar of each site's limiting season (the season with the lowest \
             present-day mean) in {last} under {pathway_name}; higher ranks first."
        ),
        "Ties: the present-day seasonal minimum of the mean Ω_ar (higher first).".to_string(),
        format!(
            "Shown for context, not used for the order: the medians at the other horizon years \
             and {}.",
            match &first_calc_name {
                Some(n) => format!("the change in calcification from {n} in {last}"),
                None => "(no calcification relationship given)".to_string(),
            }
        ),
    ];
    json!({
        "pathway": pathway_name,
        "last_horizon": last,
        "criteria": criteria,
        "calc_relationship": first_calc_name,
        "rows": rows,
        "crossings": crossing_rows,
        "crossing_groups": crossing_groups,
        "figures": figures.comparison.iter().map(fig).collect::<Vec<_>>(),
        "key_figure": figures.comparison_key.as_ref().map(fig),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;
    use crate::report::figures::build_all;

    #[test]
    fn every_number_in_the_view_is_a_string() {
        fn walk(v: &Value, path: &str) {
            match v {
                Value::Number(_) => {
                    // Only class indices (used for colouring) may be numbers.
                    assert!(path.ends_with("class"), "number at {path}");
                }
                Value::Array(a) => a
                    .iter()
                    .enumerate()
                    .for_each(|(i, x)| walk(x, &format!("{path}[{i}]"))),
                Value::Object(o) => o.iter().for_each(|(k, x)| walk(x, &format!("{path}.{k}"))),
                _ => {}
            }
        }
        let model = example_model(3);
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, model.timestamp);
        walk(&v, "");
    }

    #[test]
    fn verdict_uses_limiting_season_and_exact_horizon_values() {
        let model = example_model(1);
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, model.timestamp);
        let site = &model.sites[0];
        let season = site.limiting_season().unwrap();
        let verdict = &v["sites"][0]["verdict"];
        assert_eq!(verdict["season"], season);
        let p = &model.pathways[0];
        let y = model.horizons[0];
        let q = site.series(&p.id, season).unwrap().at(y).unwrap().omega_ar;
        assert_eq!(verdict["rows"][0]["cells"][0]["median"], fmt::omega(q.p50));
        assert_eq!(
            verdict["rows"][0]["cells"][0]["class"],
            json!(model.thresholds.classify(q.p50))
        );
    }

    #[test]
    fn ranking_orders_by_end_horizon_median() {
        let model = example_model(3);
        let ranked = rank_sites(&model);
        let vals: Vec<f64> = ranked.iter().map(|e| e.end_median.unwrap()).collect();
        assert!(vals.windows(2).all(|w| w[0] >= w[1]), "{vals:?}");
        assert_eq!(ranked.len(), 3);
    }

    #[test]
    fn missing_horizon_year_shows_a_dash_not_a_guess() {
        let mut model = example_model(1);
        model.horizons.push(2093); // not on the example's 5-year grid
        let figs = build_all(&model).unwrap();
        let v = build(&model, &figs, model.timestamp);
        let cells = v["sites"][0]["verdict"]["rows"][0]["cells"]
            .as_array()
            .unwrap();
        assert_eq!(cells.last().unwrap()["median"], fmt::MISSING);
    }
}
