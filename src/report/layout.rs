//! How wide the terminal report may be, and the one rule that wraps prose to that width.
//!
//! The default is [`DEFAULT_WIDTH`] columns (what a pipe, a file or a snapshot gets); the
//! command line sets the terminal's own width when standard output is a terminal, a width
//! the user asks for (`--width N`), or the full, unwrapped layout (`--wide`). Tables fit by
//! wrapping cell text inside their columns (`style::new_table`); prose lines wrap on spaces
//! with a hanging indent under a bullet. The setting is per thread, so a test or the report
//! page can render at a fixed width while another thread renders at another.

use std::cell::Cell;
use unicode_width::UnicodeWidthChar;

/// Width of the terminal report when nothing else is known.
pub const DEFAULT_WIDTH: usize = 100;
/// The narrowest width accepted: below it tables of d′, c and their intervals cannot fit.
pub const MIN_WIDTH: usize = 60;

/// How the terminal report is laid out.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Layout {
    /// Every table and line fits this many columns.
    Fit(usize),
    /// Full-width tables and unwrapped prose (`--wide`).
    Wide,
}

impl Default for Layout {
    fn default() -> Self {
        Layout::Fit(DEFAULT_WIDTH)
    }
}

thread_local! {
    static LAYOUT: Cell<Layout> = Cell::new(Layout::default());
}

/// Sets this thread's layout (the command line does it once, before rendering).
pub fn set_layout(layout: Layout) {
    LAYOUT.with(|l| l.set(layout));
}

/// This thread's layout.
pub fn layout() -> Layout {
    LAYOUT.with(|l| l.get())
}

/// Runs `f` with `layout`, then restores the previous one (the report page renders the
/// terminal report at [`DEFAULT_WIDTH`] whatever the terminal is, so its bytes never depend
/// on the window it was made in).
pub fn with_layout<T>(layout: Layout, f: impl FnOnce() -> T) -> T {
    let before = self::layout();
    set_layout(layout);
    let out = f();
    set_layout(before);
    out
}

/// The width of a terminal on standard output, if it is one and its width can be read.
pub fn terminal_width() -> Option<usize> {
    let t = comfy_table::Table::new();
    if t.is_tty() {
        t.width().map(usize::from)
    } else {
        None
    }
}

/// Columns a line takes on a terminal (the d̂ of r(d̂′, ĉ) is a d and a zero-width combining
/// mark: one column, as comfy-table counts it).
pub fn columns(line: &str) -> usize {
    line.chars().map(|c| c.width().unwrap_or(0)).sum()
}

/// A line as terminal cells: each visible character with the zero-width marks that follow it.
fn cells(line: &str) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for c in line.chars() {
        match (c.width().unwrap_or(0), out.last_mut()) {
            (0, Some(last)) => last.push(c),
            _ => out.push(c.to_string()),
        }
    }
    out
}

/// Fits the terminal report to the layout's width: a table wider than the width is printed
/// in panels, each repeating the table's leading (identifying) columns and carrying as many
/// of the other columns as fit, so every number stays on screen and none is cut; a prose
/// line longer than the width wraps on spaces, a continuation indented under the line's text
/// (after its indentation and any bullet such as `- `, `• `, `* ` or `1. `). A single word
/// longer than the width stays whole. `Wide` returns the text unchanged.
pub fn wrap_prose(text: &str) -> String {
    let Layout::Fit(width) = layout() else {
        return text.to_string();
    };
    let lines: Vec<&str> = text.split('\n').collect();
    let mut out: Vec<String> = Vec::with_capacity(lines.len());
    let mut i = 0;
    while i < lines.len() {
        if let Some(table) = wide_table_at(&lines, i, width) {
            // The header lines were already pushed as prose lines of the table's width:
            // take them back and print the whole table in panels.
            out.truncate(out.len() - (i - table.first));
            out.extend(panels(
                &lines[table.first..=table.last],
                table.header_rule - table.first,
                width,
            ));
            i = table.last + 1;
            continue;
        }
        let line = lines[i];
        if columns(line) <= width {
            out.push(line.to_string());
        } else {
            let mut wrapped = String::new();
            wrap_line(line, width, &mut wrapped);
            out.push(wrapped);
        }
        i += 1;
    }
    out.join("\n")
}

/// A table found in the text: its first line (header), its header rule and its bottom rule.
struct TableSpan {
    first: usize,
    header_rule: usize,
    last: usize,
}

fn is_rule(line: &str) -> bool {
    !line.is_empty() && line.chars().all(|c| c == '─')
}

/// The table whose header rule is line `i`, when it is wider than `width`: every line of a
/// table vigil prints has the rule's width (comfy-table pads cells), which is how the header
/// above and the bottom rule below are found. `None` for anything else, so prose is never
/// mistaken for a table.
fn wide_table_at(lines: &[&str], i: usize, width: usize) -> Option<TableSpan> {
    if !is_rule(lines[i]) {
        return None;
    }
    let w = columns(lines[i]);
    if w <= width || i == 0 {
        return None;
    }
    let mut first = i;
    while first > 0 && !is_rule(lines[first - 1]) && columns(lines[first - 1]) == w {
        first -= 1;
    }
    if first == i {
        return None;
    }
    let mut last = i + 1;
    while last < lines.len() && !is_rule(lines[last]) {
        if columns(lines[last]) != w {
            return None;
        }
        last += 1;
    }
    (last < lines.len() && columns(lines[last]) == w).then_some(TableSpan {
        first,
        header_rule: i,
        last,
    })
}

/// Prints a table (header lines, header rule at `rule`, rows, bottom rule) in panels of at
/// most `width` columns. Columns are runs of text separated by two or more blank positions
/// in every line (comfy-table pads each cell by one on either side; a cell's own text has
/// single spaces). The leading columns that identify a row (no decimal point, percent or ±
/// in any cell: trial counts, splits, names), up to half the width, are repeated in every
/// panel, so each row stays identified.
fn panels(table: &[&str], rule: usize, width: usize) -> Vec<String> {
    let grid: Vec<Vec<String>> = table
        .iter()
        .enumerate()
        .filter(|&(k, _)| k != rule && k != table.len() - 1)
        .map(|(_, l)| cells(l))
        .collect();
    let w = grid[0].len();
    let blank: Vec<bool> = (0..w).map(|p| grid.iter().all(|l| l[p] == " ")).collect();
    // Column starts: a non-blank position after at least two blank ones (or the first).
    let mut starts = Vec::new();
    let mut run = 2;
    for (p, &b) in blank.iter().enumerate() {
        if b {
            run += 1;
        } else {
            if run >= 2 {
                starts.push(p);
            }
            run = 0;
        }
    }
    // Region j = [starts[j] − 1, starts[j + 1] − 1): the column with its left padding.
    let cut = |j: usize| -> usize {
        if j >= starts.len() {
            w
        } else {
            starts[j].saturating_sub(1)
        }
    };
    // Identifying columns hold no measured value: no decimal point, percent or ±.
    let body: Vec<Vec<String>> = table[rule + 1..table.len() - 1]
        .iter()
        .map(|l| cells(l))
        .collect();
    let identifies = |j: usize| {
        body.iter().all(|row| {
            !row[cut(j)..cut(j + 1).min(row.len())]
                .iter()
                .any(|c| c == "." || c == "%" || c == "±")
        })
    };
    let mut keys = 1;
    while keys < starts.len() && identifies(keys) && cut(keys + 1) * 2 <= width {
        keys += 1;
    }
    if keys >= starts.len() {
        keys = 1;
    }
    // Fewer repeated columns when one of the others would not fit beside them.
    let fits = |keys: usize| (keys..starts.len()).all(|j| cut(keys) + cut(j + 1) - cut(j) <= width);
    while keys > 1 && !fits(keys) {
        keys -= 1;
    }
    let key_end = cut(keys);
    let mut groups: Vec<(usize, usize)> = Vec::new();
    let mut a = keys;
    while a < starts.len() {
        let mut b = a + 1;
        while b < starts.len() && key_end + cut(b + 1) - cut(a) <= width {
            b += 1;
        }
        groups.push((a, b));
        a = b;
    }
    let mut out = Vec::new();
    for (g, &(a, b)) in groups.iter().enumerate() {
        if g > 0 {
            out.push(String::new());
        }
        let panel_width = key_end + cut(b) - cut(a);
        for (k, line) in table.iter().enumerate() {
            if k == rule || k == table.len() - 1 {
                out.push("─".repeat(panel_width));
                continue;
            }
            let chars = cells(line);
            let mut s: String = chars[..key_end].concat();
            s.push_str(&chars[cut(a)..cut(b)].concat());
            out.push(s.trim_end().to_string());
        }
    }
    out
}

fn wrap_line(line: &str, width: usize, out: &mut String) {
    let hang = hanging_indent(line);
    let mut column = 0;
    let mut first = true;
    let (lead, body) = line.split_at(leading_spaces(line));
    out.push_str(lead);
    column += lead.len();
    for word in body.split(' ').filter(|w| !w.is_empty()) {
        let len = columns(word);
        if !first && column + 1 + len > width {
            out.push('\n');
            out.push_str(&" ".repeat(hang));
            column = hang;
        } else if !first {
            out.push(' ');
            column += 1;
        }
        out.push_str(word);
        column += len;
        first = false;
    }
}

fn leading_spaces(line: &str) -> usize {
    line.len() - line.trim_start_matches(' ').len()
}

/// Columns before the text of a line: its indentation plus a bullet or list number.
fn hanging_indent(line: &str) -> usize {
    let indent = leading_spaces(line);
    let rest = &line[indent..];
    let bullet = ["- ", "• ", "* ", "· ", "■ ", "▸ "]
        .iter()
        .find(|b| rest.starts_with(**b))
        .map(|b| b.chars().count())
        .or_else(|| {
            let digits = rest.chars().take_while(char::is_ascii_digit).count();
            (digits > 0 && rest[digits..].starts_with(". ")).then_some(digits + 2)
        })
        .unwrap_or(0);
    // A hang wider than half the width would leave too little room: indent by 2 instead.
    (indent + bullet).min(24)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_lines_wrap_under_their_bullet_and_short_ones_stay() {
        let text = format!(
            "short\n- {}\n  {}",
            "word ".repeat(40).trim(),
            "x".repeat(120)
        );
        let wrapped = with_layout(Layout::Fit(60), || wrap_prose(&text));
        let lines: Vec<&str> = wrapped.lines().collect();
        assert_eq!(lines[0], "short");
        assert!(lines[1].starts_with("- word"));
        assert!(lines[2].starts_with("  word"), "{wrapped}");
        assert!(
            lines
                .iter()
                .all(|l| l.chars().count() <= 60 || !l.trim().contains(' '))
        );
        assert_eq!(lines.last().unwrap().trim(), "x".repeat(120));
        let same = with_layout(Layout::Wide, || wrap_prose(&text));
        assert_eq!(same, text);
    }

    #[test]
    fn a_wide_table_prints_in_panels_that_repeat_its_first_columns() {
        let rule = "─".repeat(30);
        let (head, row) = (" key    aaaa   bbbb   cccc", " x1     1 ± 2  3      4");
        let table = format!("intro\n{head:<30}\n{rule}\n{row:<30}\n{rule}\nafter");
        let fitted = with_layout(Layout::Fit(20), || wrap_prose(&table));
        let (r14, r16) = ("─".repeat(14), "─".repeat(16));
        let expected = [
            "intro",
            " key    aaaa",
            &r14,
            " x1     1 ± 2",
            &r14,
            "",
            " key    bbbb",
            &r14,
            " x1     3",
            &r14,
            "",
            " key    cccc",
            &r16,
            " x1     4",
            &r16,
            "after",
        ]
        .join("\n");
        assert_eq!(fitted, expected);
    }
}
