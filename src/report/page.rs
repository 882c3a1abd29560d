//! The report page as typed blocks, written once and rendered twice: as a self-contained
//! HTML page (`page_html`) and as Markdown for pasting into a proposal (`page_markdown`),
//! so the two can never say different things.

/// One block of the page, in reading order.
#[derive(Debug, Clone, PartialEq)]
pub enum PageBlock {
    /// A heading of level 1 to 3.
    Heading(u8, String),
    Paragraph(String),
    /// A bulleted list.
    List(Vec<String>),
    Table {
        header: Vec<String>,
        rows: Vec<Vec<String>>,
    },
    /// A figure: the SVG file beside the page, its caption and its SVG text (inlined in HTML).
    Figure {
        file: String,
        caption: String,
        svg: String,
    },
    /// Preformatted text (the terminal report, the resolved plan).
    Pre(String),
}

/// A whole page.
#[derive(Debug, Clone, PartialEq)]
pub struct Page {
    pub title: String,
    pub blocks: Vec<PageBlock>,
}
