//! Report unit tests: escaping, formats by extension.

use super::*;

#[test]
fn formats_follow_the_file_extension() {
    assert_eq!(Format::from_extension("html"), Some(Format::Html));
    assert_eq!(Format::from_extension("MD"), Some(Format::Markdown));
    assert_eq!(Format::from_extension("json"), Some(Format::Json));
    assert_eq!(Format::from_extension("txt"), Some(Format::Text));
    assert_eq!(Format::from_extension("pdf"), None);
}

#[test]
fn html_escaping_leaves_no_markup() {
    assert_eq!(
        html::escape("<script>alert('x') & \"y\"</script>"),
        "&lt;script&gt;alert(&#39;x&#39;) &amp; &quot;y&quot;&lt;/script&gt;"
    );
}

#[test]
fn markdown_escaping_keeps_text_as_text() {
    assert_eq!(
        markdown::md("a|b <i>*x*</i>\nnext [l](u) &lt;"),
        "a\\|b \\<i\\>\\*x\\*\\</i\\> next \\[l\\](u) \\&lt;"
    );
}
