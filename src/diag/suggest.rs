//! "Did you mean" suggestions by edit distance against a known vocabulary.

/// Levenshtein distance between `a` and `b`, counted in characters, case-sensitive.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b_chars: Vec<char> = b.chars().collect();
    let mut previous: Vec<usize> = (0..=b_chars.len()).collect();
    let mut current = vec![0; b_chars.len() + 1];
    for (i, ca) in a.chars().enumerate() {
        current[0] = i + 1;
        for (j, cb) in b_chars.iter().enumerate() {
            let substitution = previous[j] + usize::from(ca != *cb);
            current[j + 1] = substitution.min(previous[j + 1] + 1).min(current[j] + 1);
        }
        std::mem::swap(&mut previous, &mut current);
    }
    previous[b_chars.len()]
}

/// The candidate closest to `word`, if it is close enough to be a plausible typo
/// (distance at most a third of the word's length, and at least 1). Ties go to the
/// candidate listed first, so callers control the order.
pub fn closest_match<'a, I>(word: &str, candidates: I) -> Option<&'a str>
where
    I: IntoIterator<Item = &'a str>,
{
    let limit = (word.chars().count() / 3).max(1);
    let lowered = word.to_lowercase();
    candidates
        .into_iter()
        .map(|c| (edit_distance(&lowered, &c.to_lowercase()), c))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn distance_matches_textbook_examples() {
        // Classic worked example (common practice): kitten -> sitting needs 3 edits.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("same", "same"), 0);
    }

    #[test]
    fn suggests_close_ids_and_refuses_far_ones() {
        let ids = ["ketone", "ester", "ether", "aldehyde"];
        assert_eq!(closest_match("ketnoe", ids), Some("ketone"));
        assert_eq!(closest_match("Ester", ids), Some("ester"));
        assert_eq!(closest_match("sulfone", ids), None);
    }
}
