//! JSON report: the view serialised as one pretty document (the plot trace excluded).

use super::view::ReportView;

/// Renders the JSON report, ending with a newline.
pub fn render(v: &ReportView) -> String {
    // The view holds only strings, numbers, maps with string keys and finite floats, so
    // encoding cannot fail; should it ever, the error text is the document.
    let mut s = serde_json::to_string_pretty(v)
        .unwrap_or_else(|e| format!("{{\"error\": \"cannot encode the report: {e}\"}}"));
    s.push('\n');
    s
}
