//! A real browser looks at every example's report (`make report-check`): headless Chromium
//! renders each page to a PNG in a tall window and prints it to PDF. The page fails when the
//! screenshot is blank (one colour, or almost nothing drawn) or when MathML is shown as raw
//! text — the PDF's text layer (what the browser actually laid out, via `pdftotext`) must not
//! contain TeX control words from the annotations (`\frac`, `\left`) nor MathML tags, which
//! appear only when a browser ignores MathML or the markup was escaped by mistake.
//!
//! Runs when `TELESCOPE_REPORT_CHECK=1` (set by `make report-check`, which installs Chromium
//! and poppler's `pdftotext` when they are missing; `.ci/run` calls it when Chromium is
//! there); a plain `cargo test` skips it, as it takes minutes. The PNGs stay in
//! `target/report-check/` for a person to look at.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

use common::{demo_params, examples};

fn tool(candidates: &[&str], version_flag: &str) -> Option<String> {
    candidates.iter().find_map(|name| {
        Command::new(name)
            .arg(version_flag)
            .output()
            .ok()
            .filter(|o| o.status.success())
            .map(|_| name.to_string())
    })
}

fn chromium(browser: &str, profile: &Path, extra: &[String], page: &Path) -> std::process::Output {
    let mut command = Command::new(browser);
    command.args([
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--hide-scrollbars",
    ]);
    command.arg(format!("--user-data-dir={}", profile.display()));
    command.args(extra);
    command.arg(format!("file://{}", page.display()));
    command.output().expect("chromium runs")
}

/// The share of pixels that differ from the most common colour, and the number of colours.
fn ink(png_path: &Path) -> (f64, usize) {
    let decoder = png::Decoder::new(std::fs::File::open(png_path).unwrap());
    let mut reader = decoder.read_info().unwrap();
    let mut buffer = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buffer).unwrap();
    let channels = info.color_type.samples();
    let pixels: Vec<&[u8]> = buffer[..info.buffer_size()]
        .chunks(channels)
        .map(|p| &p[..3.min(channels)])
        .collect();
    let mut counts = std::collections::HashMap::new();
    for p in &pixels {
        *counts.entry(*p).or_insert(0usize) += 1;
    }
    let background = counts.values().copied().max().unwrap_or(0);
    (
        1.0 - background as f64 / pixels.len().max(1) as f64,
        counts.len(),
    )
}

#[test]
fn every_example_report_renders_in_a_browser() {
    if std::env::var("TELESCOPE_REPORT_CHECK").map_or(true, |v| v != "1") {
        eprintln!("skipped: the browser check runs with make report-check");
        return;
    }
    let (Some(browser), Some(pdftotext)) = (
        tool(
            &["chromium", "chromium-browser", "google-chrome"],
            "--version",
        ),
        tool(&["pdftotext"], "-v"),
    ) else {
        panic!("chromium and pdftotext are needed (make report-check installs them)");
    };
    let out_dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("target/report-check");
    std::fs::create_dir_all(&out_dir).unwrap();
    let profile = out_dir.join("profile");
    for (name, text) in examples() {
        let page = out_dir.join(format!("{name}.html"));
        let mut args = vec![
            "report".to_string(),
            format!("examples/{name}.rule"),
            "-o".to_string(),
            page.display().to_string(),
        ];
        for p in demo_params(&name, &text) {
            args.push("--param".into());
            args.push(p);
        }
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let made = common::telescope(&args);
        assert!(
            made.status.success(),
            "{name}: {}",
            String::from_utf8_lossy(&made.stderr)
        );

        let png_path = out_dir.join(format!("{name}.png"));
        let _ = std::fs::remove_file(&png_path);
        chromium(
            &browser,
            &profile,
            &[
                format!("--screenshot={}", png_path.display()),
                "--window-size=1100,7000".to_string(),
            ],
            &page,
        );
        assert!(png_path.exists(), "{name}: no screenshot");
        let (share, colours) = ink(&png_path);
        assert!(
            share > 0.02 && colours > 16,
            "{name}: the page looks blank ({:.3} of the pixels drawn, {colours} colours)",
            share
        );

        let pdf_path = out_dir.join(format!("{name}.pdf"));
        let _ = std::fs::remove_file(&pdf_path);
        chromium(
            &browser,
            &profile,
            &[
                format!("--print-to-pdf={}", pdf_path.display()),
                "--no-pdf-header-footer".to_string(),
            ],
            &page,
        );
        assert!(pdf_path.exists(), "{name}: no PDF");
        let text = Command::new(&pdftotext)
            .arg(&pdf_path)
            .arg("-")
            .output()
            .expect("pdftotext runs");
        let shown = String::from_utf8_lossy(&text.stdout);
        assert!(
            shown.contains("Closed form"),
            "{name}: the page text is missing"
        );
        for raw in [
            "\\frac", "\\left", "\\Gamma", "<math", "<mi>", "<mrow", "&lt;",
        ] {
            assert!(
                !shown.contains(raw),
                "{name}: the browser shows raw {raw:?} (MathML not rendered)"
            );
        }
    }
}
