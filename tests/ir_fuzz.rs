//! A deterministic mutation fuzzer for the JCAMP-DX reader (the stable toolchain has no
//! cargo-fuzz). Seeds are the demo spectra, files of the JCAMP-DX test suite, instrument
//! exports (tests/fixtures/ir/exports/) and small hand-made files; each execution applies 1–8 random mutations (flip, insert, delete,
//! duplicate a span, splice a JCAMP-DX token, truncate) and runs the whole pipeline. Any
//! panic fails the test.
//!
//! The quick run (part of `cargo test`) does 3 000 executions. The long run is ignored:
//! `QUIDDITY_FUZZ_EXECUTIONS=200000 cargo test --release --test ir_fuzz -- --ignored`.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use quiddity::ir::synth::Noise;
use quiddity::ir::{bands_from_file_contents, PickOptions};

const TOKENS: &[&str] = &[
    "##",
    "=",
    "##END=",
    "##TITLE=x",
    "##XYDATA=(X++(Y..Y))",
    "##XYPOINTS=(XY..XY)",
    "##PEAK TABLE=(XY..XY)",
    "##NPOINTS=",
    "##FIRSTX=",
    "##LASTX=",
    "##DELTAX=",
    "##XFACTOR=",
    "##YFACTOR=1E-300",
    "##XUNITS=MICROMETERS",
    "##YUNITS=TRANSMITTANCE",
    "$$",
    "?",
    "@",
    "%",
    "J",
    "j",
    "s",
    "Z",
    "S9999999",
    "E+999",
    "-",
    ".",
    "\n",
    "\r\n",
    "\0",
    "\u{ff}",
    "NaN",
    "99999999999999999999",
    "0",
    "1E-320",
    "##DATA TYPE=LINK",
    "##BLOCKS=2",
    "\u{1a}",
    "##$AUDIT TRAIL=",
    "##DELTAX=-4.0",
];

fn seeds() -> Vec<Vec<u8>> {
    let root = env!("CARGO_MANIFEST_DIR");
    let mut out = Vec::new();
    for path in [
        "cases/spectra/alcohol-like.jdx",
        "tests/fixtures/ir/jcamp-testsuite/ir-transmittance-difdup.jcm",
        "tests/fixtures/ir/jcamp-testsuite/ir-transmittance-pac.dx",
        "tests/fixtures/ir/jcamp-testsuite/ir-polyethylene-difdup.dx",
        "tests/fixtures/ir/exports/link-deltax-sign.jdx",
        "tests/fixtures/ir/exports/neo-pentane-audit-trail.jdx",
    ] {
        out.push(std::fs::read(format!("{root}/{path}")).unwrap());
    }
    out.push(b"##TITLE=t\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##FIRSTX=1000\n##LASTX=1009\n##NPOINTS=10\n##XYDATA=(X++(Y..Y))\n1000AJJJJ\n1004EJJJJJ\n1009@\n##END=\n".to_vec());
    out.push(
        b"##TITLE=p\n##XUNITS=1/CM\n##YUNITS=%T\n##PEAK TABLE=(XY..XY)\n1700,10 1600,50\n##END=\n"
            .to_vec(),
    );
    out.push(b"wavenumber,absorbance\n4000,0.1\n3999,0.2\n3998,0.1\n3997,0.5\n".to_vec());
    out
}

fn mutate(input: &[u8], rng: &mut Noise) -> Vec<u8> {
    let mut v = input.to_vec();
    let rounds = 1 + (rng.next_u64() % 8) as usize;
    for _ in 0..rounds {
        let len = v.len().max(1);
        let at = (rng.next_u64() as usize) % len;
        match rng.next_u64() % 7 {
            0 if !v.is_empty() => {
                let i = at.min(v.len() - 1);
                v[i] ^= 1 << (rng.next_u64() % 8);
            }
            1 => v.insert(at.min(v.len()), (rng.next_u64() % 256) as u8),
            2 if !v.is_empty() => {
                let end = (at + 1 + (rng.next_u64() % 64) as usize).min(v.len());
                v.drain(at.min(v.len())..end);
            }
            3 if !v.is_empty() => {
                let end = (at + 1 + (rng.next_u64() % 128) as usize).min(v.len());
                let span: Vec<u8> = v[at.min(v.len())..end].to_vec();
                let to = (rng.next_u64() as usize) % (v.len() + 1);
                v.splice(to..to, span);
            }
            4 | 5 => {
                let token = TOKENS[(rng.next_u64() as usize) % TOKENS.len()].as_bytes();
                let to = at.min(v.len());
                v.splice(to..to, token.iter().copied());
            }
            _ => v.truncate(at),
        }
    }
    v
}

fn run(executions: u64) -> u64 {
    let seeds = seeds();
    let mut rng = Noise::new(0x5eed_f00d);
    let options = PickOptions::default();
    let mut ran = 0;
    for i in 0..executions {
        let seed = &seeds[(i as usize) % seeds.len()];
        let input = mutate(seed, &mut rng);
        let _ = bands_from_file_contents(&input, "fuzz.jdx", &options);
        ran += 1;
    }
    ran
}

#[test]
fn mutation_fuzz_quick_run_never_panics() {
    assert_eq!(run(3_000), 3_000);
}

#[test]
#[ignore = "long run; set QUIDDITY_FUZZ_EXECUTIONS"]
fn mutation_fuzz_long_run_never_panics() {
    let executions = std::env::var("QUIDDITY_FUZZ_EXECUTIONS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(200_000);
    let started = std::time::Instant::now();
    assert_eq!(run(executions), executions);
    eprintln!(
        "{executions} executions in {:.1} s",
        started.elapsed().as_secs_f64()
    );
}
