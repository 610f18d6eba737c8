//! Band lists of invented but realistic condensed-phase and vapour-phase spectra of eleven
//! compounds (tests/support/phase_compounds.rs; handbook positions from memory, sourced
//! there): the picker must find every strong and medium diagnostic band (≥ 1500 cm⁻¹) near
//! its handbook position with a plausible class and shape, and must not add strong or
//! medium diagnostic bands of its own — water-vapour lines, CO2 and the P/R branches of
//! vapour contours must not turn into extra bands the engine would have to explain.

#[path = "support/cli.rs"]
mod cli;
#[path = "support/phase_compounds.rs"]
mod compounds;

use compounds::{Compound, Draw, Word, B, COMPOUNDS};
use quiddity::ir::{
    bands_from_file_contents, BandKind, PickOptions, PickedSpectrum, SamplePhase, Shape, Strength,
};

fn pick(text: &str, phase: SamplePhase) -> PickedSpectrum {
    let mut options = PickOptions::default();
    options.pick.phase = phase;
    bands_from_file_contents(text.as_bytes(), "invented.csv", &options).expect("readable")
}

fn listing(p: &PickedSpectrum) -> String {
    p.bands
        .iter()
        .map(|b| {
            format!(
                "{:.0} {} {:?} {:?} w={:.0}",
                b.at,
                b.strength,
                b.shape,
                b.kind,
                b.fwhm.unwrap_or(0.0)
            )
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// The checks shared by both phases; `tolerance` is how far a picked band may sit from the
/// handbook position (a contour's centre is a midpoint or a Q branch).
fn check(c: &Compound, invented: &[B], picked: &PickedSpectrum, tolerance: f64, label: &str) {
    let list = listing(picked);
    let own: Vec<_> = picked
        .bands
        .iter()
        .filter(|b| !b.kind.is_artefact_likely())
        .collect();
    for &B(at, word, how) in invented {
        if at < 1500.0 || word == Word::W {
            continue;
        }
        let near = own
            .iter()
            .filter(|b| (b.at - at).abs() <= tolerance)
            .max_by(|a, b| a.height.total_cmp(&b.height));
        let Some(band) = near else {
            panic!("{} {label}: no band near {at}\n{list}", c.name);
        };
        let wanted = if word == Word::S {
            Strength::Strong
        } else {
            Strength::Medium
        };
        assert!(
            band.strength >= wanted,
            "{} {label}: band near {at} is {} (handbook {word:?})\n{list}",
            c.name,
            band.strength
        );
        let broad = matches!(how, Draw::G(w) if w >= 100.0);
        let shape = if broad { Shape::Broad } else { Shape::Sharp };
        assert_eq!(
            band.shape,
            Some(shape),
            "{} {label}: shape of the band near {at}\n{list}",
            c.name
        );
    }
    for b in &own {
        if b.at < 1500.0 || b.strength == Strength::Weak {
            continue;
        }
        let explained = invented.iter().any(|&B(at, word, how)| {
            let reach = match how {
                Draw::G(w) if w >= 100.0 => w / 2.0,
                _ => tolerance,
            };
            word != Word::W && (b.at - at).abs() <= reach
        });
        assert!(
            explained,
            "{} {label}: spurious {} band at {:.0}\n{list}",
            c.name, b.strength, b.at
        );
    }
}

#[test]
fn condensed_phase_band_lists_hold_the_handbook_bands_and_nothing_more() {
    for (i, c) in COMPOUNDS.iter().enumerate() {
        let picked = pick(
            &compounds::condensed_text(c, 11 + i as u64),
            SamplePhase::Condensed,
        );
        check(c, c.condensed, &picked, 6.0, "condensed");
    }
}

#[test]
fn overtones_and_combination_bands_come_out_weak_in_the_condensed_phase() {
    // Aromatic overtones 2000-1660 and the C=O overtone near 3400 are weak bands (Silverstein,
    // Webster & Kiemle, 7th ed., ch. 2, from memory): each invented one must be found weak.
    let mut seen = 0;
    for (i, c) in COMPOUNDS.iter().enumerate() {
        let picked = pick(
            &compounds::condensed_text(c, 11 + i as u64),
            SamplePhase::Condensed,
        );
        for &B(at, word, _) in c.condensed {
            if word != Word::W || at < 1500.0 {
                continue;
            }
            for b in picked.bands.iter().filter(|b| (b.at - at).abs() <= 6.0) {
                seen += 1;
                assert_eq!(b.strength, Strength::Weak, "{} near {at}", c.name);
            }
        }
    }
    assert!(
        seen >= 10,
        "only {seen} weak diagnostic bands were picked at all"
    );
}

#[test]
fn vapour_phase_band_lists_hold_the_handbook_bands_at_4_and_8_cm1_resolution() {
    for resolution in [4.0, 8.0] {
        for (i, c) in COMPOUNDS.iter().enumerate() {
            let text = compounds::vapour_text(c, resolution, 101 + i as u64);
            let picked = pick(&text, SamplePhase::Vapour);
            let label = format!("vapour {resolution} cm-1");
            check(c, c.vapour, &picked, 10.0, &label);
            let forest = picked
                .bands
                .iter()
                .filter(|b| b.kind == BandKind::LineForest)
                .count();
            // At 8 cm-1 the invented lines blend and few rise above the picking threshold:
            // they stay weak whether or not they are recognised as a forest (the check
            // above), so the count is asked for at 4 cm-1 only.
            assert!(
                resolution > 4.0 || forest >= 5,
                "{} {label}: {forest} forest lines\n{}",
                c.name,
                listing(&picked)
            );
            assert!(
                picked
                    .bands
                    .iter()
                    .any(|b| b.kind == BandKind::Co2 && (b.at - 2349.0).abs() < 12.0),
                "{} {label}: CO2 not marked\n{}",
                c.name,
                listing(&picked)
            );
            assert!(
                resolution > 4.0 || picked.notes.iter().any(|n| n.contains("line forest")),
                "{:?}",
                picked.notes
            );
        }
    }
}

#[test]
fn vapour_contours_become_one_band_each() {
    // Every invented contour at or above 1500 cm-1 gives exactly one band of the sample
    // within its P-R span, not two.
    for (i, c) in COMPOUNDS.iter().enumerate() {
        let picked = pick(
            &compounds::vapour_text(c, 4.0, 101 + i as u64),
            SamplePhase::Vapour,
        );
        for &B(at, word, how) in c.vapour {
            let Draw::V(sep, _, _) = how else { continue };
            if at < 1500.0 || word == Word::W {
                continue;
            }
            let inside = picked
                .bands
                .iter()
                .filter(|b| !b.kind.is_artefact_likely() && (b.at - at).abs() <= sep / 2.0 + 3.0)
                .count();
            assert_eq!(inside, 1, "{} near {at}\n{}", c.name, listing(&picked));
        }
    }
}

#[test]
fn read_as_condensed_a_vapour_spectrum_shows_why_the_phase_matters() {
    // Without the phase, the P and R branches of the acetone C=O near 1738 are two bands.
    let acetone = &COMPOUNDS[0];
    let text = compounds::vapour_text(acetone, 4.0, 101);
    let condensed = pick(&text, SamplePhase::Condensed);
    let near: Vec<_> = condensed
        .bands
        .iter()
        .filter(|b| (b.at - 1738.0).abs() <= 14.0 && b.strength == Strength::Strong)
        .collect();
    assert_eq!(near.len(), 2, "{}", listing(&condensed));
    let vapour = pick(&text, SamplePhase::Vapour);
    let near: Vec<_> = vapour
        .bands
        .iter()
        .filter(|b| (b.at - 1738.0).abs() <= 14.0)
        .collect();
    assert_eq!(near.len(), 1, "{}", listing(&vapour));
    assert_eq!(near[0].kind, BandKind::Contour);
    assert!((near[0].at - 1738.0).abs() <= 2.0);
}

#[test]
fn a_strong_water_vapour_forest_earns_a_note() {
    // Forest lines at 30 % of the strongest band (a poor background): at 8 cm-1 some blend
    // into band-like maxima, so the picker says so instead of staying silent.
    let tea = &COMPOUNDS[7];
    let text = compounds::vapour_text_with(tea, 8.0, 108, 0.3, 1.3);
    let picked = pick(&text, SamplePhase::Vapour);
    assert!(
        picked
            .notes
            .iter()
            .any(|n| n.contains("water-vapour lines are strong")),
        "{:#?}",
        picked.notes
    );
    // CO2 taller than every band of the compound does not set the strength scale.
    let c_h = picked
        .bands
        .iter()
        .find(|b| (b.at - 2980.0).abs() <= 10.0)
        .expect("C-H stretch");
    assert_eq!(c_h.strength, Strength::Strong, "{}", listing(&picked));
    // A fair background gives no such note.
    let fair = pick(&compounds::vapour_text(tea, 8.0, 108), SamplePhase::Vapour);
    assert!(!fair.notes.iter().any(|n| n.contains("lines are strong")));
}

#[test]
fn the_bands_command_picks_a_vapour_when_asked() {
    let dir = tempfile::tempdir().expect("temporary directory");
    let path = dir.path().join("acetone-vapour.csv");
    std::fs::write(&path, compounds::vapour_text(&COMPOUNDS[0], 4.0, 101)).expect("write");
    let run = |phase: &str| {
        let out = cli::quiddity(["bands", "--json", "--phase", phase, "acetone-vapour.csv"])
            .cwd(dir.path())
            .run();
        out.expect_file(&format!("bands/acetone-vapour-as-{phase}-json"));
        out.status_is(0);
        let json = out.json();
        json["bands"]
            .as_array()
            .expect("bands")
            .iter()
            .map(|b| b["kind"].as_str().expect("kind").to_owned())
            .collect::<Vec<_>>()
    };
    let vapour = run("vapour");
    for kind in ["contour", "line-forest", "co2"] {
        assert!(vapour.iter().any(|k| k == kind), "{kind}: {vapour:?}");
    }
    let condensed = run("condensed");
    assert!(!condensed
        .iter()
        .any(|k| k == "contour" || k == "line-forest"));
    cli::quiddity(["bands", "--phase", "plasma", "acetone-vapour.csv"])
        .cwd(dir.path())
        .run()
        .expect_file("bands/bad-phase");
}
