//! The ranking of a comparison as a table for other programs (`report --ranking-out`): one row
//! per ranked site, in ranking order, with the numbers the comparison page shows and the
//! criteria's inputs. CSV or JSON; both give the same numbers (fixed decimals, see
//! [`crate::numfmt`]).

use serde_json::{Value, json};

use super::model::ReportModel;
use super::ranking::{chance_below, limiting_omega, rank_sites, ranking_pathway};
use super::view::crossing_text;

/// Decimals of Ω_ar in the table (the report prints two; the table keeps one more).
const OMEGA_DECIMALS: usize = 3;

/// Where each ranked site came from: its list line and file as listed (indexed like
/// `model.sites`).
pub struct Origins<'a> {
    pub lines: &'a [usize],
    pub files: &'a [String],
}

/// A listed site left out of the ranking, with why.
pub struct LeftOut<'a> {
    pub line: usize,
    pub file: &'a str,
    pub message: &'a str,
}

/// One ranked site's row: header names and cells (empty for a missing value).
fn rows(model: &ReportModel, origins: &Origins<'_>) -> (Vec<String>, Vec<Vec<String>>) {
    let pathway = ranking_pathway(model)
        .map(|p| p.id.clone())
        .unwrap_or_default();
    let mut header: Vec<String> = [
        "rank",
        "line",
        "site",
        "name",
        "file",
        "limiting_season",
        "pathway",
        "tied",
        "present_min_omega_ar",
        "plan_end_year",
        "omega_ar_plan_end_p05",
        "omega_ar_plan_end_median",
        "omega_ar_plan_end_p95",
        "chance_below_3_plan_end_pct",
    ]
    .map(String::from)
    .to_vec();
    for y in &model.horizons {
        for q in ["p05", "median", "p95"] {
            header.push(format!("omega_ar_{y}_{q}"));
        }
    }
    for level in &model.thresholds.levels {
        header.push(format!(
            "first_below_{}",
            crate::numfmt::tidy(*level).replace('.', "_")
        ));
    }
    let num = |v: Option<f64>| {
        v.and_then(|v| crate::numfmt::fixed(v, OMEGA_DECIMALS))
            .unwrap_or_default()
    };
    let mut out = Vec::new();
    for e in &rank_sites(model) {
        let Some(site) = model.sites.get(e.site) else {
            continue;
        };
        let season = site.limiting_season().unwrap_or_default();
        let chance = e.end_year.and_then(|y| chance_below(site, &pathway, y));
        let mut row = vec![
            e.rank.to_string(),
            origins
                .lines
                .get(e.site)
                .map(|l| l.to_string())
                .unwrap_or_default(),
            site.id.clone(),
            site.name.clone(),
            origins.files.get(e.site).cloned().unwrap_or_default(),
            season.to_string(),
            pathway.clone(),
            e.tied.to_string(),
            num(e.now_min),
            e.end_year.map(|y| y.to_string()).unwrap_or_default(),
            num(e.end.map(|q| q.p05)),
            num(e.end.map(|q| q.p50)),
            num(e.end.map(|q| q.p95)),
            chance
                .and_then(|v| crate::numfmt::fixed(v, 1))
                .unwrap_or_default(),
        ];
        for &y in &model.horizons {
            let q = limiting_omega(site, &pathway, y);
            row.push(num(q.map(|q| q.p05)));
            row.push(num(q.map(|q| q.p50)));
            row.push(num(q.map(|q| q.p95)));
        }
        for level in &model.thresholds.levels {
            let c = site
                .crossings
                .iter()
                .find(|c| c.pathway == pathway && c.season == season && c.threshold == *level);
            row.push(c.map(|c| crossing_text(c.median)).unwrap_or_default());
        }
        out.push(row);
    }
    (header, out)
}

/// The ranking as CSV (a header, then one row per ranked site, best first).
pub fn ranking_csv(model: &ReportModel, origins: &Origins<'_>) -> Result<Vec<u8>, String> {
    let (header, rows) = rows(model, origins);
    let mut w = csv::Writer::from_writer(Vec::new());
    let err = |e: csv::Error| format!("cannot write the ranking table: {e}");
    w.write_record(&header).map_err(err)?;
    for r in &rows {
        w.write_record(r).map_err(err)?;
    }
    w.into_inner()
        .map_err(|e| format!("cannot write the ranking table: {e}"))
}

/// The ranking as JSON: the criteria, one object per ranked site (numbers as numbers, with the
/// CSV's decimals) and the sites left out with their messages.
pub fn ranking_json(
    model: &ReportModel,
    origins: &Origins<'_>,
    left_out: &[LeftOut<'_>],
) -> Result<Vec<u8>, String> {
    let (header, rows) = rows(model, origins);
    let numeric = |k: &str| {
        k.starts_with("omega_ar_")
            || k == "present_min_omega_ar"
            || k == "chance_below_3_plan_end_pct"
    };
    let sites: Vec<Value> = rows
        .iter()
        .map(|r| {
            let mut o = serde_json::Map::new();
            for (k, v) in header.iter().zip(r) {
                let value = if k == "rank" || k == "line" || k == "plan_end_year" {
                    v.parse::<u64>().map_or(Value::Null, Value::from)
                } else if k == "tied" {
                    Value::Bool(v == "true")
                } else if numeric(k) {
                    v.parse::<f64>().map_or(Value::Null, Value::from)
                } else if v.is_empty() {
                    Value::Null
                } else {
                    Value::from(v.as_str())
                };
                o.insert(k.clone(), value);
            }
            Value::Object(o)
        })
        .collect();
    let pathway = ranking_pathway(model).map(|p| p.label.clone());
    let doc = json!({
        "tool": format!("{} {}", model.tool.name, model.tool.version),
        "criteria": {
            "order": "under the ranking pathway: sites missing the chemistry or the heat year last; then sites whose first limit (the earlier of the year the median Omega_ar of the limiting season falls below 3.0 and the year DHW >= 8 degC-weeks is reached in most years) comes by the project's end year after the others; then the median Omega_ar of the limiting season (lowest present-day mean) in the project's end year, higher first",
            "ties": "two sites share a rank when their end-year medians differ by less than 1.645 * sqrt(s1^2 + s2^2), s = (p95 - p05) / 3.29 of each site; sites sharing a rank are listed by the later first limit, the later second year, the last-horizon median, then the present-day seasonal minimum",
            "pathway": pathway,
            "last_horizon": model.horizons.last(),
            "first_below": "first projected year in which the ensemble median of the limiting season falls below the level, under the ranking pathway",
        },
        "sites": sites,
        "left_out": left_out.iter().map(|l| json!({
            "line": l.line, "file": l.file, "message": l.message,
        })).collect::<Vec<_>>(),
    });
    let mut bytes = serde_json::to_vec_pretty(&doc)
        .map_err(|e| format!("cannot write the ranking table: {e}"))?;
    bytes.push(b'\n');
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    fn origins(n: usize) -> (Vec<usize>, Vec<String>) {
        (
            (1..=n).collect(),
            (1..=n).map(|i| format!("s{i}.toml")).collect(),
        )
    }

    #[test]
    fn csv_rows_follow_the_ranking_and_hold_the_medians() {
        let model = example_model(3);
        let (lines, files) = origins(3);
        let o = Origins {
            lines: &lines,
            files: &files,
        };
        let text = String::from_utf8(ranking_csv(&model, &o).unwrap()).unwrap();
        let mut r = csv::Reader::from_reader(text.as_bytes());
        let header = r.headers().unwrap().clone();
        let last = *model.horizons.last().unwrap();
        let col = header
            .iter()
            .position(|h| h == format!("omega_ar_{last}_median"))
            .unwrap();
        let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
        assert_eq!(rows.len(), 3);
        let ranked = rank_sites(&model);
        for (row, e) in rows.iter().zip(&ranked) {
            assert_eq!(&row[0], e.rank.to_string());
            assert_eq!(&row[1], (e.site + 1).to_string());
            // The median with three decimals, worked out here from the model's number.
            let expected = format!("{:.3}", e.last_median.unwrap());
            assert_eq!(&row[col], expected);
        }
    }

    #[test]
    fn json_names_the_sites_left_out() {
        let model = example_model(2);
        let (lines, files) = origins(2);
        let o = Origins {
            lines: &lines,
            files: &files,
        };
        let left = [LeftOut {
            line: 3,
            file: "bad.toml",
            message: "latitude 95 is outside the valid range",
        }];
        let v: Value = serde_json::from_slice(&ranking_json(&model, &o, &left).unwrap()).unwrap();
        assert_eq!(v["sites"].as_array().unwrap().len(), 2);
        assert_eq!(v["sites"][0]["rank"], 1);
        assert_eq!(v["left_out"][0]["file"], "bad.toml");
        assert_eq!(v["left_out"][0]["line"], 3);
    }
}
