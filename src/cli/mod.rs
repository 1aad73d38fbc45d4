//! Command implementations behind the thin `main.rs`: one submodule per subcommand.
//!
//! Exit status, the same for every command (also in the README):
//!
//! | code | meaning |
//! |---|---|
//! | 0 | success (warnings allowed) |
//! | 1 | input error: a file could not be read or is invalid; nothing was written |
//! | 2 | usage error: unknown command or flag (from the argument parser) |
//! | 3 | partial results: some rows could not be solved; every row was still written |
//! | 130 | interrupted (Ctrl-C); no partial output file is left behind |

pub mod check;
pub mod init;
#[cfg(feature = "pdf")]
pub mod many;
#[cfg(feature = "pdf")]
pub mod merge;
pub mod project;
pub mod report;
pub mod sites;
pub mod solve;

/// Writes `text` to standard output. A full or closed standard output is reported on standard
/// error (`print!` would panic instead); returns false when the text could not be written.
pub fn print_out(text: &str) -> bool {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => true,
        Err(e) => {
            let _ = writeln!(
                std::io::stderr(),
                "error: cannot write to standard output: {e}"
            );
            false
        }
    }
}

/// Success.
pub const EXIT_OK: i32 = 0;
/// A file could not be read or is invalid; nothing was written.
pub const EXIT_INPUT: i32 = 1;
/// Unknown command or flag.
pub const EXIT_USAGE: i32 = 2;
/// Some rows could not be solved; all rows were written.
pub const EXIT_PARTIAL: i32 = 3;
/// Interrupted by Ctrl-C.
pub const EXIT_INTERRUPTED: i32 = 130;
