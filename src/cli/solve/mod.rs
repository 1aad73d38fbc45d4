//! `calcisite solve`: the carbonate system for every row of a CSV file.
//!
//! The file contract (column names, order, the `problem` and `pair_used` columns, exit
//! status) is fixed in the README's "solve file contract". Rows go through three
//! overlapping stages in chunks (read and parse, solve in parallel, write in input order),
//! so memory stays constant however long the file is. Each row goes through the one measured-pair solver,
//! [`crate::chem::measured`]; numbers are written by [`crate::numfmt`].

use std::fs::File;
use std::io::{self, Read, Write};
use std::path::{Path, PathBuf};
use std::sync::mpsc;
use std::thread;

use clap::Args;
use rayon::prelude::*;

use crate::chem::catalogue::MethodKind;
use crate::chem::measured::{self, MeasuredError, MeasuredParams, Options, Pair, Param};
use crate::chem::scales::{self, PhScale};
use crate::chem::{
    BoronTotal, CarbonateState, Conditions, Constants, K1K2, KfSource, MethodSet, limits,
};
use crate::{fsio, numfmt};

mod records;
mod rows;
use records::Records;
use rows::{Row, Rows};

/// Exit status when every row was solved.
pub const EXIT_OK: i32 = 0;

/// Rows per chunk handed between the read, solve and write stages: large enough to keep
/// both cores busy, small enough that memory does not grow with the file.
const CHUNK_ROWS: usize = 16_384;

/// Output columns appended (or filled in place), in contract order: the species in
/// speciation order (CO2*, HCO3⁻, CO3²⁻).
pub const OUTPUT_COLUMNS: [&str; 13] = [
    "ta",
    "dic",
    "ph_t",
    "pco2",
    "fco2",
    "co2aq",
    "hco3",
    "co3",
    "omega_ar",
    "omega_ca",
    "revelle",
    "problem",
    "pair_used",
];

/// Input pH columns: the name gives the scale.
pub const PH_COLUMNS: [(&str, PhScale); 4] = [
    ("ph_t", PhScale::Total),
    ("ph_sws", PhScale::Seawater),
    ("ph_free", PhScale::Free),
    ("ph_nbs", PhScale::Nbs),
];

#[derive(Args, Debug)]
#[command(after_help = "Examples:
  calcisite solve demo-data/lagoon-bottles-solve.csv -o solved.csv
  cat samples.csv | calcisite solve - > solved.csv
  calcisite solve legacy.csv --carbonic-acid dm87 -o solved.csv

Recognised columns: date, station, temp_c, salinity, depth_m or pressure_dbar, ta, dic,
one pH column (ph_t, ph_sws, ph_free or ph_nbs: the name gives the scale), pco2, fco2, co3,
silicate, phosphate (µmol/kg, µatm, °C). Each row needs two of ta, dic, pH, pco2/fco2, co3;
further ones are checked against the solution. Other columns pass through unchanged. Output
pH is on the total scale (column ph_t). Exit status 0 when every row was solved, 3 when any
row could not be (every row is still written, with the reason in `problem`).")]
pub struct SolveArgs {
    /// Input CSV file, or `-` for standard input.
    pub input: PathBuf,
    /// Output CSV file (written atomically), or `-` for standard output (the default).
    #[arg(short, long, default_value = "-")]
    pub output: PathBuf,
    #[arg(long = "carbonic-acid", value_name = "ID", default_value_t = K1K2::default(),
          help = MethodKind::CarbonicAcid.help())]
    pub carbonic_acid: K1K2,
    #[arg(long = "total-boron", value_name = "ID", default_value_t = BoronTotal::default(),
          help = MethodKind::TotalBoron.help())]
    pub total_boron: BoronTotal,
    #[arg(long = "hydrogen-fluoride", value_name = "ID", default_value_t = KfSource::default(),
          help = MethodKind::HydrogenFluoride.help())]
    pub hydrogen_fluoride: KfSource,
}

/// Where each recognised column sits in the header.
#[derive(Debug)]
struct Layout {
    temp_c: Option<usize>,
    salinity: Option<usize>,
    depth_m: Option<usize>,
    pressure_dbar: Option<usize>,
    silicate: Option<usize>,
    phosphate: Option<usize>,
    /// Carbonate inputs present in the header: (parameter, column name, index).
    carbonate: Vec<(Param, &'static str, usize)>,
    /// The scale of the pH column, if there is one.
    ph_scale: PhScale,
    /// For each output column: the input index it fills in place, if any.
    outputs: Vec<Option<usize>>,
    /// For each input column: the output column it receives in place, if any.
    in_place: Vec<Option<usize>>,
    /// The input columns in order as runs: passed through, or filled in place.
    segments: Vec<Segment>,
    input_width: usize,
    /// The physical limits of the condition columns, looked up once.
    limits: ConditionLimits,
}

/// A run of input columns in the output line.
#[derive(Debug, Clone, PartialEq)]
enum Segment {
    /// Columns `first..=last`, passed through unchanged.
    Pass { first: usize, last: usize },
    /// Column `column`, filled in place by output column `output`.
    InPlace { column: usize, output: usize },
}

/// The runs of `in_place` (one entry per input column), in order.
fn segments(in_place: &[Option<usize>]) -> Vec<Segment> {
    let mut out: Vec<Segment> = Vec::new();
    for (column, slot) in in_place.iter().enumerate() {
        match (*slot, out.last_mut()) {
            (Some(output), _) => out.push(Segment::InPlace { column, output }),
            (None, Some(Segment::Pass { last, .. })) => *last = column,
            (None, _) => out.push(Segment::Pass {
                first: column,
                last: column,
            }),
        }
    }
    out
}

/// The limits of the condition columns ([`limits::LIMITS`] has a row for each).
#[derive(Debug)]
struct ConditionLimits {
    temp_c: limits::Limit,
    salinity: limits::Limit,
    pressure_dbar: limits::Limit,
    depth_m: limits::Limit,
    silicate: limits::Limit,
    phosphate: limits::Limit,
}

impl ConditionLimits {
    fn new() -> Result<ConditionLimits, String> {
        let of = |c: &str| {
            limits::Limit::of(c).ok_or_else(|| format!("internal: no physical limit for {c}"))
        };
        Ok(ConditionLimits {
            temp_c: of("temp_c")?,
            salinity: of("salinity")?,
            pressure_dbar: of("pressure_dbar")?,
            depth_m: of("depth_m")?,
            silicate: of("silicate")?,
            phosphate: of("phosphate")?,
        })
    }
}

impl Layout {
    fn from_header(header: &csv::StringRecord) -> Result<Layout, String> {
        let find = |name: &str| {
            header
                .iter()
                .position(|h| h.trim().eq_ignore_ascii_case(name))
        };
        let ph: Vec<(&'static str, PhScale, usize)> = PH_COLUMNS
            .iter()
            .filter_map(|&(name, scale)| find(name).map(|i| (name, scale, i)))
            .collect();
        if ph.len() > 1 {
            let names: Vec<&str> = ph.iter().map(|p| p.0).collect();
            return Err(format!(
                "the header has {} pH columns ({}); keep exactly one, named for its scale: \
                 ph_t (total), ph_sws (seawater), ph_free or ph_nbs",
                ph.len(),
                names.join(", ")
            ));
        }
        let in_place: Vec<Option<usize>> = (0..header.len())
            .map(|i| OUTPUT_COLUMNS.iter().position(|c| find(c) == Some(i)))
            .collect();
        let mut carbonate = Vec::new();
        let mut ph_scale = PhScale::Total;
        for p in Param::ALL {
            if p == Param::PhT {
                if let Some(&(name, scale, i)) = ph.first() {
                    carbonate.push((p, name, i));
                    ph_scale = scale;
                }
            } else if let Some(i) = find(p.column()) {
                carbonate.push((p, p.column(), i));
            }
        }
        Ok(Layout {
            temp_c: find("temp_c"),
            salinity: find("salinity"),
            depth_m: find("depth_m"),
            pressure_dbar: find("pressure_dbar"),
            silicate: find("silicate"),
            phosphate: find("phosphate"),
            carbonate,
            ph_scale,
            outputs: OUTPUT_COLUMNS.iter().map(|c| find(c)).collect(),
            segments: segments(&in_place),
            in_place,
            input_width: header.len(),
            limits: ConditionLimits::new()?,
        })
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

/// What solving one row gave: the state and pair when solved, and the `problem` notes.
struct RowResult {
    solved: Option<(CarbonateState, Pair)>,
    notes: Vec<String>,
}

fn cell<'a>(rec: &'a Row<'_>, idx: Option<usize>) -> Option<&'a str> {
    idx.and_then(|i| rec.get(i))
        .map(trim)
        .filter(|s| !s.is_empty())
}

/// `str::trim`, with the common case of a cell that starts and ends in a printable ASCII
/// character (nothing to trim) answered from two bytes.
fn trim(s: &str) -> &str {
    let plain = |b: Option<&u8>| b.is_some_and(|b| b.is_ascii_graphic());
    if plain(s.as_bytes().first()) && plain(s.as_bytes().last()) {
        s
    } else {
        s.trim()
    }
}

/// Parse an optional numeric cell; `Err` names the column and the text.
fn number(rec: &Row<'_>, idx: Option<usize>, column: &str) -> Result<Option<f64>, String> {
    // A plain decimal (the usual cell) straight from its bytes; anything else (spaces,
    // exponents, errors, empty) through the text.
    if let Some(v) = idx
        .and_then(|i| rec.bytes(i))
        .and_then(numfmt::fast_decimal)
    {
        return Ok(Some(v));
    }
    match cell(rec, idx) {
        None => Ok(None),
        Some(text) => match numfmt::parse_f64(text) {
            Ok(v) if v.is_finite() => Ok(Some(v)),
            Ok(_) => Err(format!("{column}: '{text}' is not a finite number")),
            Err(_) => Err(format!("{column}: '{text}' is not a number")),
        },
    }
}

/// A solved quantity's reader and the decimals it is written with.
type Quantity = (fn(&CarbonateState) -> f64, usize);

/// The solved quantities, in the order of the first [`QUANTITY_COUNT`] output columns, each
/// with the decimals it is written with (fixed, so that output bytes never depend on float
/// printing). Looked up by position: the writer does no name matching per row.
const QUANTITIES: [Quantity; QUANTITY_COUNT] = [
    (|s| s.ta, 4),
    (|s| s.dic, 4),
    (|s| s.ph_t, 6),
    (|s| s.pco2, 4),
    (|s| s.fco2, 4),
    (|s| s.co2aq, 4),
    (|s| s.hco3, 4),
    (|s| s.co3, 4),
    (|s| s.omega_ar, 5),
    (|s| s.omega_ca, 5),
    (|s| s.revelle, 4),
];

/// Output columns before `problem` and `pair_used`: the solved quantities.
const QUANTITY_COUNT: usize = OUTPUT_COLUMNS.len() - 2;

/// Decimals written for output quantity `name` (4 for a name that is not one).
fn decimals_of(name: &str) -> usize {
    OUTPUT_COLUMNS
        .iter()
        .position(|c| *c == name)
        .and_then(|k| QUANTITIES.get(k))
        .map_or(4, |q| q.1)
}

fn fixed(v: f64, decimals: usize) -> String {
    numfmt::fixed(v, decimals).unwrap_or_default()
}

/// The conditions of one row, checked against the physical limits.
fn conditions(rec: &Row<'_>, layout: &Layout) -> Result<Conditions, String> {
    let parse = |idx, col: &str| number(rec, idx, col);
    let temp_c = parse(layout.temp_c, "temp_c")?;
    let salinity = parse(layout.salinity, "salinity")?;
    let (Some(temp_c), Some(salinity)) = (temp_c, salinity) else {
        let missing = if temp_c.is_none() {
            "temp_c"
        } else {
            "salinity"
        };
        return Err(format!("{missing} is missing"));
    };
    let pressure = match (
        parse(layout.pressure_dbar, "pressure_dbar")?,
        parse(layout.depth_m, "depth_m")?,
    ) {
        (Some(p), _) => ("pressure_dbar", p),
        // A depth in metres is taken as that many decibars (within 1 % at reef depths).
        (None, Some(d)) => ("depth_m", d),
        (None, None) => ("pressure_dbar", 0.0),
    };
    let silicate = parse(layout.silicate, "silicate")?.unwrap_or(0.0);
    let phosphate = parse(layout.phosphate, "phosphate")?.unwrap_or(0.0);
    let l = &layout.limits;
    let pressure_limit = if pressure.0 == "depth_m" {
        &l.depth_m
    } else {
        &l.pressure_dbar
    };
    for (limit, v) in [
        (&l.temp_c, temp_c),
        (&l.salinity, salinity),
        (pressure_limit, pressure.1),
        (&l.silicate, silicate),
        (&l.phosphate, phosphate),
    ] {
        limit.check(v)?;
    }
    Ok(Conditions {
        temp_c,
        salinity,
        pressure_dbar: pressure.1,
        silicate,
        phosphate,
    })
}

/// The `problem` note of a measured parameter that disagrees with the solved state.
fn misfit_note(m: &measured::Misfit, pair: Pair) -> String {
    let name = m.param.column();
    let (shown, tol) = if m.tolerance.relative {
        (
            format!("{} %", fixed(m.difference * 100.0, 1)),
            format!("{} %", fixed(m.tolerance.limit * 100.0, 0)),
        )
    } else {
        (fixed(m.difference, 4), format!("{}", m.tolerance.limit))
    };
    format!(
        "warning: measured {name} {} differs from the value calculated from {} + {} ({}) by {shown} (tolerance {tol})",
        m.measured,
        pair.0.column(),
        pair.1.column(),
        fixed(m.calculated, decimals_of(name))
    )
}

/// Solve one row; never panics.
fn solve_row(rec: &Row<'_>, layout: &Layout, methods: &MethodSet) -> RowResult {
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
        RowResult {
            solved: None,
            notes,
        }
    };
    let cond = match conditions(rec, layout) {
        Ok(c) => c,
        Err(e) => return fail(notes, e),
    };
    let k = Constants::new(&cond, methods);
    let mut given = MeasuredParams::default();
    for &(param, name, idx) in &layout.carbonate {
        match number(rec, Some(idx), name) {
            Ok(Some(v)) if param == Param::PhT && layout.ph_scale != PhScale::Total => {
                given.set(param, Some(scales::to_total(v, layout.ph_scale, &k)));
            }
            Ok(v) => given.set(param, v),
            Err(e) => return fail(notes, e),
        }
    }
    let sol = match measured::solve_measured(&given, &k, &Options::default()) {
        Ok(s) => s,
        Err(e @ MeasuredError::NoPair { .. }) => return fail(notes, e.to_string()),
        Err(MeasuredError::Solve { error, .. }) => return fail(notes, error.to_string()),
    };
    if !methods.in_fitted_ranges(&cond) {
        for w in methods.range_warnings(&cond) {
            notes.push(format!("warning: {w}"));
        }
    }
    for m in sol.inconsistent() {
        notes.push(misfit_note(m, sol.pair));
    }
    RowResult {
        solved: Some((sol.state, sol.pair)),
        notes,
    }
}

/// Append `field` to a CSV line as the `csv` crate's writer does by default: in double
/// quotes, with quotes doubled, when it holds a comma, a quote, CR or LF; as is otherwise.
fn push_field(out: &mut Vec<u8>, field: &[u8]) {
    if !field
        .iter()
        .any(|&b| matches!(b, b',' | b'"' | b'\r' | b'\n'))
    {
        out.extend_from_slice(field);
        return;
    }
    out.push(b'"');
    for part in field.split_inclusive(|&b| b == b'"') {
        out.extend_from_slice(part);
        if part.last() == Some(&b'"') {
            out.push(b'"');
        }
    }
    out.push(b'"');
}

/// Output column `k` of one row as CSV text (quoted when needed), or false for an unsolved
/// value (an in-place column then keeps the input's text). `problem` and `pair_used` are
/// always written.
fn push_output(out: &mut Vec<u8>, k: usize, row: &RowResult, scratch: &mut String) -> bool {
    if let Some(&(value, decimals)) = QUANTITIES.get(k) {
        // Digits, '.' and '-' only: never quoted.
        return match &row.solved {
            Some((st, _)) => numfmt::push_fixed_bytes(out, value(st), decimals),
            None => false,
        };
    }
    if k == QUANTITY_COUNT {
        // `problem`
        scratch.clear();
        for (i, n) in row.notes.iter().enumerate() {
            if i > 0 {
                scratch.push_str("; ");
            }
            scratch.push_str(n);
        }
        push_field(out, scratch.as_bytes());
    } else if let Some((_, pair)) = &row.solved {
        // `pair_used`, as `Pair`'s `Display` writes it (`ta+dic`); the column names hold no
        // character that needs quoting.
        out.extend_from_slice(pair.0.column().as_bytes());
        out.push(b'+');
        out.extend_from_slice(pair.1.column().as_bytes());
    }
    true
}

/// Solve one row and append its output line to `out`; returns whether it was solved.
fn process(
    rec: &Row<'_>,
    layout: &Layout,
    methods: &MethodSet,
    out: &mut Vec<u8>,
    scratch: &mut String,
) -> bool {
    let row = solve_row(rec, layout, methods);
    if rec.plain && rec.len() == layout.input_width {
        // No field needs quoting: runs of passed-through columns are copied as they stand,
        // commas and all (the same bytes as field by field).
        for (n, segment) in layout.segments.iter().enumerate() {
            if n > 0 {
                out.push(b',');
            }
            match *segment {
                Segment::Pass { first, last } => {
                    out.extend_from_slice(rec.span(first, last).unwrap_or("").as_bytes());
                }
                Segment::InPlace { column, output } => {
                    if !push_output(out, output, &row, scratch) {
                        out.extend_from_slice(rec.get(column).unwrap_or("").as_bytes());
                    }
                }
            }
        }
    } else {
        for i in 0..layout.input_width {
            if i > 0 {
                out.push(b',');
            }
            let in_place = layout.in_place.get(i).copied().flatten();
            if !in_place.is_some_and(|k| push_output(out, k, &row, scratch)) {
                push_field(out, rec.get(i).unwrap_or("").as_bytes());
            }
        }
    }
    // The output has at least two fields (temp_c and salinity are in the header, `problem`
    // is appended or in place), so the csv crate's quoting of a lone empty field never arises.
    for (k, slot) in layout.outputs.iter().enumerate() {
        if slot.is_none() {
            out.push(b',');
            push_output(out, k, &row, scratch);
        }
    }
    out.push(b'\n');
    row.solved.is_some()
}

/// Rows per output buffer: each worker writes this many rows into its own buffer. The two
/// workers finish a chunk at most one part apart, and one idles meanwhile: a third of a
/// millisecond at 256 rows (at 1,024 it was over a millisecond of every chunk's ten).
const SUB_ROWS: usize = 256;

/// Solve rows `range` of `rows` and append their lines to `out`; returns the count of
/// unsolved rows.
fn write_rows(
    rows: &Rows,
    range: std::ops::Range<usize>,
    layout: &Layout,
    methods: &MethodSet,
    out: &mut Vec<u8>,
) -> u64 {
    let mut scratch = String::with_capacity(64);
    let mut unsolved = 0;
    for rec in range.filter_map(|i| rows.row(i)) {
        if !process(&rec, layout, methods, out, &mut scratch) {
            unsolved += 1;
        }
    }
    unsolved
}

/// Counts of a finished run.
#[derive(Debug, Default, Clone, Copy, PartialEq, Eq)]
pub struct SolveSummary {
    pub rows: u64,
    pub unsolved: u64,
}

/// The message for a cell (0-based `field`) that is not UTF-8.
fn utf8_error(line: u64, field: usize, header: &csv::StringRecord) -> String {
    let name = header.get(field).unwrap_or("?");
    format!(
        "line {line}, column {} (`{name}`): the cell is not valid UTF-8 text; save the file as UTF-8 (nothing was written)",
        field + 1
    )
}

/// A chunk read (empty at the end of the file), or the read error.
type Chunk = Result<Rows, String>;
/// A chunk solved: one byte buffer per `SUB_ROWS` rows, rows, unsolved rows.
type Solved = Result<(Vec<Vec<u8>>, u64, u64), String>;

/// Stream `reader` to `writer`: the whole `solve` command without the file handling.
///
/// Three stages overlap, each handing chunks to the next through a channel that holds one:
/// a thread reads and parses the next chunk, another solves the current one on all cores,
/// and the calling thread writes the one before. Records and buffers go back to the stage
/// that fills them, so memory stays constant however long the file is.
pub fn solve_stream<R: Read + Send, W: Write>(
    reader: R,
    writer: W,
    methods: &MethodSet,
) -> Result<SolveSummary, String> {
    let mut records = Records::new(reader);
    let head = records
        .header_bytes()
        .map_err(|e| format!("cannot read the header: {e}"))?;
    // The header line alone, read by the `csv` crate as it reads a whole file's first line.
    let header = csv::ReaderBuilder::new()
        .flexible(true)
        .from_reader(head.as_slice())
        .headers()
        .map_err(|e| format!("cannot read the header: {e}"))?
        .clone();
    if header.iter().all(|h| h.trim().is_empty()) {
        return Err("the file has no header row".into());
    }
    let layout = Layout::from_header(&header)?;
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
    let mut out = writer;
    let mut head = Vec::with_capacity(256);
    for (i, name) in layout.output_header(&header).iter().enumerate() {
        if i > 0 {
            head.push(b',');
        }
        push_field(&mut head, name.as_bytes());
    }
    head.push(b'\n');
    out.write_all(&head).map_err(|e| e.to_string())?;

    let (chunk_tx, chunk_rx) = mpsc::sync_channel::<Chunk>(1);
    let (solved_tx, solved_rx) = mpsc::sync_channel::<Solved>(1);
    let (rows_back, rows_free) = mpsc::channel::<Rows>();
    let (bufs_back, bufs_free) = mpsc::channel::<Vec<Vec<u8>>>();
    let layout = &layout;
    let header = &header;
    thread::scope(|s| {
        // Stage 1: read and parse. Stops at the end, at an error, or when no one listens.
        s.spawn(move || {
            loop {
                let mut rows = rows_free.try_recv().unwrap_or_default();
                let msg = rows.fill(&mut records, header, CHUNK_ROWS).map(|()| rows);
                let last = !matches!(&msg, Ok(rows) if rows.len() > 0);
                if chunk_tx.send(msg).is_err() || last {
                    return;
                }
            }
        });
        // Stage 2: solve each chunk in parallel, in `SUB_ROWS` parts written in input order.
        s.spawn(move || {
            for msg in chunk_rx {
                let solved = msg.map(|rows| {
                    let n = rows.len();
                    let mut bufs = bufs_free.try_recv().unwrap_or_default();
                    bufs.resize_with(n.div_ceil(SUB_ROWS), || Vec::with_capacity(SUB_ROWS * 256));
                    let unsolved = bufs
                        .par_iter_mut()
                        .enumerate()
                        .map(|(part, buf)| {
                            buf.clear();
                            let start = part * SUB_ROWS;
                            let range = start..n.min(start + SUB_ROWS);
                            write_rows(&rows, range, layout, methods, buf)
                        })
                        .sum::<u64>();
                    let _ = rows_back.send(rows);
                    (bufs, n as u64, unsolved)
                });
                if solved_tx.send(solved).is_err() {
                    return;
                }
            }
        });
        // Stage 3 (this thread): write in order. Returning early drops the receiver, which
        // stops the other stages.
        let mut summary = SolveSummary::default();
        for msg in solved_rx {
            let (bufs, rows, unsolved) = msg?;
            if rows == 0 {
                break;
            }
            for buf in &bufs {
                out.write_all(buf).map_err(|e| e.to_string())?;
            }
            let _ = bufs_back.send(bufs);
            summary.rows += rows;
            summary.unsolved += unsolved;
        }
        out.flush().map_err(|e| e.to_string())?;
        Ok(summary)
    })
}

/// Run the command; returns the process exit status.
pub fn run(args: &SolveArgs) -> Result<SolveSummary, String> {
    let methods = MethodSet {
        k1k2: args.carbonic_acid,
        boron: args.total_boron,
        kf: args.hydrogen_fluoride,
    };
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
    // Unbuffered: the record reader reads in blocks of its own.
    let reader: Box<dyn Read + Send> = if from_stdin {
        Box::new(io::stdin())
    } else {
        let f = File::open(&args.input)
            .map_err(|e| format!("cannot open the input {}: {e}", args.input.display()))?;
        Box::new(f)
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
        solve_stream(reader, io::BufWriter::new(out), &methods).map_err(label)
    } else {
        let mut result = Err(String::new());
        let written = fsio::write_atomic(Path::new(&args.output), |w| {
            match solve_stream(reader, w, &methods) {
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
mod tests;
