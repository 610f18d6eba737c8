//! Salt forms: a candidate of a salt's organic part holds exactly as many salt-form groups
//! of each side as the counter-ions pair (one ammonium per HCl, one carboxylate per Na).
//! Without a counter-ion no salt-form group enters the problem at all (`Problem::new`).

use super::super::model::Problem;
use super::super::outcome::RelationFailure;
use crate::rules::Ionic;

/// How many salt-form groups of each side the organic part must hold, inclusive ranges
/// `(fewest, most)` per molecule of the organic part. The default admits none.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct IonicSites {
    /// Protonated bases (ammonium) paired with acid anions.
    pub cation: (u32, u32),
    /// Deprotonated acids (carboxylate) paired with metal cations.
    pub anion: (u32, u32),
}

impl IonicSites {
    /// The range for one side.
    pub fn of(&self, side: Ionic) -> (u32, u32) {
        match side {
            Ionic::Cation => self.cation,
            Ionic::Anion => self.anion,
        }
    }

    /// True when groups of this side may enter the problem at all.
    pub fn admits(&self, side: Ionic) -> bool {
        self.of(side).1 > 0
    }
}

/// The count of each side's salt-form groups against the sites; one failure per side
/// that does not fit.
pub fn check(problem: &Problem<'_>, counts: &[u32]) -> Vec<RelationFailure> {
    let mut out = Vec::new();
    for side in [Ionic::Cation, Ionic::Anion] {
        let (lo, hi) = problem.ionic_sites.of(side);
        let held: u32 = problem
            .groups
            .iter()
            .zip(counts)
            .filter(|(g, _)| g.group.ionic == Some(side))
            .map(|(_, n)| *n)
            .sum();
        if held < lo || held > hi {
            out.push(RelationFailure::SaltSites {
                side,
                fewest: lo,
                most: hi,
                held,
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_sites_admit_no_salt_form() {
        let none = IonicSites::default();
        assert!(!none.admits(Ionic::Cation));
        assert!(!none.admits(Ionic::Anion));
        let hcl = IonicSites {
            cation: (1, 1),
            anion: (0, 0),
        };
        assert!(hcl.admits(Ionic::Cation));
        assert_eq!(hcl.of(Ionic::Anion), (0, 0));
    }
}
