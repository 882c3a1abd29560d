//! The report page in a real headless browser (Debian's chromium, installed by
//! `.ci/install-browser.sh`, which `.ci/run` calls): it loads with no console message,
//! every figure is laid out with a visible size, and a screenshot is saved under `target/`
//! (`target/tmp/report-screenshot.png`) as a CI artefact.
//!
//! Ignored in a plain `cargo test` (a developer's machine may lack the browser); `.ci/run`
//! runs it with `--ignored`, and there a missing browser fails the test, saying so.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

/// The browser, or a failure that says how to get it.
fn chromium() -> PathBuf {
    let candidates = ["chromium", "chromium-browser"];
    std::env::var_os("PATH")
        .iter()
        .flat_map(std::env::split_paths)
        .flat_map(|dir| candidates.iter().map(move |c| dir.join(c)))
        .find(|p| p.is_file())
        .unwrap_or_else(|| {
            panic!(
                "chromium is not installed, so the report page cannot be checked in a browser: run .ci/install-browser.sh (.ci/run does)"
            )
        })
}

/// Runs headless chromium on `page` with `args`; returns (stdout, stderr).
fn browse(page: &Path, profile: &Path, args: &[&str]) -> (String, String) {
    let url = format!("file://{}", page.display());
    let out = Command::new(chromium())
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-dev-shm-usage",
            "--no-first-run",
            "--enable-logging=stderr",
            "--v=0",
            "--hide-scrollbars",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .args(args)
        .arg(&url)
        .output()
        .expect("chromium starts");
    assert!(
        out.status.success(),
        "chromium failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    (
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// Appended to a copy of the page (never to the page itself, which has no script): records
/// errors and, once laid out, how many figures have a visible box.
const PROBE: &str = r#"<script>
window.__errors = [];
window.addEventListener('error', e => window.__errors.push(String(e.message)));
window.addEventListener('load', () => {
  const figs = [...document.querySelectorAll('figure svg')];
  const shown = figs.filter(s => {
    const r = s.getBoundingClientRect();
    const st = getComputedStyle(s);
    return r.width > 100 && r.height > 50 && st.visibility !== 'hidden' && st.display !== 'none';
  });
  document.body.setAttribute('data-figures', String(figs.length));
  document.body.setAttribute('data-visible', String(shown.length));
  document.body.setAttribute('data-errors', String(window.__errors.length));
});
</script>"#;

fn attribute(dom: &str, name: &str) -> usize {
    let key = format!("{name}=\"");
    let start = dom
        .find(&key)
        .unwrap_or_else(|| panic!("no {name} in the DOM"))
        + key.len();
    dom[start..].split('"').next().unwrap().parse().unwrap()
}

#[test]
#[ignore = "needs chromium: .ci/run installs it and runs this with --ignored"]
fn report_page_loads_cleanly_with_every_figure_visible() {
    let browser = chromium();
    let dir = common::workspace_with_plans();
    let out = common::vigil(
        dir.path(),
        &[
            "report",
            "plans/predator-model-colony.toml",
            "--out",
            "colony-report",
            "-q",
        ],
    );
    assert!(out.status.success(), "{}", common::stderr(&out));
    let folder = dir.path().join("colony-report");
    let page = folder.join("index.html");
    let html = std::fs::read_to_string(&page).unwrap();
    let figures = std::fs::read_dir(folder.join("figures")).unwrap().count();
    assert!(figures > 0);
    let profile = dir.path().join("profile");

    // The page as written: no console message of any kind while it loads.
    let (_, log) = browse(&page, &profile, &["--dump-dom"]);
    let console: Vec<&str> = log.lines().filter(|l| l.contains(":CONSOLE")).collect();
    assert!(
        console.is_empty(),
        "console messages from {}:\n{}",
        browser.display(),
        console.join("\n")
    );

    // A probed copy: every figure laid out with a visible box, no script error.
    let probed = folder.join("probe.html");
    std::fs::write(
        &probed,
        html.replace("</body>", &format!("{PROBE}\n</body>")),
    )
    .unwrap();
    let (dom, _) = browse(&probed, &profile, &["--dump-dom", "--window-size=1280,900"]);
    assert_eq!(attribute(&dom, "data-figures"), figures);
    assert_eq!(
        attribute(&dom, "data-visible"),
        figures,
        "some figures are not visible"
    );
    assert_eq!(attribute(&dom, "data-errors"), 0);

    // The screenshot, kept under target/ for CI.
    let shot = Path::new(env!("CARGO_TARGET_TMPDIR")).join("report-screenshot.png");
    let _ = std::fs::remove_file(&shot);
    browse(
        &page,
        &profile,
        &[
            &format!("--screenshot={}", shot.display()),
            "--window-size=1280,2400",
        ],
    );
    let bytes = std::fs::read(&shot).expect("the screenshot was written");
    assert!(bytes.starts_with(b"\x89PNG"), "not a PNG");
    assert!(
        bytes.len() > 20_000,
        "the screenshot is nearly empty ({} bytes)",
        bytes.len()
    );
}
