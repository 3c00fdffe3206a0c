//! The one table renderer of every text report: box-drawing lines by default, plain ASCII on
//! request, and an optional width limit that wraps the widest columns first.
//!
//! The layout is chosen once per process by the binary ([`set_table_layout`]); library users
//! who never set it get today's output: box-drawing lines and no width limit.

use std::sync::OnceLock;

use tabled::builder::Builder;
use tabled::settings::peaker::Priority;
use tabled::settings::style::HorizontalLine;
use tabled::settings::{Style, Width};

/// How text tables are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct TableLayout {
    /// Draw with `+`, `-` and `|` only (for logs that are not UTF-8 clean).
    pub ascii: bool,
    /// Wrap cells so that no table is wider than this many columns; None for no limit.
    pub max_width: Option<usize>,
}

static LAYOUT: OnceLock<TableLayout> = OnceLock::new();

/// Sets the layout of every table this process renders. The first call wins; later calls are
/// ignored (returns false).
pub fn set_table_layout(layout: TableLayout) -> bool {
    LAYOUT.set(layout).is_ok()
}

/// The layout in force (the default when never set).
pub fn table_layout() -> TableLayout {
    LAYOUT.get().copied().unwrap_or_default()
}

/// Renders a table with a header row in the process's layout.
pub fn render_table<I, R>(header: &[&str], rows: I) -> String
where
    I: IntoIterator<Item = R>,
    R: IntoIterator<Item = String>,
{
    render_table_with(table_layout(), header, rows)
}

/// Renders a table with a header row in `layout`.
pub fn render_table_with<I, R>(layout: TableLayout, header: &[&str], rows: I) -> String
where
    I: IntoIterator<Item = R>,
    R: IntoIterator<Item = String>,
{
    let mut b = Builder::default();
    b.push_record(header.iter().map(|h| h.to_string()));
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    if layout.ascii {
        // Like the default style: a frame, column lines and one line under the header.
        t.with(
            Style::ascii()
                .remove_horizontal()
                .horizontals([(1, HorizontalLine::full('-', '+', '+', '+'))]),
        );
    } else {
        t.with(Style::sharp());
    }
    if let Some(w) = layout.max_width {
        // Wrap the widest columns first, at word boundaries where a word fits.
        t.with(
            Width::wrap(w)
                .priority(Priority::max(true))
                .keep_words(true),
        );
    }
    t.to_string()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rows() -> Vec<Vec<String>> {
        vec![vec![
            "stuck-at-0 on a long net name".to_string(),
            "y[0], y[1], y[2], y[3], co, ovf, zero".to_string(),
        ]]
    }

    #[test]
    fn default_is_box_drawing_without_limit() {
        let s = render_table_with(TableLayout::default(), &["fault", "observed at"], rows());
        assert!(s.starts_with('┌'), "{s}");
        assert!(s
            .lines()
            .any(|l| l.contains("y[0], y[1], y[2], y[3], co, ovf, zero")));
    }

    #[test]
    fn ascii_and_width_limit() {
        let layout = TableLayout {
            ascii: true,
            max_width: Some(40),
        };
        let s = render_table_with(layout, &["fault", "observed at"], rows());
        assert!(s.is_ascii(), "{s}");
        assert!(s.starts_with('+'), "{s}");
        for l in s.lines() {
            assert!(l.chars().count() <= 40, "{l:?} is wider than 40\n{s}");
        }
        assert!(s.lines().count() > 5, "nothing was wrapped\n{s}");
    }
}
