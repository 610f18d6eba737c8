//! The shipped catalogue: it validates cleanly, holds every required id, names a source
//! for every value, and lists every `rules/*.yaml` in the embedded list.

use quiddity::diag::render_all;
use quiddity::rules::{embedded_catalogue, load, Catalogue, EMBEDDED_FILES, REQUIRED_GROUP_IDS};

fn shipped() -> Catalogue {
    match embedded_catalogue() {
        Ok(c) => c,
        Err(d) => panic!("shipped catalogue has problems:\n{}", render_all(&d)),
    }
}

#[test]
fn shipped_catalogue_validates_with_zero_diagnostics() {
    let (catalogue, diagnostics) = load(EMBEDDED_FILES.iter().copied());
    assert!(diagnostics.is_empty(), "{}", render_all(&diagnostics));
    assert!(
        catalogue.groups.len() >= 45,
        "only {} groups",
        catalogue.groups.len()
    );
}

#[test]
fn every_required_id_exists() {
    let catalogue = shipped();
    for id in REQUIRED_GROUP_IDS {
        assert!(catalogue.group(id).is_some(), "required id {id} missing");
    }
}

#[test]
fn every_rules_file_is_embedded() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/rules");
    let mut on_disk: Vec<String> = std::fs::read_dir(dir)
        .expect("rules/ exists")
        .map(|e| {
            e.expect("readable entry")
                .file_name()
                .to_string_lossy()
                .into_owned()
        })
        .filter(|n| n.ends_with(".yaml"))
        .collect();
    on_disk.sort();
    let embedded: Vec<String> = EMBEDDED_FILES.iter().map(|(n, _)| n.to_string()).collect();
    assert!(!on_disk.is_empty(), "no rules files found in {dir}");
    assert_eq!(on_disk, embedded, "rules/*.yaml and EMBEDDED_FILES differ");
    for (name, text) in EMBEDDED_FILES {
        let disk = std::fs::read_to_string(format!("{dir}/{name}")).expect("readable");
        assert_eq!(&disk, text, "{name} differs from its embedded copy");
    }
}

#[test]
fn rules_manual_names_every_rules_file() {
    let guide = include_str!("../docs/rules.md");
    for (name, _) in EMBEDDED_FILES {
        assert!(
            guide.contains(name),
            "docs/rules.md does not mention rules/{name}"
        );
    }
}

#[test]
fn wet_tests_and_nmr_regions_come_from_the_catalogue_with_their_sources() {
    // The discriminating checks outside IR and MS are catalogue data (`checks:`), each
    // with a source and a place; the families that have long had one keep it.
    let catalogue = shipped();
    let mut n_checks = 0;
    for g in &catalogue.groups {
        for c in &g.checks {
            n_checks += 1;
            assert!(
                !c.source.trim().is_empty(),
                "{}: check without source",
                g.id
            );
            assert!(!c.text.trim().is_empty(), "{}: empty check", g.id);
            assert!(c.defined_at.line > 0, "{}: check without a line", g.id);
        }
    }
    assert!(n_checks >= 10, "only {n_checks} checks in the catalogue");
    let kinds = |id: &str| -> Vec<&str> {
        catalogue
            .group(id)
            .map(|g| g.checks.iter().map(|c| c.kind.word()).collect())
            .unwrap_or_default()
    };
    // common practice: an aldehyde has a wet test (silver mirror) and an NMR region (CHO
    // near 9-10 ppm); a phenol a colour test with iron(III) chloride.
    assert_eq!(kinds("aldehyde"), ["wet_test", "nmr"]);
    assert_eq!(kinds("phenol"), ["wet_test"]);
}
