//! The README never shows a figure the program does not print: every output example in
//! README.md is checked against the output of the command that it says produced it.
//!
//! The rule:
//! - An output example is a fenced block with no language tag (a bare ```` ``` ````),
//!   preceded on the line just above the fence by `<!-- output: vigil ARGS -->`, naming the
//!   exact command. ARGS are split at whitespace (no quoting, no shell). Fences with a
//!   language tag (`sh`, `toml`) are not output; a bare fence without the comment fails the
//!   test, so no example goes unchecked.
//! - The test runs the command in a temporary folder holding a copy of `plans/`, so
//!   `plans/NAME.toml` means the bundled plan (with its own default `experiments` unless
//!   the command says `--experiments`); the command must succeed.
//! - An example is an excerpt: it may begin and end anywhere in the output. Its lines must
//!   match whole output lines, in order and consecutive, ignoring trailing whitespace on
//!   both sides (leading spaces count). Blank lines match blank lines.
//! - A line that holds only `…` (indented or not) stands for any number of omitted output
//!   lines, none included.
//! - A `…` inside a line stands for any text within that one output line (none included),
//!   so a long line may be cut short with a trailing `…` or have a middle part left out.
//!
//! DEVELOPERS.md ("README examples") says how to refresh an example after output changes.

mod common;

use common::{stderr, stdout, vigil, workspace_with_plans};
use std::collections::BTreeMap;

const MARKER_START: &str = "<!-- output:";
const MARKER_END: &str = "-->";
const ELLIPSIS: char = '…';

/// One marked output example of the README.
struct Example {
    /// 1-based README line of the `<!-- output: … -->` comment.
    line: usize,
    /// The command after `vigil`.
    args: Vec<String>,
    /// The lines between the fences.
    body: Vec<String>,
}

/// Every marked example of `readme`; errors for bare fences without a marker and markers
/// without a bare fence right below.
fn examples(readme: &str) -> Result<Vec<Example>, Vec<String>> {
    let lines: Vec<&str> = readme.lines().collect();
    let mut found = Vec::new();
    let mut errors = Vec::new();
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i].trim();
        if let Some(rest) = line.strip_prefix(MARKER_START) {
            let Some(command) = rest.strip_suffix(MARKER_END) else {
                errors.push(format!("README.md:{}: marker not closed by -->", i + 1));
                i += 1;
                continue;
            };
            let mut words = command.split_whitespace().map(str::to_string);
            if words.next().as_deref() != Some("vigil") {
                errors.push(format!(
                    "README.md:{}: command must start with vigil",
                    i + 1
                ));
            }
            if lines.get(i + 1).map(|l| l.trim_end()) != Some("```") {
                errors.push(format!(
                    "README.md:{}: marker not followed by a bare ``` fence",
                    i + 1
                ));
                i += 1;
                continue;
            }
            let start = i + 2;
            let Some(len) = lines[start..].iter().position(|l| l.trim_end() == "```") else {
                errors.push(format!("README.md:{}: fence never closed", i + 2));
                break;
            };
            found.push(Example {
                line: i + 1,
                args: words.collect(),
                body: lines[start..start + len]
                    .iter()
                    .map(|l| l.to_string())
                    .collect(),
            });
            i = start + len + 1;
        } else if line.starts_with("```") {
            let tagged = line.len() > 3;
            if !tagged {
                errors.push(format!(
                    "README.md:{}: bare ``` fence without an <!-- output: vigil … --> marker \
                     (give non-output blocks a language tag)",
                    i + 1
                ));
            }
            // Skip to the closing fence.
            let close = lines[i + 1..]
                .iter()
                .position(|l| l.trim_end() == "```")
                .map_or(lines.len(), |p| i + 1 + p);
            i = close + 1;
        } else {
            i += 1;
        }
    }
    if errors.is_empty() {
        Ok(found)
    } else {
        Err(errors)
    }
}

/// Whether output `line` matches example line `pattern` (`…` = any text in the line).
fn line_matches(pattern: &str, line: &str) -> bool {
    let (pattern, line) = (pattern.trim_end(), line.trim_end());
    let pieces: Vec<&str> = pattern.split(ELLIPSIS).collect();
    if pieces.len() == 1 {
        return pattern == line;
    }
    let (first, last) = (pieces[0], pieces[pieces.len() - 1]);
    if !line.starts_with(first) || line.len() < first.len() + last.len() {
        return false;
    }
    let mut rest = &line[first.len()..];
    if !rest.ends_with(last) {
        return false;
    }
    rest = &rest[..rest.len() - last.len()];
    for piece in &pieces[1..pieces.len() - 1] {
        match rest.find(piece) {
            Some(at) => rest = &rest[at + piece.len()..],
            None => return false,
        }
    }
    true
}

/// `Ok` when `body` is an excerpt of `output` under the rule above; otherwise the first
/// example line (0-based index into `body`) that could not be matched.
fn check_excerpt(body: &[String], output: &str) -> Result<(), usize> {
    let out: Vec<&str> = output.lines().collect();
    let mut pos = 0;
    let mut index = 0;
    // Groups of consecutive lines, split at lines that hold only `…`.
    while index < body.len() {
        if body[index].trim() == ELLIPSIS.to_string() {
            index += 1;
            continue;
        }
        let end = body[index..]
            .iter()
            .position(|l| l.trim() == ELLIPSIS.to_string())
            .map_or(body.len(), |p| index + p);
        let group = &body[index..end];
        // The earliest placement leaves the most room for the groups after it.
        let fits = |s: usize| {
            group
                .iter()
                .zip(&out[s..])
                .take_while(|(p, l)| line_matches(p, l))
                .count()
        };
        match (pos..out.len()).find(|&s| fits(s) == group.len()) {
            Some(s) => pos = s + group.len(),
            None => {
                let best = (pos..out.len()).map(fits).max().unwrap_or(0);
                return Err(index + best);
            }
        }
        index = end;
    }
    Ok(())
}

#[test]
fn every_readme_output_example_is_printed_by_its_command() {
    let readme = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md"))
        .expect("README.md is readable");
    let examples = examples(&readme).unwrap_or_else(|e| panic!("{}", e.join("\n")));
    assert!(
        !examples.is_empty(),
        "README.md has no marked output example"
    );

    let dir = workspace_with_plans();
    let mut outputs: BTreeMap<Vec<String>, String> = BTreeMap::new();
    let mut failures = Vec::new();
    for ex in &examples {
        assert!(
            ex.body.iter().any(|l| !l.trim().is_empty()),
            "README.md:{}: empty example",
            ex.line
        );
        let output = outputs.entry(ex.args.clone()).or_insert_with(|| {
            let args: Vec<&str> = ex.args.iter().map(String::as_str).collect();
            let out = vigil(dir.path(), &args);
            assert!(
                out.status.success(),
                "README.md:{}: vigil {} failed: {}",
                ex.line,
                ex.args.join(" "),
                stderr(&out)
            );
            stdout(&out)
        });
        if let Err(i) = check_excerpt(&ex.body, output) {
            failures.push(format!(
                "README.md:{}: `vigil {}` does not print this line (or not in this place):\n  {}",
                ex.line + 2 + i,
                ex.args.join(" "),
                ex.body[i]
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

// The rule itself, on made-up text, so a broken matcher cannot let the README pass.

fn lines(text: &str) -> Vec<String> {
    text.lines().map(str::to_string).collect()
}

const OUTPUT: &str = "title\n rows   a    b   \n    1   0.5  7%\n    2   0.6  8%\n\nReading: a is 0.5 at 1 and 0.6 at 2.\n";

#[test]
fn an_exact_excerpt_passes_and_a_changed_figure_fails() {
    assert_eq!(
        check_excerpt(&lines(" rows   a    b\n    1   0.5  7%"), OUTPUT),
        Ok(())
    );
    assert_eq!(
        check_excerpt(&lines(" rows   a    b\n    1   0.5  9%"), OUTPUT),
        Err(1)
    );
    // Leading spaces count.
    assert_eq!(check_excerpt(&lines("rows   a    b"), OUTPUT), Err(0));
}

#[test]
fn lines_must_be_consecutive_unless_an_ellipsis_line_stands_between() {
    assert_eq!(
        check_excerpt(&lines("title\n    1   0.5  7%"), OUTPUT),
        Err(1)
    );
    assert_eq!(
        check_excerpt(&lines("title\n   …\n    2   0.6  8%"), OUTPUT),
        Ok(())
    );
    // Order matters.
    assert_eq!(
        check_excerpt(&lines("    2   0.6  8%\n…\ntitle"), OUTPUT),
        Err(2)
    );
    // Blank lines match blank lines only.
    assert_eq!(
        check_excerpt(&lines("    2   0.6  8%\n\nReading: …"), OUTPUT),
        Ok(())
    );
    assert_eq!(
        check_excerpt(&lines("title\n\n rows   a    b"), OUTPUT),
        Err(1)
    );
}

#[test]
fn an_ellipsis_inside_a_line_stands_for_text_of_that_line_only() {
    assert!(line_matches(
        "Reading: a is 0.5 …",
        "Reading: a is 0.5 at 1 and 0.6 at 2."
    ));
    assert!(line_matches(
        "Reading: … and 0.6 at 2.",
        "Reading: a is 0.5 at 1 and 0.6 at 2."
    ));
    assert!(line_matches(
        "Reading: a is … at 1 … at 2.",
        "Reading: a is 0.5 at 1 and 0.6 at 2."
    ));
    assert!(!line_matches(
        "Reading: a is 0.7 …",
        "Reading: a is 0.5 at 1 and 0.6 at 2."
    ));
    assert!(!line_matches(
        "Reading: … at 3.",
        "Reading: a is 0.5 at 1 and 0.6 at 2."
    ));
    // Pieces may not overlap.
    assert!(!line_matches("ab…ba", "aba"));
}

#[test]
fn unmarked_output_fences_and_dangling_markers_are_errors() {
    assert!(examples("text\n```\nvigil output\n```\n").is_err());
    assert!(examples("<!-- output: vigil run x.toml -->\n\n```\nx\n```\n").is_err());
    assert!(examples("<!-- output: cargo run -->\n```\nx\n```\n").is_err());
    let ok =
        examples("```sh\ncargo test\n```\n<!-- output: vigil check p.toml -->\n```\nline\n```\n")
            .unwrap();
    assert_eq!(ok.len(), 1);
    assert_eq!(ok[0].args, ["check", "p.toml"]);
    assert_eq!(ok[0].body, ["line"]);
    assert_eq!(ok[0].line, 4);
}
