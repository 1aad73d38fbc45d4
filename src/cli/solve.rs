//! `calcisite solve`: the carbonate system for every row of a CSV file.
//!
//! The file contract (column names, order, the `problem` column, exit status) is fixed in
//! `DEVELOPERS.md` and the README. Rows are read and written in chunks; each chunk is
//! solved in parallel and written back in input order, so memory stays constant however
//! long the file is.

use std::fs::File;
use std::io::{self, BufReader, Read, Write};
use std::path::{Path, PathBuf};

use clap::Args;
use rayon::prelude::*;

use crate::chem::scales::{self, PhScale};
use crate::chem::{
    BoronTotal, CarbonateState, Conditions, Constants, Input, K1K2, KfSource, MethodSet, limits,
    solve_pair,
};
use crate::fsio;
use crate::site::records::{TOL_CO2_FRACTION, TOL_PH, TOL_TA_DIC_UMOL_KG};

/// Exit status when every row was solved.
pub const EXIT_OK: i32 = 0;

/// Rows per parallel chunk: large enough to keep both cores busy, small enough that memory
/// does not grow with the file.
const CHUNK_ROWS: usize = 16_384;

/// Input parameters in the order of preference used when a row gives more than two: the
/// pair that constrains the system best (Dickson et al. 2007, chapter 1; TA + DIC is the
/// usual choice, the pH + CO2 pair the worst conditioned) solves, the rest are checked.
const PREFERRED_PAIRS: &[(&str, &str)] = &[
    ("ta", "dic"),
    ("ta", "ph_t"),
    ("dic", "ph_t"),
    ("ta", "pco2"),
    ("ta", "fco2"),
    ("dic", "pco2"),
    ("dic", "fco2"),
    ("ta", "co3"),
    ("dic", "co3"),
    ("ph_t", "co3"),
    ("pco2", "co3"),
    ("fco2", "co3"),
    ("ph_t", "pco2"),
    ("ph_t", "fco2"),
];

/// Measured-minus-calculated tolerances for the consistency check of over-determined rows:
/// the same limits `check` applies to record files (see `site::records::TOL_*` for their
/// basis), so that both commands judge a sample alike. CO3 shares the relative CO2 limit.
const CONSISTENCY: &[(&str, f64, bool)] = &[
    ("ta", TOL_TA_DIC_UMOL_KG, false),
    ("dic", TOL_TA_DIC_UMOL_KG, false),
    ("ph_t", TOL_PH, false),
    ("pco2", TOL_CO2_FRACTION, true),
    ("fco2", TOL_CO2_FRACTION, true),
    ("co3", TOL_CO2_FRACTION, true),
];

/// Output columns appended (or filled in place), in contract order.
pub const OUTPUT_COLUMNS: [&str; 12] = [
    "ta", "dic", "ph_t", "pco2", "fco2", "hco3", "co3", "co2aq", "omega_ar", "omega_ca", "revelle",
    "problem",
];

#[derive(Args, Debug)]
#[command(after_help = "Examples:
  calcisite solve demo-data/lagoon-bottles-solve.csv -o solved.csv
  cat samples.csv | calcisite solve - > solved.csv
  calcisite solve legacy.csv --ph-scale nbs --k1k2 dm87 -o solved.csv

Recognised columns: date, station, temp_c, salinity, depth_m or pressure_dbar, ta, dic,
ph_t, pco2, fco2, co3, silicate, phosphate (µmol/kg, µatm, °C). Each row needs exactly two
of ta, dic, ph_t, pco2/fco2, co3; a third is checked against the solution. Other columns
pass through unchanged. Exit status 0 when every row was solved, 3 when any row could not
be (every row is still written, with the reason in `problem`).")]
pub struct SolveArgs {
    /// Input CSV file, or `-` for standard input.
    pub input: PathBuf,
    /// Output CSV file (written atomically), or `-` for standard output (the default).
    #[arg(short, long, default_value = "-")]
    pub output: PathBuf,
    /// K1/K2 constant set: lueker2000 (default), millero2010, wmw2014, sulpis2020, dm87.
    #[arg(long, default_value = "lueker2000")]
    pub k1k2: K1K2Arg,
    /// Total boron: lee2010 (default) or uppstrom1974.
    #[arg(long, default_value = "lee2010")]
    pub boron: BoronArg,
    /// Hydrogen fluoride constant: pf87 (default) or dr79.
    #[arg(long, default_value = "pf87")]
    pub kf: KfArg,
    /// pH scale of the input `ph_t` column: total (default), sws, free or nbs. Output pH is
    /// always on the total scale and replaces the input value in the `ph_t` column.
    #[arg(long, default_value = "total")]
    pub ph_scale: PhScaleArg,
}

macro_rules! parse_arg {
    ($name:ident, $inner:ty) => {
        #[derive(Clone, Copy, Debug)]
        pub struct $name(pub $inner);
        impl std::str::FromStr for $name {
            type Err = String;
            fn from_str(s: &str) -> Result<Self, String> {
                s.parse::<$inner>().map($name).map_err(|e| e.to_string())
            }
        }
    };
}
parse_arg!(K1K2Arg, K1K2);
parse_arg!(BoronArg, BoronTotal);
parse_arg!(KfArg, KfSource);
parse_arg!(PhScaleArg, PhScale);

/// Where each recognised column sits in the header.
#[derive(Default, Debug)]
struct Layout {
    temp_c: Option<usize>,
    salinity: Option<usize>,
    depth_m: Option<usize>,
    pressure_dbar: Option<usize>,
    silicate: Option<usize>,
    phosphate: Option<usize>,
    /// Carbonate inputs present in the header: (column name, index).
    carbonate: Vec<(&'static str, usize)>,
    /// For each output column: the input index it fills in place, if any.
    outputs: Vec<Option<usize>>,
    input_width: usize,
}

impl Layout {
    fn from_header(header: &csv::StringRecord) -> Layout {
        let find = |name: &str| {
            header
                .iter()
                .position(|h| h.trim().eq_ignore_ascii_case(name))
        };
        let mut carbonate = Vec::new();
        for name in ["ta", "dic", "ph_t", "pco2", "fco2", "co3"] {
            if let Some(i) = find(name) {
                carbonate.push((name, i));
            }
        }
        Layout {
            temp_c: find("temp_c"),
            salinity: find("salinity"),
            depth_m: find("depth_m"),
            pressure_dbar: find("pressure_dbar"),
            silicate: find("silicate"),
            phosphate: find("phosphate"),
            carbonate,
            outputs: OUTPUT_COLUMNS.iter().map(|c| find(c)).collect(),
            input_width: header.len(),
        }
    }

    fn output_header(&self, header: &csv::StringRecord) -> Vec<String> {
        let mut out: Vec<String> = header.iter().map(str::to_string).collect();
        for (name, slot) in OUTPUT_COLUMNS.iter().zip(&self.outputs) {
            if slot.is_none() {
                out.push((*name).to_string());
            }
        }
        out
    }
}

/// The result of one row: the values to write and whether it was solved.
struct RowOut {
    /// All output fields in one buffer (one allocation per row).
    fields: csv::ByteRecord,
    solved: bool,
}

fn cell(rec: &csv::StringRecord, idx: Option<usize>) -> Option<&str> {
    idx.and_then(|i| rec.get(i))
        .map(str::trim)
        .filter(|s| !s.is_empty())
}

/// Parse an optional numeric cell; `Err` names the column and the text.
fn number(
    rec: &csv::StringRecord,
    idx: Option<usize>,
    column: &str,
) -> Result<Option<f64>, String> {
    match cell(rec, idx) {
        None => Ok(None),
        Some(text) => match text.parse::<f64>() {
            Ok(v) if v.is_finite() => Ok(Some(v)),
            Ok(_) => Err(format!("{column}: '{text}' is not a finite number")),
            Err(_) => Err(format!("{column}: '{text}' is not a number")),
        },
    }
}

fn make_input(name: &str, v: f64) -> Input {
    match name {
        "ta" => Input::Ta(v),
        "dic" => Input::Dic(v),
        "ph_t" => Input::PhT(v),
        "pco2" => Input::Pco2(v),
        "fco2" => Input::Fco2(v),
        _ => Input::Co3(v),
    }
}

fn state_value(st: &CarbonateState, name: &str) -> f64 {
    match name {
        "ta" => st.ta,
        "dic" => st.dic,
        "ph_t" => st.ph_t,
        "pco2" => st.pco2,
        "fco2" => st.fco2,
        "hco3" => st.hco3,
        "co3" => st.co3,
        "co2aq" => st.co2aq,
        "omega_ar" => st.omega_ar,
        "omega_ca" => st.omega_ca,
        _ => st.revelle,
    }
}

/// Decimals written per output quantity (fixed, so that output bytes never depend on float
/// printing).
fn decimals_of(name: &str) -> u32 {
    match name {
        "ph_t" => 6,
        "omega_ar" | "omega_ca" => 5,
        _ => 4,
    }
}

/// The text of one output value.
#[cfg(test)]
fn format_value(name: &str, v: f64) -> String {
    let mut s = String::new();
    push_fixed(&mut s, v, decimals_of(name));
    s
}

/// Append `v` with exactly `decimals` decimals, rounded half away from zero at
/// `v·10^decimals`. Many times faster than `format!("{v:.4}")`, whose exact decimal
/// expansion dominated the run time of `solve` on large files. Values too large for the
/// integer path (never the case for the quantities written here) fall back to `format!`.
fn push_fixed(buf: &mut String, v: f64, decimals: u32) {
    let decimals = decimals.min(9);
    let scaled = (v * 10f64.powi(decimals as i32)).round();
    if !scaled.is_finite() || scaled.abs() >= 9.0e15 {
        buf.push_str(&format!("{v:.prec$}", prec = decimals as usize));
        return;
    }
    let n = scaled as i64;
    if n < 0 {
        buf.push('-');
    }
    let unit = 10u64.pow(decimals);
    let m = n.unsigned_abs();
    push_digits(buf, m / unit, 1);
    if decimals > 0 {
        buf.push('.');
        push_digits(buf, m % unit, decimals as usize);
    }
}

/// Append the decimal digits of `x`, left-padded with zeros to at least `width`.
fn push_digits(buf: &mut String, mut x: u64, width: usize) {
    let mut digits = [b'0'; 20];
    let mut len = 0;
    while x > 0 || len < width {
        if let Some(d) = digits.get_mut(len) {
            *d = b'0' + (x % 10) as u8;
        }
        x /= 10;
        len += 1;
        if len >= digits.len() {
            break;
        }
    }
    for &d in digits.iter().take(len).rev() {
        buf.push(char::from(d));
    }
}

/// Solve one row; never panics.
fn solve_row(
    rec: &csv::StringRecord,
    layout: &Layout,
    methods: &MethodSet,
    ph_scale: PhScale,
) -> (Option<CarbonateState>, Vec<String>, bool) {
    let mut notes = Vec::new();
    if rec.len() != layout.input_width {
        notes.push(format!(
            "warning: row has {} fields, the header has {}",
            rec.len(),
            layout.input_width
        ));
    }
    let fail = |mut notes: Vec<String>, msg: String| {
        notes.push(format!("error: {msg}"));
        (None, notes, false)
    };
    let parse = |idx, col: &str| number(rec, idx, col);
    let (temp_c, salinity) = match (
        parse(layout.temp_c, "temp_c"),
        parse(layout.salinity, "salinity"),
    ) {
        (Ok(Some(t)), Ok(Some(s))) => (t, s),
        (Err(e), _) | (_, Err(e)) => return fail(notes, e),
        (Ok(None), _) => return fail(notes, "temp_c is missing".into()),
        (_, Ok(None)) => return fail(notes, "salinity is missing".into()),
    };
    let pressure = match (
        parse(layout.pressure_dbar, "pressure_dbar"),
        parse(layout.depth_m, "depth_m"),
    ) {
        (Err(e), _) | (_, Err(e)) => return fail(notes, e),
        (Ok(Some(p)), _) => ("pressure_dbar", p),
        // A depth in metres is taken as that many decibars (within 1 % at reef depths).
        (Ok(None), Ok(Some(d))) => ("depth_m", d),
        (Ok(None), Ok(None)) => ("pressure_dbar", 0.0),
    };
    let silicate = match parse(layout.silicate, "silicate") {
        Ok(v) => v.unwrap_or(0.0),
        Err(e) => return fail(notes, e),
    };
    let phosphate = match parse(layout.phosphate, "phosphate") {
        Ok(v) => v.unwrap_or(0.0),
        Err(e) => return fail(notes, e),
    };
    for (col, v) in [
        ("temp_c", temp_c),
        ("salinity", salinity),
        (pressure.0, pressure.1),
        ("silicate", silicate),
        ("phosphate", phosphate),
    ] {
        if let Err(e) = limits::check(col, v) {
            return fail(notes, e);
        }
    }
    let cond = Conditions {
        temp_c,
        salinity,
        pressure_dbar: pressure.1,
        silicate,
        phosphate,
    };
    let k = Constants::new(&cond, methods);

    let mut given: Vec<(&'static str, f64)> = Vec::new();
    for &(name, idx) in &layout.carbonate {
        match number(rec, Some(idx), name) {
            Ok(Some(mut v)) => {
                if name == "ph_t" && ph_scale != PhScale::Total {
                    v = scales::to_total(v, ph_scale, &k);
                }
                given.push((name, v));
            }
            Ok(None) => {}
            Err(e) => return fail(notes, e),
        }
    }
    let has = |n: &str| given.iter().any(|(g, _)| *g == n);
    if has("pco2") && has("fco2") && given.len() == 2 {
        return fail(notes, "pco2 with fco2 is not a valid pair: they carry the same information; give one of them with ta, dic, ph_t or co3".into());
    }
    if given.len() < 2 {
        let names: Vec<&str> = given.iter().map(|(n, _)| *n).collect();
        return fail(
            notes,
            format!(
                "two of ta, dic, ph_t, pco2/fco2, co3 are needed, this row gives {}",
                if names.is_empty() {
                    "none".to_string()
                } else {
                    format!("{} only", names.join(", "))
                }
            ),
        );
    }
    let value = |n: &str| given.iter().find(|(g, _)| *g == n).map(|(_, v)| *v);
    let Some(&(a, b)) = PREFERRED_PAIRS.iter().find(|(a, b)| has(a) && has(b)) else {
        return fail(notes, "no valid pair among the given parameters".into());
    };
    let (Some(va), Some(vb)) = (value(a), value(b)) else {
        return fail(notes, "no valid pair among the given parameters".into());
    };
    let state = match solve_pair(make_input(a, va), make_input(b, vb), &k) {
        Ok(st) => st,
        Err(e) => return fail(notes, e.to_string()),
    };
    for w in methods.range_warnings(&cond) {
        notes.push(format!("warning: {w}"));
    }
    if given.len() > 2 {
        notes.push(format!("note: solved from {a} + {b}"));
    }
    for (name, measured) in &given {
        if *name == a || *name == b {
            continue;
        }
        let calc = state_value(&state, name);
        if let Some(&(_, tol, relative)) = CONSISTENCY.iter().find(|(n, ..)| n == name) {
            let diff = if relative {
                (measured - calc) / calc
            } else {
                measured - calc
            };
            if diff.abs() > tol {
                let shown = if relative {
                    format!("{:.1} %", diff * 100.0)
                } else {
                    format!("{diff:.4}")
                };
                let tol_s = if relative {
                    format!("{:.0} %", tol * 100.0)
                } else {
                    format!("{tol}")
                };
                notes.push(format!(
                    "warning: measured {name} {measured} differs from the value calculated from {a} + {b} ({}) by {shown} (tolerance {tol_s})",
                    {
                        let mut t = String::new();
                        push_fixed(&mut t, calc, decimals_of(name));
                        t
                    }
                ));
            }
        }
    }
    (Some(state), notes, true)
}

fn process(
    rec: &csv::StringRecord,
    layout: &Layout,
    methods: &MethodSet,
    ph_scale: PhScale,
) -> RowOut {
    let (state, notes, solved) = solve_row(rec, layout, methods, ph_scale);
    // The text of output column `k`, or None for an unsolved value (an in-place column then
    // keeps the input's text).
    let mut scratch = String::with_capacity(16);
    let text = |k: usize, buf: &mut String| -> bool {
        buf.clear();
        let name = OUTPUT_COLUMNS.get(k).copied().unwrap_or("problem");
        if name == "problem" {
            for (i, n) in notes.iter().enumerate() {
                if i > 0 {
                    buf.push_str("; ");
                }
                buf.push_str(n);
            }
            true
        } else if let Some(st) = &state {
            push_fixed(buf, state_value(st, name), decimals_of(name));
            true
        } else {
            false
        }
    };
    let mut fields = csv::ByteRecord::with_capacity(
        rec.as_slice().len() + 160,
        layout.input_width + OUTPUT_COLUMNS.len(),
    );
    for i in 0..layout.input_width {
        let input = rec.get(i).unwrap_or("");
        match layout.outputs.iter().position(|slot| *slot == Some(i)) {
            Some(k) if text(k, &mut scratch) => fields.push_field(scratch.as_bytes()),
            _ => fields.push_field(input.as_bytes()),
        }
    }
    for (k, slot) in layout.outputs.iter().enumerate() {
        if slot.is_none() {
            if text(k, &mut scratch) {
                fields.push_field(scratch.as_bytes());
            } else {
                fields.push_field(b"");
            }
        }
    }
    RowOut { fields, solved }
}

/// Counts of a finished run.
#[derive(Debug, Default, Clone, Copy, PartialEq, Eq)]
pub struct SolveSummary {
    pub rows: u64,
    pub unsolved: u64,
}

/// Stream `reader` to `writer`: the whole `solve` command without the file handling.
pub fn solve_stream<R: Read, W: Write>(
    reader: R,
    writer: W,
    methods: &MethodSet,
    ph_scale: PhScale,
) -> Result<SolveSummary, String> {
    let mut rdr = csv::ReaderBuilder::new().flexible(true).from_reader(reader);
    let header = rdr
        .headers()
        .map_err(|e| format!("cannot read the header: {e}"))?
        .clone();
    if header.iter().all(|h| h.trim().is_empty()) {
        return Err("the file has no header row".into());
    }
    let layout = Layout::from_header(&header);
    if layout.temp_c.is_none() || layout.salinity.is_none() {
        if header.iter().all(|h| h.trim().parse::<f64>().is_ok()) {
            return Err(format!(
                "line 1 ({}) looks like data, not a header; add a header line naming the columns, e.g. temp_c,salinity,ta,dic",
                header.iter().collect::<Vec<_>>().join(",")
            ));
        }
        return Err(format!(
            "the header needs temp_c and salinity columns (found: {})",
            header.iter().collect::<Vec<_>>().join(", ")
        ));
    }
    let mut wtr = csv::WriterBuilder::new().flexible(true).from_writer(writer);
    wtr.write_record(layout.output_header(&header))
        .map_err(|e| e.to_string())?;
    let mut summary = SolveSummary::default();
    let mut chunk: Vec<csv::StringRecord> = Vec::with_capacity(CHUNK_ROWS);
    let mut records = rdr.records();
    loop {
        chunk.clear();
        for rec in records.by_ref().take(CHUNK_ROWS) {
            match rec {
                Ok(r) => chunk.push(r),
                Err(e) => {
                    let line = e.position().map(|p| p.line()).unwrap_or(0);
                    if let csv::ErrorKind::Utf8 { err, .. } = e.kind() {
                        let name = header.get(err.field()).unwrap_or("?");
                        return Err(format!(
                            "line {line}, column {} (`{name}`): the cell is not valid UTF-8 text; save the file as UTF-8 (nothing was written)",
                            err.field() + 1
                        ));
                    }
                    return Err(format!("line {line}: {e}"));
                }
            }
        }
        if chunk.is_empty() {
            break;
        }
        let outs: Vec<RowOut> = chunk
            .par_iter()
            .map(|r| process(r, &layout, methods, ph_scale))
            .collect();
        for o in outs {
            summary.rows += 1;
            if !o.solved {
                summary.unsolved += 1;
            }
            wtr.write_byte_record(&o.fields)
                .map_err(|e| e.to_string())?;
        }
    }
    wtr.flush().map_err(|e| e.to_string())?;
    Ok(summary)
}

/// Run the command; returns the process exit status.
pub fn run(args: &SolveArgs) -> Result<SolveSummary, String> {
    let methods = MethodSet {
        k1k2: args.k1k2.0,
        boron: args.boron.0,
        kf: args.kf.0,
    };
    let ph_scale = args.ph_scale.0;
    let from_stdin = args.input.as_os_str() == "-";
    let to_stdout = args.output.as_os_str() == "-";
    if !from_stdin
        && !to_stdout
        && fsio::is_same_file_as_any(&args.output, std::slice::from_ref(&args.input))
    {
        return Err(format!(
            "{}: the output would overwrite the input; choose another -o path",
            args.output.display()
        ));
    }
    if !from_stdin && args.input.is_dir() {
        return Err(format!(
            "the input {} is a folder; give the path of a CSV file",
            args.input.display()
        ));
    }
    let reader: Box<dyn Read> = if from_stdin {
        Box::new(io::stdin().lock())
    } else {
        let f = File::open(&args.input)
            .map_err(|e| format!("cannot open the input {}: {e}", args.input.display()))?;
        Box::new(BufReader::with_capacity(1 << 20, f))
    };
    let label = |e: String| {
        if from_stdin {
            format!("<stdin>: {e}")
        } else {
            format!("{}: {e}", args.input.display())
        }
    };
    if to_stdout {
        let out = io::stdout().lock();
        solve_stream(reader, io::BufWriter::new(out), &methods, ph_scale).map_err(label)
    } else {
        let mut result = Err(String::new());
        let written = fsio::write_atomic(Path::new(&args.output), |w| {
            match solve_stream(reader, w, &methods, ph_scale) {
                Ok(s) => {
                    result = Ok(s);
                    Ok(())
                }
                Err(e) => {
                    result = Err(label(e));
                    Err(io::Error::other("input error"))
                }
            }
        });
        match (written, result) {
            (Ok(()), Ok(s)) => Ok(s),
            (_, Err(e)) if !e.is_empty() => Err(e),
            (Err(e), _) => Err(format!("{}: {e}", args.output.display())),
            (Ok(()), Err(e)) => Err(e),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run_str(input: &str) -> (String, SolveSummary) {
        let mut out = Vec::new();
        let s = solve_stream(
            input.as_bytes(),
            &mut out,
            &MethodSet::default(),
            PhScale::Total,
        )
        .unwrap();
        (String::from_utf8(out).unwrap(), s)
    }

    #[test]
    fn contract_columns_and_order() {
        let (out, s) = run_str("station,temp_c,salinity,ta,dic,note\nA,25,35,2300,2000,x\n");
        let mut lines = out.lines();
        assert_eq!(
            lines.next().unwrap(),
            "station,temp_c,salinity,ta,dic,note,ph_t,pco2,fco2,hco3,co3,co2aq,omega_ar,omega_ca,revelle,problem"
        );
        let row = lines.next().unwrap();
        // PyCO2SYS 1.8.3.4, default set (fact sheet §7g): pH_T 8.040225, Omega_ar 3.346727.
        assert!(
            row.starts_with("A,25,35,2300.0000,2000.0000,x,8.040225,402.69"),
            "{row}"
        );
        assert!(row.contains(",3.34673,"), "{row}");
        assert!(row.ends_with(','), "problem column should be empty: {row}");
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
        let lines: Vec<&str> = out.lines().collect();
        assert_eq!(lines.len(), 7, "every row is written");
        assert!(
            lines[1].contains("ta: 'abc' is not a number"),
            "{}",
            lines[1]
        );
        assert!(
            lines[2].contains("pco2 with fco2 is not a valid pair"),
            "{}",
            lines[2]
        );
        assert!(lines[3].contains("this row gives ta only"), "{}", lines[3]);
        assert!(
            lines[4].contains("ta = -5") && lines[4].contains("physical limit"),
            "{}",
            lines[4]
        );
        assert!(lines[5].contains("salinity = 60"), "{}", lines[5]);
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
        // pCO2 402.69 is what TA 2300 / DIC 2000 give; 500 is not.
        let (out, _) =
            run_str("temp_c,salinity,ta,dic,pco2\n25,35,2300,2000,402.7\n25,35,2300,2000,500\n");
        let lines: Vec<&str> = out.lines().collect();
        assert!(lines[1].contains("note: solved from ta + dic") && !lines[1].contains("warning"));
        assert!(
            lines[2].contains("warning: measured pco2 500"),
            "{}",
            lines[2]
        );
    }

    fn fixed(v: f64, d: u32) -> String {
        let mut s = String::new();
        push_fixed(&mut s, v, d);
        s
    }

    #[test]
    fn fixed_decimals_matches_rounding() {
        assert_eq!(fixed(8.0402251, 6), "8.040225");
        assert_eq!(fixed(2300.0, 4), "2300.0000");
        assert_eq!(fixed(0.000049, 4), "0.0000");
        assert_eq!(fixed(-1.23456, 2), "-1.23");
        assert_eq!(fixed(3.3467265, 5), "3.34673");
        assert_eq!(fixed(0.5, 0), "1");
        assert_eq!(fixed(7.0, 0), "7");
        assert_eq!(fixed(0.04, 1), "0.0");
        assert_eq!(fixed(1e300, 4), format!("{:.4}", 1e300));
        assert_eq!(format_value("ph_t", 8.0), "8.000000");
        // Agrees with the exact formatter except at (near-)ties, where the exact formatter
        // sees the binary value's side of the half and this one rounds the scaled value.
        let near_tie = |x: f64, d: i32| ((x * 10f64.powi(d)).abs().fract() - 0.5).abs() < 1e-6;
        for i in 0..20_000 {
            let v = -700.0 + f64::from(i) * 0.0731;
            if !near_tie(v, 4) {
                assert_eq!(fixed(v, 4), format!("{v:.4}"), "{v}");
            }
            if !near_tie(v / 1000.0, 6) {
                assert_eq!(fixed(v / 1000.0, 6), format!("{:.6}", v / 1000.0), "{v}");
            }
        }
    }

    #[test]
    fn out_of_fitted_range_is_solved_and_flagged() {
        let (out, s) = run_str("temp_c,salinity,ta,dic\n0.5,35,2300,2100\n");
        assert!(
            out.contains("warning: temp_c 0.50 °C is outside the K1/K2 fitted range"),
            "{out}"
        );
        assert_eq!(s.unsolved, 0);
    }
}
