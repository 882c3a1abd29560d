//! `vigil completions SHELL` and `vigil manual`: each prints a script or page that names every
//! subcommand (checked against the list `vigil --help` prints), and a bad shell is exit 2.

mod common;
use common::{stdout, vigil};

/// The subcommands `vigil --help` lists (the lines between "Commands:" and "Options:").
fn subcommands(dir: &std::path::Path) -> Vec<String> {
    let help = stdout(&vigil(dir, &["--help"]));
    help.lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| !l.is_empty() && !l.starts_with("Options:"))
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .filter(|c| c != "help")
        .collect()
}

#[test]
fn completion_scripts_and_the_manual_name_every_subcommand() {
    let dir = tempfile::tempdir().unwrap();
    let commands = subcommands(dir.path());
    assert!(commands.len() >= 8, "{commands:?}");
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let out = vigil(dir.path(), &["completions", shell]);
        assert!(out.status.success(), "{shell}");
        let text = stdout(&out);
        for c in &commands {
            assert!(text.contains(c.as_str()), "{shell} script lacks `{c}`");
        }
    }
    let out = vigil(dir.path(), &["manual"]);
    assert!(out.status.success());
    let page = stdout(&out);
    assert!(
        page.starts_with(".ie") || page.contains(".TH vigil 1"),
        "{page}"
    );
    for c in &commands {
        assert!(page.contains(c.as_str()), "manual lacks `{c}`");
    }
}

#[test]
fn an_unknown_shell_is_refused_with_the_allowed_ones() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil(dir.path(), &["completions", "tcsh"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bash") && err.contains("zsh"), "{err}");
}
