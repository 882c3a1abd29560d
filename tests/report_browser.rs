//! The report page in a real headless browser (Debian's chromium): it loads with no console
//! message, every figure is laid out with a visible size, and a screenshot is saved under
//! `target/` (`target/tmp/report-screenshot.png`) as a CI artefact.
//!
//! Part of the plain `cargo test`: when chromium is missing the test installs it with the
//! project's own `.ci/install-browser.sh` (Debian's package, through apt-get), and fails,
//! saying so, when that is not possible.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

fn find_chromium() -> Option<PathBuf> {
    let candidates = ["chromium", "chromium-browser"];
    std::env::var_os("PATH")
        .iter()
        .flat_map(std::env::split_paths)
        .flat_map(|dir| candidates.iter().map(move |c| dir.join(c)))
        .find(|p| p.is_file())
}

/// The browser, installed by the project's script when missing, or a failure that says why.
fn chromium() -> PathBuf {
    if let Some(p) = find_chromium() {
        return p;
    }
    let script = Path::new(env!("CARGO_MANIFEST_DIR")).join(".ci/install-browser.sh");
    let status = Command::new("bash").arg(&script).status();
    assert!(
        matches!(status, Ok(s) if s.success()),
        "chromium is not installed and {} could not install it ({status:?}), so the report page cannot be checked in a browser",
        script.display()
    );
    find_chromium().expect("chromium is on PATH after .ci/install-browser.sh")
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
