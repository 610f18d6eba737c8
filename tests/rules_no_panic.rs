//! Bad input never panics the loader: whatever the text, `load` returns a catalogue and
//! diagnostics. Mutations of a real rules file (cut, duplicated or replaced spans) and
//! arbitrary text are fed in.

use proptest::prelude::*;
use quiddity::rules::{load, EMBEDDED_FILES};

fn carbonyl() -> &'static str {
    EMBEDDED_FILES
        .iter()
        .find(|(n, _)| *n == "carbonyl.yaml")
        .map(|(_, t)| *t)
        .expect("carbonyl.yaml is shipped")
}

/// Cuts `text` at character positions (never inside a character).
fn splice(text: &str, from: usize, to: usize, insert: &str) -> String {
    let chars: Vec<char> = text.chars().collect();
    let from = from.min(chars.len());
    let to = to.clamp(from, chars.len());
    let mut out: String = chars[..from].iter().collect();
    out.push_str(insert);
    out.extend(&chars[to..]);
    out
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    #[test]
    fn mutated_rules_files_give_diagnostics_not_panics(
        from in 0usize..40_000,
        len in 0usize..200,
        insert in "[ -~\n]{0,20}",
    ) {
        let text = splice(carbonyl(), from, from + len, &insert);
        let (_, diagnostics) = load([("carbonyl.yaml", text.as_str())]);
        // Without the other files the required ids are missing, so there is always one.
        prop_assert!(!diagnostics.is_empty());
        for d in &diagnostics {
            prop_assert!(!d.message.is_empty());
        }
    }

    #[test]
    fn arbitrary_text_gives_diagnostics_not_panics(text in "\\PC{0,300}") {
        let (_, diagnostics) = load([("x.yaml", text.as_str())]);
        prop_assert!(!diagnostics.is_empty());
    }
}
