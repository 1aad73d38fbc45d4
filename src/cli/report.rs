//! Arguments of `calcisite report` and the parts of the command that do not need the site data:
//! `--dump-template`, the render options (template directory, PDF/A, `SOURCE_DATE_EPOCH`) and
//! writing the outputs. Filling the [`crate::report::ReportModel`] from the site and outlook
//! stages is done by the caller.

use std::path::{Path, PathBuf};

use crate::report::ReportError;

/// Arguments of `calcisite report`.
#[derive(clap::Args, Debug, Clone)]
#[command(after_help = "\
Examples:
  calcisite report reef.toml -o reef.pdf
  calcisite report reef.toml -o reef.pdf --appendix --data-out reef.json
  calcisite report north.toml lagoon.toml slope.toml -o comparison.pdf
  calcisite report --dump-template my-templates
  calcisite report reef.toml -o reef.pdf --template my-templates

The report prints the date of its last sample and the date it was prepared: [report] date
in the site file, or SOURCE_DATE_EPOCH when set (never the clock), so the same inputs, seed
and version give a byte-identical file.")]
pub struct ReportArgs {
    /// Site description files (TOML); two or more give a comparison report
    #[arg(value_name = "SITE.toml", required_unless_present = "dump_template", num_args = 1..)]
    pub sites: Vec<PathBuf>,

    /// The PDF to write (written to a temporary file first, then renamed into place)
    #[arg(
        short,
        long,
        value_name = "FILE.pdf",
        required_unless_present = "dump_template"
    )]
    pub output: Option<PathBuf>,

    /// Add the chemistry appendix: every sample with measured and calculated parameters and
    /// QC flags
    #[arg(long)]
    pub appendix: bool,

    /// Also write the numbers behind the report as JSON
    #[arg(long, value_name = "FILE.json")]
    pub data_out: Option<PathBuf>,

    /// Typeset with the templates in DIR (must contain report.typ) instead of the built-in ones
    #[arg(long, value_name = "DIR")]
    pub template: Option<PathBuf>,

    /// Write the built-in templates into DIR for editing, then stop (never overwrites)
    #[arg(long, value_name = "DIR", conflicts_with_all = ["sites", "output", "template", "data_out"])]
    pub dump_template: Option<PathBuf>,

    /// Write PDF/A-2b (for archival filing) instead of plain PDF
    #[arg(long)]
    pub pdfa: bool,

    /// Seed of the Monte Carlo ensemble (default: the site's or the built-in seed)
    #[arg(long, value_name = "N")]
    pub seed: Option<u64>,
}

/// Writes the built-in templates for `--dump-template DIR`; returns the files written.
pub fn dump_templates(dir: &std::path::Path) -> Result<Vec<PathBuf>, ReportError> {
    crate::report::dump_templates(dir)
}

#[cfg(feature = "pdf")]
impl ReportArgs {
    /// Render options from the flags and `SOURCE_DATE_EPOCH`; `dated_by_user`: a site gave
    /// `[report] date` (which the model's timestamp then holds).
    pub fn render_options(
        &self,
        dated_by_user: bool,
    ) -> Result<crate::report::RenderOptions, ReportError> {
        Ok(crate::report::RenderOptions {
            template: match &self.template {
                Some(dir) => crate::report::TemplateSource::Dir(dir.clone()),
                None => crate::report::TemplateSource::BuiltIn,
            },
            pdfa: self.pdfa,
            timestamp_override: crate::report::timestamp_from_env()?,
            dated_by_user,
        })
    }

    /// Renders the model and writes the PDF (and `--data-out` JSON). Nothing is written when
    /// the typesetting fails; the JSON is written only after the PDF succeeded. The JSON is
    /// serialised first, so that the report can name it with its SHA-256 (the model's
    /// `data_out`, which the JSON itself does not hold). `dated_by_user` as for
    /// [`ReportArgs::render_options`].
    pub fn write_outputs(
        &self,
        model: &mut crate::report::ReportModel,
        dated_by_user: bool,
    ) -> Result<crate::report::Rendered, ReportError> {
        let out = self.output.as_deref().ok_or_else(|| {
            ReportError::Refused("no output file given (use -o FILE.pdf)".to_string())
        })?;
        let options = self.render_options(dated_by_user)?;
        let json = match &self.data_out {
            Some(path) => {
                let bytes = crate::report::data_json_bytes(model)?;
                model.data_out = Some(crate::report::OutputFile {
                    name: path
                        .file_name()
                        .map(|n| n.to_string_lossy().into_owned())
                        .unwrap_or_default(),
                    sha256: crate::report::sha256_hex(&bytes),
                });
                Some((path, bytes))
            }
            None => None,
        };
        let rendered = crate::report::render(model, &options)?;
        crate::report::write_atomic(out, &rendered.pdf)?;
        if let Some((path, bytes)) = json {
            crate::report::write_atomic(path, &bytes)?;
        }
        Ok(rendered)
    }
}

/// Runs `report`; returns the exit status. Sites are loaded and projected in parallel; when
/// one fails, the message names it and nothing is written.
pub fn run_report(args: &ReportArgs) -> i32 {
    use super::{EXIT_INPUT, EXIT_OK};
    if let Some(dir) = &args.dump_template {
        return match dump_templates(dir) {
            Ok(files) => {
                for f in files {
                    super::print_out(&format!("wrote {}\n", f.display()));
                }
                EXIT_OK
            }
            Err(e) => {
                eprintln!("error: {e}");
                EXIT_INPUT
            }
        };
    }
    run_report_sites(args)
}

#[cfg(not(feature = "pdf"))]
fn run_report_sites(_args: &ReportArgs) -> i32 {
    eprintln!(
        "error: this build of calcisite has no typesetter (built without the `pdf` feature); \
         rebuild with default features to write reports"
    );
    super::EXIT_INPUT
}

#[cfg(feature = "pdf")]
fn run_report_sites(args: &ReportArgs) -> i32 {
    use rayon::prelude::*;

    use super::EXIT_INPUT;
    use super::project::{EnsembleOverrides, load_and_project};
    use crate::pipeline::{RunStatus, SiteRun, report_model};
    use crate::report::build::BuildOptions;

    let Some(out) = args.output.as_deref() else {
        eprintln!("error: no output file given (use -o FILE.pdf)");
        return EXIT_INPUT;
    };
    // Refuse an impossible output path before the sites are projected and typeset.
    for target in std::iter::once(out).chain(args.data_out.as_deref()) {
        if let Err(e) = crate::fsio::output_folder(target) {
            eprintln!("error: cannot write {}: {e}", target.display());
            return EXIT_INPUT;
        }
    }
    let overrides = EnsembleOverrides {
        seed: args.seed,
        members: None,
        threads: None,
    };
    let single = args.sites.len() == 1;
    let results: Vec<_> = args
        .sites
        .par_iter()
        .map(|site| (site, load_and_project(site, overrides, single, false)))
        .collect();
    let mut runs = Vec::with_capacity(results.len());
    let mut failed = Vec::new();
    for (site, r) in results {
        match r {
            Ok((loaded, outlook)) => runs.push(SiteRun { loaded, outlook }),
            Err(_) => failed.push(site.display().to_string()),
        }
    }
    if !failed.is_empty() {
        eprintln!(
            "error: no report written: {} of {} site(s) failed: {} (see the messages above)",
            failed.len(),
            args.sites.len(),
            failed.join(", ")
        );
        return EXIT_INPUT;
    }
    let inputs: Vec<PathBuf> = runs
        .iter()
        .flat_map(|r| r.loaded.input_files.iter().cloned())
        .collect();
    for candidate in std::iter::once(out).chain(args.data_out.as_deref()) {
        if crate::fsio::is_same_file_as_any(candidate, &inputs) {
            eprintln!(
                "error: {} is one of the inputs; choose another output file",
                candidate.display()
            );
            return EXIT_INPUT;
        }
    }
    // The command that reproduces the numbers, run in the first site file's folder: site
    // paths relative to it, so that no folder of this machine is printed, and output paths
    // left out, so that the same inputs give the same PDF wherever it is written.
    let base = args
        .sites
        .first()
        .and_then(|s| s.parent())
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let mut command = String::from("calcisite report");
    for s in &args.sites {
        command.push(' ');
        command.push_str(&crate::fsio::relative_to(base, s).display().to_string());
    }
    if let Some(seed) = args.seed {
        command.push_str(&format!(" --seed {seed}"));
    }
    if args.appendix {
        command.push_str(" --appendix");
    }
    if args.pdfa {
        command.push_str(" --pdfa");
    }
    let opts = BuildOptions {
        appendix: args.appendix,
        command: Some(command),
    };
    let mut model = match report_model(&runs, &opts) {
        Ok(m) => m,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_INPUT;
        }
    };
    // The model builder takes the report date from the first site that gives `[report] date`.
    let dated_by_user = runs.iter().any(|r| r.loaded.site.report.date.is_some());
    match args.write_outputs(&mut model, dated_by_user) {
        Ok(rendered) => {
            if !crate::diag::quiet() {
                eprint!("{}", rendered.warnings);
                eprintln!("wrote {} ({} pages)", out.display(), rendered.pages);
            }
            // Exit 3 when ensemble members could not be solved at any site (README).
            let status = RunStatus::worst(runs.iter().map(|r| RunStatus::of_outlook(&r.outlook)));
            if status == RunStatus::Partial && !crate::diag::quiet() {
                eprintln!(
                    "some ensemble member-years could not be solved; see the notes in the report"
                );
            }
            status.exit_code()
        }
        Err(e) => {
            eprintln!("error: {e}");
            EXIT_INPUT
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::Parser;

    #[derive(clap::Parser, Debug)]
    struct Cli {
        #[command(flatten)]
        args: ReportArgs,
    }

    #[test]
    fn parses_sites_output_and_flags() {
        let c = Cli::try_parse_from([
            "x",
            "a.toml",
            "b.toml",
            "-o",
            "out.pdf",
            "--appendix",
            "--data-out",
            "d.json",
            "--pdfa",
            "--seed",
            "7",
            "--template",
            "tpl",
        ])
        .unwrap();
        assert_eq!(c.args.sites.len(), 2);
        assert_eq!(
            c.args.output.as_deref(),
            Some(std::path::Path::new("out.pdf"))
        );
        assert!(c.args.appendix && c.args.pdfa);
        assert_eq!(c.args.seed, Some(7));
    }

    #[test]
    fn dump_template_stands_alone() {
        let c = Cli::try_parse_from(["x", "--dump-template", "dir"]).unwrap();
        assert!(c.args.sites.is_empty() && c.args.output.is_none());
        assert!(Cli::try_parse_from(["x", "a.toml", "--dump-template", "dir"]).is_err());
        assert!(
            Cli::try_parse_from(["x", "a.toml"]).is_err(),
            "-o is required"
        );
        assert!(
            Cli::try_parse_from(["x", "-o", "a.pdf"]).is_err(),
            "a site is required"
        );
    }
}
