//! The `calcisite` command line: argument parsing and printing only; the work is done by
//! the library (see `src/lib.rs`).

use std::process::ExitCode;

use calcisite::cli::{
    self, check::CheckArgs, init::InitArgs, project::ProjectArgs, report::ReportArgs,
    solve::SolveArgs,
};
use clap::{CommandFactory, Parser, Subcommand};

/// Seawater carbonate chemistry and aragonite-saturation outlooks for candidate coral-reef
/// restoration sites. Screening-level estimates: not a permit determination.
#[derive(Parser, Debug)]
#[command(
    name = "calcisite",
    version,
    about,
    long_about = None,
    after_help = "Examples:
  calcisite init my-site
  calcisite check my-site/site.toml
  calcisite project my-site/site.toml -o outlook.csv
  calcisite report a.toml b.toml c.toml -o comparison.pdf
  calcisite solve samples.csv -o solved.csv

Screening-level estimates, not a permit determination: biological and local factors are not
modelled; consult local permitting authorities and licensed professionals."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
    /// Print errors only (no warnings, notes or progress).
    #[arg(short, long, global = true, conflicts_with = "verbose")]
    quiet: bool,
    /// Print more detail about what is being done.
    #[arg(short, long, global = true)]
    verbose: bool,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Solve the carbonate system for every row of a CSV file.
    Solve(SolveArgs),
    /// Validate a site file and its records; print coverage, QC findings and the seasonal
    /// baseline.
    Check(CheckArgs),
    /// Write a commented site file and a record template into a folder.
    Init(InitArgs),
    /// Project Omega_ar per season under CO2 pathways with uncertainty; write the tables.
    Project(ProjectArgs),
    /// Typeset the PDF feasibility report for one site, or a comparison of several.
    Report(ReportArgs),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
}

/// Keeps glibc's size above which an allocation gets its own memory mapping at 128 KiB (its
/// starting value). glibc otherwise raises that size each time a mapped block is freed (up to
/// 32 MiB), after which large buffers (figure SVGs, font data, the PDF) come from the heap,
/// where freed space fragments and is not given back: the same three-site report then peaked
/// anywhere between about 100 and 440 MB from run to run; with the size kept, at about 104 MB
/// every time (measured with `/usr/bin/time -v`, 5 runs each; README, "Speed").
#[cfg(all(target_os = "linux", target_env = "gnu"))]
fn keep_mmap_threshold() {
    /// `M_MMAP_THRESHOLD` of glibc's `<malloc.h>`.
    const M_MMAP_THRESHOLD: std::ffi::c_int = -3;
    unsafe extern "C" {
        fn mallopt(param: std::ffi::c_int, value: std::ffi::c_int) -> std::ffi::c_int;
    }
    // SAFETY: mallopt only sets an allocator parameter; it is called once, first thing in
    // main, before any other thread exists. A refusal (return 0) leaves glibc's default.
    unsafe {
        mallopt(M_MMAP_THRESHOLD, 128 * 1024);
    }
}

#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
fn keep_mmap_threshold() {}

fn main() -> ExitCode {
    keep_mmap_threshold();
    let _ = ctrlc::set_handler(|| {
        calcisite::fsio::remove_pending();
        eprintln!("calcisite: interrupted; no partial output was left behind");
        std::process::exit(cli::EXIT_INTERRUPTED);
    });
    let args = Cli::parse();
    calcisite::diag::set_verbosity(if args.quiet {
        calcisite::diag::Verbosity::Quiet
    } else if args.verbose {
        calcisite::diag::Verbosity::Verbose
    } else {
        calcisite::diag::Verbosity::Normal
    });
    let code = match args.command {
        Command::Solve(a) => match cli::solve::run(&a) {
            Ok(s) if s.unsolved > 0 => {
                eprintln!(
                    "calcisite solve: {} of {} rows could not be solved (see the problem column)",
                    s.unsolved, s.rows
                );
                cli::EXIT_PARTIAL
            }
            Ok(_) => cli::EXIT_OK,
            Err(e) => {
                eprintln!("error: {e}");
                cli::EXIT_INPUT
            }
        },
        Command::Check(a) => cli::check::run_check(&a),
        Command::Init(a) => cli::init::run_init(&a),
        Command::Project(a) => cli::project::run_project(&a),
        Command::Report(a) => cli::report::run_report(&a),
        Command::Completions { shell } => {
            // Into memory first: generating straight to a full or closed stdout would panic.
            let mut script = Vec::new();
            clap_complete::generate(shell, &mut Cli::command(), "calcisite", &mut script);
            if cli::print_out(&String::from_utf8_lossy(&script)) {
                cli::EXIT_OK
            } else {
                cli::EXIT_INPUT
            }
        }
    };
    ExitCode::from(code as u8)
}
