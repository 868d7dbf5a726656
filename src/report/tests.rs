//! Render tests: the sample surveys' reports (built through the real pipeline) rendered by the
//! real engine, read back with lopdf and pdftotext.

use std::sync::OnceLock;

use super::testkit::{field_sheet, identity, report};
use super::*;

/// The stack sample's model, built once.
fn stack() -> &'static ReportData {
    static DATA: OnceLock<ReportData> = OnceLock::new();
    DATA.get_or_init(|| report("stack"))
}

fn engine() -> &'static Engine {
    static ENGINE: OnceLock<Engine> = OnceLock::new();
    ENGINE.get_or_init(Engine::new)
}

fn date() -> chrono::NaiveDate {
    chrono::NaiveDate::from_ymd_opt(2026, 10, 14).unwrap()
}

fn sample_attachments() -> Vec<Attachment> {
    vec![
        Attachment::new(
            "boiler2.toml",
            b"[survey]\ntitle = \"Boiler 2 stack\"\n".to_vec(),
            "application/toml",
            "Survey file",
        )
        .unwrap(),
        Attachment::new(
            "boiler2-run1.csv",
            b"line,point,dp[inH2O]\nA,1,0.31\n".to_vec(),
            "text/csv",
            "Run 1 readings",
        )
        .unwrap(),
        Attachment::new(
            "results.json",
            br#"{"runs":[]}"#.to_vec(),
            "application/json",
            "Computed results",
        )
        .unwrap(),
    ]
}

fn render_stack() -> Rendered {
    let options = RenderOptions {
        date: date(),
        attachments: sample_attachments(),
    };
    match engine().render_report(stack(), &options) {
        Ok(r) => r,
        Err(e) => panic!("{e}"),
    }
}

/// Text of a PDF via poppler's `pdftotext` (CI installs poppler-utils).
fn pdf_text(pdf: &[u8]) -> String {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("r.pdf");
    std::fs::write(&path, pdf).unwrap();
    let out = std::process::Command::new("pdftotext")
        .arg("-layout")
        .arg(&path)
        .arg("-")
        .output()
        .expect("pdftotext (poppler-utils) must be installed for the report tests");
    assert!(out.status.success(), "pdftotext failed");
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn stack_report_renders_without_warnings() {
    let r = render_stack();
    let warnings: Vec<String> = r.warnings.iter().map(|w| w.to_string()).collect();
    assert!(warnings.is_empty(), "{warnings:#?}");
    assert!(r.pdf.starts_with(b"%PDF-"));
}

#[test]
fn hvac_report_and_field_sheets_render_without_warnings() {
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    let rect = engine()
        .render_report(&report("hvac"), &options)
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(rect.warnings.is_empty(), "{:#?}", rect.warnings);
    for sheet in [field_sheet("stack"), field_sheet("hvac")] {
        let s = engine()
            .render_field_sheet(&sheet, date())
            .unwrap_or_else(|e| panic!("{e}"));
        assert!(s.warnings.is_empty(), "{:#?}", s.warnings);
        let text = pdf_text(&s.pdf);
        assert!(text.contains(&sheet.title), "{text}");
        assert!(text.contains("Probe mark"));
    }
}

#[test]
fn every_section_heading_is_in_the_text() {
    let text = pdf_text(&render_stack().pdf);
    for heading in [
        "Summary",
        "Measurement plane",
        "Readings",
        "Velocity field",
        "Checks",
        "Uncertainty",
        "Instruments and calibration",
        "Notes and deviations",
        "Safety cautions",
        "Sign-off",
    ] {
        assert!(text.contains(heading), "missing section `{heading}`");
    }
    let pages = text.matches('\u{c}').count();
    assert!(
        text.contains(&format!("Page 1 of {pages}")),
        "no page x of y"
    );
    assert!(text.contains(&identity().report_id));
}

#[test]
fn attachments_come_back_byte_equal() {
    let r = render_stack();
    let files = embedded_files(&r.pdf).unwrap();
    let mut want = sample_attachments();
    want.sort_by(|a, b| a.name().cmp(b.name()));
    let mut got = files.clone();
    got.sort_by(|a, b| a.name.cmp(&b.name));
    assert_eq!(got.len(), want.len());
    for (g, w) in got.iter().zip(&want) {
        assert_eq!(g.name, w.name());
        assert_eq!(g.bytes, w.bytes(), "{}", g.name);
        assert_eq!(g.mime.as_deref(), Some(w.mime()));
        assert_eq!(g.description.as_deref(), Some(w.description()));
    }
}

#[test]
fn two_renders_are_byte_identical() {
    let a = render_stack();
    let b = render_stack();
    assert!(a.pdf == b.pdf, "renders differ");
}

#[test]
fn a_broken_user_template_reports_file_line_and_column() {
    let template = UserTemplate {
        display_name: "custom/report.typ".into(),
        text: "#let data = json(\"/data.json\")\n= Custom\n#data.header.title\n#let x = (1, 2\n"
            .into(),
    };
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    let err = engine()
        .render_report_with_template(&template, stack(), &options)
        .unwrap_err();
    let RenderError::Template(diags) = &err else {
        panic!("expected a template error, got {err}");
    };
    let first = &diags[0];
    assert_eq!(first.file.as_deref(), Some("custom/report.typ"));
    assert_eq!(first.line, Some(4));
    assert!(first.column.is_some());
    assert!(
        first.to_string().starts_with("custom/report.typ:4:"),
        "{first}"
    );
    assert!(first.to_string().contains("error: "), "{first}");

    // A runtime error (a key the model does not have) is located too.
    let template = UserTemplate {
        display_name: "keys.typ".into(),
        text: "#let data = json(\"/data.json\")\n\n  #data.header.no_such_key\n".into(),
    };
    let err = engine()
        .render_report_with_template(&template, stack(), &options)
        .unwrap_err();
    let RenderError::Template(diags) = &err else {
        panic!("expected a template error, got {err}");
    };
    assert_eq!(
        (diags[0].file.as_deref(), diags[0].line, diags[0].column),
        (Some("keys.typ"), Some(3), Some(16)),
        "{}",
        diags[0]
    );
    assert!(diags[0].message.contains("no_such_key"), "{}", diags[0]);
}

#[test]
fn reports_are_pdf_a_3b_with_pinned_metadata() {
    let pdf = render_stack().pdf;
    let text = String::from_utf8_lossy(&pdf);
    assert!(text.contains("<pdfaid:part>3</pdfaid:part>"));
    assert!(text.contains("<pdfaid:conformance>B</pdfaid:conformance>"));
    assert!(text.contains("2026-10-14T00:00:00"));
    assert!(text.contains("<xmp:CreatorTool>annulus "));
}

#[test]
fn a_user_template_sees_the_same_data_and_keeps_the_attachments() {
    let template = UserTemplate {
        display_name: "mine.typ".into(),
        text: "#let data = json(\"/data.json\")\n#set document(keywords: (\"custom\",))\n#set text(font: \"DejaVu Sans\")\n\
               = #data.header.title\nRuns: #data.runs.len()\n"
            .into(),
    };
    let options = RenderOptions {
        date: date(),
        attachments: sample_attachments(),
    };
    let r = engine()
        .render_report_with_template(&template, stack(), &options)
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(r.warnings.is_empty(), "{:#?}", r.warnings);
    let text = pdf_text(&r.pdf);
    assert!(text.contains("Runs: 3"), "{text}");
    assert_eq!(embedded_files(&r.pdf).unwrap().len(), 3);
}

#[test]
fn an_unknown_font_is_a_warning_with_a_location() {
    let template = UserTemplate {
        display_name: "fonts.typ".into(),
        text: "#set text(font: \"No Such Font\")\nHello\n".into(),
    };
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    let r = engine()
        .render_report_with_template(&template, stack(), &options)
        .unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(r.warnings.len(), 1, "{:#?}", r.warnings);
    assert!(r.warnings[0].to_string().starts_with("fonts.typ:1:"));
}

#[test]
fn a_bad_model_is_rejected_before_typst_runs() {
    let mut data = stack().clone();
    data.header.content_sha256 = "abc".into();
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    assert!(matches!(
        engine().render_report(&data, &options),
        Err(RenderError::Model(model::ModelError::BadFingerprint { .. }))
    ));
    let a = sample_attachments().remove(0);
    let dup = RenderOptions {
        date: date(),
        attachments: vec![a.clone(), a],
    };
    assert!(matches!(
        engine().render_report(stack(), &dup),
        Err(RenderError::Attachment(AttachmentError::Duplicate { .. }))
    ));
}

#[test]
fn the_engine_has_a_proportional_sans_and_no_system_fonts() {
    let families = engine().font_families();
    assert!(families.iter().any(|f| f == "DejaVu Sans"), "{families:?}");
    assert!(families.iter().any(|f| f == "DejaVu Sans Mono"));
    // Exactly the embedded families: typst-assets and DejaVu Sans.
    for f in &families {
        assert!(
            f.starts_with("DejaVu")
                || f.starts_with("Libertinus")
                || f.starts_with("New Computer Modern"),
            "unexpected font family {f}"
        );
    }
}

/// Writes the sample PDFs for a visual check: `ANNULUS_PREVIEW_DIR=/tmp/p cargo test --lib
/// report::tests::write_previews -- --ignored`, then `pdftoppm -r 60 -png`.
#[test]
#[ignore]
fn write_previews() {
    let dir = std::path::PathBuf::from(
        std::env::var("ANNULUS_PREVIEW_DIR").unwrap_or_else(|_| "target/report-preview".into()),
    );
    std::fs::create_dir_all(&dir).unwrap();
    let start = std::time::Instant::now();
    let _ = engine();
    eprintln!("engine (fonts, library): {:?}", start.elapsed());
    let start = std::time::Instant::now();
    let round = render_stack();
    eprintln!("stack render: {:?}", start.elapsed());
    let start = std::time::Instant::now();
    let _ = render_stack();
    eprintln!("stack render again: {:?}", start.elapsed());
    write_atomic(&dir.join("stack.pdf"), &round.pdf).unwrap();
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    let start = std::time::Instant::now();
    let rect = engine()
        .render_report(&report("hvac"), &options)
        .unwrap_or_else(|e| panic!("{e}"));
    eprintln!("hvac render: {:?}", start.elapsed());
    write_atomic(&dir.join("hvac.pdf"), &rect.pdf).unwrap();
    for (name, sheet) in [
        ("sheet-round.pdf", field_sheet("stack")),
        ("sheet-rect.pdf", field_sheet("hvac")),
    ] {
        let s = engine().render_field_sheet(&sheet, date()).unwrap();
        write_atomic(&dir.join(name), &s.pdf).unwrap();
    }
}

#[test]
fn a_sparse_model_still_renders() {
    let mut data = stack().clone();
    data.summary.headline.clear();
    data.results.clear();
    data.checks.survey.clear();
    data.checks.matrices.clear();
    data.instruments.clear();
    data.notes.clear();
    data.deviations.clear();
    data.safety.clear();
    data.header.signer_key_fingerprint = None;
    for run in &mut data.runs {
        run.summary.clear();
    }
    data.runs[1].field.clear();
    let options = RenderOptions {
        date: date(),
        attachments: vec![],
    };
    let r = engine()
        .render_report(&data, &options)
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(r.warnings.is_empty(), "{:#?}", r.warnings);
    assert!(pdf_text(&r.pdf).contains("not signed"));
}

#[test]
fn the_engine_can_be_shared_between_threads() {
    fn assert_send_sync<T: Send + Sync>() {}
    assert_send_sync::<Engine>();
}
