//! `calcisite check SITE.toml`: read and check a site and its records, print the summary
//! (site, record coverage per season, baseline table, QC findings) to standard output and the
//! findings to standard error. Exit status [`EXIT_OK`] when the site is usable (warnings
//! allowed), [`EXIT_INPUT`] when any input error was found (every error is listed).

use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fmt::Write as _;
use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};

use serde::Serialize;

use super::{EXIT_INPUT, EXIT_OK};
use crate::diag::{Diagnostic, Diagnostics, Severity, colour_wanted};
use crate::site::baseline::{Stats, TaModelKind};
use crate::site::{Finding, FindingKind, LoadFailure, LoadedSite};

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
    /// The row findings, typed (one per row, not grouped).
    findings: &'a [Finding],
}

/// Runs `check`; returns the exit status.
pub fn run_check(args: &CheckArgs) -> i32 {
    let colour = colour_wanted(false);
    let verbose = crate::diag::verbose();
    // The same checks `project` and `report` run (pipeline::load_checked), so that `check`
    // passing means they accept the site file.
    let mut thermal_line = String::new();
    let loaded = match crate::pipeline::load_checked(&args.site, Default::default()) {
        Ok(checked) => {
            thermal_line = thermal_text(checked.thermal.as_ref());
            Ok(checked.loaded)
        }
        Err(crate::pipeline::Failure::Load(fail)) => Err(fail),
        Err(crate::pipeline::Failure::Outlook(e)) => {
            eprintln!("error: {}: {e}", args.site.display());
            return EXIT_INPUT;
        }
    };
    match loaded {
        Ok(site) => {
            let mut shown = site_diagnostics(&site, verbose);
            // Rows the outlook will leave out, by the outlook's own test.
            shown.extend(crate::outlook::from_site::rows_left_out(&site));
            let printed = match args.format {
                CheckFormat::Text => {
                    super::print_out(&format!("{}{thermal_line}", summary_text(&site)))
                }
                CheckFormat::Json => print_json(&JsonOut {
                    status: "ok",
                    site: Some(&site),
                    diagnostics: &shown,
                    findings: &site.qc,
                }),
            };
            if !shown.is_empty() {
                eprint!("{}", shown.render(colour));
            }
            if printed { EXIT_OK } else { EXIT_INPUT }
        }
        Err(fail) => {
            let diags = failure_diagnostics(&fail, verbose);
            if args.format == CheckFormat::Json {
                print_json(&JsonOut {
                    status: "error",
                    site: None,
                    diagnostics: &diags,
                    findings: &fail.rows,
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

/// One paragraph on the temperature record the thermal outlook will use.
fn thermal_text(prepared: Option<&crate::outlook::thermal::site::PreparedHeat>) -> String {
    use crate::outlook::thermal::site::MmmOrigin;
    let Some(p) = prepared else {
        return "\nThermal stress: no temperature record ([thermal] logger file or sensor records); \
                the heat-stress outlook is not computed\n"
            .to_string();
    };
    let source = crate::outlook::thermal::output::source_text(&p.source);
    let last = p.daily.date(p.daily.temp_c.len().saturating_sub(1));
    let mmm = match &p.mmm_origin {
        MmmOrigin::Stated {
            source,
            base_period,
        } => format!(
            "MMM {} °C stated ({source}, {}–{})",
            p.mmm_c, base_period.0, base_period.1
        ),
        MmmOrigin::Record { .. } => format!(
            "MMM {} °C estimated from this record",
            crate::numfmt::fixed(p.mmm_c, 2).unwrap_or_default()
        ),
    };
    format!(
        "\nThermal stress: {source}, {} readings, {} to {last}; {mmm}\n",
        p.readings, p.daily.first
    )
}

/// Row errors of one kind in one file shown in full before the rest are summarised (all of
/// them with `--verbose`).
pub const SHOWN_PER_GROUP: usize = 10;
/// Row warnings and notes of one kind in one file shown in full before the rest are
/// summarised in one line, so that an ordinary lab file gives a screenful at most.
pub const SHOWN_PER_GROUP_NOT_ERRORS: usize = 1;

/// Every finding of a loaded site as `check` shows it: site-level diagnostics with the row
/// findings grouped among them.
pub fn site_diagnostics(ls: &LoadedSite, verbose: bool) -> Diagnostics {
    merge(&ls.findings, &ls.qc, ls.qc_position, verbose)
}

/// Every finding of a failed load as `check` shows it.
pub fn failure_diagnostics(f: &LoadFailure, verbose: bool) -> Diagnostics {
    merge(&f.diagnostics, &f.rows, f.rows_position, verbose)
}

fn merge(site: &Diagnostics, rows: &[Finding], at: usize, verbose: bool) -> Diagnostics {
    let (before, after) = site.as_slice().split_at(at.min(site.len()));
    let mut out = Diagnostics::new();
    out.extend(before.iter().cloned());
    out.extend(group_rows(rows, verbose));
    out.extend(after.iter().cloned());
    out
}

/// Row findings as diagnostics: in the order given (severity, file, line); at most
/// [`SHOWN_PER_GROUP`] per (file, kind, field, severity) in full, with the offending line and
/// a caret under the cell; the rest as one diagnostic listing every line.
fn group_rows(findings: &[Finding], verbose: bool) -> Diagnostics {
    type Key<'a> = (Severity, usize, FindingKind, Option<&'a str>);
    let mut groups: Vec<(Vec<&Finding>, Vec<usize>)> = Vec::new();
    let mut index: HashMap<Key<'_>, usize> = HashMap::new();
    let mut out_of_order: BTreeMap<usize, Vec<&Finding>> = BTreeMap::new();
    for f in findings {
        if f.kind == FindingKind::OutOfOrder && !verbose {
            out_of_order.entry(f.file_index).or_default().push(f);
            continue;
        }
        let shown_max = if f.severity == Severity::Error {
            SHOWN_PER_GROUP
        } else {
            SHOWN_PER_GROUP_NOT_ERRORS
        };
        let key = (f.severity, f.file_index, f.kind, f.field.as_deref());
        let gi = *index.entry(key).or_insert_with(|| {
            groups.push((Vec::new(), Vec::new()));
            groups.len() - 1
        });
        if let Some((shown, rest)) = groups.get_mut(gi) {
            if verbose || shown.len() < shown_max {
                shown.push(f);
            } else {
                rest.push(f.line);
            }
        }
    }
    // Source lines needed for snippets, read once per file.
    let mut wanted: BTreeMap<usize, (&Path, BTreeSet<usize>)> = BTreeMap::new();
    for (shown, _) in &groups {
        for f in shown.iter().filter(|f| f.line > 0) {
            wanted
                .entry(f.file_index)
                .or_insert_with(|| (&*f.file, BTreeSet::new()))
                .1
                .insert(f.line);
        }
    }
    let texts = read_lines(&wanted);
    let mut out = Diagnostics::new();
    for (shown, rest) in groups {
        let Some(first) = shown.first().copied() else {
            continue;
        };
        for f in shown {
            let mut d = f.to_diagnostic();
            if let Some(text) = texts.get(&(f.file_index, f.line)) {
                if let Some((col, width)) = f.cell.and_then(|c| cell_position(text, c)) {
                    d = d.with_column(col).with_width(width);
                }
                d = d.with_snippet(text.clone());
            }
            out.push(d);
        }
        if !rest.is_empty() {
            let mut d = Diagnostic::new(
                first.severity,
                format!(
                    "{} more {} like the one above ({}) on lines {}",
                    rest.len(),
                    if rest.len() == 1 { "row" } else { "rows" },
                    first.kind.as_str(),
                    line_ranges(&rest)
                ),
            )
            .with_file(&*first.file);
            if let Some(field) = &first.field {
                d = d.with_field(field.clone());
            }
            out.push(d);
        }
    }
    // Dates out of order: one note per file (rows need not be sorted).
    for rows in out_of_order.values() {
        let Some(first) = rows.first() else { continue };
        let lines: Vec<usize> = rows.iter().map(|f| f.line).collect();
        out.push(
            Diagnostic::note(format!(
                "{} {} a date earlier than the previous row of the same station (lines {}); rows kept: records need not be in date order",
                rows.len(),
                if rows.len() == 1 { "row has" } else { "rows have" },
                line_ranges(&lines)
            ))
            .with_file(&*first.file)
            .with_field("date"),
        );
    }
    out
}

fn read_lines(
    wanted: &BTreeMap<usize, (&Path, BTreeSet<usize>)>,
) -> HashMap<(usize, usize), String> {
    let mut out = HashMap::new();
    for (&fi, (path, lines)) in wanted {
        let Some(&last) = lines.last() else {
            continue;
        };
        let Ok(f) = std::fs::File::open(path) else {
            continue;
        };
        let mut r = BufReader::new(f);
        let mut buf = Vec::new();
        let mut n = 0;
        while n < last {
            buf.clear();
            match r.read_until(b'\n', &mut buf) {
                Ok(0) | Err(_) => break,
                Ok(_) => {}
            }
            n += 1;
            if lines.contains(&n) {
                let s = String::from_utf8_lossy(&buf);
                let s = s
                    .trim_end_matches(['\n', '\r'])
                    .trim_start_matches('\u{feff}');
                out.insert((fi, n), s.to_string());
            }
        }
    }
    out
}

/// 1-based character column and width of the `idx`-th comma-separated cell of `line`
/// (quote-aware).
fn cell_position(line: &str, idx: usize) -> Option<(usize, usize)> {
    let mut cell = 0;
    let mut start = 0usize; // char index of current cell start
    let mut in_quotes = false;
    let mut pos = 0usize;
    for c in line.chars() {
        match c {
            '"' => in_quotes = !in_quotes,
            ',' if !in_quotes => {
                if cell == idx {
                    return Some((start + 1, (pos - start).max(1)));
                }
                cell += 1;
                start = pos + 1;
            }
            _ => {}
        }
        pos += 1;
    }
    (cell == idx).then(|| (start + 1, (pos - start).max(1)))
}

/// `3, 5–9, 12` from a list of line numbers; very long lists are cut after 100 ranges with
/// the count of the rest.
fn line_ranges(lines: &[usize]) -> String {
    let mut v = lines.to_vec();
    v.sort_unstable();
    v.dedup();
    let mut parts = Vec::new();
    let mut i = 0;
    while i < v.len() {
        let a = v[i];
        let mut b = a;
        while i + 1 < v.len() && v[i + 1] == b + 1 {
            i += 1;
            b = v[i];
        }
        parts.push(if a == b {
            a.to_string()
        } else {
            format!("{a}–{b}")
        });
        i += 1;
    }
    const MAX_RANGES: usize = 100;
    if parts.len() > MAX_RANGES {
        let more: usize = parts.len() - MAX_RANGES;
        parts.truncate(MAX_RANGES);
        format!("{} and {more} further ranges", parts.join(", "))
    } else {
        parts.join(", ")
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

/// The TA–salinity fit and the salinity-normalised TA, with their rules, for the summary.
fn ta_salinity_text(ls: &LoadedSite) -> String {
    use crate::site::baseline::{MIN_TA_FIT_SAMPLES, NtaForm};
    let mut o = String::new();
    let floor = ls.site.baseline.salinity_floor();
    let left: usize = ls.records.iter().map(|r| r.below_salinity_floor).sum();
    if left > 0 {
        let _ = writeln!(
            o,
            "\nLeft out of the baseline and outlook: {left} rows with salinity below {floor} ([baseline] salinity_floor); they stay in the per-sample list"
        );
    }
    let w = &ls.baseline.whole_record;
    let nta = &ls.baseline.nta;
    let form = match nta.form {
        NtaForm::Proportional => "TA·35/S".to_string(),
        NtaForm::FreshwaterEndMember { ta_s0_umol_kg } => format!(
            "(TA − TA_S0)/S·35 + TA_S0 with TA_S0 {ta_s0_umol_kg:.0} µmol/kg, the freshwater end-member of the TA–salinity fit (Friis et al. 2003)"
        ),
    };
    if w.nta_umol_kg.n > 0 {
        let _ = writeln!(
            o,
            "\nSalinity-normalised TA ({form}; measured TA at S ≥ {}): {} µmol/kg, n {}",
            nta.min_salinity,
            mean_sd(&w.nta_umol_kg, 1),
            w.nta_umol_kg.n
        );
    } else {
        let _ = writeln!(
            o,
            "\nSalinity-normalised TA: none (no measured TA at S ≥ {})",
            nta.min_salinity
        );
    }
    if nta.below_min_salinity + nta.outside_physical_range > 0 {
        let _ = writeln!(
            o,
            "  not normalised: {} samples below S {}, {} outside the physical range",
            nta.below_min_salinity, nta.min_salinity, nta.outside_physical_range
        );
    }
    match &ls.baseline.ta_salinity {
        Some(f) => {
            let _ = writeln!(
                o,
                "TA–salinity regression over bottle samples: TA = {:.1} + {:.2}·S, r² {:.3}, n {}, S {:.2}–{:.2}, prediction standard error {:.1} µmol/kg (n − 2 degrees of freedom, at the mean salinity); {}",
                f.intercept_umol_kg,
                f.slope,
                f.r2,
                f.n,
                f.salinity_min,
                f.salinity_max,
                f.prediction_se_umol_kg,
                match f.model {
                    TaModelKind::Linear => format!(
                        "rows without TA use it (rms residual {:.1} µmol/kg)",
                        f.rmse_umol_kg
                    ),
                    TaModelKind::Proportional if f.is_poor() => format!(
                        "the fit is poor (r² below 0.5 or residual standard error above 20 µmol/kg) and is not used; rows without TA use a constant nTA (rms residual {:.1} µmol/kg)",
                        f.rmse_umol_kg
                    ),
                    TaModelKind::Proportional => format!(
                        "the salinity range is too narrow for a slope; rows without TA use a constant nTA (rms residual {:.1} µmol/kg)",
                        f.rmse_umol_kg
                    ),
                }
            );
        }
        None => {
            let _ = writeln!(
                o,
                "TA–salinity regression: not available (fewer than {MIN_TA_FIT_SAMPLES} bottle samples with TA)"
            );
        }
    }
    o
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

    o.push_str(&records_table(ls));
    o.push_str(&coverage_table(ls));
    o.push_str(&baseline_table(ls));
    o.push_str(&ta_salinity_text(ls));
    o.push_str(&diel_table(ls));
    let c = &ls.baseline.calcification;
    let cover = c
        .coral_cover_fraction
        .map(|f| format!("; coral cover {:.0} %", f * 100.0))
        .unwrap_or_default();
    let _ = match ls.site.baseline.net_calcification_kg_m2_yr {
        Some(rate) => writeln!(
            o,
            "\nNet calcification measured at the site: {rate} kg CaCO₃ m⁻² yr⁻¹ ({}){cover}",
            c.source
        ),
        None => writeln!(
            o,
            "\nNo measured net calcification: calcification is given as a relative change only{cover}"
        ),
    };
    let (e, wn, n) = (
        ls.count(Severity::Error),
        ls.count(Severity::Warning),
        ls.count(Severity::Note),
    );
    let _ = writeln!(
        o,
        "\nQC findings: {e} errors, {wn} warnings, {n} notes (grouped on standard error; --verbose lists every row)"
    );
    let _ = writeln!(
        o,
        "Screening-level estimate, not a permit determination; biological and local factors are not modelled."
    );
    o
}

/// The records table of the summary.
fn records_table(ls: &LoadedSite) -> String {
    let mut o = String::new();
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

    o
}

/// Rows kept per season and record file.
fn coverage_table(ls: &LoadedSite) -> String {
    let mut o = String::new();
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

    o
}

/// The seasonal baseline table.
fn baseline_table(ls: &LoadedSite) -> String {
    let mut o = String::new();
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

    o
}

/// The diel ranges, when the records resolve the time of day.
fn diel_table(ls: &LoadedSite) -> String {
    let mut o = String::new();
    let w = &ls.baseline.whole_record;
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
    o
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_compress_and_cut() {
        assert_eq!(line_ranges(&[9, 3, 5, 6, 7, 12]), "3, 5–7, 9, 12");
        let many: Vec<usize> = (0..500).map(|i| i * 2).collect();
        let s = line_ranges(&many);
        assert!(s.ends_with("and 400 further ranges"), "{s}");
    }

    #[test]
    fn cell_positions_respect_quotes() {
        let line = "2024-01-01,\"a,b\",8.1x,35";
        assert_eq!(cell_position(line, 0), Some((1, 10)));
        assert_eq!(cell_position(line, 2), Some((18, 4)));
        assert_eq!(cell_position(line, 3), Some((23, 2)));
        assert_eq!(cell_position(line, 4), None);
    }
}
