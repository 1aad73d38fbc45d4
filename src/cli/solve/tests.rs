//! Unit tests of `solve`, kept apart so the command's file stays small (a `#[cfg(test)]`
//! module: its `unwrap`s never meet user data).
use super::*;

fn run_with(input: &str, m: &MethodSet) -> Result<(String, SolveSummary), String> {
    let mut out = Vec::new();
    let s = solve_stream(input.as_bytes(), &mut out, m)?;
    Ok((String::from_utf8(out).map_err(|e| e.to_string())?, s))
}

fn run_str(input: &str) -> (String, SolveSummary) {
    run_with(input, &MethodSet::default()).unwrap()
}

/// Field `name` of data line `row` (1-based) of a solve output.
fn field(out: &str, row: usize, name: &str) -> String {
    let mut rdr = csv::ReaderBuilder::new()
        .flexible(true)
        .from_reader(out.as_bytes());
    let header = rdr.headers().unwrap().clone();
    let i = header.iter().position(|h| h == name).unwrap();
    let rec = rdr.records().nth(row - 1).unwrap().unwrap();
    rec.get(i).unwrap().to_string()
}

#[test]
fn contract_columns_and_order() {
    let (out, s) = run_str("station,temp_c,salinity,ta,dic,note\nA,25,35,2300,2000,x\n");
    let mut lines = out.lines();
    assert_eq!(
        lines.next().unwrap(),
        "station,temp_c,salinity,ta,dic,note,ph_t,pco2,fco2,co2aq,hco3,co3,omega_ar,omega_ca,revelle,problem,pair_used"
    );
    let row = lines.next().unwrap();
    // PyCO2SYS 1.8.3.4, default set (fact sheet §7g): pH_T 8.040225, pCO2 402.693,
    // CO2* 11.3967, HCO3 1777.679, CO3 210.925, Omega_ar 3.346727.
    assert!(
        row.starts_with("A,25,35,2300.0000,2000.0000,x,8.040225,402.69"),
        "{row}"
    );
    assert!(row.contains(",11.39"), "{row}");
    assert!(row.contains(",1777.6"), "{row}");
    assert!(row.contains(",210.9"), "{row}");
    assert!(row.contains(",3.34673,"), "{row}");
    assert!(
        row.ends_with(",,ta+dic"),
        "problem empty, pair named: {row}"
    );
    assert_eq!(
        s,
        SolveSummary {
            rows: 1,
            unsolved: 0
        }
    );
}

#[test]
fn bad_rows_are_written_with_a_problem_and_counted() {
    let input = "temp_c,salinity,ta,dic,pco2,fco2\n\
                 25,35,abc,2000,,\n\
                 25,35,,,400,400\n\
                 25,35,2300,,,\n\
                 25,35,-5,2000,,\n\
                 25,60,2300,2000,,\n\
                 25,35,2300,2000,,\n";
    let (out, s) = run_str(input);
    assert_eq!(out.lines().count(), 7, "every row is written");
    let problem = |row| field(&out, row, "problem");
    assert_eq!(problem(1), "error: ta: 'abc' is not a number");
    assert!(
        problem(2).starts_with("error: pco2 with fco2 is not a valid pair"),
        "{}",
        problem(2)
    );
    assert_eq!(
        problem(3),
        "error: two of ta, dic, ph_t, pco2/fco2, co3 are needed, this row gives ta only"
    );
    assert_eq!(
        problem(4),
        "error: ta = -5 µmol/kg is outside the physical limit (above 0 to 5000 µmol/kg)"
    );
    assert_eq!(
        problem(5),
        "error: salinity = 60 is outside the physical limit (from 0 to 50)"
    );
    assert_eq!(problem(6), "");
    for row in 1..=5 {
        assert_eq!(field(&out, row, "pair_used"), "", "row {row}");
    }
    assert_eq!(field(&out, 6, "pair_used"), "ta+dic");
    assert_eq!(
        s,
        SolveSummary {
            rows: 6,
            unsolved: 5
        }
    );
}

#[test]
fn over_determined_rows_are_checked() {
    // pCO2 402.69 is what TA 2300 / DIC 2000 give (PyCO2SYS, fact sheet §7g); 500 is
    // 24 % above it, beyond the 5 % tolerance.
    let (out, _) =
        run_str("temp_c,salinity,ta,dic,pco2\n25,35,2300,2000,402.7\n25,35,2300,2000,500\n");
    assert_eq!(field(&out, 1, "problem"), "");
    assert_eq!(field(&out, 1, "pair_used"), "ta+dic");
    assert_eq!(
        field(&out, 2, "problem"),
        "warning: measured pco2 500 differs from the value calculated from ta + dic \
         (402.6930) by 24.2 % (tolerance 5 %)"
    );
    assert_eq!(field(&out, 2, "pair_used"), "ta+dic");
}

/// The pH column's name gives its scale. PyCO2SYS 1.8.3.4 (fact sheet §7g, and the
/// scale cross-check in `chem::scales`): pH_T 8.040225 is pH_NBS 8.176768 at S 35,
/// 25 °C, with TA 2300 µmol/kg.
#[test]
fn ph_scale_comes_from_the_column_name() {
    let (out, _) = run_str("temp_c,salinity,ta,ph_nbs\n25,35,2300,8.176768\n");
    assert!(
        out.starts_with("temp_c,salinity,ta,ph_nbs,dic,ph_t,"),
        "{out}"
    );
    assert_eq!(field(&out, 1, "ph_nbs"), "8.176768", "input kept");
    let ph_t: f64 = field(&out, 1, "ph_t").parse().unwrap();
    assert!((ph_t - 8.040225).abs() < 3e-6, "{ph_t}");
    assert_eq!(field(&out, 1, "pair_used"), "ta+ph_t");
}

#[test]
fn two_ph_columns_are_refused_naming_both() {
    let e = run_with(
        "temp_c,salinity,ta,ph_t,ph_free\n25,35,2300,8.0,8.1\n",
        &MethodSet::default(),
    )
    .unwrap_err();
    assert_eq!(
        e,
        "the header has 2 pH columns (ph_t, ph_free); keep exactly one, named for its \
         scale: ph_t (total), ph_sws (seawater), ph_free or ph_nbs"
    );
}

#[test]
fn out_of_fitted_range_is_solved_and_flagged() {
    let (out, s) = run_str("temp_c,salinity,ta,dic\n0.5,35,2300,2100\n");
    assert_eq!(
        field(&out, 1, "problem"),
        "warning: temp_c 0.50 °C is outside the K1/K2 fitted range 2–35 °C \
         (Lueker, Dickson & Keeling (2000), Mar. Chem. 70:105); \
         warning: temp_c 0.50 °C is outside the KF fitted range 9–33 °C \
         (Perez & Fraga (1987), Mar. Chem. 21:161); \
         warning: temp_c 0.50 °C is outside the Ksp fitted range 5–40 °C (Mucci 1983)"
    );
    assert_eq!(s.unsolved, 0);
}

#[test]
fn method_flags_use_catalogue_ids_and_messages() {
    let e = "lueker".parse::<K1K2>().unwrap_err();
    assert_eq!(e.suggestion, Some("lueker2000"));
    assert!(
        e.to_string()
            .starts_with("unknown carbonic-acid constant set 'lueker'"),
        "{e}"
    );
    // Uppström boron is 4 % below Lee et al.: less borate alkalinity at the same TA
    // leaves more carbonate alkalinity, so pH is higher at the same DIC. The flag
    // reaches the solver.
    let m = MethodSet {
        boron: "uppstrom1974".parse().unwrap(),
        ..MethodSet::default()
    };
    let input = "temp_c,salinity,ta,dic\n25,35,2300,2000\n";
    let (a, _) = run_str(input);
    let (b, _) = run_with(input, &m).unwrap();
    let ph = |o: &str| field(o, 1, "ph_t").parse::<f64>().unwrap();
    assert!(ph(&b) > ph(&a), "{a}\n{b}");
}

/// Worked by hand: columns 0–1 pass, 2 is filled in place, 3–4 pass, 5 in place.
#[test]
fn segments_are_the_runs_of_the_columns() {
    let runs = segments(&[None, None, Some(0), None, None, Some(1)]);
    assert_eq!(
        runs,
        vec![
            Segment::Pass { first: 0, last: 1 },
            Segment::InPlace {
                column: 2,
                output: 0
            },
            Segment::Pass { first: 3, last: 4 },
            Segment::InPlace {
                column: 5,
                output: 1
            },
        ]
    );
    assert_eq!(segments(&[]), vec![]);
}

/// A quoted field, a ragged row and plain rows in one file: every line is written as the
/// field-by-field writer writes it (the `csv` crate's writer, a separate implementation).
#[test]
fn plain_and_quoted_rows_write_alike() {
    let input = "note,temp_c,salinity,ta,dic,x\n\
                 \"a, b\",25,35,2300,2000,1\n\
                 plain,25,35,2300,2000,2\n\
                 short,25,35,2300,2000\n\
                 \"q\"\"q\",25,35,,2000,3\n\
                 plain,25,35,,2000,4\n";
    let (out, _) = run_str(input);
    let mut rdr = csv::ReaderBuilder::new()
        .flexible(true)
        .from_reader(out.as_bytes());
    let mut w = csv::WriterBuilder::new()
        .flexible(true)
        .from_writer(Vec::new());
    w.write_record(rdr.headers().unwrap()).unwrap();
    for rec in rdr.records() {
        w.write_record(&rec.unwrap()).unwrap();
    }
    assert_eq!(String::from_utf8(w.into_inner().unwrap()).unwrap(), out);
    assert!(
        out.contains("\n\"a, b\",25,35,2300.0000,2000.0000,1,"),
        "{out}"
    );
    assert!(
        out.contains("\nplain,25,35,,2000,4,,,,,,,,,,\"error: "),
        "{out}"
    );
}
