//! The exposure part of the report (part of the `report_pdf` tests; helpers in the parent
//! and in `heat`): the lagoon's first page states the hours a day below Ω_ar 3.0 at its
//! sensor station in the limiting season, as sampled and at the table years under the
//! ranking pathway, equal to `calcisite project --table exposure` for the same site; the section has its
//! heading; the bottle-only sites say in a sentence that sub-daily data are needed.

use super::heat::{column, first_page, project_table};
use super::*;

#[test]
fn lagoon_first_page_states_hours_a_day_below_three_as_project_gives_them() {
    let r = one();
    let page = first_page(r);
    let proj = projection_of(LAGOON);
    let season = limiting_season(proj);
    let (h, rows) = project_table(LAGOON, "exposure");
    let [path_c, scen_c, year_c, season_c, station_c, thr_c, hours_c] = [
        "pathway",
        "scenario",
        "year",
        "season",
        "station",
        "threshold_omega_ar",
        "hours_per_day_below",
    ]
    .map(|n| column(&h, n));
    // The report prints hours with one decimal; `project` gives two.
    let hours = |pathway: &str, year: &str| -> Vec<String> {
        let row = rows
            .iter()
            .find(|x| {
                x[path_c] == pathway
                    && x[year_c] == year
                    && x[season_c] == season
                    && x[station_c] == "LG1"
                    && x[thr_c] == "3.00"
                    && x[scen_c] == "none"
            })
            .unwrap_or_else(|| panic!("no exposure row {pathway} {year} {season}"));
        let v: f64 = row[hours_c].parse().expect("hours");
        shown_as(v, 2, &|x| fmt::number(x, 1))
    };
    assert!(page.contains(&squeeze("Hours a day below 3.0")), "{page}");
    // The line follows the diel figure's pathway: the ranking pathway, the middle one of the
    // report's pathways (ordered by 2100 CO2, as the site file lists them).
    let names = pathway_names(proj);
    let pathway = &names[(names.len() - 1) / 2];
    let mut steps = vec![
        vec![format!("{season} season, LG1 sensor, {pathway}")],
        hours("", "").iter().map(|n| format!("now {n},")).collect(),
    ];
    for y in horizons(r, proj) {
        let y = y.to_string();
        steps.push(
            hours(pathway, &y)
                .iter()
                .map(|n| format!("{y} {n}"))
                .collect(),
        );
    }
    let mut from = page.find(&squeeze("Hours a day below 3.0")).unwrap_or(0);
    for alternatives in steps {
        let rest = page.get(from..).unwrap_or_default();
        let hit = alternatives
            .iter()
            .filter_map(|a| rest.find(&squeeze(a)).map(|at| at + squeeze(a).len()))
            .min();
        from += hit.unwrap_or_else(|| panic!("{alternatives:?} not found on page 1 in order"));
    }
    // The caution box stays on the first page.
    assert!(
        page.contains(&squeeze("Caution: screening-level estimate")),
        "{page}"
    );
    r.assert_has("Exposure: hours below a level", "exposure section");
}

#[test]
fn bottle_only_sites_say_the_hours_need_sub_daily_data() {
    let r = comparison();
    r.assert_has(
        "need sub-daily data from a sensor series; this site has bottle samples only",
        "bottle-only sentence",
    );
}
