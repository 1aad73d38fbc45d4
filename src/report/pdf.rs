//! Compiling the report to PDF in-process and writing it atomically.

use std::path::Path;

use typst::diag::Warned;
use typst::foundations::{Datetime, Smart};
use typst_layout::PagedDocument;
use typst_pdf::{PdfOptions, PdfStandard, PdfStandards, Timestamp};

use super::error::ReportError;
use super::figures;
use super::model::{ReportModel, ReportTime};
use super::output::write_atomic;
use super::view;
use super::world::{ReportWorld, TemplateSource};

/// How to render a report.
#[derive(Debug, Clone, Default)]
pub struct RenderOptions {
    pub template: TemplateSource,
    /// Write PDF/A-2b (archival) instead of plain PDF 1.7.
    pub pdfa: bool,
    /// Replaces the model's timestamp (pass [`super::timestamp_from_env`]'s value here).
    pub timestamp_override: Option<ReportTime>,
    /// Whether the model's timestamp is a preparation date the user gave (`[report] date`).
    /// When it is not and there is no override, the timestamp is only the data's last sample
    /// time: the PDF keeps it as its creation time (same inputs, same bytes) but prints no
    /// preparation date, and says how to set one.
    pub dated_by_user: bool,
}

impl RenderOptions {
    /// The dates of a report rendered with these options.
    pub fn dates(&self, model: &ReportModel) -> view::Dates {
        let timestamp = self.timestamp_override.unwrap_or(model.timestamp);
        let prepared = if self.timestamp_override.is_some() || self.dated_by_user {
            Some(timestamp)
        } else {
            None
        };
        view::Dates {
            timestamp,
            prepared,
        }
    }
}

/// A rendered report.
#[derive(Debug, Clone)]
pub struct Rendered {
    pub pdf: Vec<u8>,
    pub pages: usize,
    /// Template warnings rendered with file and line (empty when none).
    pub warnings: String,
}

/// Typesets the model into PDF bytes. Deterministic: the same model and options give the same
/// bytes.
pub fn render(model: &ReportModel, options: &RenderOptions) -> Result<Rendered, ReportError> {
    model.thresholds.validate().map_err(ReportError::Model)?;
    if model.sites.is_empty() {
        return Err(ReportError::Model(
            "a report needs at least one site".to_string(),
        ));
    }
    let dates = options.dates(model);
    let date = dates.timestamp;
    let figs = figures::build_all(model)?;
    let data = view::build(model, &figs, dates);
    let data_json = serde_json::to_vec(&data)
        .map_err(|e| ReportError::Model(format!("cannot serialise the report data: {e}")))?;
    let files: Vec<(String, Vec<u8>)> = figs
        .all()
        .into_iter()
        .map(|f| (f.path(), f.svg.clone().into_bytes()))
        .collect();
    let world = ReportWorld::new(&options.template, data_json, files, date)?;

    let Warned { output, warnings } = typst::compile::<PagedDocument>(&world);
    let warnings_text = world.render_diagnostics(&warnings);
    let doc = match output {
        Ok(doc) => doc,
        Err(errors) => {
            let mut text = world.render_diagnostics(&errors);
            text.push_str(&warnings_text);
            return Err(ReportError::Template(text));
        }
    };

    let timestamp = Datetime::from_ymd_hms(
        date.year,
        date.month,
        date.day,
        date.hour,
        date.minute,
        date.second,
    )
    .map(Timestamp::new_utc)
    .ok_or_else(|| ReportError::Timestamp(format!("invalid timestamp {}", date.iso_datetime())))?;
    let standards = if options.pdfa {
        PdfStandards::new(&[PdfStandard::A_2b])
            .map_err(|e| ReportError::Pdf(e.message().to_string()))?
    } else {
        PdfStandards::default()
    };
    let site_names: Vec<&str> = model.sites.iter().map(|s| s.name.as_str()).collect();
    let pdf_options = PdfOptions {
        ident: Smart::Custom(format!(
            "{}/{}/{}",
            model.tool.name,
            model.title,
            site_names.join("+")
        )),
        creator: Smart::Custom(Some(format!(
            "{} {} ({})",
            model.tool.name,
            model.tool.version,
            view::TYPESETTER
        ))),
        timestamp: Some(timestamp),
        standards,
        ..PdfOptions::default()
    };
    let pdf = match typst_pdf::pdf(&doc, &pdf_options) {
        Ok(bytes) => bytes,
        Err(errors) => return Err(ReportError::Pdf(world.render_diagnostics(&errors))),
    };
    Ok(Rendered {
        pdf,
        pages: doc.pages().len(),
        warnings: warnings_text,
    })
}

/// Typesets the model and writes the PDF to `out` atomically (a temporary file in the same
/// directory, renamed into place); on any error no file is left behind.
pub fn write_pdf(
    model: &ReportModel,
    options: &RenderOptions,
    out: &Path,
) -> Result<Rendered, ReportError> {
    let rendered = render(model, options)?;
    write_atomic(out, &rendered.pdf)?;
    Ok(rendered)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::example::example_model;

    fn text_of(pdf: &[u8]) -> String {
        let raw = pdf_extract::extract_text_from_mem(pdf).expect("PDF text extraction");
        // Join words split over lines and collapse runs of white space.
        raw.split_whitespace().collect::<Vec<_>>().join(" ")
    }

    fn render_example(n_sites: usize) -> Rendered {
        match render(&example_model(n_sites), &RenderOptions::default()) {
            Ok(r) => r,
            Err(e) => panic!("{e}"),
        }
    }

    #[test]
    fn one_site_report_has_every_section_caution_and_source() {
        let model = example_model(1);
        let r = render_example(1);
        assert!(r.pages > 3, "only {} pages", r.pages);
        assert!(r.warnings.is_empty(), "template warnings:\n{}", r.warnings);
        let text = text_of(&r.pdf);
        for section in [
            "Site and data",
            "Coverage per season",
            "Quality control",
            "Seasonal baseline",
            "Projection",
            "Thresholds and crossing years",
            "Calcification outlook",
            "Local scenarios",
            "Methods",
            "Assumptions and limitations",
            "Reproducibility",
            "Appendix: carbonate chemistry of every sample",
        ] {
            assert!(text.contains(section), "section {section:?} missing");
        }
        for caution in [
            "screening-level estimate, not a permit determination",
            "consult the local permitting authorities and licensed professionals",
        ] {
            assert!(
                text.to_lowercase().contains(caution),
                "caution {caution:?} missing"
            );
        }
        for p in &model.pathways {
            assert!(text.contains(&p.label), "pathway {} missing", p.label);
        }
        let site = &model.sites[0];
        let mut sources: Vec<&str> = site
            .methods
            .chemistry
            .iter()
            .map(|m| m.citation.as_str())
            .collect();
        sources.extend(site.calcification.iter().map(|c| c.citation.as_str()));
        sources.push(model.thresholds.citation.as_str());
        sources.push(model.pathways[0].citation.as_str());
        for s in sources {
            // Compare on a prefix that avoids line-break hyphenation inside page ranges.
            let key: String = s.chars().take(24).collect();
            assert!(text.contains(&key), "source {key:?} missing");
        }
        assert!(text.contains(&site.name));
        assert!(text.contains(site.data_notice.as_deref().unwrap()));
        // Every input file's SHA-256 is printed in full.
        for f in &model.reproducibility.inputs {
            assert!(
                text.replace(' ', "").contains(&f.sha256),
                "hash of {} missing",
                f.path
            );
        }
    }

    #[test]
    fn numbers_in_the_pdf_are_those_of_the_model() {
        let model = example_model(1);
        let r = render_example(1);
        let text = text_of(&r.pdf);
        let site = &model.sites[0];
        let season = site.limiting_season().unwrap();
        for p in &model.pathways {
            for &y in &model.horizons {
                let q = site.series(&p.id, season).unwrap().at(y).unwrap().omega_ar;
                let cell = format!(
                    "{} ({})",
                    crate::report::fmt::omega(q.p50),
                    crate::report::fmt::range(
                        &crate::report::fmt::omega(q.p05),
                        &crate::report::fmt::omega(q.p95)
                    )
                );
                assert!(
                    text.contains(&cell),
                    "{} {y}: {cell} not in the PDF",
                    p.label
                );
            }
        }
    }

    #[test]
    fn two_compiles_are_byte_identical() {
        let a = render_example(1);
        let b = render_example(1);
        assert!(a.pdf == b.pdf, "PDF bytes differ between two runs");
        assert!(a.pdf.starts_with(b"%PDF-"));
    }

    #[test]
    fn comparison_report_ranks_sites_and_has_a_section_per_site() {
        let model = example_model(3);
        let r = render_example(3);
        let text = text_of(&r.pdf);
        assert!(text.contains("Ranking"));
        assert!(text.contains("How the sites are ranked"));
        assert!(text.contains("First year below each level"));
        for s in &model.sites {
            assert!(
                text.contains(&format!("Site: {}", s.name)),
                "no section for {}",
                s.name
            );
        }
        // The best-ranked site is listed first in the ranking table.
        let ranked = crate::report::ranking::rank_sites(&model);
        let first = &model.sites[ranked[0].site].name;
        let pos_first = text.find(&format!("1 {first}"));
        assert!(pos_first.is_some(), "rank 1 is not {first}");
        assert!(r.pages > 3 * 4);
    }

    #[test]
    fn timestamp_override_sets_the_printed_date() {
        let model = example_model(1);
        let options = RenderOptions {
            timestamp_override: ReportTime::from_source_date_epoch("1700000000").ok(),
            ..RenderOptions::default()
        };
        let r = render(&model, &options).unwrap();
        let text = text_of(&r.pdf);
        assert!(text.contains("2023-11-14"), "overridden date missing");
        assert!(!text.contains(&model.timestamp.iso_date()));
    }

    #[test]
    fn pdfa_output_declares_conformance() {
        let options = RenderOptions {
            pdfa: true,
            ..RenderOptions::default()
        };
        let r = render(&example_model(1), &options).unwrap();
        let needle = b"pdfaid:part";
        assert!(
            r.pdf.windows(needle.len()).any(|w| w == needle),
            "no PDF/A identification"
        );
    }

    #[test]
    fn fonts_are_embedded_and_figures_use_the_sans_face() {
        let r = render_example(1);
        let has = |n: &[u8]| r.pdf.windows(n.len()).any(|w| w == n);
        assert!(has(b"DejaVuSans"), "DejaVu Sans not embedded");
        // Figure labels are real text (not outlines) and come through extraction.
        let text = text_of(&r.pdf);
        assert!(text.contains("aragonite saturation"));
        assert!(text.contains("Temperature (°C)"));
    }

    fn template_dir(main: &str) -> tempfile::TempDir {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("report.typ"), main).unwrap();
        dir
    }

    fn render_with(dir: &std::path::Path) -> Result<Rendered, ReportError> {
        let options = RenderOptions {
            template: TemplateSource::Dir(dir.to_path_buf()),
            ..RenderOptions::default()
        };
        render(&example_model(1), &options)
    }

    #[test]
    fn custom_template_dir_is_used() {
        let dir = template_dir(
            "#let data = json(\"/data.json\")\n= Custom #data.sites.first().name\n#image(data.sites.first().figures.overview.path, alt: \"x\")\n",
        );
        let r = render_with(dir.path()).unwrap();
        let text = text_of(&r.pdf);
        assert!(text.contains("Custom Coral Garden North"), "{text}");
    }

    #[test]
    fn template_error_names_file_line_and_column() {
        let dir = template_dir("= Fine\n\nSome text.\n#let broken = (1, 2\nmore\n");
        let e = render_with(dir.path())
            .expect_err("broken template must fail")
            .to_string();
        let file = dir.path().join("report.typ").display().to_string();
        assert!(e.contains(&format!("{file}:4:")), "no file:line in\n{e}");
        assert!(e.contains("error:"), "{e}");
        assert!(e.contains("#let broken"), "no source line in\n{e}");

        let dir = template_dir("#let x = 1\n#x.foo()\n");
        let e = render_with(dir.path()).err().unwrap().to_string();
        assert!(
            e.contains(&format!("{}:2:", dir.path().join("report.typ").display())),
            "{e}"
        );

        // An error inside an imported file names that file.
        let dir = template_dir("#import \"part.typ\": f\n#f()\n");
        std::fs::write(
            dir.path().join("part.typ"),
            "#let f() = {\n  undefined-name\n}\n",
        )
        .unwrap();
        let e = render_with(dir.path()).err().unwrap().to_string();
        assert!(
            e.contains(&format!("{}:2:", dir.path().join("part.typ").display())),
            "{e}"
        );
        assert!(e.contains("unknown variable"), "{e}");
    }

    #[test]
    fn template_warnings_are_rendered_with_file_and_line() {
        let dir = template_dir("#set text(font: \"No Such Font\")\nHello\n");
        let r = render_with(dir.path()).unwrap();
        assert!(r.warnings.contains("warning:"), "{}", r.warnings);
        assert!(r.warnings.contains("report.typ:1:"), "{}", r.warnings);
    }

    #[test]
    fn template_cannot_read_outside_its_directory() {
        for (src, expect) in [
            ("#read(\"/../etc/passwd\")", "would escape"),
            ("#read(\"../../../../../../etc/passwd\")", "would escape"),
            ("#read(\"/etc/passwd\")", "not found"),
            ("#import \"@preview/anything:0.1.0\": *", "not available"),
        ] {
            let dir = template_dir(src);
            let e = match render_with(dir.path()) {
                Ok(_) => panic!("{src} must fail"),
                Err(e) => e.to_string(),
            };
            assert!(e.contains(expect), "{src}: expected {expect:?} in\n{e}");
            assert!(!e.contains("root:"), "{src}: leaked passwd content\n{e}");
            assert!(
                !e.contains("--root"),
                "{src}: hint about a flag we do not have\n{e}"
            );
        }
    }

    #[cfg(unix)]
    #[test]
    fn template_symlink_to_outside_is_refused() {
        let outside = tempfile::tempdir().unwrap();
        std::fs::write(outside.path().join("secret.typ"), "Secret text").unwrap();
        let dir = template_dir("#include \"inner.typ\"\n");
        std::os::unix::fs::symlink(
            outside.path().join("secret.typ"),
            dir.path().join("inner.typ"),
        )
        .unwrap();
        let e = render_with(dir.path())
            .expect_err("symlink must be refused")
            .to_string();
        assert!(e.contains("outside the template directory"), "{e}");
    }

    #[test]
    fn failed_render_leaves_no_output_file() {
        let out_dir = tempfile::tempdir().unwrap();
        let out = out_dir.path().join("report.pdf");
        let tpl = template_dir("#let broken = (\n");
        let options = RenderOptions {
            template: TemplateSource::Dir(tpl.path().to_path_buf()),
            ..RenderOptions::default()
        };
        assert!(write_pdf(&example_model(1), &options, &out).is_err());
        assert_eq!(std::fs::read_dir(out_dir.path()).unwrap().count(), 0);
        // And a good render writes exactly the PDF.
        let r = write_pdf(&example_model(1), &RenderOptions::default(), &out).unwrap();
        assert_eq!(std::fs::read(&out).unwrap(), r.pdf);
        assert_eq!(std::fs::read_dir(out_dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn bad_model_is_refused_before_typesetting() {
        let mut model = example_model(1);
        model.thresholds.levels = vec![3.0, 3.5];
        assert!(matches!(
            render(&model, &RenderOptions::default()),
            Err(ReportError::Model(_))
        ));
        let mut model = example_model(1);
        model.sites.clear();
        assert!(matches!(
            render(&model, &RenderOptions::default()),
            Err(ReportError::Model(_))
        ));
    }

    #[test]
    fn sparse_model_without_optional_parts_renders() {
        let mut model = example_model(1);
        model.subtitle = None;
        model.prepared_for = None;
        model.prepared_by = None;
        model.extra_limitations.clear();
        model.reproducibility.command = None;
        model.reproducibility.settings.clear();
        model.reproducibility.inputs.clear();
        let site = &mut model.sites[0];
        site.location = None;
        site.latitude = None;
        site.longitude = None;
        site.depth_m = None;
        site.habitat = None;
        site.data_notice = None;
        site.qc.clear();
        site.crossings.clear();
        site.probabilities.clear();
        site.calcification.clear();
        site.local_scenarios.clear();
        site.methods.projection.clear();
        site.methods.notes.clear();
        site.samples.clear();
        for b in &mut site.baseline {
            b.ta = None;
            b.dic = None;
            b.pco2 = None;
            b.omega_ar.sd = f64::NAN;
        }
        let r = render(&model, &RenderOptions::default()).unwrap_or_else(|e| panic!("{e}"));
        assert!(r.warnings.is_empty(), "{}", r.warnings);
        let text = text_of(&r.pdf);
        assert!(text.contains("No quality-control findings"));
        assert!(text.contains("No crossing years were computed"));
        assert!(text.contains("No calcification relationship was evaluated"));
        assert!(text.contains("No samples."));
        assert!(!text.contains("Local scenarios"));
    }

    #[test]
    fn thermal_stress_has_its_section_and_a_site_without_a_record_says_so() {
        let r = render_example(1);
        let text = text_of(&r.pdf);
        assert!(!text.contains("not yet shown in this report"), "{text}");
        assert!(text.contains("Annual maximum DHW per pathway"), "{text}");
        // The example states an MMM of 28.4 °C (two decimals in the report) with its source.
        assert!(text.contains("28.40 °C"), "{text}");
        assert!(text.contains("invented example climatology"), "{text}");
        let mut model = example_model(1);
        model.sites[0].thermal = None;
        let r = render(&model, &RenderOptions::default()).unwrap_or_else(|e| panic!("{e}"));
        let text = text_of(&r.pdf);
        assert!(
            text.contains("This site has no temperature record"),
            "{text}"
        );
        assert!(!text.contains("Annual maximum DHW per pathway"));
        assert!(text.contains("no temperature record"));
    }

    #[test]
    fn user_text_is_typeset_literally_not_as_markup() {
        let mut model = example_model(1);
        let tricky = "Reef #1 *star* _under_ $x$ <lbl> @ref [b] \\ `code`";
        model.sites[0].name = tricky.to_string();
        let r = render(&model, &RenderOptions::default()).unwrap_or_else(|e| panic!("{e}"));
        let text = text_of(&r.pdf);
        assert!(text.contains(tricky), "site name not verbatim");
    }

    #[test]
    fn many_sites_split_the_comparison_chart() {
        let model = example_model(8);
        let figs = crate::report::figures::build_all(&model).unwrap();
        assert_eq!(figs.comparison.len(), 2);
        let r = render(&model, &RenderOptions::default()).unwrap_or_else(|e| panic!("{e}"));
        let text = text_of(&r.pdf);
        assert!(text.contains("part 2 of 2"));
    }
}
