//! HTML reports in a real browser (headless Chromium, Debian's `chromium` package): the page
//! renders, its SVG holds one mark per observed band, and a hostile case title stays text.
//! Ignored by default so that plain `cargo test` needs no browser; `.ci/run` installs
//! Chromium and runs `cargo test -- --ignored browser`.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use quiddity::cli::casefile::{load_case, report_text, LoadOptions};
use quiddity::engine::{solve, SolveOptions};
use quiddity::report::Format;
use quiddity::rules::embedded_catalogue;
use std::path::Path;
use std::process::Command;

const HOSTILE: &str =
    "<script>document.title='pwned'</script><img src=x onerror=\"document.title='pwned'\">";

/// The DOM Chromium builds from `page`, after scripts (if any) ran.
fn dump_dom(page: &Path, profile: &Path) -> String {
    let browser = ["chromium", "chromium-browser"]
        .into_iter()
        .find(|b| Command::new(b).arg("--version").output().is_ok())
        .expect("headless Chromium is needed: apt-get install -y chromium");
    let output = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--no-first-run",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg("--dump-dom")
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("chromium runs");
    assert!(
        output.status.success(),
        "chromium failed: {}",
        String::from_utf8_lossy(&output.stderr)
    );
    String::from_utf8(output.stdout).expect("UTF-8 DOM")
}

/// Renders `case` (copied with a hostile title into a temp dir) and checks the page.
fn check_case(case: &str, with_spectrum: bool) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir_all(dir.path().join("spectra")).unwrap();
    for entry in std::fs::read_dir("cases/spectra").unwrap().flatten() {
        std::fs::copy(
            entry.path(),
            dir.path().join("spectra").join(entry.file_name()),
        )
        .unwrap();
    }
    let text = std::fs::read_to_string(case).unwrap();
    let title_line = text.lines().find(|l| l.starts_with("title:")).unwrap();
    let hostile = format!("title: '{}'", HOSTILE.replace('\'', "''"));
    let path = dir.path().join("hostile.yaml");
    std::fs::write(&path, text.replace(title_line, &hostile)).unwrap();

    let loaded = load_case(&path, &LoadOptions::default()).unwrap();
    let outcome = solve(
        &loaded.case,
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    );
    let page = dir.path().join("report.html");
    let html = report_text(&loaded, &outcome, Format::Html, None);
    assert_eq!(html.contains("class=\"trace\""), with_spectrum);
    std::fs::write(&page, &html).unwrap();

    let dom = dump_dom(&page, &dir.path().join("profile"));
    let n_bands = loaded.case.ir.as_ref().unwrap().bands.len();
    assert!(n_bands > 0);
    assert_eq!(
        dom.matches("class=\"band-mark\"").count(),
        n_bands,
        "one mark per band"
    );
    assert_eq!(dom.matches("<svg").count(), 1, "one inline plot");
    assert!(dom.contains("class=\"fingerprint\""));
    // The hostile title is text: escaped in the heading, never an element, never run.
    assert!(
        dom.contains("&lt;script&gt;document.title='pwned'&lt;/script&gt;"),
        "title escaped"
    );
    assert!(!dom.contains("<script"), "no script element in the page");
    assert!(!dom.contains("<img"), "no image element in the page");
    assert!(!dom.contains("<title>pwned</title>"), "no script ran");
    // Self-contained: nothing is fetched from anywhere.
    for needle in [
        "http://", "https://", " src=\"", " href=\"", "@import", "url(",
    ] {
        let outside_svg_ns = dom.replace("http://www.w3.org/2000/svg", "");
        assert!(
            !outside_svg_ns.contains(needle),
            "page refers outside: {needle}"
        );
    }
}

#[test]
#[ignore = "needs headless Chromium; run with: cargo test -- --ignored browser"]
fn browser_renders_a_spectrum_report_with_one_mark_per_band() {
    check_case("cases/lab-0111-spectrum-ketone.yaml", true);
}

#[test]
#[ignore = "needs headless Chromium; run with: cargo test -- --ignored browser"]
fn browser_renders_a_band_list_report_with_one_mark_per_band() {
    check_case("cases/lab-0101-carbonyl.yaml", false);
}
