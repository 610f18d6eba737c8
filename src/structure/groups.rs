//! Functional-group ids (the required list of `rules::REQUIRED_GROUP_IDS` plus `ring`) and group multisets,
//! with a positioned parser for the `id:count,id:count` form the command line takes.

use crate::diag::{closest_match, Diagnostic};
use std::collections::BTreeMap;
use std::fmt;

macro_rules! group_ids {
    ($($variant:ident => $id:literal, $dbe:literal;)*) => {
        /// A functional group the structure module can perceive and build.
        #[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
        pub enum GroupId {
            $(
                #[doc = concat!("`", $id, "`")]
                $variant,
            )*
        }

        impl GroupId {
            /// Every id, in declaration order.
            pub const ALL: &'static [GroupId] = &[$(GroupId::$variant),*];

            /// The catalogue id.
            pub fn id(self) -> &'static str {
                match self { $(GroupId::$variant => $id,)* }
            }

            /// Rings plus π bonds one instance of the group accounts for (the degree of
            /// unsaturation it consumes; hypervalent S=O and P=O and the nitro group's
            /// charge-separated N=O consume none, `common practice`).
            pub fn dbe(self) -> u32 {
                match self { $(GroupId::$variant => $dbe,)* }
            }
        }
    };
}

group_ids! {
    Alkene => "alkene", 1;
    AlkyneTerminal => "alkyne_terminal", 2;
    AlkyneInternal => "alkyne_internal", 2;
    AromaticRing => "aromatic_ring", 4;
    PyridineRing => "pyridine_ring", 4;
    Ring => "ring", 1;
    Alcohol => "alcohol", 0;
    Phenol => "phenol", 0;
    Ether => "ether", 0;
    Aldehyde => "aldehyde", 1;
    Ketone => "ketone", 1;
    CarboxylicAcid => "carboxylic_acid", 1;
    Ester => "ester", 1;
    Anhydride => "anhydride", 2;
    AcylHalide => "acyl_halide", 1;
    AminePrimary => "amine_primary", 0;
    AmineSecondary => "amine_secondary", 0;
    AmineTertiary => "amine_tertiary", 0;
    AmidePrimary => "amide_primary", 1;
    AmideSecondary => "amide_secondary", 1;
    AmideTertiary => "amide_tertiary", 1;
    Nitrile => "nitrile", 2;
    Nitro => "nitro", 1;
    Imine => "imine", 1;
    Isocyanate => "isocyanate", 2;
    Thiol => "thiol", 0;
    Sulfide => "sulfide", 0;
    Sulfoxide => "sulfoxide", 0;
    Sulfone => "sulfone", 0;
    Sulfonamide => "sulfonamide", 0;
    Fluoro => "fluoro", 0;
    Chloro => "chloro", 0;
    Bromo => "bromo", 0;
    Iodo => "iodo", 0;
    Carbamate => "carbamate", 1;
    Urea => "urea", 1;
    NitrateEster => "nitrate_ester", 1;
    PhosphateEster => "phosphate_ester", 0;
}

impl GroupId {
    /// The group for a catalogue id (exact).
    pub fn from_id(id: &str) -> Option<GroupId> {
        GroupId::ALL.iter().copied().find(|g| g.id() == id)
    }
}

impl fmt::Display for GroupId {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.id())
    }
}

impl serde::Serialize for GroupId {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.id())
    }
}

/// A multiset of groups: how many instances of each id (zero counts are not stored).
#[derive(Clone, Debug, Default, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
#[serde(transparent)]
pub struct GroupCounts(BTreeMap<GroupId, u32>);

impl GroupCounts {
    /// The empty multiset.
    pub fn new() -> GroupCounts {
        GroupCounts::default()
    }

    /// Adds `n` instances of `g`.
    pub fn add(&mut self, g: GroupId, n: u32) {
        if n > 0 {
            *self.0.entry(g).or_insert(0) += n;
        }
    }

    /// From `(group, count)` pairs.
    pub fn from_pairs<I: IntoIterator<Item = (GroupId, u32)>>(pairs: I) -> GroupCounts {
        let mut c = GroupCounts::new();
        for (g, n) in pairs {
            c.add(g, n);
        }
        c
    }

    /// How many instances of `g`.
    pub fn count(&self, g: GroupId) -> u32 {
        self.0.get(&g).copied().unwrap_or(0)
    }

    /// `(group, count)` in id order.
    pub fn iter(&self) -> impl Iterator<Item = (GroupId, u32)> + '_ {
        self.0.iter().map(|(g, n)| (*g, *n))
    }

    /// True when no group is present.
    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// Σ count × [`GroupId::dbe`].
    pub fn dbe(&self) -> u32 {
        self.iter().map(|(g, n)| g.dbe() * n).sum()
    }

    /// Parses `id:count,id:count` (count defaults to 1 when `:count` is left out;
    /// repeated ids add up). Errors carry the byte offset into `src`.
    pub fn parse(src: &str) -> Result<GroupCounts, GroupsError> {
        let mut counts = GroupCounts::new();
        let mut offset = 0;
        for item in src.split(',') {
            let start = offset + (item.len() - item.trim_start().len());
            offset += item.len() + 1;
            let item = item.trim();
            if item.is_empty() {
                return Err(GroupsError::new(src, start, "expected a group id", None));
            }
            let (id, count_text) = match item.split_once(':') {
                Some((id, n)) => (id.trim_end(), Some(n)),
                None => (item, None),
            };
            let Some(group) = GroupId::from_id(id) else {
                let hint = closest_match(id, GroupId::ALL.iter().map(|g| g.id()))
                    .map(|s| format!("did you mean {s:?}?"));
                return Err(GroupsError::new(
                    src,
                    start,
                    format!("unknown group id {id:?}"),
                    hint,
                ));
            };
            let n = match count_text {
                None => 1,
                Some(text) => {
                    let at = start + item.find(':').unwrap_or(0) + 1;
                    match text.trim().parse::<u32>() {
                        Ok(n) if n <= 64 => n,
                        Ok(_) => {
                            return Err(GroupsError::new(
                                src,
                                at,
                                "a group count must be at most 64",
                                None,
                            ))
                        }
                        Err(_) => {
                            return Err(GroupsError::new(
                                src,
                                at,
                                format!(
                                    "expected a whole number after ':', found {:?}",
                                    text.trim()
                                ),
                                None,
                            ))
                        }
                    }
                }
            };
            counts.add(group, n);
        }
        Ok(counts)
    }
}

impl fmt::Display for GroupCounts {
    /// `id:count,id:count`; `(none)` for the empty multiset.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_empty() {
            return f.write_str("(none)");
        }
        let text: Vec<String> = self.iter().map(|(g, n)| format!("{g}:{n}")).collect();
        f.write_str(&text.join(","))
    }
}

/// A group list that could not be read.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct GroupsError {
    /// Lower-case message without a trailing period.
    pub message: String,
    /// 0-based byte offset into `input`.
    pub offset: usize,
    /// The text read.
    pub input: String,
    /// A "did you mean" hint.
    pub hint: Option<String>,
}

impl GroupsError {
    fn new(
        src: &str,
        offset: usize,
        message: impl Into<String>,
        hint: Option<String>,
    ) -> GroupsError {
        GroupsError {
            message: message.into(),
            offset,
            input: src.to_owned(),
            hint,
        }
    }

    /// A diagnostic at the error's place in origin `origin`.
    pub fn to_diagnostic(&self, origin: &str) -> Diagnostic {
        let d = Diagnostic::error(origin, self.message.clone()).at_offset(&self.input, self.offset);
        match &self.hint {
            Some(h) => d.with_help(h.clone()),
            None => d,
        }
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn every_group_id_the_code_names_is_in_the_shipped_catalogue_with_its_dbe() {
        // The generator's ids are the code's own names for groups: each must exist in the
        // shipped catalogue, be a required id (or `ring`), and consume the catalogue's DBE.
        let catalogue = crate::rules::embedded_catalogue().expect("shipped catalogue");
        for g in GroupId::ALL {
            let entry = catalogue.group(g.id());
            let entry = entry.unwrap_or_else(|| panic!("{} is not in the catalogue", g.id()));
            assert!(
                g.id() == "ring" || crate::rules::REQUIRED_GROUP_IDS.contains(&g.id()),
                "{} is neither a required id nor ring",
                g.id()
            );
            assert_eq!(g.dbe(), entry.dbe, "DBE of {}", g.id());
        }
        // and every required id is one the generator can build
        for id in crate::rules::REQUIRED_GROUP_IDS {
            assert!(
                GroupId::from_id(id).is_some(),
                "no structure template for {id}"
            );
        }
    }

    use super::*;

    #[test]
    fn every_id_round_trips() {
        for g in GroupId::ALL {
            assert_eq!(GroupId::from_id(g.id()), Some(*g));
        }
        assert_eq!(GroupId::ALL.len(), 38);
    }

    #[test]
    fn group_lists_parse_with_default_counts() {
        let g = GroupCounts::parse("ketone:1, aromatic_ring,ketone:2").unwrap();
        assert_eq!(g.count(GroupId::Ketone), 3);
        assert_eq!(g.count(GroupId::AromaticRing), 1);
        assert_eq!(g.to_string(), "aromatic_ring:1,ketone:3");
    }

    #[test]
    fn bad_group_lists_name_the_place() {
        for (src, offset, message) in [
            ("ketone:1,ketome:1", 9, "unknown group id \"ketome\""),
            (
                "ketone:x",
                7,
                "expected a whole number after ':', found \"x\"",
            ),
            ("ketone:1,,ring", 9, "expected a group id"),
            ("ring:99", 5, "a group count must be at most 64"),
        ] {
            let e = GroupCounts::parse(src).unwrap_err();
            assert_eq!((e.offset, e.message.as_str()), (offset, message), "{src}");
        }
        let e = GroupCounts::parse("ketome").unwrap_err();
        assert_eq!(e.hint.as_deref(), Some("did you mean \"ketone\"?"));
    }
}
