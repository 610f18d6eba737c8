//! Times quiddity's fine isotope structure on one formula and prints what
//! `tests/reference/isotope_side_by_side.py` needs to set it beside a general-purpose
//! isotope library timed in the same run: one `name<TAB>value` line each for the counts
//! and median times, `isotope<TAB>symbol<TAB>count<TAB>masses<TAB>abundances` for every
//! natural element (so the other library can be given the same abundances), and
//! `peak<TAB>mass<TAB>probability` for the merged pattern.
//!
//! `cargo run --release --example fine_structure_timing -- [FORMULA] [RESOLVING_POWER]`

use std::time::Instant;

use quiddity::chem::isotopes::DEFAULT_PRUNE_BELOW;
use quiddity::chem::{fine_isotopologues, fine_structure_pattern, Formula};

/// Median wall time of `f` in microseconds over enough runs to fill about half a second.
fn median_us<T>(mut f: impl FnMut() -> T) -> f64 {
    std::hint::black_box(f());
    let start = Instant::now();
    std::hint::black_box(f());
    let once = start.elapsed().as_secs_f64().max(1e-7);
    let runs = ((0.5 / once) as usize).clamp(11, 5_001);
    let mut times: Vec<f64> = (0..runs)
        .map(|_| {
            let t = Instant::now();
            std::hint::black_box(f());
            t.elapsed().as_secs_f64() * 1e6
        })
        .collect();
    times.sort_by(f64::total_cmp);
    times[times.len() / 2]
}

/// A comma-separated list of numbers at full precision.
fn joined(values: impl Iterator<Item = f64>) -> String {
    values
        .map(|v| format!("{v:.17e}"))
        .collect::<Vec<_>>()
        .join(",")
}

fn main() -> Result<(), String> {
    let mut args = std::env::args().skip(1);
    let text = args
        .next()
        .unwrap_or_else(|| "C100H150N20O30S5Cl2".to_string());
    let resolving_power: f64 = match args.next() {
        Some(r) => r
            .parse()
            .map_err(|e| format!("resolving power {r:?}: {e}"))?,
        None => 100_000.0,
    };
    let formula = Formula::parse(&text).map_err(|e| format!("formula {text:?}: {e}"))?;
    let listed = fine_isotopologues(&formula, DEFAULT_PRUNE_BELOW);
    let pattern = fine_structure_pattern(&formula, resolving_power)
        .ok_or_else(|| format!("resolving power {resolving_power} must be positive"))?;
    println!("formula\t{text}");
    println!("resolving_power\t{resolving_power}");
    println!("prune_below\t{DEFAULT_PRUNE_BELOW:e}");
    for (atom, n) in formula.atoms().filter(|(a, _)| a.mass_number().is_none()) {
        let isotopes = atom.element().isotopes;
        println!(
            "isotope\t{}\t{n}\t{}\t{}",
            atom.symbol(),
            joined(isotopes.iter().map(|i| i.mass)),
            joined(isotopes.iter().map(|i| i.abundance))
        );
    }
    println!("isotopologues\t{}", listed.len());
    println!(
        "isotopologue_probability\t{:.12}",
        listed.iter().map(|p| p.probability).sum::<f64>()
    );
    println!("merged_peaks\t{}", pattern.peaks().len());
    for p in pattern.peaks() {
        println!("peak\t{:.9}\t{:.12e}", p.mz, p.probability);
    }
    println!(
        "list_us\t{:.1}",
        median_us(|| fine_isotopologues(&formula, DEFAULT_PRUNE_BELOW))
    );
    println!(
        "pattern_us\t{:.1}",
        median_us(|| fine_structure_pattern(&formula, resolving_power))
    );
    Ok(())
}
