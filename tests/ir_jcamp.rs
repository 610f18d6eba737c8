//! JCAMP-DX reader checks against outside sources: the compression examples of the
//! standard, the JCAMP-DX test-suite files shipped in the `jcamp` PyPI package, round trips
//! through the writer, bad files with their exact error line, and arbitrary bytes.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use proptest::prelude::*;
use quiddity::ir::jcamp::{
    self, asdf::decode_ordinates, decode_block, read_blocks, read_infrared, write_jcamp,
    JcampErrorKind, JcampForm, WriteSpectrum,
};
use quiddity::ir::{bands_from_file_contents, PickOptions, ReadOptions, SpectrumData};

const SUITE: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/ir/jcamp-testsuite"
);

fn suite_file(name: &str) -> String {
    let bytes = std::fs::read(format!("{SUITE}/{name}")).expect("fixture present");
    String::from_utf8(bytes).expect("fixture is text")
}

// --- The compression examples of the standard -------------------------------------------

/// McDonald & Wilks, Applied Spectroscopy 42 (1988), §5.3–5.10 and Table VII: one data
/// run written in every form (from memory). The values are 1 2 3 3 2 1 0 -1 -2 -3.
#[test]
fn the_standards_example_run_decodes_the_same_in_every_form() {
    let expected = [1.0, 2.0, 3.0, 3.0, 2.0, 1.0, 0.0, -1.0, -2.0, -3.0];
    for (form, text) in [
        ("FIX/AFFN", "1 2 3 3 2 1 0 -1 -2 -3"),
        ("PAC", "1+2+3+3+2+1+0-1-2-3"),
        ("SQZ", "1BCCBA@abc"),
        ("DIF", "1JJ%jjjjjj"),
        ("DIFDUP", "1JT%jX"),
    ] {
        assert_eq!(decode_ordinates(text).unwrap(), expected, "{form}: {text}");
    }
}

/// McDonald & Wilks 1988, §5.9–5.10 (from memory): "50 50 50 50" is "50V" in DUP form,
/// "50%%%" in DIF form and "50%U" in DIFDUP form.
#[test]
fn the_standards_duplicate_suppression_example() {
    let expected = [50.0; 4];
    for text in ["50 50 50 50", "50V", "50%%%", "50%U", "E0V", "E0%U"] {
        assert_eq!(decode_ordinates(text).unwrap(), expected, "{text}");
    }
}

// --- Files of the JCAMP-DX test suite ---------------------------------------------------
// Origin: PyPI package `jcamp` 1.3.2, folder data/jcamp-dx.org_official_test_data (the
// JCAMP-DX test files of the IUPAC working party); renamed, see tests/fixtures/ir/SOURCES.md.

fn header_number(src: &str, label: &str) -> f64 {
    let blocks = read_blocks(src).unwrap();
    blocks[0]
        .value(label)
        .unwrap_or_else(|| panic!("{label} present"))
        .parse()
        .unwrap()
}

/// Each infrared file states NPOINTS, FIRSTY, MAXY and MINY in its header; the decoded
/// ordinates must agree with what the file says about itself.
#[test]
fn suite_infrared_files_decode_to_their_stated_counts_and_extremes() {
    for name in [
        "ir-transmittance-difdup.jcm",
        "ir-absorbance-difdup.jcm",
        "ir-transmittance-pac.dx",
        "ir-transmittance-affn.dx",
    ] {
        let src = suite_file(name);
        let blocks = read_blocks(&src).unwrap();
        let data = decode_block(&blocks[0]).unwrap();
        let npoints = header_number(&src, "NPOINTS") as usize;
        assert_eq!(data.y.len(), npoints, "{name}");
        let yfactor = header_number(&src, "YFACTOR");
        let first_y = header_number(&src, "FIRSTY");
        assert!(
            (data.y[0] - first_y).abs() <= yfactor.max(1e-3 * first_y.abs()),
            "{name} FIRSTY"
        );
        let max = data.y.iter().copied().fold(f64::MIN, f64::max);
        let min = data.y.iter().copied().fold(f64::MAX, f64::min);
        let stated_max = header_number(&src, "MAXY");
        let stated_min = header_number(&src, "MINY");
        assert!(
            (max - stated_max).abs() <= 2.0 * yfactor + 1e-6 * stated_max.abs(),
            "{name} MAXY {max} vs {stated_max}"
        );
        assert!(
            (min - stated_min).abs() <= 2.0 * yfactor + 1e-6 * stated_min.abs(),
            "{name} MINY {min} vs {stated_min}"
        );
        let first_x = header_number(&src, "FIRSTX");
        let last_x = header_number(&src, "LASTX");
        assert_eq!(data.x[0], first_x);
        assert_eq!(*data.x.last().unwrap(), last_x);
    }
}

/// The suite holds one sample twice, as percent transmittance and as absorbance (both
/// DIFDUP). Reading both and converting T to A must give the same absorbance where the
/// absorbance file is not clipped (it caps at A = 5) and T is well above its noise.
#[test]
fn suite_transmittance_and_absorbance_files_of_one_sample_agree_after_conversion() {
    let t = read_infrared(
        &suite_file("ir-transmittance-difdup.jcm"),
        &ReadOptions::default(),
    )
    .unwrap();
    let a = read_infrared(
        &suite_file("ir-absorbance-difdup.jcm"),
        &ReadOptions::default(),
    )
    .unwrap();
    let (SpectrumData::Trace(t), SpectrumData::Trace(a)) = (t.data, a.data) else {
        panic!("traces expected")
    };
    assert_eq!(t.wavenumber.len(), a.wavenumber.len());
    let mut compared = 0;
    for (tv, av) in t.y.iter().zip(&a.y) {
        if *tv > 0.01 && *av < 2.0 {
            assert!(
                (-tv.log10() - av).abs() < 0.01,
                "T {tv} -> A {} vs {av}",
                -tv.log10()
            );
            compared += 1;
        }
    }
    assert!(compared > 3000, "compared only {compared} points");
}

/// The same NMR spectrum in AFFN, PAC and SQZ forms (suite files, data type NMR: decoded
/// as blocks, not as infrared) must decode to identical ordinates. The suite's DIFDUP copy
/// holds a slightly differently rounded spectrum (its header states FIRSTY 2254931 and
/// MINY -27593239 against 2259260 and -27593530): it must match its own stated values and
/// follow the AFFN ordinates to within 0.1 % of the range.
#[test]
fn suite_nmr_file_decodes_the_same_in_affn_pac_sqz_and_close_in_difdup() {
    let decode = |name: &str| {
        let src = suite_file(name);
        let blocks = read_blocks(&src).unwrap();
        (src.clone(), decode_block(&blocks[0]).unwrap())
    };
    let (_, affn) = decode("nmr-affn.dx");
    assert_eq!(affn.y.len(), 16384);
    for name in ["nmr-pac.dx", "nmr-sqz.dx"] {
        let (_, other) = decode(name);
        assert!(
            other.y == affn.y,
            "{name}: ordinates differ from the AFFN copy"
        );
        assert!(
            other.x == affn.x,
            "{name}: abscissae differ from the AFFN copy"
        );
    }
    let (src, difdup) = decode("nmr-difdup.dx");
    assert_eq!(difdup.y.len(), header_number(&src, "NPOINTS") as usize);
    assert_eq!(difdup.y[0], header_number(&src, "FIRSTY"));
    let max = difdup.y.iter().copied().fold(f64::MIN, f64::max);
    let min = difdup.y.iter().copied().fold(f64::MAX, f64::min);
    assert_eq!(
        (max, min),
        (header_number(&src, "MAXY"), header_number(&src, "MINY"))
    );
    let range = max - min;
    let worst = difdup
        .y
        .iter()
        .zip(&affn.y)
        .map(|(a, b)| (a - b).abs())
        .fold(0.0f64, f64::max);
    assert!(
        worst < 1e-3 * range,
        "DIFDUP strays {worst} from AFFN (range {range})"
    );
}

/// An NMR-only file is not read as an infrared spectrum.
#[test]
fn an_nmr_file_is_refused_as_infrared() {
    let errors = read_infrared(&suite_file("nmr-sqz.dx"), &ReadOptions::default()).unwrap_err();
    let err = &errors[0];
    assert!(
        matches!(err.kind, JcampErrorKind::NoInfraredBlock { .. }),
        "{err:?}"
    );
}

/// The suite's polyethylene file ends with a check line "31999@" (Y = 0) after a line whose
/// last ordinate, in DIF form, is 26506: the Y-value check fails on the last data line.
#[test]
fn suite_polyethylene_file_fails_its_last_y_check_on_line_107() {
    let src = suite_file("ir-polyethylene-difdup.dx");
    let errors = read_infrared(&src, &ReadOptions::default()).unwrap_err();
    assert_eq!(errors.len(), 1);
    assert_eq!(errors[0].line + 1, 107);
    assert_eq!(
        errors[0].kind,
        JcampErrorKind::DifCheck {
            expected: 26506.0,
            found: 0.0
        }
    );
}

// --- Bad files: one line each, the exact place and message ------------------------------

const GOOD: &str = "##TITLE=t
##JCAMP-DX=4.24
##DATA TYPE=INFRARED SPECTRUM
##XUNITS=1/CM
##YUNITS=ABSORBANCE
##FIRSTX=1000
##LASTX=1009
##DELTAX=1
##NPOINTS=10
##XYDATA=(X++(Y..Y))
1000 1 2 3 4 5
1005 6 7 8 9 10
##END=
";

fn first_error(src: &[u8]) -> String {
    let errors = bands_from_file_contents(src, "bad.jdx", &PickOptions::default()).unwrap_err();
    errors[0].to_string()
}

#[test]
fn the_good_template_reads() {
    let picked =
        bands_from_file_contents(GOOD.as_bytes(), "good.jdx", &PickOptions::default()).unwrap();
    assert_eq!(picked.header.n_points, 10);
}

#[test]
fn bad_files_name_their_line_and_what_was_expected() {
    let cases: Vec<(&str, String, &str)> = vec![
        ("truncated", GOOD.replace("##END=\n", ""),
         "error: bad.jdx:12:1: file ends inside block \"t\" opened on line 1; expected ##END="),
        ("DIF check", GOOD.replace("1000 1 2 3 4 5\n1005 6 7 8 9 10", "1000AJJJJ\n1004FJJJJJ"),
         "error: bad.jdx:12:5: DIF Y-check failed: line starts with Y = 6, expected 5 (the last Y of the line before)"),
        ("question mark", GOOD.replace("1005 6 7 8", "1005 6 ? 8"),
         "error: bad.jdx:12:8: missing or not-a-number value \"?\"; expected a finite number"),
        ("NaN word", GOOD.replace("1005 6 7 8", "1005 6 NaN 8"),
         "error: bad.jdx:12:8: missing or not-a-number value \"NaN\"; expected a finite number"),
        ("empty block", "##TITLE=empty\n##JCAMP-DX=4.24\n##END=\n".to_owned(),
         "error: bad.jdx:1:1: block \"empty\" holds no ##XYDATA=, ##XYPOINTS= or ##PEAK TABLE=; expected spectral data"),
        ("point count", GOOD.replace("##NPOINTS=10", "##NPOINTS=11"),
         "error: bad.jdx:12:1: NPOINTS=11 but 10 ordinates were found; expected them to agree"),
        ("lost ordinate", "##TITLE=t\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##FIRSTX=1000\n##LASTX=1014\n##XYDATA=(X++(Y..Y))\n1000.0 1 2 3 4\n1005.0 6 7 8 9 10\n1010.0 11 12 13 14 15\n##END=\n".to_owned(),
         "error: bad.jdx:8:1: line abscissa 1005 does not match point 4 (expected 1004.30"),
        ("line X runs back", GOOD.replace("1005 6 7", "995 6 7"),
         "error: bad.jdx:12:1: non-monotonic X: 995 after 1000; expected X to keep running up"),
        ("DELTAX", GOOD.replace("##DELTAX=1", "##DELTAX=2"),
         "error: bad.jdx:8:1: DELTAX=2 disagrees with (LASTX-FIRSTX)/(NPOINTS-1) = 1; expected agreement within 1 %"),
        ("stray character", GOOD.replace("1005 6 7 8", "1005 6 7 # 8"),
         "error: bad.jdx:12:10: unexpected character '#'; expected a number or an ASDF pseudo-digit"),
        ("no equals", GOOD.replace("##XUNITS=1/CM", "##XUNITS 1/CM"),
         "error: bad.jdx:4:1: labelled data record without '='; expected ##LABEL=value"),
        ("XYPOINTS backwards", "##TITLE=p\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XYPOINTS=(XY..XY)\n1000, 1\n1001, 2\n1000.5, 3\n##END=\n".to_owned(),
         "error: bad.jdx:7:1: non-monotonic X: 1000.5 after 1001; expected X to keep running up"),
        ("unpaired", "##TITLE=p\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XYPOINTS=(XY..XY)\n1000, 1\n1001\n##END=\n".to_owned(),
         "error: bad.jdx:6:1: unpaired value 1001; expected X,Y pairs"),
        ("micrometre zero", GOOD.replace("##XUNITS=1/CM", "##XUNITS=MICROMETERS").replace("1000", "0").replace("1005", "5").replace("##LASTX=1009", "##LASTX=9"),
         "error: bad.jdx:10:1: wavelength 0 µm; expected positive wavelengths to convert"),
        ("other x units", GOOD.replace("1/CM", "NANOMETERS"),
         "error: bad.jdx:4:1: XUNITS=\"NANOMETERS\"; expected 1/CM or MICROMETERS"),
        ("missing FIRSTX", GOOD.replace("##FIRSTX=1000\n", ""),
         "error: bad.jdx:9:1: ##FIRSTX= is missing; expected it with ##XYDATA=(X++(Y..Y))"),
        ("bad header number", GOOD.replace("##YFACTOR", "").replace("##NPOINTS=10", "##NPOINTS=ten"),
         "error: bad.jdx:9:1: ##NPOINTS= is \"ten\"; expected a number"),
        // Text before the first ##TITLE= is now skipped with a note (instrument exports open
        // with an audit trail); a file without any ##TITLE= is still refused.
        ("audit trail and no title", format!("$$ exported\n##$AUDIT TRAIL=x\n{}", GOOD.replace("##TITLE=t\n", "")),
         "error: bad.jdx:2:1: no ##TITLE= in the file; expected ##TITLE= to start a JCAMP-DX block, found \"##$AUDIT TRAIL=x\" first"),
        ("no title, records only", GOOD.replace("##TITLE=t\n", ""),
         "error: bad.jdx:1:1: no ##TITLE= in the file; expected ##TITLE= to start a JCAMP-DX block, found \"##JCAMP-DX=4.24\" first"),
        ("DOS end-of-file byte inside the text", GOOD.replace("1005 6", "1005 \u{1a}6"),
         "error: bad.jdx:12:6: binary data (byte 0x1a); expected a text spectrum file"),
        ("DELTAX sign and size wrong", GOOD.replace("##DELTAX=1", "##DELTAX=-2"),
         "error: bad.jdx:8:1: DELTAX=-2 disagrees with (LASTX-FIRSTX)/(NPOINTS-1) = 1; expected agreement within 1 %"),
    ];
    let mut failures = Vec::new();
    for (name, src, expected) in &cases {
        let got = first_error(src.as_bytes());
        if !got.starts_with(expected) {
            failures.push(format!("{name}:\n  got      {got}\n  expected {expected}"));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn binary_input_names_the_first_offending_byte() {
    let mut bytes = GOOD.as_bytes().to_vec();
    let offset = GOOD.find("DATA TYPE").unwrap() + 2;
    bytes[offset] = 0;
    assert_eq!(
        first_error(&bytes),
        "error: bad.jdx:3:5: binary data (byte 0x00); expected a text spectrum file (JCAMP-DX or two-column text)"
    );
    let mut bytes = GOOD.as_bytes().to_vec();
    bytes[offset] = 0xff;
    assert_eq!(
        first_error(&bytes),
        "error: bad.jdx:3:5: invalid UTF-8; expected a text spectrum file (JCAMP-DX is printable ASCII)"
    );
}

// --- Round trips through the writer ------------------------------------------------------

fn spectrum_strategy() -> impl Strategy<Value = (WriteSpectrum, JcampForm)> {
    (
        3usize..600,
        400.0f64..1000.0,
        prop_oneof![Just(0.5), Just(-0.5), Just(0.964), Just(2.0), Just(-4.0)],
        prop_oneof![Just(1e-3), Just(1e-4), Just(1e-6)],
        prop::collection::vec(-0.2f64..3.5, 600),
        prop_oneof![Just(JcampForm::Affn), Just(JcampForm::DifDup)],
        0usize..4,
    )
        .prop_map(|(n, first_x, step, y_factor, values, form, runs)| {
            let mut y: Vec<f64> = values[..n].to_vec();
            // Flat runs exercise DUP.
            for r in 0..runs {
                let start = (r * 37) % n;
                let v = y[start];
                for item in y.iter_mut().skip(start).take(9) {
                    *item = v;
                }
            }
            let first_x = if step < 0.0 {
                first_x + 3000.0
            } else {
                first_x
            };
            (
                WriteSpectrum {
                    title: "round trip (invented)".to_owned(),
                    comments: vec!["invented data for a round-trip test".to_owned()],
                    fields: vec![("ORIGIN".to_owned(), "quiddity tests".to_owned())],
                    first_x,
                    delta_x: step,
                    y,
                    y_units: "ABSORBANCE".to_owned(),
                    y_factor,
                },
                form,
            )
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Writing then reading gives every ordinate back within YFACTOR / 2 (the stated
    /// precision) and every abscissa within 10⁻⁶ cm⁻¹.
    #[test]
    fn write_then_read_is_exact_to_the_stated_precision((spectrum, form) in spectrum_strategy()) {
        let text = write_jcamp(&spectrum, form);
        for line in text.lines() {
            prop_assert!(line.len() <= 80, "line too long: {line}");
        }
        let read = read_infrared(&text, &ReadOptions::default())
            .map_err(|e| TestCaseError::fail(format!("{e:?}\n{text}")))?;
        let SpectrumData::Trace(trace) = read.data else {
            return Err(TestCaseError::fail("trace expected"));
        };
        prop_assert_eq!(trace.y.len(), spectrum.y.len());
        for (i, (got, want)) in trace.y.iter().zip(&spectrum.y).enumerate() {
            prop_assert!((got - want).abs() <= spectrum.y_factor / 2.0 + 1e-12, "point {i}: {got} vs {want}");
            let x = spectrum.first_x + i as f64 * spectrum.delta_x;
            prop_assert!((trace.wavenumber[i] - x).abs() < 1e-6);
        }
    }

    /// No input makes the reader (or the whole pipeline) panic.
    #[test]
    fn arbitrary_bytes_never_panic(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        let _ = bands_from_file_contents(&bytes, "fuzz", &PickOptions::default());
    }

    /// Text made of JCAMP-DX's own characters never panics either.
    #[test]
    fn jcamp_like_text_never_panics(body in "[#=A-Za-z0-9@%?+\\-., ()$\n]{0,400}") {
        let text = format!("##TITLE=x\n##XUNITS=1/CM\n##FIRSTX=1\n##LASTX=9\n##XYDATA=(X++(Y..Y))\n{body}");
        let _ = bands_from_file_contents(text.as_bytes(), "fuzz", &PickOptions::default());
        let _ = jcamp::read_blocks(&text);
    }
}

// --- Other records and layouts ------------------------------------------------------------

#[test]
fn a_peak_table_gives_its_peaks_as_bands_with_relative_strengths() {
    let src = "##TITLE=peaks (invented)\n##JCAMP-DX=5.01\n##DATA TYPE=INFRARED PEAK TABLE\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##PEAK TABLE=(XY..XY)\n1715.0, 1.0; 2960.0, 0.5\n1050.0, 0.1\n##END=\n";
    let picked =
        bands_from_file_contents(src.as_bytes(), "p.jdx", &PickOptions::default()).unwrap();
    assert_eq!(picked.header.format, "JCAMP-DX 5.01");
    let words: Vec<(f64, &str)> = picked
        .bands()
        .iter()
        .map(|b| (b.at, b.strength.word()))
        .collect();
    assert_eq!(
        words,
        vec![(2960.0, "strong"), (1715.0, "strong"), (1050.0, "weak")]
    );
    assert!(picked.bands().iter().all(|b| b.shape.is_none()));
    assert!(picked.notes.iter().any(|n| n.contains("peak table")));
}

#[test]
fn micrometre_xypoints_are_converted_and_resampled_with_notes() {
    // Invented: a band at 5.8 µm (about 1724 cm-1) on a 0.01 µm grid.
    let mut src = String::from("##TITLE=um (invented)\n##JCAMP-DX=4.24\n##DATA TYPE=INFRARED SPECTRUM\n##XUNITS=MICROMETERS\n##YUNITS=ABSORBANCE\n##XYPOINTS=(XY..XY)\n");
    for i in 0..=1000 {
        let um = 2.5 + i as f64 * 0.0125;
        let cm1 = 1e4 / um;
        let a = 0.8 * 10.0f64.powi(2) / ((cm1 - 1724.0).powi(2) + 10.0f64.powi(2));
        src.push_str(&format!("{um:.4}, {a:.6}\n"));
    }
    src.push_str("##END=\n");
    let picked =
        bands_from_file_contents(src.as_bytes(), "um.jdx", &PickOptions::default()).unwrap();
    assert!(
        picked.notes.iter().any(|n| n.contains("micrometres")),
        "{:?}",
        picked.notes
    );
    assert!(
        picked.notes.iter().any(|n| n.contains("resampled")),
        "{:?}",
        picked.notes
    );
    let band = picked
        .bands
        .iter()
        .max_by(|a, b| a.height.total_cmp(&b.height))
        .unwrap();
    assert!((band.at - 1724.0).abs() < 2.0, "{band:?}");
}

#[test]
fn of_several_blocks_the_first_infrared_one_is_read_and_the_note_says_so() {
    let infrared = GOOD.replace("##TITLE=t", "##TITLE=second");
    let src = format!(
        "##TITLE=link\n##JCAMP-DX=5.01\n##DATA TYPE=LINK\n##BLOCKS=3\n##TITLE=structure\n##JCAMP-CS=3.7\n##END=\n##TITLE=mass\n##DATA TYPE=MASS SPECTRUM\n##XUNITS=M/Z\n##PEAK TABLE=(XY..XY)\n43,100\n##END=\n{infrared}##END=\n"
    );
    let picked =
        bands_from_file_contents(src.as_bytes(), "linked.jdx", &PickOptions::default()).unwrap();
    assert_eq!(picked.header.title.as_deref(), Some("second"));
    assert!(
        picked
            .notes
            .iter()
            .any(|n| n.contains("4 blocks") && n.contains("read block 4")),
        "{:?}",
        picked.notes
    );
}

#[test]
fn missing_units_are_taken_from_the_options_or_asked_for() {
    let src = GOOD.replace("##XUNITS=1/CM\n", "");
    let err = first_error(src.as_bytes());
    assert_eq!(err, "error: bad.jdx:1:1: ##XUNITS= is missing; expected 1/CM or MICROMETERS (or give the x units as an option)");
    let mut options = PickOptions::default();
    options.read.x_units = Some(quiddity::ir::XUnits::Wavenumber);
    let picked = bands_from_file_contents(src.as_bytes(), "ok.jdx", &options).unwrap();
    assert!(picked.notes.iter().any(|n| n.contains("no XUNITS")));
}

#[test]
fn huge_dup_counts_are_refused_before_they_exhaust_memory() {
    let src = GOOD.replace("1005 6 7 8 9 10", "1005 6s99999999");
    assert!(first_error(src.as_bytes())
        .starts_with("error: bad.jdx:12:7: DUP count 999999999; expected at most"));
    let many = format!("1005 6{}", "Z99999".repeat(200));
    let src = GOOD.replace("1005 6 7 8 9 10", &many);
    assert!(first_error(src.as_bytes()).contains("ordinates in all"));
}

// --- Instrument exports: real measured files with one documented change -----------------
// tests/fixtures/ir/exports/ holds real measured spectra from tests/fixtures/ir/measured-gas/
// (PyPI package `jcamp` 1.3.2, see tests/fixtures/ir/SOURCES.md) with the one change an
// instrument export makes; the bands read from the altered file must be those of the original.

const MEASURED: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/tests/fixtures/ir/measured-gas"
);
const EXPORTS: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/fixtures/ir/exports");

fn bytes_of(folder: &str, name: &str) -> Vec<u8> {
    std::fs::read(format!("{folder}/{name}")).expect("fixture present")
}

fn picked(bytes: &[u8], origin: &str) -> quiddity::ir::PickedSpectrum {
    bands_from_file_contents(bytes, origin, &PickOptions::default())
        .unwrap_or_else(|e| panic!("{origin}: {e:?}"))
}

/// The altered file reads to the same bands (positions, heights, widths, classes) as the
/// original, and one of its notes contains every piece of `note_parts`.
fn assert_same_bands_with_note(original: &[u8], altered: &[u8], origin: &str, note_parts: &[&str]) {
    let want = picked(original, "original.jdx");
    let got = picked(altered, origin);
    assert!(
        want.bands.len() >= 5,
        "the original gives too few bands to compare"
    );
    assert_eq!(got.bands, want.bands, "{origin}");
    assert!(
        got.notes
            .iter()
            .any(|n| note_parts.iter().all(|part| n.contains(part))),
        "{origin}: no note with {note_parts:?} in {:?}",
        got.notes
    );
}

#[test]
fn a_trailing_dos_end_of_file_byte_is_ignored_with_a_note() {
    let original = bytes_of(MEASURED, "neo-pentane.jdx");
    let altered = bytes_of(EXPORTS, "neo-pentane-dos-eof.jdx");
    assert_eq!(
        altered,
        [original.as_slice(), b"\x1a"].concat(),
        "fixture as documented"
    );
    assert_same_bands_with_note(
        &original,
        &altered,
        "neo-pentane-dos-eof.jdx",
        &["1 DOS end-of-file byte", "0x1A", "line 111"],
    );
    // A run of them, mixed with line ends, after the last ##END=.
    let run = [original.as_slice(), b"\x1a\r\n\x1a\x1a\n"].concat();
    assert_same_bands_with_note(&original, &run, "run.jdx", &["3 DOS end-of-file byte"]);
}

#[test]
fn an_audit_trail_before_the_title_is_skipped_with_a_note_naming_its_lines() {
    let original = bytes_of(MEASURED, "neo-pentane.jdx");
    let altered = bytes_of(EXPORTS, "neo-pentane-audit-trail.jdx");
    assert!(
        altered.starts_with(b"##$AUDIT TRAIL="),
        "fixture as documented"
    );
    assert!(altered.ends_with(&original), "fixture as documented");
    assert_same_bands_with_note(
        &original,
        &altered,
        "neo-pentane-audit-trail.jdx",
        &[
            "skipped lines 1-3",
            "first ##TITLE= (line 4)",
            "AUDIT TRAIL",
        ],
    );
}

/// FIRSTX and LASTX fix the direction of the abscissa; DELTAX only checks the spacing
/// (JCAMP-DX 4.24, McDonald & Wilks 1988: X of point i from FIRSTX, LASTX and NPOINTS;
/// from memory). A DELTAX of the right size and the wrong sign is read with a note.
#[test]
fn a_deltax_of_the_wrong_sign_is_read_in_the_direction_of_firstx_and_lastx() {
    let original = bytes_of(MEASURED, "neo-pentane.jdx");
    let linked = bytes_of(EXPORTS, "link-deltax-sign.jdx");
    assert_same_bands_with_note(
        &original,
        &linked,
        "link-deltax-sign.jdx",
        &["DELTAX=-4 on line 21", "FIRSTX=550 -> LASTX=3846"],
    );
    let got = picked(&linked, "link-deltax-sign.jdx");
    assert!(
        got.notes
            .iter()
            .any(|n| n.contains("3 blocks") && n.contains("read block 2 (\"neo-pentane\", line 5)")),
        "{:?}",
        got.notes
    );
    // The same change in a file of one block.
    let text = String::from_utf8(original.clone()).unwrap();
    let single = text.replace("##DELTAX=4.0\n", "##DELTAX=-4.0\n");
    assert_ne!(single, text);
    assert_same_bands_with_note(
        &original,
        single.as_bytes(),
        "single.jdx",
        &["DELTAX=-4 on line 17"],
    );
}

#[test]
fn an_unreadable_block_is_reported_with_its_line_and_title_and_the_next_one_read() {
    let butene = bytes_of(MEASURED, "1-butene.jdx");
    let linked = bytes_of(EXPORTS, "link-first-block-cut.jdx");
    assert_same_bands_with_note(
        &butene,
        &linked,
        "link-first-block-cut.jdx",
        &[
            "block 2 (\"neo-pentane\", line 5) skipped",
            "line 112: NPOINTS=825 but 820 ordinates",
        ],
    );
}

#[test]
fn when_every_infrared_block_fails_each_blocks_problem_is_listed() {
    let linked = String::from_utf8(bytes_of(EXPORTS, "link-first-block-cut.jdx")).unwrap();
    // Cut 1-butene's last data line too: no readable infrared block remains.
    let last_line = "3930.0 40 8 45 28 35 47 64 41 23 37\n";
    let both_cut = linked.replacen(last_line, "", 1);
    assert_ne!(
        both_cut, linked,
        "1-butene's last data line is {last_line:?}"
    );
    let errors = bands_from_file_contents(both_cut.as_bytes(), "cut.jdx", &PickOptions::default())
        .unwrap_err();
    let lines: Vec<String> = errors.iter().map(ToString::to_string).collect();
    assert_eq!(lines.len(), 3, "{lines:#?}");
    assert_eq!(lines[0], "error: cut.jdx:5:1: none of the 2 infrared blocks could be read (each block's problem follows); expected at least one readable block");
    assert_eq!(lines[1], "error: cut.jdx:112:1: block 2 \"neo-pentane\" (opened on line 5): NPOINTS=825 but 820 ordinates were found; expected them to agree");
    assert!(
        lines[2].starts_with("error: cut.jdx:225:1: block 3 \"1-Butene\" (opened on line 114): NPOINTS=880 but 870 ordinates"),
        "{}",
        lines[2]
    );
}

#[test]
fn records_before_the_title_are_skipped_and_a_single_line_is_named() {
    let picked = picked(format!("hello\n{GOOD}").as_bytes(), "good.jdx");
    assert_eq!(picked.header.n_points, 10);
    assert!(
        picked
            .notes
            .iter()
            .any(|n| n == "skipped line 1 before the first ##TITLE= (line 2), starting \"hello\""),
        "{:?}",
        picked.notes
    );
}
