//! The comparison's first page as a funder reads it (part of the `report_pdf` tests; helpers in
//! the parent): each site at its project's end year, ties worked out here from `calcisite
//! project`'s numbers by the rule the page states, the like-for-like season basis, and each
//! site's plan and data basis as its site file gives them.

use super::heat::first_page;
use super::*;

/// The ranking pathway of the demo comparison: the middle of the three pathways every demo
/// site projects (SSP1-2.6, SSP2-4.5, SSP5-8.5).
const RANKING: &str = "SSP2-4.5";

fn end_year(site: &str) -> i64 {
    site_toml(site)["plan"]["project_end_year"]
        .as_integer()
        .expect("plan.project_end_year")
}

/// The end-year (p05, p50, p95) of a site's limiting season under the ranking pathway, from
/// `project`.
fn end_quantiles(site: &str) -> [f64; 3] {
    let proj = projection_of(site);
    let q = quantiles(
        proj,
        RANKING,
        &limiting_season(proj),
        "omega_ar",
        end_year(site),
    );
    [q[0], q[2], q[4]]
}

/// The tie rule the page states, worked out here: the normal distribution's one-sided 95 %
/// point is 1.645 (any table of the standard normal), so a 5–95 % range spans 3.29 standard
/// deviations and two medians tie when their difference is below 1.645 × √(s₁² + s₂²).
fn ties(a: [f64; 3], b: [f64; 3]) -> bool {
    let s = |q: [f64; 3]| (q[2] - q[0]) / 3.29;
    (a[1] - b[1]).abs() < 1.645 * (s(a).powi(2) + s(b).powi(2)).sqrt()
}

#[test]
fn first_page_shows_every_site_at_its_projects_end_year() {
    let r = comparison();
    let page = first_page(r);
    for site in ALL {
        let y = end_year(site);
        assert!(
            page.contains(&squeeze(&format!("{y} (plan end)"))),
            "first page lacks the end year {y} of {site}"
        );
        // The end-year median and its 5–95 % range as `project` gives them.
        let [lo, mid, hi] = end_quantiles(site);
        let d = PROJECT_DECIMALS_OMEGA;
        let found = shown_as(mid, d, &fmt::omega).iter().any(|m| {
            shown_as(lo, d, &fmt::omega).iter().any(|l| {
                shown_as(hi, d, &fmt::omega)
                    .iter()
                    .any(|h| page.contains(&squeeze(&format!("{m}{}", fmt::range(l, h)))))
            })
        });
        assert!(
            found,
            "{site}: end-year cell {mid} ({lo}–{hi}) not on page 1"
        );
    }
    // The rule that uses it is stated on page 1.
    assert!(page.contains(&squeeze(
        "comes by its project's end year ranks after the others"
    )));
}

#[test]
fn sites_within_the_stated_rule_share_a_marked_rank() {
    let r = comparison();
    let page = first_page(r);
    // The rule as the report states it, with the numbers this test uses.
    r.assert_has("by less than 1.645 × √(s₁² + s₂²)", "tie rule");
    r.assert_has("/ 3.29 for each site", "tie rule");
    let q: Vec<[f64; 3]> = ALL.iter().map(|s| end_quantiles(s)).collect();
    let mut tied_pairs = 0;
    for i in 0..ALL.len() {
        for j in i + 1..ALL.len() {
            if ties(q[i], q[j]) {
                tied_pairs += 1;
            }
        }
    }
    // The demo was built so that two sites tie and one does not: the lagoon and the fore-reef
    // end 2036 close together, the pass well below both.
    assert!(
        ties(q[0], q[1]),
        "fore-reef and lagoon: {:?} {:?}",
        q[0],
        q[1]
    );
    assert!(!ties(q[0], q[2]) && !ties(q[1], q[2]), "{q:?}");
    assert_eq!(tied_pairs, 1);
    // Both tied sites carry "=1" before their name; the pass, ranked alone, "3".
    for (site, mark) in [(FOREREEF, "=1"), (LAGOON, "=1"), (PASS, "3")] {
        let name = site_toml(site)["site"]["name"]
            .as_str()
            .expect("site name")
            .to_string();
        let first_word_run: String = squeeze(&name).chars().take(12).collect();
        let key = format!("{mark}{first_word_run}");
        assert!(
            page.contains(&key),
            "{site}: {key:?} not on page 1:\n{page}"
        );
    }
    assert_eq!(
        page.matches("=1TalaVesi").count(),
        2,
        "two sites share rank 1"
    );
}

/// The months of a season as the report writes them: a run "May–Oct" or one month.
fn months_text(months: &[i64]) -> String {
    const NAMES: [&str; 12] = [
        "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
    ];
    let name = |m: i64| NAMES[(m - 1) as usize];
    match months {
        [m] => name(*m).to_string(),
        [a, .., b] => format!("{}–{}", name(*a), name(*b)),
        [] => String::new(),
    }
}

#[test]
fn first_page_states_the_like_for_like_season_basis() {
    let r = comparison();
    let page = first_page(r);
    assert!(page.contains(&squeeze(
        "Like-for-like basis: the sites define their seasons differently, so each site's \
         seasons are mapped onto calendar months"
    )));
    // Each site's limiting season with its calendar months from the site file (a site without
    // [seasons] has one season per month, named by the month), and the months all share.
    let mut shared: Option<Vec<i64>> = None;
    for site in ALL {
        let season = limiting_season(projection_of(site));
        let months: Vec<i64> = match site_toml(site).get("seasons") {
            Some(t) => t[season.as_str()]
                .as_array()
                .expect("season months")
                .iter()
                .map(|m| m.as_integer().expect("month"))
                .collect(),
            None => {
                let names = [
                    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov",
                    "Dec",
                ];
                vec![
                    names
                        .iter()
                        .position(|n| *n == season)
                        .expect("month season") as i64
                        + 1,
                ]
            }
        };
        let shown = months_text(&months);
        let expected = if shown == season {
            season.clone()
        } else {
            format!("{season} ({shown})")
        };
        assert!(page.contains(&squeeze(&expected)), "{site}: {expected:?}");
        shared = Some(match shared {
            None => months,
            Some(s) => s.into_iter().filter(|m| months.contains(m)).collect(),
        });
    }
    // Dry May–Oct, upwelling Jul–Oct and the fore-reef's October share October.
    assert_eq!(shared, Some(vec![10]));
    assert!(page.contains(&squeeze("every one of them includes Oct")));
    // One sentence says what the ranges are.
    assert!(page.contains(&squeeze(
        "5–95 % of the ensemble, the uncertainty of the season"
    )));
}

#[test]
fn first_page_prints_each_sites_plan_and_data_basis() {
    let page = first_page(comparison());
    for site in ALL {
        let t = site_toml(site);
        let plan = &t["plan"];
        let window = format!(
            "{}–{}",
            plan["project_start_year"].as_integer().expect("start"),
            plan["project_end_year"].as_integer().expect("end")
        );
        assert!(page.contains(&squeeze(&window)), "{site}: window {window}");
        for g in plan["target_groups"].as_array().expect("groups") {
            let g = g.as_str().expect("group");
            assert!(page.contains(&squeeze(g)), "{site}: target group {g}");
        }
        // 2500.0 m² → "2,500 m²".
        let area = plan["outplanting_area_m2"].as_float().expect("area") as i64;
        let area = if area >= 1000 {
            format!("{},{:03} m²", area / 1000, area % 1000)
        } else {
            format!("{area} m²")
        };
        assert!(page.contains(&squeeze(&area)), "{site}: area {area}");
        let cover = t["baseline"]["coral_cover_fraction"]
            .as_float()
            .expect("cover");
        let cover = format!("coral cover {} %", (cover * 100.0).round() as i64);
        assert!(page.contains(&squeeze(&cover)), "{site}: {cover}");
    }
    // The lagoon's sensor series takes its TA from the salinity relationship; the others'
    // bottles measure it (demo-data/README.md).
    assert!(page.contains(&squeeze("sensor readings")));
    assert!(page.contains(&squeeze("estimated from salinity")));
    assert!(page.contains(&squeeze("36 bottle samples, 2024; TA measured")));
}
