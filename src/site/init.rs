//! Templates written by `calcisite init DIR`: a commented site file and a record CSV with the
//! canonical header. `check` accepts them as soon as the CSV has rows of real numbers and the
//! placeholder site values are replaced.

use std::io::Write;
use std::path::{Path, PathBuf};

use crate::diag::{Diagnostic, Diagnostics};

/// File name of the site template.
pub const SITE_FILE: &str = "site.toml";
/// File name of the record template.
pub const RECORD_FILE: &str = "records.csv";

/// Header of the record template: the canonical column names (see docs/site-format.md).
pub const RECORD_HEADER: &str =
    "date,station,depth_m,temp_c,salinity,ta,dic,ph_t,pco2,silicate,phosphate\n";

/// The commented site template.
pub fn site_template() -> String {
    format!(
        r#"# Site description for calcisite (every key is explained in docs/site-format.md).
# Replace the placeholder values below with your site's; keep the units in the key names.

[site]
name = "Candidate site"            # a short name used in tables and reports
region = "Region, country"         # free text
latitude_deg = 0.0                 # decimal degrees, north positive (-90 to 90)
longitude_deg = 0.0                # decimal degrees, east positive (-180 to 180)
depth_min_m = 2.0                  # shallowest planted depth, m
depth_max_m = 8.0                  # deepest planted depth, m
habitat = "fore-reef slope"        # reef zone or habitat, free text
area_m2 = 10000.0                  # area of the candidate site, m²
utc_offset = "+00:00"              # offset of local time from UTC for record times without one

[plan]
outplanting_area_m2 = 500.0
target_groups = ["branching corals"]
project_start_year = 2026
project_end_year = 2035

[baseline]
# Present net community calcification and live coral cover, if known. Without a rate the
# global-average reef calcification of 1.5 kg CaCO3 m-2 yr-1 (Andersson, Bates & Mackenzie 2007)
# is used.
# net_calcification_kg_m2_yr = 1.5
# coral_cover_fraction = 0.25

# One [[records]] table per CSV file. Paths are relative to this file.
[[records]]
path = "{RECORD_FILE}"
kind = "bottle"                    # "bottle" (lab samples) or "sensor" (logged series)
date_format = "iso"                # "iso", "day-first" or "month-first"
# station = "S1"                   # one station name for every row (overrides a station column)
# missing = ["-999"]               # extra cell values that mean "no value"
# Map your headers to the quantities when they differ from the canonical names:
# [records.columns]
# ta = "Alkalinity"
# [records.units]
# ta = "umol/kg"                   # "umol/kg", "umol/L" or "mmol/kg" (also dic, silicate, phosphate)
# ph = "total"                     # "total", "sws", "free" or "nbs"
# co2 = "pco2_uatm"                # "pco2_uatm", "fco2_uatm" or "xco2_ppm"

# Seasons: leave out for calendar months, or name seasons and list their months (1-12),
# each month in exactly one season.
# [seasons]
# wet = [11, 12, 1, 2, 3, 4]
# dry = [5, 6, 7, 8, 9, 10]

[projection]
pathways = ["SSP1-2.6", "SSP2-4.5", "SSP5-8.5"]
# horizon_years = [2030, 2050, 2070, 2100]   # default: every 5 years to 2100
disequilibrium = "ratio"           # "ratio", "additive" or "source offsets"
warming = true
members = 1000
seed = 20240601

[uncertainty]
ta_umol_kg = 2.0
dic_umol_kg = 2.0
ph = 0.01
pco2_pct = 0.5

[thresholds]
omega_ar_optimal_min = 4.0
omega_ar_adequate_min = 3.5
omega_ar_marginal_min = 3.0

[chemistry]
carbonic_acid = "lueker2000"       # K1, K2 of carbonic acid
total_boron = "lee2010"            # total boron to salinity ratio
hydrogen_fluoride = "pf87"         # KF

[report]
title = "Carbonate chemistry screening"
prepared_for = ""
prepared_by = ""
"#
    )
}

/// Writes both templates into `dir` (created if missing). Refuses to overwrite an existing
/// file; each file is written to a temporary file in `dir` and renamed into place.
pub fn write_templates(dir: &Path) -> Result<Vec<PathBuf>, Diagnostics> {
    let site = dir.join(SITE_FILE);
    let rec = dir.join(RECORD_FILE);
    let mut errs = Diagnostics::new();
    for p in [&site, &rec] {
        if p.exists() {
            errs.push(
                Diagnostic::error(format!(
                    "{} already exists; nothing was written",
                    p.display()
                ))
                .with_file(p)
                .with_help("choose an empty or new folder; init never overwrites files"),
            );
        }
    }
    if errs.has_errors() {
        return Err(errs);
    }
    std::fs::create_dir_all(dir).map_err(|e| {
        Diagnostics::from(
            Diagnostic::error(format!("cannot create {}: {e}", dir.display()))
                .with_file(dir)
                .with_help("check the path and permissions"),
        )
    })?;
    let mut written = Vec::new();
    for (p, content) in [(&site, site_template()), (&rec, RECORD_HEADER.to_string())] {
        if let Err(e) = write_new(dir, p, content.as_bytes()) {
            // Leave nothing half-done: remove what this call wrote.
            for w in &written {
                let _ = std::fs::remove_file(w);
            }
            return Err(Diagnostics::from(
                Diagnostic::error(format!("cannot write {}: {e}", p.display()))
                    .with_file(p)
                    .with_help("check the path and permissions; init never overwrites files"),
            ));
        }
        written.push(p.clone());
    }
    Ok(written)
}

fn write_new(dir: &Path, path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let mut tmp = tempfile::NamedTempFile::new_in(dir)?;
    tmp.write_all(bytes)?;
    tmp.as_file().sync_all()?;
    tmp.persist_noclobber(path).map_err(|e| e.error)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn template_parses_as_a_site_file() {
        let text = site_template();
        let r = super::super::spans::parse_site_text(Path::new("site.toml"), &text);
        assert!(r.is_ok(), "{:?}", r.err());
    }

    #[test]
    fn refuses_to_overwrite() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let target = dir.path().join(SITE_FILE);
        std::fs::write(&target, "keep me").unwrap_or_else(|e| panic!("{e}"));
        let e = write_templates(dir.path())
            .err()
            .unwrap_or_else(|| panic!("overwrote"))
            .to_string();
        assert!(
            e.contains("site.toml already exists; nothing was written"),
            "{e}"
        );
        assert_eq!(
            std::fs::read_to_string(&target).unwrap_or_default(),
            "keep me"
        );
        assert!(!dir.path().join(RECORD_FILE).exists());
    }
}
