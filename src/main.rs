//! The `calcisite` command line: argument parsing and printing only; the work is done by
//! the library (see `src/lib.rs`).

use std::process::ExitCode;

use calcisite::cli::{self, solve::SolveArgs};
use clap::{CommandFactory, Parser, Subcommand};

/// Seawater carbonate chemistry and aragonite-saturation outlooks for candidate coral-reef
/// restoration sites. Screening-level estimates: not a permit determination.
#[derive(Parser, Debug)]
#[command(name = "calcisite", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Solve the carbonate system for every row of a CSV file.
    Solve(SolveArgs),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
}

fn main() -> ExitCode {
    let _ = ctrlc::set_handler(|| {
        calcisite::fsio::remove_pending();
        eprintln!("calcisite: interrupted; no partial output was left behind");
        std::process::exit(cli::EXIT_INTERRUPTED);
    });
    let args = Cli::parse();
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
        Command::Completions { shell } => {
            clap_complete::generate(shell, &mut Cli::command(), "calcisite", &mut std::io::stdout());
            cli::EXIT_OK
        }
    };
    ExitCode::from(code as u8)
}
