//! The outlook's check of the site file's `[projection]` pathways, user pathways, horizon
//! years and ensemble size, and `[calcification]` relationship ids. The site stage keeps these
//! as written (it knows no outlook names); this module validates them once, reporting every
//! problem with the site file's key path (`projection.pathways[1]`), which
//! [`LoadedSite::locate`] turns into file, line and column, and builds the outlook's
//! pathways, years and calcification settings from them.

use std::collections::BTreeSet;

use crate::diag::{Diagnostic, Diagnostics};
use crate::site::LoadedSite;
use crate::site::spans::did_you_mean;

use super::PathwaySpec;
use super::calcification::{CalcificationSettings, builtin_relationships};
use super::ensemble::MAX_MEMBERS;
use super::nec::{NecSettings, SiteNec, site_nec};
use super::pathways::{BUILTIN_NAMES, Observed, Pathway, USER_PPM_RANGE, USER_YEAR_RANGE};
use super::warming::Warming;

/// Horizon years accepted in `[projection] horizon_years`.
pub const HORIZON_YEAR_RANGE: (i32, i32) = (2000, 2500);

/// What the site's outlook specs become once checked.
pub struct CheckedSpecs {
    pub pathways: Vec<PathwaySpec>,
    pub years: Vec<i32>,
    pub calcification: CalcificationSettings,
    /// The field NEC relationships ([`super::nec`]) with the site's cover, habitat choice and
    /// its own measured NEC (`[calcification.measured_nec]`, checked) to anchor them to.
    pub nec: NecSettings,
}

/// Collects errors about keys of the site file, each located in it.
struct Errors<'a> {
    loaded: &'a LoadedSite,
    diags: Diagnostics,
}

impl Errors<'_> {
    fn push(&mut self, field: &str, message: impl Into<String>, help: impl Into<String>) {
        let d = Diagnostic::error(message)
            .with_file(&self.loaded.path)
            .with_field(field)
            .with_help(help);
        self.diags.push(self.loaded.locate(d));
    }
}

/// The horizon years to use: the listed ones, or every 5 years after `last_record_year` up
/// to 2100 ([`super::horizon_years`]).
pub fn horizon_years_or_default(listed: &[i32], last_record_year: i32) -> Vec<i32> {
    if !listed.is_empty() {
        return listed.to_vec();
    }
    super::horizon_years(
        last_record_year,
        super::DEFAULT_END_YEAR,
        super::DEFAULT_STEP_YEARS,
    )
}

/// Checks the site's outlook specs; every problem is reported, each at its key.
pub fn check_specs(loaded: &LoadedSite) -> Result<CheckedSpecs, Diagnostics> {
    let mut e = Errors {
        loaded,
        diags: Diagnostics::new(),
    };
    let user = check_user_pathways(&mut e);
    let pathways = check_pathway_names(&mut e, &user);
    let years = check_years(&mut e);
    check_members(&mut e);
    let calcification = check_calcification(&mut e);
    let measured_nec = check_measured_nec(&mut e);
    let site_file = &loaded.site;
    let nec = NecSettings::for_site(
        site_file.site.habitat.as_deref(),
        site_file.baseline.coral_cover_fraction,
        measured_nec,
    );
    match (calcification, e.diags.has_errors()) {
        (Some(calcification), false) => Ok(CheckedSpecs {
            pathways,
            years,
            calcification,
            nec,
        }),
        _ => Err(e.diags),
    }
}

/// Checks `[[projection.user_pathways]]`; returns the valid ones by name.
fn check_user_pathways(e: &mut Errors<'_>) -> Vec<(String, Pathway)> {
    let pr = &e.loaded.site.projection;
    let mut names = BTreeSet::new();
    let mut out = Vec::new();
    for (i, u) in pr.user_pathways.iter().enumerate() {
        let path = format!("projection.user_pathways[{i}]");
        let before = e.diags.len();
        if u.name.trim().is_empty() {
            e.push(
                &format!("{path}.name"),
                "the pathway name is empty",
                "give the pathway a name",
            );
        } else if BUILTIN_NAMES
            .iter()
            .any(|b| b.eq_ignore_ascii_case(&u.name))
        {
            e.push(
                &format!("{path}.name"),
                format!("`{}` is the name of a built-in pathway", u.name),
                "choose another name for your own pathway",
            );
        } else if !names.insert(u.name.clone()) {
            e.push(
                &format!("{path}.name"),
                format!("pathway `{}` is defined twice", u.name),
                "give each user pathway its own name",
            );
        }
        if u.points.len() < 2 {
            e.push(
                &format!("{path}.points"),
                "a user pathway needs at least two [year, ppm] points",
                "e.g. points = [[2025, 425.0], [2100, 600.0]]",
            );
        }
        let points = check_points(e, &path, &u.points);
        if e.diags.len() > before {
            continue;
        }
        match Pathway::user(&u.name, &points) {
            Ok(p) => out.push((u.name.clone(), p)),
            Err(err) => e.push(
                &path,
                err.to_string(),
                format!(
                    "the outlook accepts whole years {}-{} and {}-{} ppm",
                    USER_YEAR_RANGE.0, USER_YEAR_RANGE.1, USER_PPM_RANGE.0, USER_PPM_RANGE.1
                ),
            ),
        }
    }
    out
}

/// Checks the `[year, ppm]` points of one user pathway.
fn check_points(e: &mut Errors<'_>, path: &str, points: &[[f64; 2]]) -> Vec<(i32, f64)> {
    let mut prev = f64::NEG_INFINITY;
    let (y0, y1) = (f64::from(USER_YEAR_RANGE.0), f64::from(USER_YEAR_RANGE.1));
    let (c0, c1) = USER_PPM_RANGE;
    let mut out = Vec::with_capacity(points.len());
    for (j, [y, ppm]) in points.iter().enumerate() {
        let pp = format!("{path}.points[{j}]");
        if !y.is_finite() || *y < y0 || *y > y1 || y.fract() != 0.0 {
            e.push(
                &pp,
                format!("year {y} is not a whole year between {y0} and {y1}"),
                "each point is [year, ppm]",
            );
        } else if *y <= prev {
            e.push(
                &pp,
                format!("year {y} is not after the previous point's year {prev}"),
                "list the points in increasing year order",
            );
        }
        prev = *y;
        if !ppm.is_finite() || *ppm < c0 || *ppm > c1 {
            e.push(
                &pp,
                format!("CO2 {ppm} ppm is outside the valid range"),
                format!("atmospheric CO2 must be between {c0} and {c1} ppm"),
            );
        }
        // In range (checked above, else an error was pushed): the cast is exact.
        out.push((*y as i32, *ppm));
    }
    out
}

/// Checks `[projection] pathways` against the built-in and user names.
fn check_pathway_names(e: &mut Errors<'_>, user: &[(String, Pathway)]) -> Vec<PathwaySpec> {
    let pr = &e.loaded.site.projection;
    let mut known: Vec<String> = BUILTIN_NAMES.iter().map(|s| s.to_string()).collect();
    known.extend(pr.user_pathways.iter().map(|u| u.name.clone()));
    let observed = Observed::noaa();
    let listed = pr.pathways.clone().unwrap_or_else(default_pathways);
    if listed.is_empty() {
        e.push(
            "projection.pathways",
            "no pathways are listed",
            format!("list one or more of: {}", known.join(", ")),
        );
    }
    let mut out = Vec::new();
    for (i, name) in listed.iter().enumerate() {
        let field = format!("projection.pathways[{i}]");
        if let Some((_, p)) = user.iter().find(|(n, _)| n == name) {
            out.push(PathwaySpec::with_default_warming(p.clone(), &observed));
            continue;
        }
        if BUILTIN_NAMES.contains(&name.as_str()) {
            match Pathway::builtin(name) {
                Ok(p) => out.push(PathwaySpec::with_default_warming(p, &observed)),
                Err(err) => e.push(&field, err.to_string(), ""),
            }
            continue;
        }
        if known.iter().any(|k| k == name) {
            continue; // a user pathway with its own error, reported above
        }
        let help = match known.iter().find(|k| k.eq_ignore_ascii_case(name)) {
            Some(k) => format!("did you mean `{k}`? (names are case-sensitive)"),
            None => match did_you_mean(name, known.iter().map(String::as_str)) {
                Some(k) => format!("did you mean `{k}`? valid pathways: {}", known.join(", ")),
                None => format!(
                    "valid pathways: {} (or define your own in [[projection.user_pathways]])",
                    known.join(", ")
                ),
            },
        };
        e.push(&field, format!("unknown pathway `{name}`"), help);
    }
    apply_sst_changes(e, &mut out, &observed);
    out
}

/// Plausible range of a stated SST change, 2081–2100 relative to 1995–2014, °C (wider than
/// any AR6 pathway's very likely range of global-mean SST change, to allow regional values).
const SST_CHANGE_RANGE_C: (f64, f64) = (-1.0, 6.0);

/// Applies `[[projection.sst_change]]`: the site's own warming for listed pathways.
fn apply_sst_changes(e: &mut Errors<'_>, specs: &mut [PathwaySpec], observed: &Observed) {
    let changes = e.loaded.site.projection.sst_change.clone();
    for (i, c) in changes.iter().enumerate() {
        let field = format!("projection.sst_change[{i}]");
        let (lo, hi) = SST_CHANGE_RANGE_C;
        if !c.change_c.is_finite() || !(lo..=hi).contains(&c.change_c) {
            e.push(
                &format!("{field}.change_c"),
                format!(
                    "SST change {} degC is outside {lo} to {hi} degC",
                    c.change_c
                ),
                "give the change of the 2081-2100 mean relative to 1995-2014 in degC",
            );
            continue;
        }
        if c.source.trim().is_empty() {
            e.push(
                &format!("{field}.source"),
                "the SST change has no source",
                "name the regional projection or study the value comes from",
            );
            continue;
        }
        if changes.iter().take(i).any(|o| o.pathway == c.pathway) {
            e.push(
                &format!("{field}.pathway"),
                format!("pathway `{}` has a second SST change", c.pathway),
                "give one sst_change per pathway",
            );
            continue;
        }
        match specs.iter_mut().find(|s| s.pathway.name == c.pathway) {
            Some(spec) => {
                spec.warming = Warming::stated(&spec.pathway, observed, c.change_c, &c.source);
            }
            None => e.push(
                &format!("{field}.pathway"),
                format!(
                    "pathway `{}` is not among the projected pathways",
                    c.pathway
                ),
                format!(
                    "use one of: {}",
                    specs
                        .iter()
                        .map(|s| s.pathway.name.as_str())
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            ),
        }
    }
}

/// The pathways used when `[projection] pathways` is not given.
pub fn default_pathways() -> Vec<String> {
    ["SSP1-2.6", "SSP2-4.5", "SSP5-8.5"]
        .iter()
        .map(|s| s.to_string())
        .collect()
}

/// Checks `[projection] horizon_years` (or the default years after the last sample).
fn check_years(e: &mut Errors<'_>) -> Vec<i32> {
    let pr = &e.loaded.site.projection;
    let (lo, hi) = HORIZON_YEAR_RANGE;
    let mut prev_year = i32::MIN;
    for (i, y) in pr.horizon_years.iter().enumerate() {
        let path = format!("projection.horizon_years[{i}]");
        if !(lo..=hi).contains(y) {
            e.push(
                &path,
                format!("horizon year {y} is outside {lo}–{hi}"),
                "list years such as [2030, 2050, 2070, 2100]",
            );
        } else if *y <= prev_year {
            e.push(
                &path,
                format!("horizon year {y} is not after {prev_year}"),
                "list horizon years in increasing order, each once",
            );
        }
        prev_year = *y;
    }
    let last = e.loaded.last_sample_year();
    let mut years = horizon_years_or_default(&pr.horizon_years, last);
    // The plan's end year is projected too: the report shows each site at the end of its
    // project before the long horizons.
    if let Some(end) = e.loaded.site.plan.project_end_year
        && end > last
        && (lo..=hi).contains(&end)
        && !years.contains(&end)
    {
        years.push(end);
        years.sort_unstable();
    }
    if years.is_empty() {
        e.push(
            "projection.horizon_years",
            format!("no horizon years after the last sample ({last})"),
            "list years explicitly, e.g. horizon_years = [2030, 2050, 2100]",
        );
    }
    years
}

/// Checks `[projection] members`.
fn check_members(e: &mut Errors<'_>) {
    let members = e.loaded.site.projection.members;
    if members == 0 {
        e.push(
            "projection.members",
            "0 ensemble members",
            "e.g. members = 1000",
        );
    } else if members > MAX_MEMBERS {
        e.push(
            "projection.members",
            format!("{members} ensemble members exceed the outlook's limit of {MAX_MEMBERS}"),
            "1000 members give stable 5-95 % quantiles",
        );
    }
}

/// Checks `[calcification] relationships` and builds the calcification settings.
fn check_calcification(e: &mut Errors<'_>) -> Option<CalcificationSettings> {
    let site_file = &e.loaded.site;
    let ids = &site_file.calcification.relationships;
    let known: Vec<&str> = builtin_relationships().iter().map(|r| r.id).collect();
    let mut ok = true;
    for (i, id) in ids.iter().enumerate() {
        let field = format!("calcification.relationships[{i}]");
        if id.trim().is_empty() {
            e.push(&field, "empty relationship id", "remove the empty entry");
            ok = false;
        } else if !known.contains(&id.trim()) {
            let hint = did_you_mean(id.trim(), known.iter().copied())
                .map(|s| format!("did you mean `{s}`? "))
                .unwrap_or_default();
            e.push(
                &field,
                format!(
                    "unknown calcification relationship \"{id}\" (known: {})",
                    known.join(", ")
                ),
                format!("{hint}known ids: {}", known.join(", ")),
            );
            ok = false;
        }
    }
    if !ok {
        return None;
    }
    // An absolute rate only when the site measured one (never a global default).
    match CalcificationSettings::from_site(
        site_file.baseline.net_calcification_kg_m2_yr,
        site_file.baseline.source.as_deref(),
        ids,
    ) {
        Ok(s) => Some(s),
        Err(m) => {
            e.push("calcification", m, "");
            None
        }
    }
}

/// Checks `[calcification.measured_nec]`; every problem is reported at its key.
fn check_measured_nec(e: &mut Errors<'_>) -> Option<SiteNec> {
    let spec = e.loaded.site.calcification.measured_nec.as_ref()?;
    match site_nec(spec) {
        Ok(nec) => Some(nec),
        Err(problems) => {
            for p in problems {
                e.push(
                    &format!("calcification.measured_nec.{}", p.key),
                    p.message,
                    p.help,
                );
            }
            None
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every 5 years from the first multiple of 5 after the last record, to 2100 (worked
    /// arithmetic: after 2024 the first is 2025, 16 years to 2100; after 2025 it is 2030).
    #[test]
    fn default_horizon_is_every_five_years_to_2100() {
        let y = horizon_years_or_default(&[], 2024);
        assert_eq!(y.first(), Some(&2025));
        assert_eq!(y.last(), Some(&2100));
        assert_eq!(y.len(), 16);
        assert_eq!(horizon_years_or_default(&[], 2025).first(), Some(&2030));
        assert_eq!(horizon_years_or_default(&[2040], 2025), vec![2040]);
    }
}
