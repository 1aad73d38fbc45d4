//! `calcisite init DIR`: write a commented site file and a record template.

use std::path::PathBuf;

use crate::site::init::write_templates;

/// Arguments of `calcisite init`.
#[derive(clap::Args, Debug, Clone)]
#[command(after_help = "Examples:
  calcisite init my-site
  calcisite check my-site/site.toml      (after filling in the values and records)

Existing files are never overwritten.")]
pub struct InitArgs {
    /// Folder to write `site.toml` and `records.csv` into (created if missing; existing files
    /// are never overwritten)
    pub dir: PathBuf,
}

/// Runs `init`; returns the exit status ([`super::EXIT_OK`] written, [`super::EXIT_INPUT`]
/// refused or failed; nothing is overwritten).
pub fn run_init(args: &InitArgs) -> i32 {
    match write_templates(&args.dir) {
        Ok(files) => {
            for f in &files {
                super::print_out(&format!("wrote {}\n", f.display()));
            }
            if let Some(site) = files.first() {
                super::print_out(&format!(
                    "next: fill in the site values in {} and one row per sample in the CSV, then run `calcisite check {}`\n",
                    site.display(),
                    site.display()
                ));
            }
            super::EXIT_OK
        }
        Err(diags) => {
            eprint!("{}", diags.render(crate::diag::colour_wanted(false)));
            super::EXIT_INPUT
        }
    }
}
