//! The report page as one self-contained HTML file: styles inline, every figure inlined as
//! SVG, no script and nothing fetched from elsewhere, so it opens offline and prints whole.

use super::page::{Page, PageBlock};
use std::fmt::Write;

/// Escapes text for HTML element content and attribute values.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for ch in text.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

/// The SVG document without an XML declaration, ready to inline.
fn inline_svg(svg: &str) -> &str {
    match (svg.starts_with("<?xml"), svg.find("?>")) {
        (true, Some(end)) => svg[end + 2..].trim_start(),
        _ => svg,
    }
}

const STYLE: &str = "body{font-family:sans-serif;max-width:62rem;margin:2rem auto;padding:0 1rem;\
color:#222;line-height:1.45}table{border-collapse:collapse;margin:0.5rem 0 1.2rem;font-size:0.9rem}\
th,td{border:1px solid #bbb;padding:0.2rem 0.5rem;text-align:left;vertical-align:top}\
th{background:#eee}figure{margin:1rem 0 2rem}figure svg{max-width:100%;height:auto;\
border:1px solid #ddd}figcaption{font-size:0.9rem;color:#444}pre{background:#f6f6f6;\
padding:0.6rem;overflow-x:auto;font-size:0.78rem;line-height:1.25}";

/// The HTML bytes of a page.
pub fn render(page: &Page) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "<!DOCTYPE html>");
    let _ = writeln!(out, "<html lang=\"en\">");
    let _ = writeln!(out, "<head>");
    let _ = writeln!(out, "<meta charset=\"utf-8\">");
    let _ = writeln!(
        out,
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
    );
    let _ = writeln!(out, "<title>{}</title>", escape(&page.title));
    let _ = writeln!(out, "<style>{STYLE}</style>");
    let _ = writeln!(out, "</head>");
    let _ = writeln!(out, "<body>");
    for block in &page.blocks {
        match block {
            PageBlock::Heading(level, text) => {
                let _ = writeln!(out, "<h{level}>{}</h{level}>", escape(text));
            }
            PageBlock::Paragraph(text) => {
                let _ = writeln!(out, "<p>{}</p>", escape(text));
            }
            PageBlock::List(items) => {
                let _ = writeln!(out, "<ul>");
                for item in items {
                    let _ = writeln!(out, "<li>{}</li>", escape(item));
                }
                let _ = writeln!(out, "</ul>");
            }
            PageBlock::Table { header, rows } => {
                let _ = writeln!(out, "<table>");
                let cells: Vec<String> = header
                    .iter()
                    .map(|h| format!("<th>{}</th>", escape(h)))
                    .collect();
                let _ = writeln!(out, "<thead><tr>{}</tr></thead>", cells.concat());
                let _ = writeln!(out, "<tbody>");
                for row in rows {
                    let cells: Vec<String> = row
                        .iter()
                        .map(|c| format!("<td>{}</td>", escape(c)))
                        .collect();
                    let _ = writeln!(out, "<tr>{}</tr>", cells.concat());
                }
                let _ = writeln!(out, "</tbody>");
                let _ = writeln!(out, "</table>");
            }
            PageBlock::Figure { file, caption, svg } => {
                let _ = writeln!(out, "<figure id=\"{}\">", escape(file));
                let _ = writeln!(out, "{}", inline_svg(svg).trim_end());
                let _ = writeln!(
                    out,
                    "<figcaption>{} (also as <a href=\"{}\">{}</a>)</figcaption>",
                    escape(caption),
                    escape(file),
                    escape(file)
                );
                let _ = writeln!(out, "</figure>");
            }
            PageBlock::Pre(text) => {
                let _ = writeln!(out, "<pre>{}</pre>", escape(text.trim_end()));
            }
        }
    }
    let _ = writeln!(out, "</body>");
    let _ = writeln!(out, "</html>");
    out
}
