//! What a comparison rests on, in words: each site's plan, the basis of its data, the calendar
//! months of the season it is compared in, and the one like-for-like sentence of the first
//! page.

use serde_json::{Value, json};

use crate::report::fmt;
use crate::report::model::{DataBasis, ReportModel, SitePlan, SiteReport};
use crate::report::ranking::{
    RankEntry, chance_below, chemistry_year, evaluation_year, heat_year, limiting_omega,
    ranking_pathway,
};
use crate::site::schema::MONTH_NAMES;

fn month_name(m: u32) -> &'static str {
    MONTH_NAMES
        .get((m as usize).wrapping_sub(1))
        .copied()
        .unwrap_or("?")
}

/// Months as a reader writes them: "Oct", "May–Oct", "Nov–Apr" (a run across the new year),
/// "all year", else a list.
pub(super) fn months_span(months: &[u32]) -> String {
    let n = months.len();
    if n == 12 {
        return "all year".to_string();
    }
    let consecutive = months.windows(2).all(|w| w[1] == w[0] % 12 + 1);
    match (months.first(), months.last()) {
        (Some(a), _) if n == 1 => month_name(*a).to_string(),
        (Some(a), Some(b)) if consecutive => format!("{}–{}", month_name(*a), month_name(*b)),
        _ => months
            .iter()
            .map(|m| month_name(*m))
            .collect::<Vec<_>>()
            .join(", "),
    }
}

/// The months of a site's limiting season (numbers; empty when unknown).
pub(super) fn limiting_months(site: &SiteReport) -> Vec<u32> {
    let season = site.limiting_season().unwrap_or_default();
    site.coverage
        .seasons
        .iter()
        .find(|s| s.season == season)
        .map(|s| s.month_numbers.clone())
        .unwrap_or_default()
}

/// "2024" or "2021–2024".
fn years_text(first: Option<i32>, last: Option<i32>) -> Option<String> {
    match (first, last) {
        (Some(a), Some(b)) if a == b => Some(a.to_string()),
        (Some(a), Some(b)) => Some(format!("{a}–{b}")),
        _ => None,
    }
}

/// The calendar years of the limiting season's records, e.g. "2024".
pub(super) fn season_years(site: &SiteReport) -> String {
    let season = site.limiting_season().unwrap_or_default();
    let year = |d: &Option<String>| d.as_ref().and_then(|d| d.get(..4)?.parse::<i32>().ok());
    site.coverage
        .seasons
        .iter()
        .find(|s| s.season == season)
        .and_then(|s| years_text(year(&s.first_date), year(&s.last_date)))
        .unwrap_or_else(|| fmt::MISSING.to_string())
}

/// A whole count with thousands separators: 8760 → "8,760".
fn count(n: usize) -> String {
    let digits = n.to_string();
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
}

/// The plan in one line: window, target groups, out-planting area, coral cover.
pub(super) fn plan_text(p: &SitePlan) -> String {
    let mut parts = Vec::new();
    match (p.start_year, p.end_year) {
        (Some(a), Some(b)) => parts.push(format!("{a}–{b}")),
        (None, Some(b)) => parts.push(format!("to {b}")),
        (Some(a), None) => parts.push(format!("from {a}")),
        (None, None) => parts.push("no project years given".to_string()),
    }
    if !p.target_groups.is_empty() {
        parts.push(p.target_groups.join(", "));
    }
    if let Some(a) = p.outplanting_area_m2 {
        parts.push(format!(
            "{} m² out-planted",
            count(a.round().max(0.0) as usize)
        ));
    }
    if let Some(c) = p.coral_cover_fraction {
        parts.push(format!("coral cover {} %", fmt::number(100.0 * c, 0)));
    }
    parts.join("; ")
}

/// The data basis in one line: records by kind, years, how TA was obtained.
pub(super) fn basis_text(b: &DataBasis) -> String {
    let mut kinds = Vec::new();
    if b.bottle_used > 0 {
        kinds.push(format!("{} bottle samples", count(b.bottle_used)));
    }
    if b.sensor_used > 0 {
        kinds.push(format!("{} sensor readings", count(b.sensor_used)));
    }
    if kinds.is_empty() {
        kinds.push("no records used".to_string());
    }
    let mut text = kinds.join(" + ");
    if let Some(y) = years_text(b.first_year, b.last_year) {
        text.push_str(&format!(", {y}"));
    }
    let ta = match (b.ta_measured, b.ta_estimated) {
        (0, 0) => "TA not used (pairs without TA)".to_string(),
        (_, 0) => "TA measured".to_string(),
        (0, _) => "TA estimated from salinity".to_string(),
        (m, e) => format!(
            "TA measured in {}, estimated from salinity in {}",
            count(m),
            count(e)
        ),
    };
    format!("{text}; {ta}")
}

/// One row of the plan-and-data table (ranking order).
pub(super) fn plan_row(site: &SiteReport) -> Value {
    json!({
        "site": site.name,
        "plan": plan_text(&site.plan),
        "basis": basis_text(&site.data_basis),
    })
}

/// The like-for-like sentence: how the sites' seasons were put on one basis.
pub(super) fn like_for_like(model: &ReportModel, ranked: &[RankEntry]) -> String {
    let mut shared: Option<Vec<u32>> = None;
    let mut parts = Vec::new();
    for e in ranked {
        let Some(site) = model.sites.get(e.site) else {
            continue;
        };
        let months = limiting_months(site);
        let season = site.limiting_season().unwrap_or_default();
        let span = months_span(&months);
        parts.push(if span == season {
            format!("{} {span}", site.name)
        } else {
            format!("{} {season} ({span})", site.name)
        });
        shared = Some(match shared {
            None => months,
            Some(s) => s.into_iter().filter(|m| months.contains(m)).collect(),
        });
    }
    let shared = shared.unwrap_or_default();
    let common = if shared.is_empty() {
        "these seasons share no calendar month".to_string()
    } else {
        format!(
            "every one of them includes {}",
            shared
                .iter()
                .map(|m| month_name(*m))
                .collect::<Vec<_>>()
                .join(", ")
        )
    };
    format!(
        "Like-for-like basis: the sites define their seasons differently, so each site's \
         seasons are mapped onto calendar months and each is compared in its limiting season \
         (lowest present-day mean Ω_ar): {}; {common}. A shorter season averages less of the \
         year, so its mean can sit lower.",
        parts.join("; ")
    )
}

/// The one-site verdict in a sentence: the limiting season's mean Ω_ar at the project's end
/// year under the middle (ranking) pathway, the chance it lies below the key level, and the
/// first limit.
pub(super) fn verdict_sentence(model: &ReportModel, site: &SiteReport) -> Option<String> {
    let pathway = ranking_pathway(model)?;
    let year = evaluation_year(site, &model.horizons)?;
    let season = site.limiting_season()?;
    let q = limiting_omega(site, &pathway.id, year)?;
    let when = if site.plan.end_year == Some(year) {
        format!("at the project's end year, {year}")
    } else {
        format!("in {year}")
    };
    let chance = chance_below(site, &pathway.id, year)
        .map(|p| {
            format!(
                ", with a {} % chance of lying below {}",
                fmt::number(p, 0),
                fmt::level(crate::report::ranking::KEY_OMEGA_LEVEL)
            )
        })
        .unwrap_or_default();
    let first = super::comparison::first_limit_text(
        chemistry_year(site, &pathway.id),
        heat_year(site, &pathway.id),
        site.thermal.is_some(),
    );
    Some(format!(
        "Under {}, the {season} season's mean Ω_ar {when} is {} ({}){chance}; its first limit \
         (Ω_ar below {} or DHW ≥ 8 °C-weeks in most years) is {first}.",
        pathway.label,
        fmt::omega(q.p50),
        fmt::range(&fmt::omega(q.p05), &fmt::omega(q.p95)),
        fmt::level(crate::report::ranking::KEY_OMEGA_LEVEL),
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn months_are_written_as_spans() {
        assert_eq!(months_span(&[10]), "Oct");
        assert_eq!(months_span(&[5, 6, 7, 8, 9, 10]), "May–Oct");
        // A run across the new year.
        assert_eq!(months_span(&[11, 12, 1, 2, 3, 4]), "Nov–Apr");
        assert_eq!(months_span(&[1, 3]), "Jan, Mar");
        assert_eq!(months_span(&(1..=12).collect::<Vec<_>>()), "all year");
    }

    #[test]
    fn counts_plan_and_basis_read_as_words() {
        assert_eq!(count(8760), "8,760");
        assert_eq!(count(36), "36");
        let p = SitePlan {
            start_year: Some(2026),
            end_year: Some(2036),
            target_groups: vec!["massive Porites".into()],
            outplanting_area_m2: Some(2500.0),
            coral_cover_fraction: Some(0.15),
        };
        assert_eq!(
            plan_text(&p),
            "2026–2036; massive Porites; 2,500 m² out-planted; coral cover 15 %"
        );
        let b = DataBasis {
            bottle_used: 24,
            sensor_used: 8760,
            first_year: Some(2023),
            last_year: Some(2024),
            ta_measured: 24,
            ta_estimated: 8760,
        };
        assert_eq!(
            basis_text(&b),
            "24 bottle samples + 8,760 sensor readings, 2023–2024; TA measured in 24, \
             estimated from salinity in 8,760"
        );
    }
}
