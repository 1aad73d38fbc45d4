//! `calcisite check SITE.toml`: read and check a site and its records, print the summary
//! (site, record coverage per season, baseline table, QC findings) to standard output and the
//! findings to standard error. Exit status [`EXIT_OK`] when the site is usable (warnings
//! allowed), [`EXIT_INPUT`] when any input error was found (every error is listed).

use std::fmt::Write as _;
use std::path::PathBuf;

use serde::Serialize;

use super::{EXIT_INPUT, EXIT_OK};
use crate::diag::{Diagnostics, colour_wanted};
use crate::site::baseline::{Stats, TaModelKind};
use crate::site::{LoadedSite, load_site};

/// Output format of `check`.
#[derive(clap::ValueEnum, Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum CheckFormat {
    #[default]
    Text,
    Json,
}

/// Arguments of `calcisite check`.
#[derive(clap::Args, Debug, Clone)]
#[command(after_help = "Examples:
  calcisite check sites/tala-vesi-pass.toml
  calcisite check my-site/site.toml --format json > check.json

Exit status 0 when the site is usable (warnings allowed), 1 with every error listed when not.")]
pub struct CheckArgs {
    /// The site description file (TOML)
    pub site: PathBuf,
    /// Format of the summary on standard output
    #[arg(long, value_enum, default_value_t = CheckFormat::Text)]
    pub format: CheckFormat,
}

#[derive(Serialize)]
struct JsonOut<'a> {
    status: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    site: Option<&'a LoadedSite>,
    diagnostics: &'a Diagnostics,
}

/// Runs `check`; returns the exit status.
pub fn run_check(args: &CheckArgs) -> i32 {
    let colour = colour_wanted(false);
    let loaded = load_site(&args.site).and_then(|site| {
        // The projection settings are checked here too, so that `check` passing means
        // `project` and `report` accept the site file.
        match crate::outlook::from_site::projection_settings(&site) {
            Ok(_) => Ok(site),
            Err(ds) => {
                let mut all: Diagnostics = ds.into_iter().map(|d| site.locate(d)).collect();
                all.extend(site.findings.iter().cloned());
                Err(all)
            }
        }
    });
    match loaded {
        Ok(site) => {
            let printed = match args.format {
                CheckFormat::Text => super::print_out(&summary_text(&site)),
                CheckFormat::Json => print_json(&JsonOut {
                    status: "ok",
                    site: Some(&site),
                    diagnostics: &site.findings,
                }),
            };
            if !site.findings.is_empty() {
                eprint!("{}", site.findings.render(colour));
            }
            if printed { EXIT_OK } else { EXIT_INPUT }
        }
        Err(diags) => {
            if args.format == CheckFormat::Json {
                print_json(&JsonOut {
                    status: "error",
                    site: None,
                    diagnostics: &diags,
                });
            }
            eprint!("{}", diags.render(colour));
            eprintln!(
                "{}: the site cannot be used until the errors above are fixed",
                args.site.display()
            );
            EXIT_INPUT
        }
    }
}

/// Prints `v` as JSON on standard output; false when it could not be written.
fn print_json<T: Serialize>(v: &T) -> bool {
    match serde_json::to_string_pretty(v) {
        Ok(s) => super::print_out(&format!("{s}\n")),
        Err(e) => {
            eprintln!("error: cannot write JSON: {e}");
            false
        }
    }
}

fn mean_sd(s: &Stats, dp: usize) -> String {
    match (s.mean, s.sd) {
        (Some(m), Some(sd)) => format!("{m:.dp$}±{sd:.dp$}"),
        (Some(m), None) => format!("{m:.dp$}"),
        _ => "–".to_string(),
    }
}

fn min_max(s: &Stats, dp: usize) -> String {
    match (s.min, s.max) {
        (Some(a), Some(b)) => format!("{a:.dp$}–{b:.dp$}"),
        _ => "–".to_string(),
    }
}

fn months_label(months: &[u32]) -> String {
    use crate::site::schema::MONTH_NAMES;
    if months.len() == 12 {
        return "all".to_string();
    }
    months
        .iter()
        .filter_map(|m| MONTH_NAMES.get((*m as usize).wrapping_sub(1)))
        .copied()
        .collect::<Vec<_>>()
        .join(",")
}

fn table(rows: &[Vec<String>]) -> String {
    let ncol = rows.iter().map(Vec::len).max().unwrap_or(0);
    let widths: Vec<usize> = (0..ncol)
        .map(|c| {
            rows.iter()
                .filter_map(|r| r.get(c))
                .map(|s| s.chars().count())
                .max()
                .unwrap_or(0)
        })
        .collect();
    let mut out = String::new();
    for r in rows {
        let mut line = String::from(" ");
        for (c, cell) in r.iter().enumerate() {
            let w = widths.get(c).copied().unwrap_or(0);
            let pad = w.saturating_sub(cell.chars().count());
            if c == 0 {
                line.push_str(&format!(" {cell}{}", " ".repeat(pad)));
            } else {
                line.push_str(&format!("  {}{cell}", " ".repeat(pad)));
            }
        }
        out.push_str(line.trim_end());
        out.push('\n');
    }
    out
}

/// The text summary printed by `check`.
pub fn summary_text(ls: &LoadedSite) -> String {
    let s = &ls.site.site;
    let mut o = String::new();
    let ns = if s.latitude_deg < 0.0 { 'S' } else { 'N' };
    let ew = if s.longitude_deg < 0.0 { 'W' } else { 'E' };
    let _ = writeln!(
        o,
        "Site: {}{}",
        s.name,
        s.region
            .as_deref()
            .map(|r| format!(" ({r})"))
            .unwrap_or_default()
    );
    let _ = writeln!(
        o,
        "  {:.4}°{ns} {:.4}°{ew}, depth {}–{} m{}{}, UTC{}",
        s.latitude_deg.abs(),
        s.longitude_deg.abs(),
        s.depth_min_m,
        s.depth_max_m,
        s.habitat
            .as_deref()
            .map(|h| format!(", {h}"))
            .unwrap_or_default(),
        s.area_m2.map(|a| format!(", {a} m²")).unwrap_or_default(),
        ls.utc_offset
    );
    let _ = writeln!(
        o,
        "  site file {}; chemistry: K1,K2 {}, total boron {}, KF {}",
        ls.path.display(),
        ls.methods.k1k2,
        ls.methods.boron,
        ls.methods.kf
    );

    let _ = writeln!(o, "\nRecords");
    let mut rows = vec![vec![
        "file".to_string(),
        "kind".to_string(),
        "rows".to_string(),
        "solved".to_string(),
        "first".to_string(),
        "last".to_string(),
        "pairs used".to_string(),
    ]];
    for r in &ls.records {
        let kind = match r.kind {
            crate::site::schema::RecordKind::Bottle => "bottle",
            crate::site::schema::RecordKind::Sensor => {
                if r.sub_daily {
                    "sensor (sub-daily)"
                } else {
                    "sensor"
                }
            }
        };
        let fmt_t = |t: Option<chrono::DateTime<chrono::FixedOffset>>| {
            t.map_or("–".to_string(), |t| {
                t.with_timezone(&ls.utc_offset)
                    .format("%Y-%m-%d")
                    .to_string()
            })
        };
        rows.push(vec![
            r.path.display().to_string(),
            kind.to_string(),
            r.rows.to_string(),
            r.solved.to_string(),
            fmt_t(r.first),
            fmt_t(r.last),
            r.pairs
                .iter()
                .map(|(k, v)| format!("{k} {v}"))
                .collect::<Vec<_>>()
                .join(", "),
        ]);
    }
    o.push_str(&table(&rows));

    let _ = writeln!(o, "\nCoverage per season (rows kept)");
    let mut rows = vec![{
        let mut h = vec!["season".to_string(), "months".to_string()];
        h.extend(ls.records.iter().map(|r| {
            r.path.file_name().map_or_else(
                || r.path.display().to_string(),
                |n| n.to_string_lossy().to_string(),
            )
        }));
        h
    }];
    for (i, season) in ls.seasons.iter().enumerate() {
        let mut r = vec![season.name.clone(), months_label(&season.months)];
        r.extend(
            ls.records
                .iter()
                .map(|rec| rec.rows_per_season.get(i).copied().unwrap_or(0).to_string()),
        );
        rows.push(r);
    }
    o.push_str(&table(&rows));

    let _ = writeln!(
        o,
        "\nBaseline (mean±sd; TA, DIC in µmol/kg, pCO2 in µatm, at in-situ temperature)"
    );
    let mut rows = vec![vec![
        "season".to_string(),
        "n".to_string(),
        "T °C".to_string(),
        "S".to_string(),
        "TA".to_string(),
        "DIC".to_string(),
        "pH_T".to_string(),
        "pCO2".to_string(),
        "Omega_ar".to_string(),
        "Omega_ar range".to_string(),
        "Omega_ca".to_string(),
    ]];
    for sb in ls
        .baseline
        .seasons
        .iter()
        .chain(std::iter::once(&ls.baseline.whole_record))
    {
        rows.push(vec![
            sb.name.clone(),
            sb.n_solved.to_string(),
            mean_sd(&sb.temp_c, 2),
            mean_sd(&sb.salinity, 2),
            mean_sd(&sb.ta_umol_kg, 0),
            mean_sd(&sb.dic_umol_kg, 0),
            mean_sd(&sb.ph_t, 3),
            mean_sd(&sb.pco2_uatm, 0),
            mean_sd(&sb.omega_ar, 2),
            min_max(&sb.omega_ar, 2),
            mean_sd(&sb.omega_ca, 2),
        ]);
    }
    o.push_str(&table(&rows));

    let w = &ls.baseline.whole_record;
    if w.nta_umol_kg.n > 0 {
        let _ = writeln!(
            o,
            "\nSalinity-normalised TA (TA·35/S, measured TA): {} µmol/kg, n {}",
            mean_sd(&w.nta_umol_kg, 1),
            w.nta_umol_kg.n
        );
    }
    match &ls.baseline.ta_salinity {
        Some(f) => {
            let _ = writeln!(
                o,
                "TA–salinity regression over bottle samples: TA = {:.1} + {:.2}·S, r² {:.3}, n {}, S {:.2}–{:.2}; rows without TA use the {} model (rms residual {:.1} µmol/kg)",
                f.intercept_umol_kg,
                f.slope,
                f.r2,
                f.n,
                f.salinity_min,
                f.salinity_max,
                match f.model {
                    TaModelKind::Linear => "linear",
                    TaModelKind::Proportional => "proportional (constant nTA)",
                },
                f.rmse_umol_kg
            );
        }
        None => {
            let _ = writeln!(
                o,
                "TA–salinity regression: not available (fewer than 3 bottle samples with TA)"
            );
        }
    }
    let diel: Vec<_> = ls
        .baseline
        .seasons
        .iter()
        .chain(std::iter::once(w))
        .filter_map(|sb| sb.diel.map(|d| (sb.name.as_str(), d)))
        .collect();
    if !diel.is_empty() {
        let _ = writeln!(
            o,
            "\nDiel range (mean of daily max−min over station-days with ≥ 6 samples)"
        );
        let mut rows = vec![vec![
            "season".to_string(),
            "days".to_string(),
            "pH_T mean".to_string(),
            "pH_T max".to_string(),
            "Omega_ar mean".to_string(),
            "Omega_ar max".to_string(),
        ]];
        for (name, d) in diel {
            rows.push(vec![
                name.to_string(),
                d.n_days.to_string(),
                format!("{:.3}", d.ph_t_range_mean),
                format!("{:.3}", d.ph_t_range_max),
                format!("{:.2}", d.omega_ar_range_mean),
                format!("{:.2}", d.omega_ar_range_max),
            ]);
        }
        o.push_str(&table(&rows));
    }
    let c = &ls.baseline.calcification;
    let _ = writeln!(
        o,
        "\nNet calcification used as the present rate: {} kg CaCO3 m⁻² yr⁻¹ ({}){}",
        c.net_calcification_kg_m2_yr,
        c.source,
        c.coral_cover_fraction
            .map(|f| format!("; coral cover {:.0} %", f * 100.0))
            .unwrap_or_default()
    );
    let (e, wn, n) = (
        ls.findings.count(crate::diag::Severity::Error),
        ls.findings.count(crate::diag::Severity::Warning),
        ls.findings.count(crate::diag::Severity::Note),
    );
    let _ = writeln!(
        o,
        "\nQC findings: {e} errors, {wn} warnings, {n} notes (listed on standard error)"
    );
    let _ = writeln!(
        o,
        "Screening-level estimate, not a permit determination; biological and local factors are not modelled."
    );
    o
}
