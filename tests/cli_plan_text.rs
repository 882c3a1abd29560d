//! Plan text as pasted from web pages, PDFs and word processors: unicode spaces and a
//! byte-order mark are read as the author meant them or named in the error, never a panic.

mod common;

use common::{accepted, plan_text, rejected};

/// Spaces TOML does not know that turn up in pasted text: no-break, ideographic and em
/// spaces, the line separator and the next-line character.
const SPACES: [(char, &str); 5] = [
    ('\u{a0}', "U+00A0"),
    ('\u{3000}', "U+3000"),
    ('\u{2003}', "U+2003"),
    ('\u{2028}', "U+2028"),
    ('\u{85}', "U+0085"),
];

#[test]
fn no_break_space_before_a_key_does_not_panic() {
    // The smallest reproducer: the bytes `[study]\n\xc2\xa0seed = 1\n`. The space is read
    // as indentation, so the seed counts and the plan is refused for what it lacks.
    let text = std::str::from_utf8(b"[study]\n\xc2\xa0seed = 1\n").unwrap();
    let msg = rejected(text, 1, "study.title");
    assert!(msg.contains("missing"), "{msg}");
}

#[test]
fn indentation_with_unicode_spaces_is_read_as_spaces() {
    for (space, _) in SPACES {
        let text = plan_text("playback-yes-no.toml")
            .replace("\nseed = ", &format!("\n{space}{space}seed = "))
            .replace("presence = 0.3", &format!("presence{space}={space}0.3"))
            .replace("[20, 40, 80, 160]", &format!("[20,{space}40, 80, 160]"));
        let out = accepted(&text);
        assert!(out.contains("call on 30% of trials"), "{out}");
    }
}

#[test]
fn unicode_space_inside_a_quoted_key_is_named() {
    for (space, code) in SPACES {
        let text = plan_text("playback-yes-no.toml")
            .replace("\nseed = ", &format!("\n\"seed{space}\" = "));
        let line = text.lines().position(|l| l.starts_with("\"seed")).unwrap() + 1;
        let msg = rejected(&text, line, &format!("study.seed<{code}>"));
        assert!(msg.contains(&format!("({code})")), "{msg}");
        assert!(msg.contains("did you mean `seed`"), "{msg}");
    }
}

#[test]
fn unicode_space_inside_a_number_is_located_and_named() {
    let text =
        plan_text("playback-yes-no.toml").replace("seed = 20261201", "seed = 2026\u{a0}1201");
    let line = text.lines().position(|l| l.starts_with("seed")).unwrap() + 1;
    let msg = rejected(&text, line, "study.seed");
    assert!(msg.contains("no-break space (U+00A0)"), "{msg}");
}

#[test]
fn byte_order_mark_keeps_the_table_of_a_bad_key() {
    let msg = rejected("\u{feff}[study]\nzz = 1\n", 2, "study.zz");
    assert!(msg.contains("unknown key `zz`"), "{msg}");
    let text = format!("\u{feff}{}", plan_text("playback-yes-no.toml"));
    accepted(&text);
}

#[test]
fn zero_width_space_in_a_bare_key_is_named() {
    let text = plan_text("playback-yes-no.toml").replace("\nseed = ", "\nse\u{200b}ed = ");
    let line = text
        .lines()
        .position(|l| l.starts_with("se\u{200b}ed"))
        .unwrap()
        + 1;
    let msg = rejected(&text, line, "study.se");
    assert!(msg.contains("zero-width space (U+200B)"), "{msg}");
}

#[test]
fn empty_plan_names_the_top_level_design_key() {
    let text = "[study]\ntitle = \"t\"\nseed = 1\n[observer]\nd_prime = 1\ncriterion = 0\n";
    let msg = rejected(text, 1, "design");
    assert!(!msg.contains("study.design"), "{msg}");
    assert!(!msg.contains("observer.design"), "{msg}");
}
