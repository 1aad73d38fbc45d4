//! Atmospheric CO2 pathways: the five SSP concentration pathways, the observed record, a
//! steady-state pathway and user-defined pathways, all at annual resolution.
//!
//! The annual values come from one embedded table, `data/co2-annual.csv` (its sources are in
//! `data/co2-annual.md` beside it): the NOAA GML global marine-surface annual means 1979–2025
//! and the five CMIP6 SSP pathways of Meinshausen et al. (2020) for every year 1979–2300.
//!
//! Every pathway is the observed record up to its last year ([`Observed::last_year`], 2025 for
//! the built-in NOAA table) followed by the pathway's own values, joined without a step: an SSP
//! takes its table value minus the offset (SSP minus observed) of the last observed year, the
//! offset fading linearly to zero over [`JOIN_FADE_YEARS`] years (common practice). Values are
//! global annual means of dry-air mole fraction (ppm).

use std::fmt;
use std::sync::OnceLock;

/// The embedded annual table (see the module documentation for its sources).
const CO2_ANNUAL_CSV: &str = include_str!("data/co2-annual.csv");

/// One row of the annual table: a year, the NOAA annual mean and its uncertainty where
/// observed, and the five SSP values (SSP1-1.9, SSP1-2.6, SSP2-4.5, SSP3-7.0, SSP5-8.5).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AnnualRow {
    /// Calendar year of the annual means.
    pub year: i32,
    /// NOAA GML global marine-surface annual mean, ppm, and its uncertainty, ppm (1979–2025).
    pub noaa: Option<(f64, f64)>,
    /// ppm for SSP1-1.9, SSP1-2.6, SSP2-4.5, SSP3-7.0, SSP5-8.5 (Meinshausen et al. 2020;
    /// CMIP6 historical concentration up to 2014, identical in all five).
    pub ssp: [f64; 5],
}

/// Parses the embedded table; an error names the line and field.
fn parse_annual(text: &str) -> Result<Vec<AnnualRow>, String> {
    let mut rows = Vec::new();
    for (i, line) in text.lines().enumerate().skip(1) {
        if line.trim().is_empty() {
            continue;
        }
        let f: Vec<&str> = line.split(',').map(str::trim).collect();
        if f.len() != 8 {
            return Err(format!(
                "co2-annual.csv line {}: {} fields, expected 8",
                i + 1,
                f.len()
            ));
        }
        let num = |j: usize| -> Result<f64, String> {
            let v = f.get(j).copied().unwrap_or("");
            v.parse::<f64>()
                .map_err(|_| format!("co2-annual.csv line {} field {}: \"{v}\"", i + 1, j + 1))
        };
        let year = f
            .first()
            .and_then(|y| y.parse::<i32>().ok())
            .ok_or_else(|| format!("co2-annual.csv line {}: bad year", i + 1))?;
        let noaa = match f.get(1).copied().unwrap_or("") {
            "" => None,
            _ => Some((num(1)?, num(2)?)),
        };
        rows.push(AnnualRow {
            year,
            noaa,
            ssp: [num(3)?, num(4)?, num(5)?, num(6)?, num(7)?],
        });
    }
    if rows.windows(2).any(|w| w[1].year != w[0].year + 1) {
        return Err("co2-annual.csv: years are not consecutive".to_string());
    }
    Ok(rows)
}

/// The embedded annual table, parsed once. A unit test proves it parses; should it not, every
/// look-up fails with the parse error instead of panicking.
pub fn annual_table() -> Result<&'static [AnnualRow], PathwayError> {
    static TABLE: OnceLock<Result<Vec<AnnualRow>, String>> = OnceLock::new();
    match TABLE.get_or_init(|| parse_annual(CO2_ANNUAL_CSV)) {
        Ok(rows) => Ok(rows.as_slice()),
        Err(e) => Err(PathwayError::Invalid {
            pathway: "built-in table".to_string(),
            message: e.clone(),
        }),
    }
}

/// Years over which the offset between a pathway and the last observed annual mean fades
/// linearly to zero (common practice for joining a scenario to observations without a step).
pub const JOIN_FADE_YEARS: i32 = 10;

/// Citation carried with every SSP pathway in the outputs, in words a reader can look up (the
/// copy the table was taken from is named in `data/co2-annual.md`, not here).
pub const SSP_SOURCE: &str = "Meinshausen et al. (2020), Geosci. Model Dev. 13:3571-3605, \
     annual CMIP6 greenhouse-gas concentrations to 2300; observed NOAA GML global \
     marine-surface annual means to the last observed year, the offset at that year fading \
     linearly to zero over 10 years (common practice)";

/// Citation of the observed record, in words a reader can look up (the copy and version used
/// are named in `data/co2-annual.md`).
pub const NOAA_SOURCE: &str = "NOAA Global Monitoring Laboratory (GML), globally averaged \
     marine-surface annual mean CO2, 1979-2025 (release of 2026-08-01)";

/// Plausible range for any user-given atmospheric CO2 value, ppm (a guard against unit slips,
/// not a physical law: glacial minima are about 180 ppm and the SSP extensions peak near
/// 2,200 ppm).
pub const USER_PPM_RANGE: (f64, f64) = (150.0, 3000.0);

/// Years a user pathway or observation may use.
pub const USER_YEAR_RANGE: (i32, i32) = (1850, 2500);

/// Errors from pathway construction or look-up. Messages name the pathway, the year or point
/// and the limit.
#[derive(Clone, Debug, PartialEq)]
pub enum PathwayError {
    /// A name that is neither built in nor defined.
    UnknownName(String),
    /// A user pathway or observation failed validation.
    Invalid { pathway: String, message: String },
    /// A year outside what the pathway covers.
    OutOfRange {
        pathway: String,
        year: i32,
        message: String,
    },
}

impl fmt::Display for PathwayError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            PathwayError::UnknownName(n) => write!(
                f,
                "unknown CO2 pathway \"{n}\": built-in names are {}, or define it with year/ppm points",
                BUILTIN_NAMES.join(", ")
            ),
            PathwayError::Invalid { pathway, message } => {
                write!(f, "CO2 pathway \"{pathway}\": {message}")
            }
            PathwayError::OutOfRange {
                pathway,
                year,
                message,
            } => {
                write!(f, "CO2 pathway \"{pathway}\", year {year}: {message}")
            }
        }
    }
}

impl std::error::Error for PathwayError {}

/// The five SSP concentration pathways.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Ssp {
    Ssp119,
    Ssp126,
    Ssp245,
    Ssp370,
    Ssp585,
}

impl Ssp {
    /// All five, low to high forcing.
    pub const ALL: [Ssp; 5] = [
        Ssp::Ssp119,
        Ssp::Ssp126,
        Ssp::Ssp245,
        Ssp::Ssp370,
        Ssp::Ssp585,
    ];

    /// The usual name, e.g. "SSP2-4.5".
    pub fn name(self) -> &'static str {
        match self {
            Ssp::Ssp119 => "SSP1-1.9",
            Ssp::Ssp126 => "SSP1-2.6",
            Ssp::Ssp245 => "SSP2-4.5",
            Ssp::Ssp370 => "SSP3-7.0",
            Ssp::Ssp585 => "SSP5-8.5",
        }
    }

    /// Column of the SSP values in [`AnnualRow::ssp`].
    pub fn column(self) -> usize {
        match self {
            Ssp::Ssp119 => 0,
            Ssp::Ssp126 => 1,
            Ssp::Ssp245 => 2,
            Ssp::Ssp370 => 3,
            Ssp::Ssp585 => 4,
        }
    }

    /// Parses "SSP2-4.5" (also "ssp245", "SSP2-45"); case-insensitive.
    pub fn parse(s: &str) -> Option<Ssp> {
        let key: String = s
            .chars()
            .filter(|c| c.is_ascii_alphanumeric())
            .map(|c| c.to_ascii_lowercase())
            .collect();
        match key.as_str() {
            "ssp119" => Some(Ssp::Ssp119),
            "ssp126" => Some(Ssp::Ssp126),
            "ssp245" => Some(Ssp::Ssp245),
            "ssp370" => Some(Ssp::Ssp370),
            "ssp585" => Some(Ssp::Ssp585),
            _ => None,
        }
    }

    /// The table's annual value in `year` (1979–2300), before joining to the observations.
    pub fn table_ppm(self, year: i32) -> Option<f64> {
        let table = annual_table().ok()?;
        let first = table.first()?.year;
        let row = table.get(usize::try_from(year.checked_sub(first)?).ok()?)?;
        row.ssp.get(self.column()).copied()
    }
}

/// Names accepted by [`Pathway::builtin`].
pub const BUILTIN_NAMES: [&str; 6] = [
    "SSP1-1.9", "SSP1-2.6", "SSP2-4.5", "SSP3-7.0", "SSP5-8.5", "steady",
];

/// Linear interpolation in a table of strictly increasing years; `None` outside it.
fn interpolate(points: &[(i32, f64)], year: i32) -> Option<f64> {
    let first = points.first()?;
    let last = points.last()?;
    if year < first.0 || year > last.0 {
        return None;
    }
    for w in points.windows(2) {
        let (y0, v0) = w[0];
        let (y1, v1) = w[1];
        if year == y0 {
            return Some(v0);
        }
        if year > y0 && year <= y1 {
            let f = f64::from(year - y0) / f64::from(y1 - y0);
            return Some(v0 + f * (v1 - v0));
        }
    }
    // A single-point table or the exact first year.
    if year == first.0 { Some(first.1) } else { None }
}

/// The observed atmospheric record used for the historical part of every pathway and for the
/// sampling-year atmosphere. Defaults to the NOAA annual means of the embedded table; later
/// annual means may be appended with [`Observed::extended`].
#[derive(Clone, Debug, PartialEq)]
pub struct Observed {
    points: Vec<(i32, f64)>,
    source: String,
}

impl Default for Observed {
    fn default() -> Self {
        Observed::noaa()
    }
}

impl Observed {
    /// The built-in NOAA record (1979–2025; empty if the embedded table could not be read,
    /// which a unit test rules out).
    pub fn noaa() -> Self {
        let points = annual_table()
            .map(|t| {
                t.iter()
                    .filter_map(|r| r.noaa.map(|(ppm, _)| (r.year, ppm)))
                    .collect()
            })
            .unwrap_or_default();
        Observed {
            points,
            source: NOAA_SOURCE.to_string(),
        }
    }

    /// The record with further annual means appended (for example a year published after
    /// this program was built). Each new year must follow the record's last year.
    pub fn extended(&self, extra: &[(i32, f64)], source: &str) -> Result<Observed, PathwayError> {
        let mut points = self.points.clone();
        for &(year, ppm) in extra {
            let last = points.last().map(|p| p.0).unwrap_or(i32::MIN);
            let err = |message: String| PathwayError::Invalid {
                pathway: "observed".to_string(),
                message,
            };
            if year <= last {
                return Err(err(format!(
                    "observed year {year} must come after the record's last year {last}"
                )));
            }
            if year > USER_YEAR_RANGE.1 {
                return Err(err(format!(
                    "observed year {year} is after {}",
                    USER_YEAR_RANGE.1
                )));
            }
            check_ppm(ppm).map_err(|m| err(format!("observed year {year}: {m}")))?;
            points.push((year, ppm));
        }
        Ok(Observed {
            points,
            source: if extra.is_empty() {
                self.source.clone()
            } else {
                format!("{}; {}", self.source, source)
            },
        })
    }

    /// First observed year.
    pub fn first_year(&self) -> i32 {
        self.points.first().map(|p| p.0).unwrap_or(0)
    }

    /// Last observed year; every pathway starts after it.
    pub fn last_year(&self) -> i32 {
        self.points.last().map(|p| p.0).unwrap_or(0)
    }

    /// Last observed value, ppm (the level of the steady pathway).
    pub fn last_ppm(&self) -> f64 {
        self.points.last().map(|p| p.1).unwrap_or(f64::NAN)
    }

    /// The observed annual mean (interpolated between rows), or `None` outside the record.
    pub fn ppm(&self, year: i32) -> Option<f64> {
        interpolate(&self.points, year)
    }

    /// The points (year, ppm).
    pub fn points(&self) -> &[(i32, f64)] {
        &self.points
    }

    /// Where the record comes from.
    pub fn source(&self) -> &str {
        &self.source
    }
}

fn check_ppm(ppm: f64) -> Result<(), String> {
    if !ppm.is_finite() || ppm < USER_PPM_RANGE.0 || ppm > USER_PPM_RANGE.1 {
        return Err(format!(
            "{ppm} ppm is outside the accepted range {}-{} ppm",
            USER_PPM_RANGE.0, USER_PPM_RANGE.1
        ));
    }
    Ok(())
}

/// What a pathway does after the observed record.
#[derive(Clone, Debug, PartialEq)]
pub enum PathwayKind {
    /// A built-in SSP (the embedded annual table).
    Ssp(Ssp),
    /// The atmosphere held at the last observed annual mean.
    Steady,
    /// User points (year, ppm), strictly increasing years, interpolated linearly; between the
    /// last observation and the first point the value is interpolated from the observation.
    User(Vec<(i32, f64)>),
}

/// What is subtracted from an SSP's table value in `year` (after the last observed year) to
/// join it to the observations without a step: the offset (SSP minus observed) of the last
/// observed year, fading linearly to zero over [`JOIN_FADE_YEARS`] years, so the joined value
/// equals the observation at the last observed year and the SSP value from ten years later.
pub fn join_offset(ssp: Ssp, observed: &Observed, year: i32) -> f64 {
    let last = observed.last_year();
    let offset = match (ssp.table_ppm(last), observed.ppm(last)) {
        (Some(a), Some(b)) => a - b,
        _ => 0.0,
    };
    let fade = 1.0 - f64::from(year - last) / f64::from(JOIN_FADE_YEARS);
    offset * fade.clamp(0.0, 1.0)
}

/// One CO2 pathway.
#[derive(Clone, Debug, PartialEq)]
pub struct Pathway {
    /// Display name ("SSP2-4.5", "steady" or the user's name).
    pub name: String,
    /// The future part.
    pub kind: PathwayKind,
}

impl Pathway {
    /// A built-in pathway by name: one of [`BUILTIN_NAMES`] (SSP names are accepted in forms
    /// like "ssp245"; "steady" case-insensitive).
    pub fn builtin(name: &str) -> Result<Pathway, PathwayError> {
        let trimmed = name.trim();
        if let Some(ssp) = Ssp::parse(trimmed) {
            return Ok(Pathway {
                name: ssp.name().to_string(),
                kind: PathwayKind::Ssp(ssp),
            });
        }
        if trimmed.eq_ignore_ascii_case("steady") {
            return Ok(Pathway {
                name: "steady".to_string(),
                kind: PathwayKind::Steady,
            });
        }
        Err(PathwayError::UnknownName(trimmed.to_string()))
    }

    /// The five SSPs, low to high.
    pub fn all_ssps() -> Vec<Pathway> {
        Ssp::ALL
            .iter()
            .map(|&s| Pathway {
                name: s.name().to_string(),
                kind: PathwayKind::Ssp(s),
            })
            .collect()
    }

    /// A user-defined pathway. Checks: a non-empty name that is not a built-in name, at least
    /// one point, strictly increasing years within 1850–2500, each value within 150–3000 ppm.
    pub fn user(name: &str, points: &[(i32, f64)]) -> Result<Pathway, PathwayError> {
        let name = name.trim();
        let err = |message: String| PathwayError::Invalid {
            pathway: name.to_string(),
            message,
        };
        if name.is_empty() {
            return Err(PathwayError::Invalid {
                pathway: String::new(),
                message: "a user pathway needs a name".to_string(),
            });
        }
        if name.chars().any(|c| c.is_control()) {
            return Err(err("the name contains a control character".to_string()));
        }
        if Ssp::parse(name).is_some() || name.eq_ignore_ascii_case("steady") {
            return Err(err(
                "this name belongs to a built-in pathway; choose another name".to_string(),
            ));
        }
        if points.is_empty() {
            return Err(err("needs at least one (year, ppm) point".to_string()));
        }
        for (i, &(year, ppm)) in points.iter().enumerate() {
            if year < USER_YEAR_RANGE.0 || year > USER_YEAR_RANGE.1 {
                return Err(err(format!(
                    "point {} year {year} is outside {}-{}",
                    i + 1,
                    USER_YEAR_RANGE.0,
                    USER_YEAR_RANGE.1
                )));
            }
            check_ppm(ppm).map_err(|m| err(format!("point {} (year {year}): {m}", i + 1)))?;
            if i > 0 && year <= points[i - 1].0 {
                return Err(err(format!(
                    "years must increase: point {} year {year} follows year {}",
                    i + 1,
                    points[i - 1].0
                )));
            }
        }
        Ok(Pathway {
            name: name.to_string(),
            kind: PathwayKind::User(points.to_vec()),
        })
    }

    /// Source text for outputs.
    pub fn source(&self, observed: &Observed) -> String {
        match &self.kind {
            PathwayKind::Ssp(_) => SSP_SOURCE.to_string(),
            PathwayKind::Steady => format!(
                "atmosphere held at the last observed annual mean ({:.2} ppm, {}) after {}; {}",
                observed.last_ppm(),
                observed.last_year(),
                observed.last_year(),
                observed.source()
            ),
            PathwayKind::User(_) => format!(
                "user-defined points from the site file (linear interpolation); {} to {}",
                observed.source(),
                observed.last_year()
            ),
        }
    }

    /// The last year the pathway defines (`None`: unbounded).
    pub fn last_year(&self) -> Option<i32> {
        match &self.kind {
            PathwayKind::Ssp(_) => annual_table().ok()?.last().map(|r| r.year),
            PathwayKind::Steady => None,
            PathwayKind::User(p) => p.last().map(|q| q.0),
        }
    }

    /// The pathway's value in 2100 (or at its last point before), used to interpolate default
    /// warming.
    pub fn ppm_2100(&self, observed: &Observed) -> f64 {
        let year = match self.last_year() {
            Some(y) if y < 2100 => y,
            _ => 2100,
        };
        self.xco2_ppm(observed, year).unwrap_or(f64::NAN)
    }

    /// Global annual-mean atmospheric CO2 (ppm, dry-air mole fraction) in `year`.
    ///
    /// Years covered by the observed record take the observation; later years take the
    /// pathway's value. Errors name the pathway, the year and the covered span.
    pub fn xco2_ppm(&self, observed: &Observed, year: i32) -> Result<f64, PathwayError> {
        if year <= observed.last_year() {
            return observed.ppm(year).ok_or_else(|| PathwayError::OutOfRange {
                pathway: self.name.clone(),
                year,
                message: format!(
                    "before the first observed annual mean ({}); add a user observation or use a later sampling year",
                    observed.first_year()
                ),
            });
        }
        let out_of_range = |message: String| PathwayError::OutOfRange {
            pathway: self.name.clone(),
            year,
            message,
        };
        match &self.kind {
            PathwayKind::Ssp(ssp) => {
                annual_table()?;
                let value = ssp
                    .table_ppm(year)
                    .ok_or_else(|| out_of_range("the SSP table covers 1979-2300".to_string()))?;
                Ok(value - join_offset(*ssp, observed, year))
            }
            PathwayKind::Steady => Ok(observed.last_ppm()),
            PathwayKind::User(points) => {
                // Splice: the last observation, then the user's points after it.
                let mut spliced: Vec<(i32, f64)> =
                    vec![(observed.last_year(), observed.last_ppm())];
                spliced.extend(
                    points
                        .iter()
                        .copied()
                        .filter(|p| p.0 > observed.last_year()),
                );
                if spliced.len() == 1 {
                    return Err(out_of_range(format!(
                        "all points lie within the observed record (to {}); add points after it",
                        observed.last_year()
                    )));
                }
                interpolate(&spliced, year).ok_or_else(|| {
                    out_of_range(format!(
                        "after the pathway's last point ({}); add points or shorten the horizon",
                        spliced.last().map(|p| p.0).unwrap_or(year)
                    ))
                })
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The Meinshausen et al. (2020) values at 2050 and 2100 are checked in
    // tests/projection_reference.rs.

    /// Outside check: the embedded table against the numbers of its source note
    /// (`data/co2-annual.md`, copied from the shared reference): 322 rows 1979–2300, NOAA
    /// 1979–2025, the five SSPs identical to 2014 (397.547 ppm, NOAA 397.34), and the SSP minus
    /// NOAA offsets of 2025 printed there (+0.885, +2.034, +3.390, +6.707, +6.190 ppm).
    #[test]
    fn embedded_table_matches_its_source_note() {
        let t = annual_table().unwrap();
        assert_eq!(t.len(), 322);
        assert_eq!((t[0].year, t[321].year), (1979, 2300));
        let obs = Observed::noaa();
        assert_eq!((obs.first_year(), obs.last_year()), (1979, 2025));
        assert_eq!(obs.ppm(2014), Some(397.34));
        assert_eq!(obs.ppm(2025), Some(425.64));
        for ssp in Ssp::ALL {
            assert_eq!(ssp.table_ppm(2014), Some(397.547));
        }
        for (ssp, offset) in Ssp::ALL.iter().zip([0.885, 2.034, 3.390, 6.707, 6.190]) {
            let d = ssp.table_ppm(2025).unwrap() - 425.64;
            assert!((d - offset).abs() < 1e-9, "{} {d}", ssp.name());
        }
    }

    /// Check of the join (common practice, stated in the module documentation): the joined
    /// pathway equals the NOAA means through the last observed year (2025) and the SSP table
    /// from ten years after it (2035 on); in between, the 2025 offset fades linearly (2030:
    /// half of it; offsets from `data/co2-annual.md`).
    #[test]
    fn joined_pathway_equals_noaa_then_ssp() {
        let obs = Observed::noaa();
        for p in Pathway::all_ssps() {
            let PathwayKind::Ssp(ssp) = p.kind else {
                unreachable!()
            };
            for y in 1979..=2025 {
                assert_eq!(
                    p.xco2_ppm(&obs, y).unwrap(),
                    obs.ppm(y).unwrap(),
                    "{} {y}",
                    p.name
                );
            }
            for y in 2035..=2300 {
                assert_eq!(p.xco2_ppm(&obs, y).unwrap(), ssp.table_ppm(y).unwrap());
            }
        }
        let p = Pathway::builtin("SSP5-8.5").unwrap();
        let v2030 = p.xco2_ppm(&obs, 2030).unwrap();
        let table_2030 = Ssp::Ssp585.table_ppm(2030).unwrap();
        assert!((v2030 - (table_2030 - 0.5 * 6.190)).abs() < 1e-9, "{v2030}");
        assert!(p.xco2_ppm(&obs, 1978).is_err());
        assert!(p.xco2_ppm(&obs, 2301).is_err());
    }

    #[test]
    fn steady_holds_last_observation() {
        let obs = Observed::noaa();
        let p = Pathway::builtin("Steady").unwrap();
        assert_eq!(p.xco2_ppm(&obs, 2090).unwrap(), 425.64);
        assert_eq!(p.xco2_ppm(&obs, 2300).unwrap(), 425.64);
        let obs2 = obs.extended(&[(2026, 428.5)], "test").unwrap();
        assert_eq!(p.xco2_ppm(&obs2, 2080).unwrap(), 428.5);
        assert!(obs.extended(&[(2024, 425.0)], "x").is_err());
        assert!(obs.extended(&[(2027, 42.5)], "x").is_err());
    }

    #[test]
    fn user_pathway_interpolates_and_validates() {
        let obs = Observed::noaa();
        let p = Pathway::user("local plan", &[(2030, 450.0), (2100, 500.0)]).unwrap();
        // 2025 observed 425.64 ppm, then linear to the first point.
        let v2027 = p.xco2_ppm(&obs, 2027).unwrap();
        assert!((v2027 - (425.64 + 0.4 * (450.0 - 425.64))).abs() < 1e-9);
        assert!((p.xco2_ppm(&obs, 2065).unwrap() - 475.0).abs() < 1e-9);
        let e = p.xco2_ppm(&obs, 2101).unwrap_err().to_string();
        assert!(e.contains("local plan") && e.contains("2101"), "{e}");

        let e = Pathway::user("x", &[(2050, 500.0), (2040, 450.0)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("years must increase"), "{e}");
        let e = Pathway::user("x", &[(2050, 5000.0)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("150-3000"), "{e}");
        assert!(Pathway::user("x", &[]).is_err());
        assert!(Pathway::user("SSP2-4.5", &[(2050, 500.0)]).is_err());
        assert!(Pathway::user("", &[(2050, 500.0)]).is_err());
        let e = Pathway::builtin("SSP9-9.9").unwrap_err().to_string();
        assert!(e.contains("SSP9-9.9") && e.contains("steady"), "{e}");
    }

    /// Common practice: among the SSPs the pathway order by 2100 CO2 follows the forcing label.
    #[test]
    fn ssps_are_ordered_by_2100_concentration() {
        let obs = Observed::noaa();
        let v: Vec<f64> = Pathway::all_ssps()
            .iter()
            .map(|p| p.ppm_2100(&obs))
            .collect();
        assert!(v.windows(2).all(|w| w[0] < w[1]), "{v:?}");
    }

    mod props {
        use super::super::*;
        use proptest::prelude::*;

        proptest! {
            /// Interpolated user values stay between the neighbouring points.
            #[test]
            fn user_values_are_bounded_by_points(
                a in 150.0f64..3000.0, b in 150.0f64..3000.0, y in 2026i32..=2100
            ) {
                let p = Pathway::user("u", &[(2026, a), (2100, b)]).unwrap();
                let v = p.xco2_ppm(&Observed::noaa(), y).unwrap();
                prop_assert!(v >= a.min(b) - 1e-9 && v <= a.max(b) + 1e-9);
            }
        }
    }
}
