//! Times a solve of the benchmark's C17H17ClN2O4S case listing every consistent
//! candidate (no enumeration limit), for profiling under `perf record`. Arguments: the
//! number of runs (3), the candidates shown (25) and the enumeration limit (none). The
//! case is invented.

use quiddity::case::parse;
use quiddity::engine::{solve, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::time::Instant;

const CASE: &str = "# invented benchmark case
formula: C17H17ClN2O4S
ir:
  technique: KBr
  bands:
    - { at: 3280, strength: medium }
    - { at: 3060, strength: weak }
    - { at: 2960, strength: medium }
    - { at: 1735, strength: strong }
    - { at: 1670, strength: strong }
    - { at: 1595, strength: medium }
    - { at: 1540, strength: medium }
    - { at: 1490, strength: medium }
    - { at: 1340, strength: strong }
    - { at: 1240, strength: strong }
    - { at: 1160, strength: strong }
    - { at: 1090, strength: medium }
    - { at: 830, strength: strong }
    - { at: 750, strength: medium }
    - { at: 690, strength: medium }
";

fn main() {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let (case, d) = parse(CASE, "bench.yaml");
    let case = case.unwrap_or_else(|| panic!("{d:?}"));
    let reps: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(3);
    let max: usize = std::env::args()
        .nth(2)
        .and_then(|a| a.parse().ok())
        .unwrap_or(25);
    let limit: usize = std::env::args()
        .nth(3)
        .and_then(|a| a.parse().ok())
        .unwrap_or(usize::MAX);
    let options = SolveOptions {
        enumeration_limit: limit,
        max_candidates: max,
        ..SolveOptions::default()
    };
    for _ in 0..reps {
        let t = Instant::now();
        let o = solve(&case, &catalogue, &options);
        eprintln!(
            "{:?}: {} classes, {} combinations, {} shown, truncated {}",
            t.elapsed(),
            o.n_consistent,
            o.n_combinations,
            o.candidates.len(),
            o.enumeration_truncated
        );
    }
}
