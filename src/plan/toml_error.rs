//! Translating TOML and serde messages into [`PlanError`]s a plan author can act on.

use super::PlanError;
use super::keys::{TABLE_KEYS, allowed};
use super::locate::{key_path_of, line_of, nearest};
use super::text::{invisible_in, line_note, visible};
use std::path::Path;

/// One clear error from a parse or type error. `source` is the text that was parsed (see
/// [`super::text::prepare`]), `original` the file as written, for naming characters a
/// reader cannot see.
pub fn translate(path: &Path, source: &str, original: &str, err: &toml::de::Error) -> PlanError {
    let span = err.span();
    let line = span.as_ref().map(|s| line_of(source, s.start));
    let located = span
        .as_ref()
        .map(|s| key_path_of(source, s))
        .unwrap_or_else(|| "(top level)".into());
    let message = err.message().trim();
    let mut out = PlanError {
        file: path.to_path_buf(),
        line,
        key: located.clone(),
        problem: message.to_string(),
        allowed: String::new(),
    };
    if let Some((unknown, expected)) = parse_unknown_field(message) {
        let valid: Vec<&str> = expected.iter().map(String::as_str).collect();
        let shown = visible(&unknown);
        out.key = replace_last(&located, &shown);
        let hidden = invisible_in(&unknown)
            .map(|w| format!(" (the name {w})"))
            .unwrap_or_default();
        out.problem = match nearest(unknown.trim(), &valid) {
            Some(s) => format!("unknown key `{shown}`{hidden}; did you mean `{s}`?"),
            None => format!("unknown key `{shown}`{hidden}"),
        };
        out.allowed = format!("one of {}", quoted_list(&valid));
    } else if let Some(missing) = between(message, "missing field `", "`") {
        out.key = join(&table_of(&located, &missing), &missing);
        out.problem = "required key is missing".into();
        out.allowed = allowed(&missing).to_string();
    } else if message.starts_with("data did not match any variant") {
        let last = last_key(&out.key);
        out.problem = "wrong type".into();
        out.allowed = allowed(&last).to_string();
    } else if message.starts_with("invalid type") || message.starts_with("invalid value") {
        let last = last_key(&out.key);
        out.problem = format!("wrong type: {}", plain_types(message));
        out.allowed = allowed(&last).to_string();
    } else {
        out.problem = format!("not valid TOML: {message}");
        out.allowed = "TOML syntax: key = value, [table], [[array of tables]]".into();
    }
    let named = out.problem.contains("(U+");
    if let Some(note) = line.and_then(|l| line_note(original, l)).filter(|_| !named) {
        // A space TOML does not know, or a character that cannot be seen, on the line.
        out.problem = format!("{}; {note}", out.problem);
    }
    out
}

/// `unknown field `x`, expected one of `a`, `b`` → (x, [a, b]).
fn parse_unknown_field(message: &str) -> Option<(String, Vec<String>)> {
    let unknown = between(message, "unknown field `", "`")?;
    let rest = &message[message.find("expected")?..];
    let expected = rest
        .split('`')
        .skip(1)
        .step_by(2)
        .map(str::to_string)
        .collect();
    Some((unknown, expected))
}

fn between(s: &str, start: &str, end: &str) -> Option<String> {
    let i = s.find(start)? + start.len();
    let j = s[i..].find(end)? + i;
    Some(s[i..j].to_string())
}

/// Serde's type names in words: `i64` → whole number, `f64` → number.
fn plain_types(message: &str) -> String {
    message
        .replace("invalid type: ", "found ")
        .replace("expected i64", "expected a whole number")
        .replace("expected u64", "expected a whole number")
        .replace("expected f64", "expected a number")
        .replace("expected a string", "expected text in quotes")
        .replace("expected a sequence", "expected a list [ … ]")
        .replace("expected a boolean", "expected true or false")
}

fn last_key(path: &str) -> String {
    let last = path.rsplit('.').next().unwrap_or(path);
    last.split('[').next().unwrap_or(last).to_string()
}

/// The table a missing key belongs to. The span of a missing key points at its table, except
/// that a missing top-level table (`design`) is reported at whichever table the parser
/// stopped in: a key no table but the top level holds belongs to the top level.
fn table_of(path: &str, missing: &str) -> String {
    let keys_of = |table: &str| {
        TABLE_KEYS
            .iter()
            .find(|(t, _)| *t == table)
            .map_or(&[][..], |(_, k)| *k)
    };
    let own = keys_of(&last_key(path)).contains(&missing);
    if !own && keys_of("").contains(&missing) {
        return String::new();
    }
    path.to_string()
}

fn replace_last(path: &str, key: &str) -> String {
    match path.rfind('.') {
        Some(i) => format!("{}.{key}", &path[..i]),
        None if path.starts_with('(') => key.to_string(),
        None => key.to_string(),
    }
}

fn join(table: &str, key: &str) -> String {
    if table.is_empty() || table.starts_with('(') {
        key.to_string()
    } else {
        format!("{table}.{key}")
    }
}

fn quoted_list(items: &[&str]) -> String {
    items
        .iter()
        .map(|s| format!("`{s}`"))
        .collect::<Vec<_>>()
        .join(", ")
}
