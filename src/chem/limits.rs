//! Physical limits for inputs. A value outside these ranges is not seawater anyone samples
//! on a reef (or is a unit mistake), so the row is refused with a message naming the column
//! and the limit. These are deliberately wide (common practice: open-ocean and coastal
//! extremes with margin); values inside them but outside a constant set's fitted range are
//! solved and flagged instead (see [`super::MethodSet::range_warnings`]).

/// (column, lowest, highest, unit). `lowest` is exclusive for quantities that must be > 0.
pub const LIMITS: &[(&str, f64, f64, &str)] = &[
    ("temp_c", -2.0, 45.0, "°C"),
    ("salinity", 0.0, 50.0, ""),
    ("pressure_dbar", 0.0, 11000.0, "dbar"),
    ("depth_m", 0.0, 11000.0, "m"),
    ("ta", 0.0, 5000.0, "µmol/kg"),
    ("dic", 0.0, 5000.0, "µmol/kg"),
    ("ph_t", 6.0, 9.5, ""),
    ("pco2", 0.0, 20000.0, "µatm"),
    ("fco2", 0.0, 20000.0, "µatm"),
    ("co3", 0.0, 1500.0, "µmol/kg"),
    ("silicate", 0.0, 500.0, "µmol/kg"),
    ("phosphate", 0.0, 20.0, "µmol/kg"),
];

/// Columns whose value must be strictly positive (a zero concentration or partial pressure
/// has no carbonate-system solution).
const STRICTLY_POSITIVE: &[&str] = &["ta", "dic", "pco2", "fco2", "co3"];

/// The limit of one column, looked up once by a caller that checks many values of it.
#[derive(Clone, Copy, Debug)]
pub struct Limit {
    column: &'static str,
    lo: f64,
    hi: f64,
    unit: &'static str,
    positive: bool,
}

impl Limit {
    /// The limit of `column`, if it has one.
    pub fn of(column: &str) -> Option<Limit> {
        let &(column, lo, hi, unit) = LIMITS.iter().find(|(c, ..)| *c == column)?;
        Some(Limit {
            column,
            lo,
            hi,
            unit,
            positive: STRICTLY_POSITIVE.contains(&column),
        })
    }

    /// [`check`] of a value of this limit's column.
    pub fn check(&self, value: f64) -> Result<(), String> {
        let below = if self.positive {
            value <= self.lo
        } else {
            value < self.lo
        };
        if value.is_finite() && !below && value <= self.hi {
            return Ok(());
        }
        check_against(self.column, value, Some(self))
    }
}

/// Check one value; `Err` names the column, the value and the valid range.
pub fn check(column: &str, value: f64) -> Result<(), String> {
    check_against(column, value, Limit::of(column).as_ref())
}

/// [`check`] of `value` in `column` against its limit `limit` (`None`: the column has none).
fn check_against(column: &str, value: f64, limit: Option<&Limit>) -> Result<(), String> {
    if !value.is_finite() {
        return Err(format!("{column}: value {value} is not a finite number"));
    }
    let Some(&Limit {
        lo,
        hi,
        unit,
        positive,
        ..
    }) = limit
    else {
        return Ok(());
    };
    let below = if positive { value <= lo } else { value < lo };
    if below || value > hi {
        let unit = if unit.is_empty() {
            String::new()
        } else {
            format!(" {unit}")
        };
        let lower = if positive {
            format!("above {lo}")
        } else {
            format!("from {lo}")
        };
        return Err(format!(
            "{column} = {}{unit} is outside the physical limit ({lower} to {hi}{unit})",
            crate::numfmt::tidy(value)
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn limits_name_column_and_range() {
        assert!(check("ta", 2300.0).is_ok());
        let e = check("ta", -5.0).unwrap_err();
        assert!(e.contains("ta") && e.contains("5000"), "{e}");
        assert_eq!(
            check("pco2", 0.0).unwrap_err(),
            "pco2 = 0 µatm is outside the physical limit (above 0 to 20000 µatm)"
        );
        assert!(check("silicate", 0.0).is_ok());
        assert!(check("ph_t", f64::NAN).unwrap_err().contains("finite"));
        assert!(check("unknown_column", 1e9).is_ok());
    }

    /// A limit looked up once answers as `check` does, at and around its ends.
    #[test]
    fn limit_looked_up_once_agrees_with_check() {
        for &(column, lo, hi, _) in LIMITS {
            let limit = Limit::of(column).unwrap();
            for v in [
                lo - 1.0,
                lo,
                lo + 1e-9,
                0.5 * (lo + hi),
                hi,
                hi + 1e-9,
                f64::NAN,
            ] {
                assert_eq!(limit.check(v), check(column, v), "{column} {v}");
            }
        }
        assert!(Limit::of("unknown_column").is_none());
    }
}
