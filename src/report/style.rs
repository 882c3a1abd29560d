//! The look of vigil's tables: a rule under the header and one at the bottom, no row
//! rules, so long scans stay compact.

use comfy_table::{CellAlignment, ContentArrangement, LineStyle, Table, TableStyle};

/// Header rule and bottom rule only.
pub const REPORT_STYLE: TableStyle = TableStyle::new()
    .header_separator(LineStyle::none().fill('─').junction('─'))
    .bottom_border(LineStyle::none().fill('─').junction('─'));

/// A table in vigil's style with the given header; columns never wrap.
pub fn new_table(header: Vec<&str>) -> Table {
    let mut t = Table::new();
    t.load_style(REPORT_STYLE)
        .set_content_arrangement(ContentArrangement::Disabled)
        .set_header(header);
    t
}

/// Right-aligns the given columns (numbers read better that way).
pub fn right_align(t: &mut Table, cols: std::ops::Range<usize>) {
    for c in cols {
        if let Some(col) = t.column_mut(c) {
            col.set_cell_alignment(CellAlignment::Right);
        }
    }
}
