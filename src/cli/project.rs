//! `calcisite project SITE.toml`: the seasonal Omega_ar projection under CO2 pathways with
//! its Monte Carlo uncertainty, habitat-threshold crossings and the calcification outlook,
//! as long-format CSV (one table, chosen with `--table`) or JSON (everything).
//!
//! Output goes to standard output, or atomically to `-o FILE` (temporary file in the same
//! folder, then renamed). A progress bar is drawn on standard error only when it is a
//! terminal. Exit status: 0 on success, 1 when the site or settings cannot be used (nothing
//! is written), 3 when some ensemble member-years could not be solved (all results are still
//! written; the notes say which).

use std::io::{self, IsTerminal, Write};
use std::path::{Path, PathBuf};

use clap::Args;

use crate::diag::colour_wanted;
use crate::fsio;
use crate::outlook::{self, Outlook, OutputFormat, OutputTable, Progress};
use crate::pipeline::{self, RunStatus};
use crate::site::LoadedSite;

use super::EXIT_INPUT;

/// Arguments of `calcisite project`.
#[derive(Args, Debug, Clone)]
#[command(after_help = "Examples:
  calcisite project sites/tala-vesi-forereef.toml -o outlook.csv
  calcisite project sites/tala-vesi-forereef.toml --format json -o outlook.json
  calcisite project sites/tala-vesi-forereef.toml --table crossings
  calcisite project sites/tala-vesi-forereef.toml --members 0      (ensemble off: records only)

CSV columns (quantiles table): pathway, scenario, year, season, quantity, p05, p25, p50,
p75, p95, members, outside_fit_pct. Quantities carry their unit in the name (omega_ar,
omega_ca, ph_t, pco2_uatm, dic_umol_kg, ta_umol_kg, co3_umol_kg, temp_c,
omega_ar_change, ph_t_change, calc_change_pct_<id>, and net_calc_kg_m2_yr_<id> only when the
site file gives a measured rate). Changes are paired: each ensemble member against its own
present-day state. Screening-level estimates, not a permit determination.")]
pub struct ProjectArgs {
    /// The site description file (TOML).
    pub site: PathBuf,
    /// Output format: csv (one table) or json (all tables, settings and sources).
    #[arg(long, default_value = "csv")]
    pub format: OutputFormat,
    /// CSV table: quantiles (default), crossings (first years below the habitat thresholds)
    /// or thresholds (probability below each threshold per year), heat, exposure (hours per
    /// day below each threshold in sensor series) or diel (their mean diel cycle).
    #[arg(long, default_value = "quantiles")]
    pub table: OutputTable,
    /// Output file (written atomically); `-` or absent for standard output.
    #[arg(short, long)]
    pub output: Option<PathBuf>,
    /// Monte Carlo seed (overrides `[projection] seed`).
    #[arg(long)]
    pub seed: Option<u64>,
    /// Ensemble members per pathway and season (overrides `[projection] members`); 0 turns
    /// the ensemble off (each record once, central constants).
    #[arg(long)]
    pub members: Option<usize>,
    /// Worker threads (default: all cores). Results do not depend on it.
    #[arg(long)]
    pub threads: Option<usize>,
}

/// Progress bar on standard error (only used on a terminal).
struct Bar(indicatif::ProgressBar);

impl Progress for Bar {
    fn start(&self, total: u64) {
        self.0.set_length(total);
    }
    fn advance(&self, n: u64) {
        self.0.inc(n);
    }
}

/// Overrides of the site file's ensemble settings from the command line.
pub use crate::pipeline::Overrides as EnsembleOverrides;

/// Loads, checks and projects one site through [`crate::pipeline`], printing its
/// diagnostics to standard error. `Err` carries the exit status and the message printed. The progress bar appears only when `progress` is true and standard error is a
/// terminal.
pub fn load_and_project(
    path: &Path,
    overrides: EnsembleOverrides,
    progress: bool,
    all_findings: bool,
) -> Result<(LoadedSite, Outlook), SiteFailed> {
    let colour = colour_wanted(false);
    let checked = match pipeline::load_checked(path, overrides) {
        Ok(c) => c,
        Err(failure) => return Err(print_failure(path, &failure, colour)),
    };
    let loaded = &checked.loaded;
    if (!loaded.findings.is_empty() || !loaded.qc.is_empty()) && !crate::diag::quiet() {
        if all_findings || crate::diag::verbose() {
            let shown = super::check::site_diagnostics(loaded, crate::diag::verbose());
            eprint!("{}", shown.render(colour));
        } else {
            // Counted as `check` shows them: row findings of one kind grouped.
            let shown = super::check::site_diagnostics(loaded, false);
            let w = shown.count(crate::diag::Severity::Warning);
            let n = shown.count(crate::diag::Severity::Note);
            eprintln!(
                "{}: {w} warning(s), {n} note(s); `calcisite check {}` lists them",
                path.display(),
                path.display()
            );
        }
    }
    let result = if progress && io::stderr().is_terminal() && !crate::diag::quiet() {
        let bar = indicatif::ProgressBar::new(0);
        if let Ok(style) = indicatif::ProgressStyle::with_template(
            "{msg} [{bar:40}] {percent:>3}% ({elapsed}, ~{eta} left)",
        ) {
            bar.set_style(style.progress_chars("=> "));
        }
        bar.set_message("projecting");
        let r = pipeline::project(checked, &Bar(bar.clone()));
        bar.finish_and_clear();
        r
    } else {
        pipeline::project(checked, &outlook::NoProgress)
    };
    match result {
        Ok(run) => Ok((run.loaded, run.outlook)),
        Err(failure) => Err(print_failure(path, &failure, colour)),
    }
}

/// A site that stopped in the pipeline: the exit status and the message printed for it.
#[derive(Debug, Clone)]
pub struct SiteFailed {
    pub code: i32,
    /// What was printed, without colour (for a result file of a sharded run).
    pub message: String,
}

/// Why a site stopped in the pipeline, as printed.
fn failure_text(path: &Path, failure: &pipeline::Failure, colour: bool) -> String {
    match failure {
        pipeline::Failure::Load(fail) => {
            let diags = super::check::failure_diagnostics(fail, crate::diag::verbose());
            format!(
                "{}{}: the site cannot be projected until the errors above are fixed\n",
                diags.render(colour),
                path.display()
            )
        }
        pipeline::Failure::Outlook(e) => format!("error: {}: {e}\n", path.display()),
    }
}

/// Prints why a site stopped in the pipeline; returns the exit status and the message.
fn print_failure(path: &Path, failure: &pipeline::Failure, colour: bool) -> SiteFailed {
    eprint!("{}", failure_text(path, failure, colour));
    SiteFailed {
        code: RunStatus::InputError.exit_code(),
        message: failure_text(path, failure, false),
    }
}

/// Runs `project`; returns the exit status.
pub fn run_project(args: &ProjectArgs) -> i32 {
    let out_path = args.output.as_ref().filter(|p| p.as_os_str() != "-");
    let overrides = EnsembleOverrides {
        seed: args.seed,
        members: args.members,
        threads: args.threads,
    };
    let (loaded, outlook) = match load_and_project(&args.site, overrides, true, true) {
        Ok(v) => v,
        Err(failed) => return failed.code,
    };
    if let Some(p) = out_path
        && fsio::is_same_file_as_any(p, &loaded.input_files)
    {
        eprintln!(
            "error: the output {} is one of the inputs; choose another file",
            p.display()
        );
        return EXIT_INPUT;
    }

    let written = match out_path {
        Some(p) => fsio::write_atomic(p, |w| outlook.write(w, args.format, args.table))
            .map_err(|e| format!("cannot write {}: {e}", p.display())),
        None => {
            let stdout = io::stdout();
            let mut w = io::BufWriter::new(stdout.lock());
            outlook
                .write(&mut w, args.format, args.table)
                .and_then(|_| w.flush())
                .map_err(|e| format!("cannot write to standard output: {e}"))
        }
    };
    if let Err(e) = written {
        eprintln!("error: {e}");
        return EXIT_INPUT;
    }
    if !crate::diag::quiet() {
        for note in &outlook.notes {
            eprintln!("note: {note}");
        }
    }
    RunStatus::of_outlook(&outlook).exit_code()
}
