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
  calcisite report --site-list sites.txt -o comparison.pdf --detail 10 \\
      --ranking-out ranking.csv --each-site-pdf site-reports
  calcisite report --site-list sites.txt --shard 2/8 --results results
  calcisite report --site-list sites.txt --merge results -o comparison.pdf

The report prints the date of its last sample and the date it was prepared: [report] date
in the site file, or SOURCE_DATE_EPOCH when set (never the clock), so the same inputs, seed
and version give a byte-identical file.")]
pub struct ReportArgs {
    /// Site description files (TOML); two or more give a comparison report
    #[arg(
        value_name = "SITE.toml",
        required_unless_present_any = ["dump_template", "site_list"],
        conflicts_with = "site_list",
        num_args = 1..
    )]
    pub sites: Vec<PathBuf>,

    /// The PDF to write (written to a temporary file first, then renamed into place)
    #[arg(
        short,
        long,
        value_name = "FILE.pdf",
        required_unless_present_any = ["dump_template", "shard"]
    )]
    pub output: Option<PathBuf>,

    /// Read the sites from FILE: one site file per line, relative to FILE's folder; blank
    /// lines and lines starting with # are skipped. A site that cannot be read or projected is
    /// named, left out of the ranking, and the run ends with status 3
    #[arg(long, value_name = "FILE")]
    pub site_list: Option<PathBuf>,

    /// How many of the best ranked sites get full sections in a comparison; every site is
    /// still ranked
    #[arg(long, value_name = "K", default_value_t = DEFAULT_DETAIL, value_parser = parse_detail)]
    pub detail: usize,

    /// Also write one report per site into DIR (created if missing), named by list line and
    /// site, e.g. 0003-north-reef.pdf
    #[arg(long, value_name = "DIR")]
    pub each_site_pdf: Option<PathBuf>,

    /// Write every ranked site's numbers to FILE (.csv or .json; may be given twice)
    #[arg(long, value_name = "FILE")]
    pub ranking_out: Vec<PathBuf>,

    /// Run only shard K of N of the site list (sites K, K+N, K+2N, ...) and write one result
    /// file per site into --results DIR, for `--merge`
    #[arg(long, value_name = "K/N", value_parser = super::sites::parse_shard, requires_all = ["site_list", "results"], conflicts_with_all = ["merge", "output", "data_out", "ranking_out"])]
    pub shard: Option<super::sites::Shard>,

    /// The folder a shard writes its result files into
    #[arg(long, value_name = "DIR", requires = "shard")]
    pub results: Option<PathBuf>,

    /// Build the ranking and the comparison from the result files the shards wrote into DIR
    /// (with the --site-list and --seed the shards were given)
    #[arg(long, value_name = "DIR", requires = "site_list")]
    pub merge: Option<PathBuf>,

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
    #[arg(long, value_name = "DIR", conflicts_with_all = ["sites", "output", "template", "data_out", "site_list"])]
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
        let json = self.data_out_bytes(model)?;
        let rendered = crate::report::render(model, &options)?;
        crate::report::write_atomic(out, &rendered.pdf)?;
        if let Some((path, bytes)) = json {
            crate::report::write_atomic(path, &bytes)?;
        }
        Ok(rendered)
    }

    /// The `--data-out` JSON of `model` (`None` without `--data-out`), its file name and
    /// SHA-256 recorded in the model first so that the appendix can name it; write the bytes
    /// only after the PDF succeeded.
    pub fn data_out_bytes(
        &self,
        model: &mut crate::report::ReportModel,
    ) -> Result<Option<(&Path, Vec<u8>)>, ReportError> {
        let Some(path) = &self.data_out else {
            return Ok(None);
        };
        let bytes = crate::report::data_json_bytes(model)?;
        model.data_out = Some(crate::report::OutputFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default(),
            sha256: crate::report::sha256_hex(&bytes),
        });
        Ok(Some((path.as_path(), bytes)))
    }
}

/// Runs `report`; returns the exit status. Sites are loaded and projected in parallel; a
/// site that fails is named with its error and left out of the ranking, the others are
/// written, and the status is 3 (nothing is written when no site could be projected).
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
    super::many::run(args)
}

/// The command that reproduces a report, run in the folder `base` (the first site file's):
/// the site paths (or the site list) relative to it, so that no folder of this machine is
/// printed, and output paths left out, so that the same inputs give the same PDF wherever it
/// is written.
pub fn reproduce_command(
    args: &ReportArgs,
    base: &Path,
    sites: &[&Path],
    list: Option<&Path>,
) -> String {
    let mut command = String::from("calcisite report");
    if let Some(list) = list {
        command.push_str(&format!(
            " --site-list {}",
            crate::fsio::relative_to(base, list).display()
        ));
    }
    for s in sites {
        command.push(' ');
        command.push_str(&crate::fsio::relative_to(base, s).display().to_string());
    }
    if let Some(seed) = args.seed {
        command.push_str(&format!(" --seed {seed}"));
    }
    if list.is_some() && args.detail != DEFAULT_DETAIL {
        command.push_str(&format!(" --detail {}", args.detail));
    }
    if args.appendix {
        command.push_str(" --appendix");
    }
    if args.pdfa {
        command.push_str(" --pdfa");
    }
    command
}

/// `--detail K`: a whole number of at least 1.
fn parse_detail(s: &str) -> Result<usize, String> {
    match s.trim().parse::<usize>() {
        Ok(k) if k >= 1 => Ok(k),
        _ => Err(format!("{s:?} is not a whole number of at least 1")),
    }
}

/// Sites shown in full in a comparison unless `--detail` says otherwise.
pub const DEFAULT_DETAIL: usize = 10;

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
