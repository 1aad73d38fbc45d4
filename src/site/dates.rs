//! Date/time and number parsing for record cells.
//!
//! Dates: ISO 8601 calendar dates (`2024-03-05`, also `2024/03/05`), optionally followed by `T`
//! or a space and a time `HH:MM`, `HH:MM:SS` or `HH:MM:SS.fff`, optionally followed by an
//! offset `Z`, `UTC`, `±HH:MM`, `±HHMM` or `±HH`. With `date_format = "day-first"` or
//! `"month-first"` the date may also be `05/03/2024`, `05.03.2024` or `05-03-2024` (year in
//! four digits). A separate time column may hold the time (and offset). Times without an offset
//! take the site's `utc_offset`. The parser is hand-written for speed (a million-row sensor
//! series) and builds its values with `chrono`, which rejects impossible dates.

use chrono::{DateTime, FixedOffset, NaiveDate, NaiveDateTime, NaiveTime, TimeZone};

use super::schema::DateFormat;

/// A parse failure: what is wrong and what would be valid.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CellError {
    pub message: String,
    pub help: String,
}

impl CellError {
    fn new(message: impl Into<String>, help: impl Into<String>) -> Self {
        CellError {
            message: message.into(),
            help: help.into(),
        }
    }
}

/// A parsed timestamp and whether the cell(s) gave a time of day (needed for diel ranges).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Stamp {
    pub time: DateTime<FixedOffset>,
    pub has_time: bool,
}

fn format_help(fmt: DateFormat) -> &'static str {
    match fmt {
        DateFormat::Iso => {
            "write dates as ISO 8601, e.g. 2024-03-05, 2024-03-05T14:30, 2024-03-05 14:30:00+10:00; or set date_format = \"day-first\" or \"month-first\" for the record"
        }
        DateFormat::DayFirst => {
            "with date_format = \"day-first\" write e.g. 05/03/2024 or 05/03/2024 14:30 (5 March), or an ISO date 2024-03-05"
        }
        DateFormat::MonthFirst => {
            "with date_format = \"month-first\" write e.g. 03/05/2024 or 03/05/2024 14:30 (5 March), or an ISO date 2024-03-05"
        }
    }
}

/// Parses a date cell (and optional time cell) into a timestamp.
pub fn parse_stamp(
    date: &str,
    time: Option<&str>,
    fmt: DateFormat,
    default_offset: FixedOffset,
) -> Result<Stamp, CellError> {
    let s = date.trim();
    if s.is_empty() {
        return Err(CellError::new("the date is empty", format_help(fmt)));
    }
    let (ymd, rest) = split_date(s, fmt)?;
    let d = make_date(ymd, s, fmt)?;
    let rest = rest.trim_start_matches(['T', 't', ' ']);
    let time_cell = time.map(str::trim).filter(|t| !t.is_empty());
    let (clock, offset) = match (rest.is_empty(), time_cell) {
        (true, None) => (None, None),
        (true, Some(t)) => parse_time_and_offset(t, fmt)?,
        (false, None) => parse_time_and_offset(rest, fmt)?,
        (false, Some(t)) => {
            // A date column exported with a midnight time beside a time column (spreadsheet
            // exports do this): the time column wins. Any other time in both is ambiguous.
            let (c, o) = parse_time_and_offset(rest, fmt)?;
            if c.is_some_and(|c| c != NaiveTime::MIN) {
                return Err(CellError::new(
                    format!("`{s}` has a time of day, and the time column also gives `{t}`"),
                    "give the time in one place only: remove the time from the date column or do not map a time column",
                ));
            }
            let (c2, o2) = parse_time_and_offset(t, fmt)?;
            (c2, o2.or(o))
        }
    };
    let has_time = clock.is_some();
    let naive = NaiveDateTime::new(d, clock.unwrap_or(NaiveTime::MIN));
    let off = offset.unwrap_or(default_offset);
    let time = off
        .from_local_datetime(&naive)
        .single()
        .ok_or_else(|| CellError::new(format!("`{s}` is out of range"), format_help(fmt)))?;
    Ok(Stamp { time, has_time })
}

/// Splits the leading calendar date into its three numbers (in file order) and the rest.
fn split_date(s: &str, fmt: DateFormat) -> Result<([u32; 3], &str), CellError> {
    let bytes = s.as_bytes();
    let mut nums = [0u32; 3];
    let mut lens = [0usize; 3];
    let mut sep: Option<u8> = None;
    let mut i = 0;
    for k in 0..3 {
        let start = i;
        while i < bytes.len() && bytes[i].is_ascii_digit() && i - start < 9 {
            nums[k] = nums[k] * 10 + u32::from(bytes[i] - b'0');
            i += 1;
        }
        lens[k] = i - start;
        if lens[k] == 0 {
            return Err(CellError::new(
                format!("`{s}` is not a date"),
                format_help(fmt),
            ));
        }
        if k < 2 {
            let c = bytes.get(i).copied();
            match (c, sep) {
                (Some(c @ (b'-' | b'/' | b'.')), None) => sep = Some(c),
                (Some(c), Some(p)) if c == p => {}
                _ => {
                    return Err(CellError::new(
                        format!("`{s}` is not a date"),
                        format_help(fmt),
                    ));
                }
            }
            i += 1;
        }
    }
    // The rest must start with a separator (or be empty).
    let rest = &s[i..];
    if !(rest.is_empty() || rest.starts_with(['T', 't', ' '])) {
        return Err(CellError::new(
            format!("`{s}` is not a date"),
            format_help(fmt),
        ));
    }
    let year_first = lens[0] == 4;
    let ymd = if year_first {
        if lens[1] > 2 || lens[2] > 2 {
            return Err(CellError::new(
                format!("`{s}` is not a date"),
                format_help(fmt),
            ));
        }
        [nums[0], nums[1], nums[2]]
    } else {
        if fmt == DateFormat::Iso {
            return Err(CellError::new(
                format!("`{s}` is not an ISO 8601 date (year first)"),
                format_help(fmt),
            ));
        }
        if lens[2] != 4 {
            return Err(CellError::new(
                format!("`{s}`: the year must have four digits"),
                format_help(fmt),
            ));
        }
        if lens[0] > 2 || lens[1] > 2 {
            return Err(CellError::new(
                format!("`{s}` is not a date"),
                format_help(fmt),
            ));
        }
        match fmt {
            DateFormat::DayFirst => [nums[2], nums[1], nums[0]],
            _ => [nums[2], nums[0], nums[1]],
        }
    };
    Ok((ymd, rest))
}

const MONTHS: [&str; 12] = [
    "January",
    "February",
    "March",
    "April",
    "May",
    "June",
    "July",
    "August",
    "September",
    "October",
    "November",
    "December",
];

fn days_in_month(y: i32, m: u32) -> u32 {
    let next = if m == 12 {
        NaiveDate::from_ymd_opt(y + 1, 1, 1)
    } else {
        NaiveDate::from_ymd_opt(y, m + 1, 1)
    };
    next.and_then(|n| n.pred_opt()).map_or(31, |d| {
        use chrono::Datelike;
        d.day()
    })
}

fn make_date([y, m, d]: [u32; 3], s: &str, fmt: DateFormat) -> Result<NaiveDate, CellError> {
    let year = i32::try_from(y).unwrap_or(i32::MAX);
    if !(1..=12).contains(&m) {
        let mut help = format_help(fmt).to_string();
        if fmt == DateFormat::DayFirst && (1..=12).contains(&d) {
            help =
                "this looks month-first: set date_format = \"month-first\" for the record".into();
        } else if fmt == DateFormat::MonthFirst && (1..=12).contains(&d) {
            help = "this looks day-first: set date_format = \"day-first\" for the record".into();
        }
        return Err(CellError::new(
            format!("`{s}`: month {m} is not between 1 and 12"),
            help,
        ));
    }
    if !(1000..=9999).contains(&year) {
        return Err(CellError::new(
            format!("`{s}`: year {y} is not a four-digit year"),
            format_help(fmt),
        ));
    }
    NaiveDate::from_ymd_opt(year, m, d).ok_or_else(|| {
        let dim = days_in_month(year, m);
        let name = MONTHS.get(m as usize - 1).copied().unwrap_or("");
        CellError::new(
            format!("`{s}` is not a calendar date: {name} {year} has {dim} days"),
            format!("the day must be between 1 and {dim}"),
        )
    })
}

/// Parses `HH:MM[:SS[.fff]]` with an optional offset.
fn parse_time_and_offset(
    s: &str,
    fmt: DateFormat,
) -> Result<(Option<NaiveTime>, Option<FixedOffset>), CellError> {
    let s = s.trim();
    let bytes = s.as_bytes();
    let bad = || {
        CellError::new(
            format!("`{s}` is not a time of day"),
            format!(
                "write times as HH:MM or HH:MM:SS (24-hour), optionally with an offset such as Z or +10:00; {}",
                format_help(fmt)
            ),
        )
    };
    let two = |i: usize| -> Option<u32> {
        let a = bytes.get(i)?;
        let b = bytes.get(i + 1)?;
        if a.is_ascii_digit() && b.is_ascii_digit() {
            Some(u32::from(a - b'0') * 10 + u32::from(b - b'0'))
        } else {
            None
        }
    };
    // Hour may have one digit ("9:05").
    let (h, mut i) = match (two(0), bytes.first()) {
        (Some(h), _) => (h, 2),
        (None, Some(c)) if c.is_ascii_digit() && bytes.get(1) == Some(&b':') => {
            (u32::from(c - b'0'), 1)
        }
        _ => return Err(bad()),
    };
    if bytes.get(i) != Some(&b':') {
        return Err(bad());
    }
    let mi = two(i + 1).ok_or_else(bad)?;
    i += 3;
    let mut sec = 0;
    let mut nano = 0u32;
    if bytes.get(i) == Some(&b':') {
        sec = two(i + 1).ok_or_else(bad)?;
        i += 3;
        if matches!(bytes.get(i), Some(b'.' | b',')) {
            i += 1;
            let start = i;
            let mut scale = 100_000_000u32;
            while let Some(c) = bytes.get(i).filter(|c| c.is_ascii_digit()) {
                nano += u32::from(c - b'0') * scale;
                scale /= 10;
                i += 1;
            }
            if i == start {
                return Err(bad());
            }
        }
    }
    let clock = NaiveTime::from_hms_nano_opt(h, mi, sec, nano).filter(|_| sec < 60);
    let Some(clock) = clock else {
        return Err(CellError::new(
            format!("`{s}` is not a valid time of day"),
            "hours must be 0–23, minutes and seconds 0–59",
        ));
    };
    let rest = s.get(i..).unwrap_or("").trim();
    let offset = parse_offset(rest).ok_or_else(|| {
        CellError::new(
            format!("`{rest}` in `{s}` is not a UTC offset"),
            "write the offset as Z, UTC, +HH:MM, +HHMM or +HH (hours 0–14, minutes 0–59), or leave it out to use the site's utc_offset",
        )
    })?;
    Ok((Some(clock), offset))
}

/// Parses `""`, `Z`, `UTC`, `±HH:MM`, `±HHMM`, `±HH`.
pub fn parse_offset(s: &str) -> Option<Option<FixedOffset>> {
    let s = s.trim();
    if s.is_empty() {
        return Some(None);
    }
    if s.eq_ignore_ascii_case("z") || s.eq_ignore_ascii_case("utc") {
        return Some(FixedOffset::east_opt(0));
    }
    let (sign, rest) = match s.as_bytes().first()? {
        b'+' => (1, &s[1..]),
        b'-' => (-1, &s[1..]),
        _ => return None,
    };
    let digits: String = rest.chars().filter(|c| *c != ':').collect();
    if !digits.bytes().all(|b| b.is_ascii_digit())
        || !(digits.len() == 2 || digits.len() == 4)
        || (rest.contains(':') && rest.len() != 5)
    {
        return None;
    }
    let h: i32 = digits.get(0..2)?.parse().ok()?;
    let m: i32 = digits
        .get(2..)
        .filter(|x| !x.is_empty())
        .map_or(Some(0), |x| x.parse().ok())?;
    if h > 14 || m > 59 {
        return None;
    }
    FixedOffset::east_opt(sign * (h * 3600 + m * 60)).map(Some)
}

/// Cell values that mean "no value" in every record file.
pub const BUILT_IN_MISSING: &[&str] = &["", "NA", "N/A", "NaN", "nan", "-"];

/// Parses a numeric cell. `Ok(None)` for a missing value (built-in markers or the record's
/// `missing` list); an error for anything else that is not a finite decimal number.
pub fn parse_number(cell: &str, extra_missing: &[String]) -> Result<Option<f64>, CellError> {
    let s = cell.trim();
    if s.is_empty() || extra_missing.iter().any(|m| m.trim() == s) {
        return Ok(None);
    }
    let plain = s
        .bytes()
        .all(|b| b.is_ascii_digit() || matches!(b, b'.' | b'-' | b'+' | b'e' | b'E'));
    if plain
        && let Ok(v) = s.parse::<f64>()
        && v.is_finite()
    {
        return Ok(Some(v));
    }
    if BUILT_IN_MISSING.iter().any(|m| m.eq_ignore_ascii_case(s)) {
        return Ok(None);
    }
    let word = s.trim_start_matches(['+', '-']).to_ascii_lowercase();
    if (plain && s.parse::<f64>().is_ok()) || word == "inf" || word == "infinity" {
        return Err(CellError::new(
            format!("`{s}` is not a finite number"),
            "values must be finite decimal numbers within the physical limits (e.g. 2301.5); leave the cell empty for no value",
        ));
    }
    let help = if s.bytes().filter(|b| *b == b',').count() == 1
        && s.replace(',', ".").parse::<f64>().is_ok()
    {
        "use a point as the decimal separator (e.g. 8.05)".to_string()
    } else {
        let mut h =
            "expected a number such as 2301.5 or 1.2e3, or leave the cell empty".to_string();
        h.push_str(" (empty, NA, N/A, NaN and - count as missing; add other markers with the record's `missing` list)");
        h
    };
    Err(CellError::new(format!("`{s}` is not a number"), help))
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::{Datelike, Timelike};
    use proptest::prelude::*;

    fn off(h: i32) -> FixedOffset {
        FixedOffset::east_opt(h * 3600)
            .unwrap_or_else(|| FixedOffset::east_opt(0).unwrap_or_else(|| unreachable!()))
    }

    fn p(s: &str, fmt: DateFormat) -> Result<Stamp, CellError> {
        parse_stamp(s, None, fmt, off(10))
    }

    #[test]
    fn iso_forms() {
        let a = p("2024-03-05", DateFormat::Iso).unwrap_or_else(|e| panic!("{e:?}"));
        assert!(!a.has_time);
        assert_eq!(a.time.to_rfc3339(), "2024-03-05T00:00:00+10:00");
        let b = p("2024-03-05T14:30", DateFormat::Iso).unwrap_or_else(|e| panic!("{e:?}"));
        assert!(b.has_time);
        assert_eq!(b.time.to_rfc3339(), "2024-03-05T14:30:00+10:00");
        let c = p("2024-03-05 14:30:15.5Z", DateFormat::Iso).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!(c.time.offset().local_minus_utc(), 0);
        assert_eq!(c.time.nanosecond(), 500_000_000);
        let d = p("2024-03-05T14:30:00-0330", DateFormat::Iso).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!(d.time.offset().local_minus_utc(), -(3 * 3600 + 30 * 60));
        let e = p("2024/03/05 9:05 +08", DateFormat::Iso).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!((e.time.hour(), e.time.minute()), (9, 5));
        assert_eq!(e.time.offset().local_minus_utc(), 8 * 3600);
    }

    #[test]
    fn day_and_month_first() {
        let a = p("05/03/2024", DateFormat::DayFirst).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!((a.time.month(), a.time.day()), (3, 5));
        let b = p("03/05/2024 14:30", DateFormat::MonthFirst).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!((b.time.month(), b.time.day(), b.time.hour()), (3, 5, 14));
        let c = p("05.03.2024", DateFormat::DayFirst).unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!(c.time.month(), 3);
        // ISO dates are accepted whatever the record's format.
        assert!(p("2024-03-05", DateFormat::DayFirst).is_ok());
        // A separate time column.
        let d = parse_stamp("05/03/2024", Some("23:10"), DateFormat::DayFirst, off(10))
            .unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!(d.time.to_rfc3339(), "2024-03-05T23:10:00+10:00");
        let e = parse_stamp(
            "05/03/2024 00:00",
            Some("23:10"),
            DateFormat::DayFirst,
            off(10),
        )
        .unwrap_or_else(|e| panic!("{e:?}"));
        assert_eq!(e.time.hour(), 23);
        let e = parse_stamp(
            "05/03/2024 08:00",
            Some("23:10"),
            DateFormat::DayFirst,
            off(10),
        )
        .err()
        .unwrap_or_else(|| panic!("accepted"));
        assert!(
            e.message
                .contains("has a time of day, and the time column also gives `23:10`"),
            "{}",
            e.message
        );
    }

    #[test]
    fn impossible_and_ambiguous_dates_are_explained() {
        let e = p("2024-02-30", DateFormat::Iso)
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(
            e.message.contains("February 2024 has 29 days"),
            "{}",
            e.message
        );
        let e = p("2023-02-29", DateFormat::Iso)
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(e.message.contains("28 days"));
        let e = p("05/03/2024", DateFormat::Iso)
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(e.help.contains("day-first"));
        let e = p("03/25/2024", DateFormat::DayFirst)
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(e.help.contains("month-first"), "{}", e.help);
        let e = p("05/03/24", DateFormat::DayFirst)
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(e.message.contains("four digits"));
        let msg = |s: &str| {
            p(s, DateFormat::Iso)
                .err()
                .map(|e| e.message)
                .unwrap_or_else(|| panic!("`{s}` accepted"))
        };
        let m = msg("2024-03-05T25:00");
        assert!(m.contains("`25:00` is not a valid time of day"), "{m}");
        let m = msg("2024-03-05T12:00+25:00");
        assert!(
            m.contains("`+25:00` in `12:00+25:00` is not a UTC offset"),
            "{m}"
        );
        assert_eq!(msg("2024-03-05x"), "`2024-03-05x` is not a date");
        assert_eq!(msg(""), "the date is empty");
    }

    #[test]
    fn numbers() {
        assert_eq!(parse_number(" 2301.5 ", &[]), Ok(Some(2301.5)));
        assert_eq!(parse_number("1.2e3", &[]), Ok(Some(1200.0)));
        assert_eq!(parse_number("NA", &[]), Ok(None));
        assert_eq!(parse_number("", &[]), Ok(None));
        assert_eq!(parse_number("-999", &["-999".to_string()]), Ok(None));
        assert_eq!(parse_number("-999", &[]), Ok(Some(-999.0)));
        let e = parse_number("8,05", &[])
            .err()
            .unwrap_or_else(|| panic!("accepted"));
        assert!(e.help.contains("decimal separator"));
        let msg = |s: &str| parse_number(s, &[]).err().map(|e| e.message);
        assert_eq!(msg("inf").as_deref(), Some("`inf` is not a finite number"));
        assert_eq!(
            msg("1e999").as_deref(),
            Some("`1e999` is not a finite number")
        );
        assert_eq!(msg("abc").as_deref(), Some("`abc` is not a number"));
    }

    proptest! {
        #[test]
        fn date_parser_never_panics(s in "\\PC{0,40}", t in proptest::option::of("\\PC{0,12}")) {
            for fmt in [DateFormat::Iso, DateFormat::DayFirst, DateFormat::MonthFirst] {
                let _ = parse_stamp(&s, t.as_deref(), fmt, off(0));
            }
        }

        #[test]
        fn date_parser_never_panics_on_date_like(s in "[0-9]{1,5}[-/.][0-9]{1,3}[-/.][0-9]{1,5}([ T][0-9]{1,2}:[0-9]{1,2}(:[0-9]{1,2}(\\.[0-9]{0,4})?)?)?( ?(Z|[+-][0-9]{1,2}(:?[0-9]{2})?))?") {
            for fmt in [DateFormat::Iso, DateFormat::DayFirst, DateFormat::MonthFirst] {
                let _ = parse_stamp(&s, None, fmt, off(0));
            }
        }

        #[test]
        fn date_round_trips(y in 1900i32..2100, m in 1u32..=12, d in 1u32..=31, h in 0u32..24,
                            mi in 0u32..60, sec in 0u32..60, oq in -48i32..=56) {
            prop_assume!(NaiveDate::from_ymd_opt(y, m, d).is_some());
            let o = FixedOffset::east_opt(oq * 900).unwrap_or_else(|| unreachable!());
            let naive = NaiveDate::from_ymd_opt(y, m, d).and_then(|x| x.and_hms_opt(h, mi, sec)).unwrap_or_default();
            let want = o.from_local_datetime(&naive).single().unwrap_or_else(|| unreachable!());
            let iso = want.format("%Y-%m-%dT%H:%M:%S%:z").to_string();
            let got = parse_stamp(&iso, None, DateFormat::Iso, off(3)).map(|s| s.time);
            prop_assert_eq!(got, Ok(want));
            let dayf = want.format("%d/%m/%Y %H:%M:%S%z").to_string();
            let got = parse_stamp(&dayf, None, DateFormat::DayFirst, off(3)).map(|s| s.time);
            prop_assert_eq!(got, Ok(want));
            let monf = naive.format("%m.%d.%Y %H:%M").to_string();
            let got = parse_stamp(&monf, None, DateFormat::MonthFirst, o).map(|s| s.time);
            prop_assert_eq!(got, Ok(want.with_second(0).unwrap_or(want)));
        }

        #[test]
        fn number_parser_never_panics(s in "\\PC{0,30}") {
            let _ = parse_number(&s, &[]);
        }

        #[test]
        fn number_round_trips(v in proptest::num::f64::NORMAL | proptest::num::f64::ZERO | proptest::num::f64::SUBNORMAL) {
            prop_assert_eq!(parse_number(&format!("{v}"), &[]), Ok(Some(v)));
            prop_assert_eq!(parse_number(&format!("{v:e}"), &[]), Ok(Some(v)));
        }
    }
}
