//! Plan text as the TOML parser should see it, and words for characters a reader cannot see.
//!
//! Text pasted from a web page, a PDF or a word processor often carries a byte-order mark
//! and spaces TOML does not know (no-break, em, ideographic spaces, line separators). Outside
//! strings and comments such a space can only ever be a separator — TOML allows no other use
//! of it there — so it is read as ASCII spaces, one per byte, which keeps every byte offset
//! (and so every line and key the parser reports) where it was. Inside quoted strings and
//! keys the text is the user's and is kept; errors then name the character instead.

use std::borrow::Cow;

/// The text to parse: without a leading byte-order mark, and with every unicode space that
/// stands outside strings and comments replaced by as many ASCII spaces as it has bytes.
pub fn prepare(text: &str) -> Cow<'_, str> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if text.is_ascii() || !text.chars().any(is_foreign_space) {
        return Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len());
    let mut state = State::Normal;
    let mut iter = text.char_indices();
    while let Some((i, c)) = iter.next() {
        let rest = &text[i..];
        match state {
            State::Normal => {
                if c == '#' {
                    state = State::Comment;
                } else if rest.starts_with("\"\"\"") || rest.starts_with("'''") {
                    state = State::Multi(c);
                    out.push_str(&rest[..3]);
                    iter.nth(1);
                    continue;
                } else if c == '"' || c == '\'' {
                    state = State::Single(c);
                } else if is_foreign_space(c) {
                    out.extend(std::iter::repeat_n(' ', c.len_utf8()));
                    continue;
                }
            }
            State::Comment if c == '\n' => state = State::Normal,
            State::Comment => {}
            State::Single(q) | State::Multi(q) if c == '\\' && q == '"' => {
                // An escape: the next character cannot end the string.
                out.push(c);
                if let Some((_, next)) = iter.next() {
                    out.push(next);
                }
                continue;
            }
            State::Single(q) if c == q || c == '\n' => state = State::Normal,
            State::Single(_) => {}
            State::Multi(q) if c == q => {
                // Up to five quotes close a multi-line string (two may belong to it).
                let run = rest.chars().take_while(|&x| x == q).count();
                if run >= 3 {
                    state = State::Normal;
                    out.push_str(&rest[..run.min(5)]);
                    if run.min(5) > 1 {
                        iter.nth(run.min(5) - 2);
                    }
                    continue;
                }
            }
            State::Multi(_) => {}
        }
        out.push(c);
    }
    Cow::Owned(out)
}

#[derive(Clone, Copy)]
enum State {
    Normal,
    Comment,
    /// Inside a one-line string or quoted key opened by this quote.
    Single(char),
    /// Inside a multi-line string opened by three of this quote.
    Multi(char),
}

/// A space, line separator or similar that is not ASCII.
fn is_foreign_space(c: char) -> bool {
    !c.is_ascii() && c.is_whitespace()
}

/// The plain name of a character a reader cannot tell from a space (or from nothing).
pub fn invisible_name(c: char) -> Option<&'static str> {
    Some(match c {
        '\u{00a0}' => "no-break space",
        '\u{0085}' => "next-line character",
        '\u{1680}' => "ogham space mark",
        '\u{2000}' => "en quad",
        '\u{2001}' => "em quad",
        '\u{2002}' => "en space",
        '\u{2003}' => "em space",
        '\u{2004}'..='\u{2006}' => "fractional space",
        '\u{2007}' => "figure space",
        '\u{2008}' => "punctuation space",
        '\u{2009}' => "thin space",
        '\u{200a}' => "hair space",
        '\u{200b}' => "zero-width space",
        '\u{200c}' => "zero-width non-joiner",
        '\u{200d}' => "zero-width joiner",
        '\u{2028}' => "line separator",
        '\u{2029}' => "paragraph separator",
        '\u{202f}' => "narrow no-break space",
        '\u{205f}' => "medium mathematical space",
        '\u{2060}' => "word joiner",
        '\u{3000}' => "ideographic space",
        '\u{feff}' => "byte-order mark",
        c if is_foreign_space(c) => "unicode space",
        _ => return None,
    })
}

/// `a no-break space (U+00A0)`, `an em space (U+2003)`.
fn describe(c: char) -> Option<String> {
    let name = invisible_name(c)?;
    let article = if name.starts_with(['a', 'e', 'i', 'o', 'u']) {
        "an"
    } else {
        "a"
    };
    Some(format!("{article} {name} (U+{:04X})", u32::from(c)))
}

/// Where `s` holds a character a reader cannot see, in words: "starts with a no-break space
/// (U+00A0)", "ends with …" or "has … after `se`". `None` when it holds none.
pub fn invisible_in(s: &str) -> Option<String> {
    let (i, c) = s
        .char_indices()
        .find(|&(_, c)| invisible_name(c).is_some())?;
    let what = describe(c)?;
    Some(if i == 0 {
        format!("starts with {what}")
    } else if i + c.len_utf8() == s.len() {
        format!("ends with {what}")
    } else {
        format!("has {what} after `{}`", &s[..i])
    })
}

/// `s` with every invisible character written as `<U+00A0>`, for showing a key in a message.
pub fn visible(s: &str) -> String {
    s.chars()
        .map(|c| match invisible_name(c) {
            Some(_) => format!("<U+{:04X}>", u32::from(c)),
            None => c.to_string(),
        })
        .collect()
}

/// A note on line `line` (1-based) of `original` if it holds an invisible character:
/// "line 2 starts with a no-break space (U+00A0)".
pub fn line_note(original: &str, line: usize) -> Option<String> {
    let text = original.strip_prefix('\u{feff}').unwrap_or(original);
    let l = text.split('\n').nth(line.checked_sub(1)?)?;
    // Indentation with ASCII spaces before it still reads as "starts with".
    let found = invisible_in(l.trim_start_matches([' ', '\t']))?;
    Some(format!("line {line} {found}"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn foreign_spaces_outside_strings_become_ascii_of_the_same_length() {
        let text = "[study]\n\u{a0}seed\u{3000}= 1\n";
        let out = prepare(text);
        assert_eq!(out, "[study]\n  seed   = 1\n");
        assert_eq!(out.len(), text.len());
    }

    #[test]
    fn strings_comments_and_quoted_keys_are_kept() {
        let text = "title = \"a\u{a0}b\" # c\u{a0}d\n\"k\u{2003}\" = 'x\u{a0}'\nm = \"\"\"\n\u{a0}\"\"\"\u{a0}\n";
        let out = prepare(text);
        assert!(out.contains("\"a\u{a0}b\""));
        assert!(out.contains("# c\u{a0}d"));
        assert!(out.contains("\"k\u{2003}\""));
        assert!(out.contains("'x\u{a0}'"));
        assert!(out.contains("\n\u{a0}\"\"\""), "{out:?}");
        assert!(out.ends_with("\"\"\"  \n"), "{out:?}");
    }

    #[test]
    fn escaped_quotes_do_not_end_a_string() {
        let out = prepare("t = \"a\\\"\u{a0}\"\u{a0}\n");
        assert_eq!(out, "t = \"a\\\"\u{a0}\"  \n");
    }

    #[test]
    fn a_byte_order_mark_is_dropped() {
        assert_eq!(prepare("\u{feff}[study]\n"), "[study]\n");
    }

    #[test]
    fn invisible_characters_are_named_where_they_are() {
        assert_eq!(
            invisible_in("seed\u{a0}").unwrap(),
            "ends with a no-break space (U+00A0)"
        );
        assert_eq!(
            invisible_in("\u{3000}x").unwrap(),
            "starts with an ideographic space (U+3000)"
        );
        assert_eq!(
            line_note("[study]\n\u{a0}seed = 1\n", 2).unwrap(),
            "line 2 starts with a no-break space (U+00A0)"
        );
        assert_eq!(visible("seed\u{a0}"), "seed<U+00A0>");
        assert_eq!(invisible_in("seed"), None);
    }
}
