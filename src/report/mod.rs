//! Report renderers: view types and text, JSON, Markdown and HTML output of an outcome.
