//! `calcisite report` over one site or many: sites are projected in parallel and only their
//! summaries are kept ([`crate::report::many`]); the comparison shows the `--detail` best
//! ranked in full, which are projected a second time when more sites were given than that.
//! Also the site list file, `--shard K/N` (one result file per site) and `--merge DIR`.

use std::path::{Path, PathBuf};
use std::sync::mpsc::SyncSender;

use rayon::prelude::*;

use super::report::{ReportArgs, reproduce_command};
use super::{EXIT_INPUT, EXIT_PARTIAL};
use crate::pipeline::{RunStatus, SiteRun, report_model};
use crate::report::build::BuildOptions;
use crate::report::many::{
    PathwayEnd, RESULT_FORMAT, ResultFile, SiteFailure, SiteResult, assemble, summarise,
};
use crate::report::ranking::rank_sites;
use crate::report::ranking_table::{LeftOut, Origins, ranking_csv, ranking_json};
use crate::report::{Rendered, ReportModel};

pub use super::sites::{Listed, Shard, read_site_list, settings_hash};

/// Renders a model with the command's options and empties the typesetter's memoisation
/// caches afterwards (they only help when the same document is compiled again, which a run
/// never does; left alone they keep every report's layout).
fn render_one(args: &ReportArgs, model: &ReportModel, dated: bool) -> Result<Rendered, String> {
    let options = args.render_options(dated).map_err(|e| e.to_string())?;
    let rendered = crate::report::render(model, &options).map_err(|e| e.to_string());
    typst::comemo::evict(0);
    rendered
}

/// A per-site PDF waiting to be typeset.
struct PdfJob {
    line: usize,
    out: PathBuf,
    model: ReportModel,
    dated: bool,
}

/// Runs `work` with a typesetting thread for the per-site PDFs (`--each-site-pdf`): the
/// sites are projected on a pool of their own and hand their models over a channel of one
/// place, so that one report is typeset at a time (a report's typesetting holds its figures,
/// fonts and layout) while the next sites are projected. The typesetter's own parallel work
/// runs on the global pool, whose threads never wait for the channel. Returns `work`'s value
/// and the sites whose PDF could not be written, with why.
fn with_site_pdfs<T: Send>(
    args: &ReportArgs,
    work: impl FnOnce(Option<&SyncSender<PdfJob>>) -> T + Send,
) -> Result<(T, Vec<(usize, String)>), String> {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(rayon::current_num_threads())
        .build()
        .map_err(|e| format!("cannot start the worker threads: {e}"))?;
    if args.each_site_pdf.is_none() {
        return Ok((pool.install(|| work(None)), Vec::new()));
    }
    let (tx, rx) = std::sync::mpsc::sync_channel::<PdfJob>(1);
    std::thread::scope(|scope| {
        let typesetter = scope.spawn(move || {
            let mut failed = Vec::new();
            for job in rx {
                let written = render_one(args, &job.model, job.dated).and_then(|r| {
                    crate::report::write_atomic(&job.out, &r.pdf).map_err(|e| e.to_string())
                });
                if let Err(e) = written {
                    eprintln!("error: {}: {e}", job.out.display());
                    failed.push((job.line, format!("its PDF could not be written: {e}")));
                }
            }
            failed
        });
        let value = pool.install(|| work(Some(&tx)));
        drop(tx);
        let failed = typesetter
            .join()
            .map_err(|_| "the typesetting thread stopped".to_string())?;
        Ok((value, failed))
    })
}

/// What every site of the run shares.
struct Context<'a> {
    args: &'a ReportArgs,
    /// Keep each site's full section (the run shows every site in detail).
    keep_full: bool,
    /// Where per-site PDFs go to be typeset (`--each-site-pdf`).
    pdfs: Option<&'a SyncSender<PdfJob>>,
}

/// Loads, projects and builds one site's model; writes its PDF (`--each-site-pdf`) and its
/// result file (`--shard`). The model is summarised unless the run keeps sites in full.
fn process_site(l: &Listed, ctx: &Context<'_>) -> Result<SiteResult, SiteFailure> {
    let args = ctx.args;
    let fail = |message: String| SiteFailure {
        line: l.line,
        file: l.shown.clone(),
        message,
    };
    let (model, partial, pathway_end_co2, dated_by_user) =
        one_site_model(args, &l.path).map_err(|m| {
            // Messages from the pipeline were printed where they arose; ours are printed here.
            if !m.1 {
                eprintln!("error: {}: {}", l.path.display(), m.0);
            }
            fail(m.0)
        })?;
    if let (Some(dir), Some(tx)) = (&args.each_site_pdf, ctx.pdfs) {
        let job = PdfJob {
            line: l.line,
            out: dir.join(site_pdf_name(l.line, &model)),
            model: model.clone(),
            dated: dated_by_user,
        };
        tx.send(job)
            .map_err(|_| fail("the typesetting thread stopped".to_string()))?;
    }
    let mut model = model;
    if !ctx.keep_full {
        let horizons = model.horizons.clone();
        for s in &mut model.sites {
            *s = summarise(s, &horizons);
        }
    }
    Ok(SiteResult {
        line: l.line,
        file: l.shown.clone(),
        dated_by_user,
        partial,
        pathway_end_co2,
        model,
    })
}

/// A site's one-site model as `calcisite report SITE` builds it, whether ensemble members
/// were left unsolved, its pathways' end CO2 and whether it is dated by `[report] date`.
/// `Err`: the message and whether it was printed already.
type OneSite = (ReportModel, bool, Vec<PathwayEnd>, bool);
fn one_site_model(args: &ReportArgs, path: &Path) -> Result<OneSite, (String, bool)> {
    let overrides = super::project::EnsembleOverrides {
        seed: args.seed,
        members: None,
        threads: None,
    };
    let (loaded, outlook) = super::project::load_and_project(path, overrides, false, false)
        .map_err(|f| (f.message, true))?;
    let run = SiteRun { loaded, outlook };
    let partial = RunStatus::of_outlook(&run.outlook) == RunStatus::Partial;
    let ends = run
        .outlook
        .pathways
        .iter()
        .map(|p| PathwayEnd {
            id: p.name.clone(),
            co2_ppm: p.xco2_ppm.last().copied().unwrap_or(f64::NAN),
        })
        .collect();
    let dated = run.loaded.site.report.date.is_some();
    let base = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let opts = BuildOptions {
        appendix: args.appendix,
        command: Some(reproduce_command(args, base, &[path], None)),
    };
    let model = report_model(std::slice::from_ref(&run), &opts).map_err(|e| (e, false))?;
    Ok((model, partial, ends, dated))
}

/// `NNNN-<site id>.pdf`: the list line keeps two sites with the same file name apart.
fn site_pdf_name(line: usize, model: &ReportModel) -> String {
    let id: String = model
        .sites
        .first()
        .map(|s| s.id.as_str())
        .unwrap_or("site")
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' || c == '.' {
                c
            } else {
                '-'
            }
        })
        .collect();
    format!("{line:04}-{id}.pdf")
}

/// The sites of the run: the list file's, or those on the command line (numbered from 1).
fn listed_sites(args: &ReportArgs) -> Result<Vec<Listed>, String> {
    match &args.site_list {
        Some(list) => read_site_list(list),
        None => Ok(args
            .sites
            .iter()
            .enumerate()
            .map(|(i, p)| Listed {
                line: i + 1,
                path: p.clone(),
                shown: p.display().to_string(),
            })
            .collect()),
    }
}

/// Refuses output paths that cannot be written before any site is projected; creates the
/// output folders.
fn check_outputs(args: &ReportArgs) -> Result<(), String> {
    let files = args
        .output
        .iter()
        .chain(args.data_out.iter())
        .chain(args.ranking_out.iter());
    for f in files {
        crate::fsio::output_folder(f).map_err(|e| format!("cannot write {}: {e}", f.display()))?;
    }
    for f in &args.ranking_out {
        let ext = f.extension().and_then(|e| e.to_str()).unwrap_or_default();
        if !matches!(ext, "csv" | "json") {
            return Err(format!(
                "--ranking-out {}: the file name must end in .csv or .json (which decides the format)",
                f.display()
            ));
        }
    }
    for dir in args.each_site_pdf.iter().chain(args.results.iter()) {
        std::fs::create_dir_all(dir)
            .map_err(|e| format!("cannot create the folder {}: {e}", dir.display()))?;
    }
    Ok(())
}

/// Runs `report` on the sites of the command line or of `--site-list`; returns the exit
/// status.
pub fn run(args: &ReportArgs) -> i32 {
    match run_inner(args) {
        Ok(code) => code,
        Err(e) => {
            eprintln!("error: {e}");
            EXIT_INPUT
        }
    }
}

fn run_inner(args: &ReportArgs) -> Result<i32, String> {
    let listed = listed_sites(args)?;
    check_outputs(args)?;
    let hash = match &args.site_list {
        Some(list) => settings_hash(list, args.seed)?,
        None => String::new(),
    };
    if let Some(dir) = &args.merge {
        let (ok, failed) = super::merge::read_results(dir, &listed, &hash)?;
        return finish(args, &listed, ok, failed, false);
    }
    let mine: Vec<&Listed> = match args.shard {
        Some(sh) => listed
            .iter()
            .enumerate()
            .filter(|(i, _)| sh.takes(*i))
            .map(|(_, l)| l)
            .collect(),
        None => listed.iter().collect(),
    };
    let keep_full = args.shard.is_none() && listed.len() <= args.detail;
    if let (Some(sh), Some(dir)) = (args.shard, &args.results) {
        let (code, pdf_failed) = with_site_pdfs(args, |pdfs| {
            let ctx = Context {
                args,
                keep_full,
                pdfs,
            };
            let process = |l: &Listed| process_site(l, &ctx);
            super::merge::run_shard(&mine, &process, dir, sh, &hash)
        })?;
        return Ok(if pdf_failed.is_empty() {
            code?
        } else {
            code.map(|_| EXIT_PARTIAL)?
        });
    }
    let (outcomes, pdf_failed) = with_site_pdfs(args, |pdfs| {
        let ctx = Context {
            args,
            keep_full,
            pdfs,
        };
        mine.par_iter()
            .map(|l| process_site(l, &ctx))
            .collect::<Vec<Result<SiteResult, SiteFailure>>>()
    })?;
    let mut ok = Vec::new();
    let mut failed = Vec::new();
    for o in outcomes {
        match o {
            Ok(r) if !pdf_failed.iter().any(|(line, _)| *line == r.line) => ok.push(r),
            Ok(r) => failed.push(SiteFailure {
                line: r.line,
                file: r.file,
                message: pdf_failed
                    .iter()
                    .find(|(line, _)| *line == r.line)
                    .map(|(_, m)| m.clone())
                    .unwrap_or_default(),
            }),
            Err(f) => failed.push(f),
        }
    }
    finish(args, &listed, ok, failed, keep_full)
}

/// Ranks the sites, projects the best ranked again in full when only summaries are held, and
/// writes the comparison, `--data-out` and `--ranking-out`.
fn finish(
    args: &ReportArgs,
    listed: &[Listed],
    ok: Vec<SiteResult>,
    failed: Vec<SiteFailure>,
    all_full: bool,
) -> Result<i32, String> {
    if ok.is_empty() {
        return Err(format!(
            "no report written: none of the {} site(s) could be projected",
            listed.len()
        ));
    }
    let out = args
        .output
        .as_deref()
        .ok_or("no output file given (use -o FILE.pdf)")?;
    let lines: Vec<usize> = ok.iter().map(|r| r.line).collect();
    let files: Vec<String> = ok.iter().map(|r| r.file.clone()).collect();
    let recorded: Vec<Vec<String>> = ok
        .iter()
        .map(|r| {
            r.model
                .reproducibility
                .inputs
                .iter()
                .map(|f| f.sha256.clone())
                .collect()
        })
        .collect();
    let inputs: Vec<PathBuf> = ok
        .iter()
        .flat_map(|r| {
            r.model
                .reproducibility
                .inputs
                .iter()
                .map(|f| PathBuf::from(&f.path))
        })
        .collect();
    for candidate in std::iter::once(out)
        .chain(args.data_out.as_deref())
        .chain(args.ranking_out.iter().map(PathBuf::as_path))
    {
        if crate::fsio::is_same_file_as_any(candidate, &inputs) {
            return Err(format!(
                "{} is one of the inputs; choose another output file",
                candidate.display()
            ));
        }
    }
    let dated_by_user = ok.iter().any(|r| r.dated_by_user);
    let partial = ok.iter().any(|r| r.partial);
    let first_path = listed.first().map(|l| l.path.as_path());
    let command = comparison_command(args, listed, first_path);
    let mut model = assemble(ok, Some(command), Vec::new())?;
    let detail: Vec<usize> = rank_sites(&model)
        .iter()
        .take(args.detail.max(1))
        .map(|e| e.site)
        .collect();
    if !all_full {
        full_sections(args, &mut model, &detail, &lines, listed, &recorded)?;
    }
    model.summary_only = (0..model.sites.len())
        .filter(|i| !detail.contains(i))
        .collect();
    let json = args.data_out_bytes(&mut model).map_err(|e| e.to_string())?;
    let rendered = render_one(args, &model, dated_by_user)?;
    crate::report::write_atomic(out, &rendered.pdf).map_err(|e| e.to_string())?;
    if let Some((path, bytes)) = json {
        crate::report::write_atomic(path, &bytes).map_err(|e| e.to_string())?;
    }
    let origins = Origins {
        lines: &lines,
        files: &files,
    };
    let left: Vec<LeftOut<'_>> = failed
        .iter()
        .map(|f| LeftOut {
            line: f.line,
            file: &f.file,
            message: &f.message,
        })
        .collect();
    for f in &args.ranking_out {
        let bytes = if f.extension().is_some_and(|e| e == "json") {
            ranking_json(&model, &origins, &left)?
        } else {
            ranking_csv(&model, &origins)?
        };
        crate::fsio::write_bytes_atomic(f, &bytes)
            .map_err(|e| format!("cannot write {}: {e}", f.display()))?;
    }
    if !crate::diag::quiet() {
        eprint!("{}", rendered.warnings);
        eprintln!("wrote {} ({} pages)", out.display(), rendered.pages);
    }
    if !failed.is_empty() {
        // A site of a list file is found by its line there; one of the command line by its
        // file name alone.
        let names: Vec<String> = failed
            .iter()
            .map(|f| match args.site_list {
                Some(_) => format!("{} (line {})", f.file, f.line),
                None => f.file.clone(),
            })
            .collect();
        eprintln!(
            "left out of the ranking: {} of {} site(s): {} (see the messages above)",
            failed.len(),
            listed.len(),
            names.join(", ")
        );
        return Ok(EXIT_PARTIAL);
    }
    if partial && !crate::diag::quiet() {
        eprintln!("some ensemble member-years could not be solved; see the notes in the report");
    }
    Ok(if partial { EXIT_PARTIAL } else { 0 })
}

/// The command that reproduces the comparison, in the first listed site's folder.
fn comparison_command(args: &ReportArgs, listed: &[Listed], first: Option<&Path>) -> String {
    let base = first
        .and_then(Path::parent)
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    match &args.site_list {
        Some(list) => reproduce_command(args, base, &[], Some(list)),
        None => {
            let paths: Vec<&Path> = listed.iter().map(|l| l.path.as_path()).collect();
            reproduce_command(args, base, &paths, None)
        }
    }
}

/// Projects the sites shown in detail again and puts their full sections into the model;
/// refuses a site whose input files changed since its summary was made.
fn full_sections(
    args: &ReportArgs,
    model: &mut ReportModel,
    detail: &[usize],
    lines: &[usize],
    listed: &[Listed],
    recorded: &[Vec<String>],
) -> Result<(), String> {
    let full: Vec<(usize, Result<ReportModel, String>)> = detail
        .par_iter()
        .map(|&i| {
            let line = lines.get(i).copied().unwrap_or_default();
            let Some(l) = listed.iter().find(|l| l.line == line) else {
                return (i, Err(format!("no listed site for line {line}")));
            };
            let r = one_site_model(args, &l.path).map(|m| m.0).map_err(|e| e.0);
            (i, r)
        })
        .collect();
    for (i, r) in full {
        let m = r?;
        let now: Vec<String> = m
            .reproducibility
            .inputs
            .iter()
            .map(|f| f.sha256.clone())
            .collect();
        let site = m.sites.into_iter().next();
        if recorded.get(i) != Some(&now) {
            return Err(format!(
                "the input files of {} changed since its result was made (their SHA-256 \
                 differ); run its shard again",
                site.as_ref().map_or("a site", |s| s.name.as_str())
            ));
        }
        if let (Some(slot), Some(site)) = (model.sites.get_mut(i), site) {
            *slot = site;
        }
    }
    Ok(())
}

/// The text of a result file for `--shard`.
pub(super) fn result_text(
    shard: Shard,
    hash: &str,
    outcome: Result<SiteResult, SiteFailure>,
) -> Result<String, String> {
    let (result, failure) = match outcome {
        Ok(r) => (Some(r), None),
        Err(f) => (None, Some(f)),
    };
    ResultFile {
        format: RESULT_FORMAT,
        tool_version: env!("CARGO_PKG_VERSION").to_string(),
        settings_hash: hash.to_string(),
        shard: shard.to_string(),
        failure,
        result,
    }
    .to_text()
}
