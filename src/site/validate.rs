//! Range and cross-field checks of a parsed site file, each reported with the file, line and
//! key path of the offending value and what would be valid.

use std::collections::BTreeSet;
use std::path::{Component, Path, PathBuf};

use chrono::FixedOffset;

use super::dates::parse_offset;
use super::schema::{MONTH_NAMES, MonthRef, Season, SiteFile, calendar_seasons, month_from_name};
use super::spans::{SourceMap, did_you_mean};
use crate::chem::catalogue::{MethodKind, UnknownMethod};
use crate::chem::{BoronTotal, K1K2, KfSource, MethodSet};
use crate::diag::{Diagnostic, Diagnostics};

/// Deepest depth accepted for a site or sampler, m (this is a reef-screening tool; the
/// chemistry itself is valid deeper). Documented in docs/site-format.md.
pub const MAX_DEPTH_M: f64 = 1000.0;
/// Salinity accepted for a constant record salinity (same as the per-row QC limit).
pub const SALINITY_RANGE: (f64, f64) = (0.0, 45.0);
/// Accepted site net calcification, kg CaCO3 m⁻² yr⁻¹: above 0 (the outlook scales a positive
/// present rate) and at most 50, the outlook stage's bounds. Kinsey (1985, from memory) gives
/// ≈10 for high-cover zones.
pub const NET_CALCIFICATION_RANGE: (f64, f64) = (0.0, 50.0);

/// What validation derives from a valid site file.
#[derive(Clone, Debug)]
pub struct Resolved {
    pub utc_offset: FixedOffset,
    pub seasons: Vec<Season>,
    /// Season index of each calendar month (index 0 = January).
    pub season_of_month: [usize; 12],
    pub methods: MethodSet,
    /// Record file paths resolved against the site file's folder.
    pub record_paths: Vec<PathBuf>,
}

struct Checker<'a> {
    file: &'a Path,
    map: &'a SourceMap,
    diags: Diagnostics,
}

impl Checker<'_> {
    fn error(&mut self, path: &str, message: impl Into<String>, help: impl Into<String>) {
        let d = Diagnostic::error(message)
            .with_file(self.file)
            .with_help(help);
        self.diags.push(self.map.at_path(d, path));
    }
    /// An error pointing at the key itself (not its value), e.g. a key under a former name.
    fn error_at_key(&mut self, path: &str, message: impl Into<String>, help: impl Into<String>) {
        let d = Diagnostic::error(message)
            .with_file(self.file)
            .with_help(help)
            .with_field(path);
        let d = match self.map.key_span(path) {
            Some(span) => self.map.locate(d, span),
            None => self.map.at_path(d, path),
        };
        self.diags.push(d);
    }
    fn warning(&mut self, path: &str, message: impl Into<String>, help: impl Into<String>) {
        let d = Diagnostic::warning(message)
            .with_file(self.file)
            .with_help(help);
        self.diags.push(self.map.at_path(d, path));
    }
    fn range(&mut self, path: &str, what: &str, v: f64, lo: f64, hi: f64, unit: &str) {
        if !v.is_finite() || v < lo || v > hi {
            self.error(
                path,
                format!("{what} {v} is outside the valid range"),
                format!("{what} must be between {lo} and {hi}{unit}"),
            );
        }
    }
}

/// Removes `.` and `name/..` pairs lexically so messages show tidy paths.
pub fn tidy_path(p: &Path) -> PathBuf {
    let mut out: Vec<Component<'_>> = Vec::new();
    for c in p.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir if matches!(out.last(), Some(Component::Normal(_))) => {
                out.pop();
            }
            other => out.push(other),
        }
    }
    if out.is_empty() {
        PathBuf::from(".")
    } else {
        out.iter().collect()
    }
}

/// Checks every value of `site`; `file` is the site file's path as given. The outlook's
/// keys (`[projection]` pathways and years, `[calcification]` ids) are checked by the outlook.
pub fn validate(file: &Path, site: &SiteFile, map: &SourceMap) -> (Option<Resolved>, Diagnostics) {
    let mut c = Checker {
        file,
        map,
        diags: Diagnostics::new(),
    };
    let utc_offset = check_site(&mut c, site);
    check_plan(&mut c, site);
    check_baseline(&mut c, site);
    let record_paths = check_records(&mut c, site);
    let seasons = check_seasons(&mut c, site);
    check_uncertainty(&mut c, site);
    check_thresholds(&mut c, site);
    let methods = check_chemistry(&mut c, site);
    check_scenarios(&mut c, site, seasons.as_deref());
    check_source_water(&mut c, site);
    if let Some(d) = &site.report.date
        && chrono::NaiveDate::parse_from_str(d, "%Y-%m-%d").is_err()
    {
        c.error(
            "report.date",
            format!("`{d}` is not a date"),
            "write the report date as \"YYYY-MM-DD\", e.g. \"2025-06-30\"",
        );
    }

    let resolved = match (utc_offset, seasons, methods) {
        (Some(utc_offset), Some(seasons), Some(methods)) if !c.diags.has_errors() => {
            let mut season_of_month = [0usize; 12];
            for (i, s) in seasons.iter().enumerate() {
                for &m in &s.months {
                    if let Some(slot) = season_of_month.get_mut(m as usize - 1) {
                        *slot = i;
                    }
                }
            }
            Some(Resolved {
                utc_offset,
                seasons,
                season_of_month,
                methods,
                record_paths,
            })
        }
        _ => None,
    };
    (resolved, c.diags)
}

/// `[site]`; returns the UTC offset when valid.
fn check_site(c: &mut Checker<'_>, site: &SiteFile) -> Option<FixedOffset> {
    let s = &site.site;
    if s.name.trim().is_empty() {
        c.error(
            "site.name",
            "the site name is empty",
            "give the site a name, e.g. name = \"North channel\"",
        );
    }
    c.range(
        "site.latitude_deg",
        "latitude",
        s.latitude_deg,
        -90.0,
        90.0,
        " degrees",
    );
    c.range(
        "site.longitude_deg",
        "longitude",
        s.longitude_deg,
        -180.0,
        180.0,
        " degrees",
    );
    c.range(
        "site.depth_min_m",
        "depth_min_m",
        s.depth_min_m,
        0.0,
        MAX_DEPTH_M,
        " m",
    );
    c.range(
        "site.depth_max_m",
        "depth_max_m",
        s.depth_max_m,
        0.0,
        MAX_DEPTH_M,
        " m",
    );
    if s.depth_min_m.is_finite() && s.depth_max_m.is_finite() && s.depth_min_m > s.depth_max_m {
        c.error(
            "site.depth_max_m",
            format!("depth_max_m {} is shallower than depth_min_m {}", s.depth_max_m, s.depth_min_m),
            "depth_min_m must be less than or equal to depth_max_m (both positive, metres below the surface)",
        );
    }
    if let Some(a) = s.area_m2 {
        c.range(
            "site.area_m2",
            "area_m2",
            a,
            f64::MIN_POSITIVE,
            1e10,
            " m² (positive)",
        );
    }
    match parse_offset(&s.utc_offset) {
        Some(Some(o)) => Some(o),
        _ => {
            c.error(
                "site.utc_offset",
                format!("`{}` is not a UTC offset", s.utc_offset),
                "write the offset of local time from UTC as \"+HH:MM\" or \"-HH:MM\" (hours 0–14, minutes 0–59), e.g. \"+10:00\"",
            );
            None
        }
    }
}

/// `[plan]`.
fn check_plan(c: &mut Checker<'_>, site: &SiteFile) {
    let p = &site.plan;
    if let Some(a) = p.outplanting_area_m2 {
        c.range(
            "plan.outplanting_area_m2",
            "outplanting_area_m2",
            a,
            0.0,
            1e10,
            " m²",
        );
        if let Some(site_area) = site.site.area_m2
            && a > site_area
        {
            c.warning(
                "plan.outplanting_area_m2",
                format!("the out-planting area {a} m² is larger than the site area {site_area} m²"),
                "check both areas (m²)",
            );
        }
    }
    for (k, y) in [
        ("plan.project_start_year", p.project_start_year),
        ("plan.project_end_year", p.project_end_year),
    ] {
        if let Some(y) = y {
            c.range(k, "year", f64::from(y), 1900.0, 2200.0, "");
        }
    }
    if let (Some(a), Some(b)) = (p.project_start_year, p.project_end_year)
        && a > b
    {
        c.error(
            "plan.project_end_year",
            format!("project_end_year {b} is before project_start_year {a}"),
            "the end year must not be before the start year",
        );
    }
}

/// `[baseline]`.
fn check_baseline(c: &mut Checker<'_>, site: &SiteFile) {
    let b = &site.baseline;
    if let Some(v) = b.net_calcification_kg_m2_yr {
        let (lo, hi) = NET_CALCIFICATION_RANGE;
        if !(v > lo && v <= hi) {
            c.error(
                "baseline.net_calcification_kg_m2_yr",
                format!("net calcification {v} is outside the valid range"),
                format!("give the present net community calcification above {lo} and at most {hi} kg CaCO3 m⁻² yr⁻¹"),
            );
        }
    }
    if let Some(v) = b.salinity_floor {
        let (lo, hi) = SALINITY_RANGE;
        c.range("baseline.salinity_floor", "salinity_floor", v, lo, hi, "");
    }
    if let Some(v) = b.coral_cover_fraction
        && !(0.0..=1.0).contains(&v)
    {
        let help = if (1.0..=100.0).contains(&v) {
            format!(
                "coral cover is a fraction between 0 and 1: write {} for {v} %",
                v / 100.0
            )
        } else {
            "coral cover is a fraction between 0 and 1".to_string()
        };
        c.error(
            "baseline.coral_cover_fraction",
            format!("coral cover {v} is outside 0–1"),
            help,
        );
    }
}

/// `[[records]]`; returns the record paths resolved against the site file's folder.
fn check_records(c: &mut Checker<'_>, site: &SiteFile) -> Vec<PathBuf> {
    let base = c.file.parent().unwrap_or(Path::new(""));
    let mut record_paths = Vec::new();
    if site.records.is_empty() {
        c.error(
            "records",
            "the site file lists no record files",
            "add at least one [[records]] table with path = \"...csv\" and kind = \"bottle\" or \"sensor\"",
        );
    }
    for (i, r) in site.records.iter().enumerate() {
        let full = tidy_path(&base.join(&r.path));
        if !full.is_file() {
            let what = if full.exists() {
                "is not a file"
            } else {
                "does not exist"
            };
            c.error(
                &format!("records[{i}].path"),
                format!("record file `{}` {what}", full.display()),
                format!(
                    "paths are relative to the folder of the site file ({}); check the spelling",
                    if base.as_os_str().is_empty() {
                        ".".to_string()
                    } else {
                        base.display().to_string()
                    }
                ),
            );
        }
        record_paths.push(full);
        if let Some(d) = r.depth_m {
            c.range(
                &format!("records[{i}].depth_m"),
                "depth_m",
                d,
                0.0,
                MAX_DEPTH_M,
                " m",
            );
        }
        if let Some(sal) = r.salinity {
            let (lo, hi) = SALINITY_RANGE;
            c.range(
                &format!("records[{i}].salinity"),
                "salinity",
                sal,
                lo,
                hi,
                "",
            );
        }
        if let Some(st) = &r.station
            && st.trim().is_empty()
        {
            c.error(
                &format!("records[{i}].station"),
                "the station name is empty",
                "give a name or leave the key out",
            );
        }
    }
    record_paths
}

/// `[uncertainty]`.
fn check_uncertainty(c: &mut Checker<'_>, site: &SiteFile) {
    let u = &site.uncertainty;
    c.range(
        "uncertainty.ta_umol_kg",
        "ta_umol_kg",
        u.ta_umol_kg,
        0.0,
        100.0,
        " µmol/kg",
    );
    c.range(
        "uncertainty.dic_umol_kg",
        "dic_umol_kg",
        u.dic_umol_kg,
        0.0,
        100.0,
        " µmol/kg",
    );
    c.range("uncertainty.ph", "ph", u.ph, 0.0, 0.5, " pH units");
    c.range(
        "uncertainty.pco2_pct",
        "pco2_pct",
        u.pco2_pct,
        0.0,
        50.0,
        " %",
    );
}

/// `[thresholds]`.
fn check_thresholds(c: &mut Checker<'_>, site: &SiteFile) {
    let t = &site.thresholds;
    for (key, v) in [
        ("omega_ar_optimal_min", t.omega_ar_optimal_min),
        ("omega_ar_adequate_min", t.omega_ar_adequate_min),
        ("omega_ar_marginal_min", t.omega_ar_marginal_min),
    ] {
        c.range(&format!("thresholds.{key}"), key, v, 0.0, 10.0, "");
    }
    if !(t.omega_ar_optimal_min > t.omega_ar_adequate_min
        && t.omega_ar_adequate_min > t.omega_ar_marginal_min)
    {
        c.error(
            "thresholds",
            format!(
                "the Omega_ar class boundaries are not in decreasing order: optimal {}, adequate {}, marginal {}",
                t.omega_ar_optimal_min, t.omega_ar_adequate_min, t.omega_ar_marginal_min
            ),
            "require omega_ar_optimal_min > omega_ar_adequate_min > omega_ar_marginal_min (defaults 4.0, 3.5, 3.0)",
        );
    }
}

/// `[chemistry]`: the method set, with the former key names refused with their new names.
fn check_chemistry(c: &mut Checker<'_>, site: &SiteFile) -> Option<MethodSet> {
    let ch = &site.chemistry;
    for (old, kind, set) in [
        ("k1k2", MethodKind::CarbonicAcid, ch.k1k2.is_some()),
        ("boron", MethodKind::TotalBoron, ch.boron.is_some()),
        ("kf", MethodKind::HydrogenFluoride, ch.kf.is_some()),
    ] {
        if set {
            let (new, example) = (kind.site_key(), kind.default_id());
            c.error_at_key(
                &format!("chemistry.{old}"),
                format!("the key `{old}` in [chemistry] is now called `{new}`"),
                format!(
                    "rename the key to `{new}`; the values are the same citation ids (e.g. {new} = \"{example}\")"
                ),
            );
        }
    }
    let k1k2 = parse_method::<K1K2>(c, &ch.carbonic_acid);
    let boron = parse_method::<BoronTotal>(c, &ch.total_boron);
    let kf = parse_method::<KfSource>(c, &ch.hydrogen_fluoride);
    Some(MethodSet {
        k1k2: k1k2?,
        boron: boron?,
        kf: kf?,
    })
}

/// `[[scenario]]`.
/// Accepted offshore TA and DIC stated in `[source_water]`, µmol/kg (the solver's limits are
/// wider; these keep a unit slip such as mmol/kg or µmol/L × 1000 out).
pub const SOURCE_TA_DIC_RANGE: (f64, f64) = (500.0, 4000.0);

/// Checks `[source_water]` and the records marked as source water.
fn check_source_water(c: &mut Checker<'_>, site: &SiteFile) {
    let marked = site.records.iter().filter(|r| r.source_water).count();
    if marked > 0 && marked == site.records.len() {
        c.error(
            &format!("records[{}].source_water", marked - 1),
            "every record file is marked as source water, so no reef record is left",
            "mark only the offshore file(s) with `source_water = true`",
        );
    }
    let spec = site.source_water.as_ref();
    if let Some(sw) = spec {
        let (lo, hi) = SOURCE_TA_DIC_RANGE;
        match (sw.ta_umol_kg, sw.dic_umol_kg) {
            (Some(ta), Some(dic)) => {
                c.range(
                    "source_water.ta_umol_kg",
                    "offshore TA",
                    ta,
                    lo,
                    hi,
                    " µmol/kg",
                );
                c.range(
                    "source_water.dic_umol_kg",
                    "offshore DIC",
                    dic,
                    lo,
                    hi,
                    " µmol/kg",
                );
                if sw.source.as_deref().is_none_or(|s| s.trim().is_empty()) {
                    c.error(
                        "source_water",
                        "an offshore TA/DIC needs its source",
                        "add source = \"...\" (a survey, cruise or data product) to [source_water]",
                    );
                }
            }
            (Some(_), None) => c.error(
                "source_water.ta_umol_kg",
                "an offshore TA is given without its DIC",
                "give both ta_umol_kg and dic_umol_kg",
            ),
            (None, Some(_)) => c.error(
                "source_water.dic_umol_kg",
                "an offshore DIC is given without its TA",
                "give both ta_umol_kg and dic_umol_kg",
            ),
            (None, None) => {}
        }
        if let Some(t) = sw.temp_c {
            c.range(
                "source_water.temp_c",
                "offshore temperature",
                t,
                -2.0,
                40.0,
                " °C",
            );
        }
        if let Some(v) = sw.salinity {
            c.range(
                "source_water.salinity",
                "offshore salinity",
                v,
                1.0,
                45.0,
                "",
            );
        }
        if let Some(st) = &sw.station
            && st.trim().is_empty()
        {
            c.error(
                "source_water.station",
                "the source-water station name is empty",
                "name the station whose rows are offshore source water",
            );
        }
    }
    let has_source =
        marked > 0 || spec.is_some_and(|sw| sw.station.is_some() || sw.has_stated_values());
    if site.projection.disequilibrium == super::schema::Disequilibrium::SourceOffsets && !has_source
    {
        c.error(
            "projection.disequilibrium",
            "\"source offsets\" needs offshore source water, and the site has none",
            "mark the offshore record file with `source_water = true`, name its station in [source_water], or give an offshore ta_umol_kg and dic_umol_kg there",
        );
    }
}

fn check_scenarios(c: &mut Checker<'_>, site: &SiteFile, seasons: Option<&[Season]>) {
    let mut names = BTreeSet::new();
    for (i, sc) in site.scenario.iter().enumerate() {
        let path = format!("scenario[{i}]");
        if sc.name.trim().is_empty() {
            c.error(
                &format!("{path}.name"),
                "the scenario name is empty",
                "give the scenario a name",
            );
        } else if !names.insert(sc.name.clone()) {
            c.error(
                &format!("{path}.name"),
                format!("scenario `{}` is defined twice", sc.name),
                "give each scenario its own name",
            );
        }
        for (key, v) in [
            ("ta_offset_umol_kg", sc.ta_offset_umol_kg),
            ("dic_offset_umol_kg", sc.dic_offset_umol_kg),
        ] {
            c.range(&format!("{path}.{key}"), key, v, -500.0, 500.0, " µmol/kg");
        }
        let (Some(list), Some(seasons)) = (&sc.seasons, seasons) else {
            continue;
        };
        for (j, name) in list.iter().enumerate() {
            if !seasons.iter().any(|s| &s.name == name) {
                let valid: Vec<&str> = seasons.iter().map(|s| s.name.as_str()).collect();
                let help = match did_you_mean(name, valid.iter().copied()) {
                    Some(s) => format!("did you mean `{s}`? seasons: {}", valid.join(", ")),
                    None => format!("seasons: {}", valid.join(", ")),
                };
                c.error(
                    &format!("{path}.seasons[{j}]"),
                    format!("unknown season `{name}`"),
                    help,
                );
            }
        }
    }
}

/// One `[chemistry]` value parsed through the chemistry module's catalogue, with its
/// suggestion and the valid ids when unknown.
fn parse_method<T: std::str::FromStr<Err = UnknownMethod>>(
    c: &mut Checker<'_>,
    value: &str,
) -> Option<T> {
    match value.parse::<T>() {
        Ok(v) => Some(v),
        Err(e) => {
            let list = e.choices.join(", ");
            let help = match e.suggestion {
                Some(s) => format!("did you mean `{s}`? valid names: {list}"),
                None => format!("valid names: {list}"),
            };
            let path = format!("chemistry.{}", e.kind.site_key());
            c.error(&path, format!("unknown method `{value}`"), help);
            None
        }
    }
}

fn check_seasons(c: &mut Checker<'_>, site: &SiteFile) -> Option<Vec<Season>> {
    let spec = &site.seasons.0;
    if spec.is_empty() {
        return Some(calendar_seasons());
    }
    let mut owner: [Option<String>; 12] = Default::default();
    let mut out = Vec::new();
    let mut ok = true;
    // Check in the order written, so a repeated month is reported where it repeats.
    let mut entries: Vec<(&String, &Vec<MonthRef>)> = spec.iter().collect();
    entries.sort_by_key(|(name, _)| {
        c.map
            .key_span(&format!("seasons.{name}"))
            .map_or(usize::MAX, |r| r.start)
    });
    for (name, months) in entries {
        let path = format!("seasons.{name}");
        if months.is_empty() {
            c.error(
                &path,
                format!("season `{name}` lists no months"),
                "list its months, e.g. wet = [11, 12, 1, 2, 3, 4]",
            );
            ok = false;
        }
        let mut ms = Vec::new();
        for (j, m) in months.iter().enumerate() {
            let mp = format!("{path}[{j}]");
            let month = match m {
                MonthRef::Number(n) if (1..=12).contains(n) => u32::try_from(*n).ok(),
                MonthRef::Name(s) => month_from_name(s),
                MonthRef::Number(_) => None,
            };
            let Some(month) = month else {
                let shown = match m {
                    MonthRef::Number(n) => n.to_string(),
                    MonthRef::Name(s) => format!("\"{s}\""),
                };
                c.error(
                    &mp,
                    format!("{shown} is not a month"),
                    "months are 1–12 or names such as \"Jan\" or \"January\"",
                );
                ok = false;
                continue;
            };
            let slot = &mut owner[month as usize - 1];
            if let Some(prev) = slot {
                c.error(
                    &mp,
                    format!(
                        "{} is in season `{prev}` and again in `{name}`",
                        MONTH_NAMES[month as usize - 1]
                    ),
                    "each month must belong to exactly one season",
                );
                ok = false;
            } else {
                *slot = Some(name.clone());
            }
            ms.push(month);
        }
        out.push(Season {
            name: name.clone(),
            months: ms,
        });
    }
    let missing: Vec<&str> = owner
        .iter()
        .zip(MONTH_NAMES)
        .filter(|(o, _)| o.is_none())
        .map(|(_, n)| n)
        .collect();
    if !missing.is_empty() {
        c.error(
            "seasons",
            format!("months not in any season: {}", missing.join(", ")),
            "the seasons together must cover all 12 months, each exactly once",
        );
        ok = false;
    }
    ok.then_some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tidy_paths() {
        assert_eq!(
            tidy_path(Path::new("sites/../demo-data/a.csv")),
            PathBuf::from("demo-data/a.csv")
        );
        assert_eq!(tidy_path(Path::new("./a.csv")), PathBuf::from("a.csv"));
        assert_eq!(tidy_path(Path::new("../a.csv")), PathBuf::from("../a.csv"));
    }
}
