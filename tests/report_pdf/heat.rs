//! The thermal-stress part of the report (part of the `report_pdf` tests; helpers in the
//! parent): the section of a demo site with the MMM and source its site file states, the
//! first page's chemistry and heat years per pathway against `calcisite project`'s own tables
//! for the same site, and the ranking's stated rule.

use super::*;

/// One-site report of the fore-reef, the demo site that states its MMM.
fn forereef() -> &'static Report {
    static R: OnceLock<Report> = OnceLock::new();
    R.get_or_init(|| render(&[FOREREEF], &[], &[]))
}

/// `calcisite project SITE --table TABLE --format csv`: the header and the rows, split at
/// commas (none of these tables quotes a field).
pub(super) fn project_table(site: &str, table: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let o = calcisite()
        .args(["project", site, "--table", table, "--format", "csv", "-q"])
        .output()
        .expect("run calcisite project");
    assert!(o.status.success(), "project --table {table}:\n{}", show(&o));
    let text = String::from_utf8(o.stdout).expect("UTF-8 CSV");
    let mut lines = text.lines();
    let split = |l: &str| l.split(',').map(str::to_string).collect::<Vec<_>>();
    let header = split(lines.next().expect("header"));
    (header, lines.map(split).collect())
}

pub(super) fn column(header: &[String], name: &str) -> usize {
    header
        .iter()
        .position(|h| h == name)
        .unwrap_or_else(|| panic!("no column {name} in {header:?}"))
}

/// The first page's text, white space removed.
pub(super) fn first_page(report: &Report) -> String {
    let pages = pdf_extract::extract_text_from_mem_by_pages(&report.pdf).expect("PDF pages");
    squeeze(pages.first().expect("a first page"))
}

#[test]
fn thermal_section_shows_the_mmm_and_source_the_site_file_states() {
    let r = forereef();
    let toml = site_toml(FOREREEF);
    let thermal = &toml["thermal"];
    let mmm = thermal["mmm_c"]
        .as_float()
        .expect("the fore-reef states mmm_c");
    let source = thermal["mmm_source"].as_str().expect("mmm_source");
    let period: Vec<i64> = thermal["mmm_base_period"]
        .as_array()
        .expect("mmm_base_period")
        .iter()
        .map(|v| v.as_integer().expect("year"))
        .collect();
    assert_in_order(
        r,
        &[
            "Calcification outlook",
            "Thermal stress",
            "MMM",
            &format!("{} °C", fmt::mmm(mmm)),
            source,
            &format!("base period {}–{}", period[0], period[1]),
            "Adaptation allowance",
            "Annual maximum DHW per pathway",
            "Assumptions of the heat-stress outlook",
            "Methods",
        ],
        "fore-reef thermal section",
    );
    // Plain levels in numbers, and the assumptions in words.
    for s in [
        "DHW ≥ 4 °C-weeks, significant stress",
        "DHW ≥ 8 °C-weeks, severe stress",
        "The MMM stays fixed over the projection unless an adaptation allowance is set",
        "changes in variability",
        "satellite sea-surface temperature",
    ] {
        r.assert_has(s, "thermal section");
    }
    // A stated MMM is not called an estimate from the record.
    assert!(!r.has("estimated from this site's own record"));
    // The observed years' maxima are those of `project --table heat`, as the report rounds.
    let (header, rows) = project_table(FOREREEF, "heat");
    let (kind, year, p50) = (
        column(&header, "row"),
        column(&header, "year"),
        column(&header, "max_dhw_p50_degc_weeks"),
    );
    let observed: Vec<String> = rows
        .iter()
        .filter(|row| row[kind] == "observed")
        .map(|row| {
            let v: f64 = row[p50].parse().expect("DHW");
            format!("{}: {}", row[year], fmt::dhw(v))
        })
        .collect();
    assert!(observed.len() >= 3, "{observed:?}");
    for o in &observed {
        r.assert_has(o, "observed annual maximum DHW");
    }
    // The sentence that sent readers to `project` for the heat numbers is gone; the caution
    // stays.
    assert!(!r.has("not yet shown in this report"));
    for c in CAUTION {
        r.assert_has(c, "caution");
    }
}

#[test]
fn first_page_sets_chemistry_and_heat_years_per_pathway_as_project_gives_them() {
    let page = first_page(forereef());
    assert!(page.contains(&squeeze("First limits: chemistry and heat stress")));
    let proj = projection_of(FOREREEF);
    let season = limiting_season(proj);
    let last = proj["settings"]["horizon_years"]
        .as_array()
        .and_then(|a| a.last())
        .and_then(Value::as_i64)
        .expect("last horizon year");
    let (h, heat) = project_table(FOREREEF, "heat");
    let (kind, pathway, onset) = (
        column(&h, "row"),
        column(&h, "pathway"),
        column(&h, "severe_most_years_from_p50"),
    );
    let (c, crossings) = project_table(FOREREEF, "crossings");
    let (cp, cs, ct) = (
        column(&c, "pathway"),
        column(&c, "season"),
        column(&c, "threshold"),
    );
    let (cy, cm) = (column(&c, "first_year_p50"), column(&c, "met_at_baseline"));
    let (c05, c95) = (column(&c, "first_year_p05"), column(&c, "first_year_p95"));
    // Members below the level as sampled cross in the latest sampling year: "now".
    let sampled = proj["seasons"]
        .as_array()
        .and_then(|g| g.iter().find(|g| g["label"] == season.as_str()))
        .and_then(|g| g["sample_year_max"].as_i64())
        .expect("the limiting season's latest sampling year")
        .to_string();
    let onsets: Vec<&Vec<String>> = heat.iter().filter(|r| r[kind] == "onset").collect();
    assert_eq!(
        onsets.len(),
        pathway_names(proj).len(),
        "one onset per pathway"
    );
    // The first page's table: a column per pathway (in `project`'s order, lowest emissions
    // first), a row for the chemistry year and a row for the heat year.
    let (mut names, mut chem_row, mut heat_row) = (Vec::new(), Vec::new(), Vec::new());
    for row in onsets {
        let name = &row[pathway];
        names.push(name.clone());
        heat_row.push(if row[onset].is_empty() {
            format!("not by {last}")
        } else {
            row[onset].clone()
        });
        // The limiting season's crossing of Ω_ar 3.0, as `project` gives it.
        let x = crossings
            .iter()
            .find(|r| &r[cp] == name && r[cs] == season && r[ct] == "3.00")
            .unwrap_or_else(|| panic!("no 3.0 crossing for {name} {season}"));
        let median = if x[cm] == "true" {
            "already below".to_string()
        } else if x[cy].is_empty() {
            format!("not by {last}")
        } else {
            x[cy].clone()
        };
        // The range of 90 % of members: from the 5 % to the 95 % member's year.
        let early = match x[c05].as_str() {
            "" => format!("after {last}"),
            y if y <= sampled.as_str() => "now".to_string(),
            y => y.to_string(),
        };
        let late = match x[c95].as_str() {
            "" => format!("after {last}"),
            y if y <= sampled.as_str() => "now".to_string(),
            y => y.to_string(),
        };
        let same = |e: &str| {
            e == median
                || (median == "already below" && e == "now")
                || median == format!("not by {last}") && e == format!("after {last}")
        };
        chem_row.push(if same(&early) && same(&late) {
            median
        } else {
            format!("{median} ({early}–{late})")
        });
    }
    for (what, row) in [
        ("header", format!("First year {}", names.join(" "))),
        ("chemistry row", format!("below 3.0 {}", chem_row.join(" "))),
        (
            "heat row",
            format!("DHW ≥ 8 °C-weeks in most years {}", heat_row.join(" ")),
        ),
    ] {
        assert!(
            page.contains(&squeeze(&row)),
            "first page lacks the {what} {row:?}"
        );
    }
}

#[test]
fn comparison_states_how_chemistry_and_heat_are_combined() {
    let r = comparison();
    r.assert_has(
        "Chemistry and heat count alike: whichever limits a site first decides.",
        "ranking rule",
    );
    // Page 1 gives each site's first limit under the ranking pathway; the table per pathway
    // opens the Site comparison section on the next page.
    let page = first_page(r);
    assert!(page.contains(&squeeze("First limit")));
    r.assert_has("First limits per pathway", "per-pathway limits");
    // Every site has a thermal section.
    let n = r
        .squeezed
        .matches(&squeeze("Annual maximum DHW per pathway"))
        .count();
    assert_eq!(n, ALL.len(), "thermal sections in the comparison");
}
