//! Element ranges of a formula search: which elements may appear and how many of each.
//!
//! Grammar (spaces between items are allowed):
//!
//! ```text
//! ranges := item+
//! item   := symbol count ( "-" count )?      C0-30   N4 (exactly 4)
//! symbol := upper lower?                     an element of chem's table
//! count  := digit+                           at most MAX_RANGE_COUNT
//! ```
//!
//! Elements not named may not appear. The default ranges
//! (`C0-60H0-120N0-10O0-20S0-4P0-3F0-10Cl0-6Br0-4I0-3Si0-4`) cover small organic
//! molecules up to about m/z 1000 in the elements a forensic or contract laboratory meets
//! (common practice).

use crate::chem::elements::{element, known_symbols, Element};
use crate::diag::{closest_match, Diagnostic};
use std::fmt;

/// Largest count an element range may allow.
pub const MAX_RANGE_COUNT: u32 = 999;

/// Most elements one search may range over.
pub const MAX_RANGE_ELEMENTS: usize = 16;

/// The default ranges, in the range grammar.
pub const DEFAULT_RANGES: &str = "C0-60H0-120N0-10O0-20S0-4P0-3F0-10Cl0-6Br0-4I0-3Si0-4";

/// One element with its allowed counts `min..=max`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ElementRange {
    /// The element.
    pub element: &'static Element,
    /// Fewest atoms.
    pub min: u32,
    /// Most atoms.
    pub max: u32,
}

/// The elements a search may use, each with its count range, in the order written.
#[derive(Clone, Debug, PartialEq)]
pub struct ElementRanges {
    ranges: Vec<ElementRange>,
}

/// What is wrong with a range text.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum RangeErrorKind {
    /// Nothing to parse.
    #[error("empty element ranges")]
    Empty,
    /// A character that cannot start an element symbol.
    #[error("expected an element symbol, found '{0}'")]
    ExpectedSymbol(char),
    /// A symbol that is not in the element table.
    #[error("unknown element \"{symbol}\"")]
    UnknownElement {
        /// The symbol as written.
        symbol: String,
        /// A close known symbol.
        suggestion: Option<String>,
    },
    /// A symbol without a count after it.
    #[error("expected a count after \"{0}\"")]
    ExpectedCount(String),
    /// A dash without an upper count.
    #[error("expected the upper count after '-'")]
    ExpectedUpper,
    /// Count too large.
    #[error("count exceeds the limit of {MAX_RANGE_COUNT}")]
    CountTooLarge,
    /// Lower count above the upper one.
    #[error("range {min}-{max} has its lower count above the upper one")]
    Reversed {
        /// Lower count.
        min: u32,
        /// Upper count.
        max: u32,
    },
    /// The same element twice.
    #[error("element \"{0}\" is given twice")]
    Duplicate(String),
    /// Too many elements.
    #[error("more than {MAX_RANGE_ELEMENTS} elements")]
    TooManyElements,
}

/// A range-text error with the byte offset where it was found.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{kind}")]
pub struct RangeError {
    /// What is wrong.
    pub kind: RangeErrorKind,
    /// Byte offset into the text.
    pub offset: usize,
}

impl RangeError {
    /// The error as a diagnostic at its place in `src` (which came from `origin`).
    pub fn to_diagnostic(&self, origin: &str, src: &str) -> Diagnostic {
        let d = Diagnostic::error(origin, self.kind.to_string()).at_offset(src, self.offset);
        match &self.kind {
            RangeErrorKind::UnknownElement {
                suggestion: Some(s),
                ..
            } => d.with_help(format!("did you mean \"{s}\"?")),
            RangeErrorKind::Empty | RangeErrorKind::ExpectedCount(_) => {
                d.with_help("write ranges like C0-30H0-60N0-4O0-8")
            }
            _ => d,
        }
    }
}

impl ElementRanges {
    /// The default ranges ([`DEFAULT_RANGES`]).
    pub fn default_ranges() -> ElementRanges {
        // The default text is a constant tested to parse.
        ElementRanges::parse(DEFAULT_RANGES).unwrap_or(ElementRanges { ranges: Vec::new() })
    }

    /// The composition with `counts[i]` atoms of the `i`-th element of the ranges.
    pub fn composition(&self, counts: &[u32]) -> crate::chem::Composition {
        crate::chem::Composition::from_pairs(
            self.ranges
                .iter()
                .zip(counts)
                .map(|(r, n)| (r.element.symbol, *n)),
        )
    }

    /// Ranges from parts; `None` when an element repeats, a range is reversed or there
    /// are too many elements.
    pub fn from_ranges(ranges: Vec<ElementRange>) -> Option<ElementRanges> {
        if ranges.len() > MAX_RANGE_ELEMENTS {
            return None;
        }
        for (i, r) in ranges.iter().enumerate() {
            if r.min > r.max
                || r.max > MAX_RANGE_COUNT
                || ranges[..i]
                    .iter()
                    .any(|q| q.element.symbol == r.element.symbol)
            {
                return None;
            }
        }
        Some(ElementRanges { ranges })
    }

    /// Parses the range grammar in the module documentation.
    pub fn parse(src: &str) -> Result<ElementRanges, RangeError> {
        let bytes = src.as_bytes();
        let mut i = 0;
        let mut ranges: Vec<ElementRange> = Vec::new();
        let skip_spaces = |i: &mut usize| {
            while *i < bytes.len() && bytes[*i].is_ascii_whitespace() {
                *i += 1;
            }
        };
        skip_spaces(&mut i);
        if i == bytes.len() {
            return Err(RangeError {
                kind: RangeErrorKind::Empty,
                offset: 0,
            });
        }
        while i < bytes.len() {
            // item := symbol count ( "-" count )?
            let start = i;
            let c = src[i..].chars().next().unwrap_or(' ');
            if !c.is_ascii_uppercase() {
                return Err(RangeError {
                    kind: RangeErrorKind::ExpectedSymbol(c),
                    offset: i,
                });
            }
            i += 1;
            if i < bytes.len() && bytes[i].is_ascii_lowercase() {
                i += 1;
            }
            let symbol = &src[start..i];
            let el = element(symbol).ok_or_else(|| RangeError {
                kind: RangeErrorKind::UnknownElement {
                    symbol: symbol.to_owned(),
                    suggestion: closest_match(symbol, known_symbols()).map(str::to_owned),
                },
                offset: start,
            })?;
            if ranges.iter().any(|r| r.element.symbol == el.symbol) {
                return Err(RangeError {
                    kind: RangeErrorKind::Duplicate(symbol.to_owned()),
                    offset: start,
                });
            }
            if ranges.len() == MAX_RANGE_ELEMENTS {
                return Err(RangeError {
                    kind: RangeErrorKind::TooManyElements,
                    offset: start,
                });
            }
            let min_at = i;
            let min = parse_count(src, &mut i)?.ok_or_else(|| RangeError {
                kind: RangeErrorKind::ExpectedCount(symbol.to_owned()),
                offset: min_at,
            })?;
            let max = if i < bytes.len() && bytes[i] == b'-' {
                i += 1;
                let max_at = i;
                parse_count(src, &mut i)?.ok_or(RangeError {
                    kind: RangeErrorKind::ExpectedUpper,
                    offset: max_at,
                })?
            } else {
                min
            };
            if min > max {
                return Err(RangeError {
                    kind: RangeErrorKind::Reversed { min, max },
                    offset: min_at,
                });
            }
            ranges.push(ElementRange {
                element: el,
                min,
                max,
            });
            skip_spaces(&mut i);
        }
        Ok(ElementRanges { ranges })
    }

    /// The ranges in the order written.
    pub fn ranges(&self) -> &[ElementRange] {
        &self.ranges
    }

    /// The range of element `symbol`, if it may appear.
    pub fn get(&self, symbol: &str) -> Option<&ElementRange> {
        self.ranges.iter().find(|r| r.element.symbol == symbol)
    }

    /// Most atoms of `symbol` allowed (0 when the element is not ranged).
    pub fn max_of(&self, symbol: &str) -> u32 {
        self.get(symbol).map_or(0, |r| r.max)
    }

    /// Number of count combinations a nested loop over every element would visit.
    pub fn n_combinations(&self) -> f64 {
        self.ranges
            .iter()
            .map(|r| f64::from(r.max - r.min + 1))
            .product()
    }
}

impl Default for ElementRanges {
    fn default() -> ElementRanges {
        ElementRanges::default_ranges()
    }
}

fn parse_count(src: &str, i: &mut usize) -> Result<Option<u32>, RangeError> {
    let bytes = src.as_bytes();
    let start = *i;
    while *i < bytes.len() && bytes[*i].is_ascii_digit() {
        *i += 1;
    }
    if *i == start {
        return Ok(None);
    }
    match src[start..*i].parse::<u32>() {
        Ok(n) if n <= MAX_RANGE_COUNT => Ok(Some(n)),
        _ => Err(RangeError {
            kind: RangeErrorKind::CountTooLarge,
            offset: start,
        }),
    }
}

impl fmt::Display for ElementRanges {
    /// Writes the ranges back in the grammar (`C0-30H0-60`).
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for r in &self.ranges {
            if r.min == r.max {
                write!(f, "{}{}", r.element.symbol, r.min)?;
            } else {
                write!(f, "{}{}-{}", r.element.symbol, r.min, r.max)?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_ranges_parse_and_round_trip() {
        let d = ElementRanges::default_ranges();
        assert_eq!(d.ranges().len(), 11);
        assert_eq!(d.to_string(), DEFAULT_RANGES);
        assert_eq!(d.max_of("Cl"), 6);
        assert_eq!(d.max_of("Na"), 0);
    }

    #[test]
    fn single_count_means_exactly_that_many() {
        let r = ElementRanges::parse("C6 H0-6 Cl1").unwrap();
        assert_eq!((r.get("C").unwrap().min, r.get("C").unwrap().max), (6, 6));
        assert_eq!(r.to_string(), "C6H0-6Cl1");
    }

    /// One line per bad input: the text, the byte offset, and the message.
    #[test]
    fn bad_ranges_are_reported_at_their_place() {
        let cases: &[(&str, usize, &str)] = &[
            ("", 0, "empty element ranges"),
            ("C0-30Xx0-4", 5, "unknown element \"Xx\""),
            ("C0-30H", 6, "expected a count after \"H\""),
            ("C0-", 3, "expected the upper count after '-'"),
            (
                "C30-0",
                1,
                "range 30-0 has its lower count above the upper one",
            ),
            ("C0-30C0-2", 5, "element \"C\" is given twice"),
            ("c0-30", 0, "expected an element symbol, found 'c'"),
            ("C0-5000", 3, "count exceeds the limit of 999"),
            ("C0-30,H0-4", 5, "expected an element symbol, found ','"),
        ];
        for (src, offset, message) in cases {
            let e = ElementRanges::parse(src).unwrap_err();
            assert_eq!(
                (e.offset, e.kind.to_string().as_str()),
                (*offset, *message),
                "{src}"
            );
        }
    }

    #[test]
    fn unknown_element_suggests_a_symbol() {
        let src = "C0-30Cx0-2";
        let e = ElementRanges::parse(src).unwrap_err();
        let d = e.to_diagnostic("--elements", src);
        assert!(d.help.unwrap_or_default().starts_with("did you mean"));
        assert_eq!(d.position.map(|p| p.column), Some(5));
    }
}
