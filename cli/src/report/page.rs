//! What the page templates (`cli/templates/`) are given: plain text (the templates escape
//! it), numbers already formatted, and SVG charts as already-safe markup. The templates hold
//! every page's HTML; this module holds the shared pieces of their data and renders a page.

use askama::filters::Safe;
use askama::Template;

/// An SVG chart built by `svg.rs`, which escapes every text it draws: inserted as it is.
pub type Svg = Safe<String>;

/// Marks a chart built by `svg.rs` as markup to insert as it is.
pub fn svg(markup: String) -> Svg {
    Safe(markup)
}

/// A numbered figure of the `figure` partial (templates/partials/figure.html).
pub struct Figure {
    /// Its number on the page, from 1.
    pub number: usize,
    /// Heading (plain text).
    pub title: String,
    /// Caption above the charts (plain text), if any.
    pub caption: Option<String>,
    /// The charts.
    pub svgs: Vec<Svg>,
}

/// A comparison table of the `table` partial: row labels, then one column per run.
pub struct CompareTable {
    /// CSS class of the table.
    pub class: &'static str,
    /// Heading of the label column.
    pub first: String,
    /// The run columns.
    pub columns: Vec<Column>,
    /// Whether the header row is closed with `</tr>` (the headline table has always left
    /// it open, which HTML allows before `</thead>`).
    pub close_head_row: bool,
    /// The rows.
    pub rows: Vec<TableRow>,
}

/// The heading of a run's column: its letter and, in the headline table, its title.
pub struct Column {
    /// Run letter (A, B, …).
    pub letter: String,
    /// Title below the letter.
    pub sub: Option<String>,
}

/// A row of a comparison table.
pub enum TableRow {
    /// A heading across the table.
    Section(String),
    /// A label and one cell per run.
    Values {
        /// Row label (plain text).
        label: String,
        /// Whether the label is a name from the file (shown as code).
        code: bool,
        /// One cell per run.
        cells: Vec<Cell>,
    },
}

/// A table cell: text (`None`: the value is not in the run file) and a CSS class ("" for
/// none: "flag" for a check above its rule, "alarm" for a collapse margin below 1).
pub struct Cell {
    /// Plain text.
    pub text: Option<String>,
    /// CSS class.
    pub class: &'static str,
}

impl Cell {
    /// A cell of plain text.
    pub fn plain(text: String) -> Self {
        Cell {
            text: Some(text),
            class: "",
        }
    }

    /// A cell of a value the run file does not hold.
    pub fn missing() -> Self {
        Cell {
            text: None,
            class: "",
        }
    }
}

/// The whole page a template describes. A template file loses its final line break when
/// read, so the page's last line (`</html>`) gets it back here.
pub fn render(page: &impl Template) -> String {
    let mut html = page
        .render()
        .expect("the report templates write to a String and call no fallible filter");
    html.push('\n');
    html
}
