//! The report page as Markdown, for pasting into a proposal: the same blocks as the HTML
//! page, figures as links to the SVG files beside it.

use super::page::{Page, PageBlock};
use std::fmt::Write;

/// A table cell: no line breaks, and `|` escaped so it does not end the cell.
fn cell(text: &str) -> String {
    text.replace('\n', " ").replace('|', "\\|")
}

/// The Markdown text of a page.
pub fn render(page: &Page) -> String {
    let mut out = String::new();
    for block in &page.blocks {
        match block {
            PageBlock::Heading(level, text) => {
                let _ = writeln!(out, "{} {text}\n", "#".repeat(usize::from(*level)));
            }
            PageBlock::Paragraph(text) => {
                let _ = writeln!(out, "{text}\n");
            }
            PageBlock::List(items) => {
                for item in items {
                    let _ = writeln!(out, "- {item}");
                }
                let _ = writeln!(out);
            }
            PageBlock::Table { header, rows } => {
                let head: Vec<String> = header.iter().map(|h| cell(h)).collect();
                let _ = writeln!(out, "| {} |", head.join(" | "));
                let _ = writeln!(out, "|{}", " --- |".repeat(header.len()));
                for row in rows {
                    let cells: Vec<String> = row.iter().map(|c| cell(c)).collect();
                    let _ = writeln!(out, "| {} |", cells.join(" | "));
                }
                let _ = writeln!(out);
            }
            PageBlock::Figure { file, caption, .. } => {
                let _ = writeln!(out, "![{}]({file})\n", cell(caption));
                let _ = writeln!(out, "*{caption}*\n");
            }
            PageBlock::Pre(text) => {
                let _ = writeln!(out, "```text\n{}\n```\n", text.trim_end());
            }
        }
    }
    out
}
