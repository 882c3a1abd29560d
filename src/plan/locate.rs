//! Turning byte offsets and serde messages into lines, key paths and suggestions.
//!
//! The TOML parser reports a byte span and a message but not the key path, so the path is
//! recovered from the source text: the nearest table header above the span and the key on
//! the span's line. Arrays of tables (`[[design]]`) are numbered from 1 as a reader counts.
//!
//! Offsets may fall inside a multi-byte character (a parser points at bytes): every slice
//! here is taken at a character boundary at or before the offset, so no text can panic.

use std::ops::Range;

/// 1-based line number of a byte offset.
pub fn line_of(source: &str, offset: usize) -> usize {
    let end = offset.min(source.len());
    source.as_bytes()[..end]
        .iter()
        .filter(|&&b| b == b'\n')
        .count()
        + 1
}

/// The largest character boundary of `s` at or before `i`.
fn boundary_at_or_before(s: &str, i: usize) -> usize {
    let mut i = i.min(s.len());
    while !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

/// The dotted key path of whatever sits at `offset`, e.g. `design[2].trials` or
/// `design[1].scale.categories` inside an inline table.
pub fn key_path_at(source: &str, offset: usize) -> String {
    let end = boundary_at_or_before(source, offset);
    let line_start = source[..end].rfind('\n').map_or(0, |i| i + 1);
    let line_end = source[line_start..]
        .find('\n')
        .map_or(source.len(), |i| line_start + i);
    let line = &source[line_start..line_end];
    let table = table_header_before(source, line_end);
    let key = key_at_column(line, end - line_start);
    match (table.is_empty(), key) {
        (true, Some(k)) => k,
        (false, Some(k)) => format!("{table}.{k}"),
        (true, None) => "(top level)".to_string(),
        (false, None) => table,
    }
}

/// The key path of a span: the key of its first byte.
pub fn key_path_of(source: &str, span: &Range<usize>) -> String {
    key_path_at(source, span.start)
}

/// The key a value at `col` is assigned to on `line`; inside an inline table the outer
/// key is prefixed (`scale.boundary`). `None` for headers, comments and blank lines.
fn key_at_column(line: &str, col: usize) -> Option<String> {
    let trimmed = line.trim_start();
    if trimmed.starts_with('[') || trimmed.starts_with('#') || !line.contains('=') {
        return None;
    }
    let outer = key_before(&line[..line.find('=')? + 1]);
    let upto = &line[..boundary_at_or_before(line, col)];
    let inner = match upto.rfind('=') {
        Some(eq) => key_before(&upto[..eq + 1]),
        // The offset sits on a key itself (e.g. an unknown key): take the word there.
        None => word_at(line, col),
    };
    let inside_inline = upto.contains('{');
    match (outer, inner) {
        (Some(o), Some(i)) if inside_inline && o != i => Some(format!("{o}.{i}")),
        (_, Some(i)) => Some(i),
        (o, None) => o,
    }
}

/// The identifier just before the `=` that ends `text`; a quoted key keeps what is
/// between its quotes, spaces included.
fn key_before(text: &str) -> Option<String> {
    let body = text.strip_suffix('=')?.trim_end();
    if let Some(q) = body.chars().last().filter(|c| *c == '"' || *c == '\'') {
        let inner = &body[..body.len() - 1];
        if let Some(open) = inner.rfind(q) {
            let key = &inner[open + 1..];
            return (!key.is_empty()).then(|| key.to_string());
        }
    }
    let start = body
        .char_indices()
        .rev()
        .find(|&(_, c)| c == '{' || c == ',' || c.is_whitespace())
        .map_or(0, |(i, c)| i + c.len_utf8());
    let key = body[start..].trim_matches('"');
    (!key.is_empty()).then(|| key.to_string())
}

/// The bare word covering `col`.
fn word_at(line: &str, col: usize) -> Option<String> {
    let is_word = |c: char| c.is_alphanumeric() || c == '_' || c == '-';
    let col = boundary_at_or_before(line, col);
    let start = line[..col]
        .char_indices()
        .rev()
        .find(|&(_, c)| !is_word(c))
        .map_or(0, |(i, c)| i + c.len_utf8());
    let end = line[col..]
        .find(|c: char| !is_word(c))
        .map_or(line.len(), |i| col + i);
    let w = &line[start..end];
    (!w.is_empty()).then(|| w.to_string())
}

/// The nearest `[table]` or `[[array]]` header above `limit`, with array entries numbered;
/// a nested array counts within its parent entry (`design[2].condition[1]`).
fn table_header_before(source: &str, limit: usize) -> String {
    let mut current = String::new();
    // Entries seen so far of each array, keyed by its resolved path (`design[2].condition`).
    let mut counts: Vec<(String, usize)> = Vec::new();
    let resolve = |name: &str, counts: &[(String, usize)]| {
        let mut path = String::new();
        for part in name.split('.').map(str::trim) {
            if !path.is_empty() {
                path.push('.');
            }
            path.push_str(part);
            if let Some((_, n)) = counts.iter().find(|(k, _)| *k == path) {
                path = format!("{path}[{n}]");
            }
        }
        path
    };
    for line in source[..boundary_at_or_before(source, limit)].lines() {
        let t = line.trim();
        if let Some(inner) = t.strip_prefix("[[").and_then(|s| s.split("]]").next()) {
            let inner = inner.trim();
            let (parent, last) = match inner.rsplit_once('.') {
                Some((p, l)) => (resolve(p, &counts), l.trim()),
                None => (String::new(), inner),
            };
            let key = if parent.is_empty() {
                last.to_string()
            } else {
                format!("{parent}.{last}")
            };
            let n = match counts.iter_mut().find(|(k, _)| *k == key) {
                Some((_, n)) => {
                    *n += 1;
                    *n
                }
                None => {
                    counts.push((key.clone(), 1));
                    1
                }
            };
            current = format!("{key}[{n}]");
        } else if let Some(inner) = t.strip_prefix('[').and_then(|s| s.split(']').next()) {
            current = resolve(inner.trim(), &counts);
        }
    }
    current
}

/// The valid key nearest to a misspelt one, if any is close enough to be a likely typo.
pub fn nearest<'a>(unknown: &str, valid: &[&'a str]) -> Option<&'a str> {
    valid
        .iter()
        .map(|v| (strsim::damerau_levenshtein(unknown, v), *v))
        .filter(|(d, v)| *d <= 2.max(v.len() / 3))
        .min_by_key(|(d, _)| *d)
        .map(|(_, v)| v)
}

#[cfg(test)]
mod tests {
    use super::*;

    const SRC: &str = "[study]\nseed = 1\n\n[[design]]\nname = \"a\"\n\n[[design]]\nname = \"b\"\npresence = 2.0\n";

    #[test]
    fn lines_count_from_one() {
        assert_eq!(line_of(SRC, 0), 1);
        assert_eq!(line_of(SRC, SRC.find("seed").unwrap()), 2);
    }

    #[test]
    fn key_paths_number_array_tables() {
        let at = SRC.find("2.0").unwrap();
        assert_eq!(key_path_at(SRC, at), "design[2].presence");
        assert_eq!(key_path_at(SRC, SRC.find("1\n").unwrap()), "study.seed");
    }

    #[test]
    fn nested_arrays_count_within_their_parent() {
        let src = "[[design]]\n[[design.condition]]\nname = \"a\"\n[[design]]\n[[design.condition]]\nname = \"b\"\n[[design.condition]]\nd_prime = 2\n";
        let at = src.find("2\n").unwrap();
        assert_eq!(key_path_at(src, at), "design[2].condition[2].d_prime");
        let at = src.find("\"b\"").unwrap();
        assert_eq!(key_path_at(src, at), "design[2].condition[1].name");
    }

    #[test]
    fn key_paths_reach_into_inline_tables() {
        let src = "[[design]]\nscale = { categories = 40, boundary = 2 }\n";
        let at = src.find("40").unwrap();
        assert_eq!(key_path_at(src, at), "design[1].scale.categories");
        let at = src.find("2 }").unwrap();
        assert_eq!(key_path_at(src, at), "design[1].scale.boundary");
    }

    #[test]
    fn offsets_inside_multi_byte_characters_do_not_panic() {
        let src = "[study]\n\u{a0}seed = 1\n\"k\u{3000}\" = 2\nzz\u{2028}= 3\n";
        for offset in 0..=src.len() + 2 {
            let _ = key_path_at(src, offset);
            let _ = line_of(src, offset);
        }
        let at = src.find("2\n").unwrap();
        assert_eq!(key_path_at(src, at), "study.k\u{3000}");
    }

    #[test]
    fn suggests_close_keys_only() {
        let valid = ["presence", "trials", "name", "scale"];
        assert_eq!(nearest("trails", &valid), Some("trials"));
        assert_eq!(nearest("presense", &valid), Some("presence"));
        assert_eq!(nearest("zzzzzz", &valid), None);
    }
}
