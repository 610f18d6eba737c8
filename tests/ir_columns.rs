//! Two-column text spectra: delimiters, headers, comments, axis order, units, errors.
//! All data invented.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use quiddity::ir::{read_spectrum, Ordinate, ReadOptions, ReadSpectrum, SpectrumData, XUnits};

fn read(src: &str) -> ReadSpectrum {
    read_spectrum(src.as_bytes(), "s.txt", &ReadOptions::default())
        .unwrap_or_else(|e| panic!("{}", quiddity::diag::render_all(&e)))
}

fn trace(r: &ReadSpectrum) -> (&[f64], &[f64], Ordinate) {
    match &r.data {
        SpectrumData::Trace(t) => (&t.wavenumber, &t.y, t.ordinate),
        SpectrumData::PeakTable(_) => panic!("trace expected"),
    }
}

#[test]
fn every_delimiter_reads_the_same_numbers() {
    let cases = [
        (
            "comma",
            "4000,0.10\n3998,0.20\n3996,0.15\n",
            "comma-separated",
        ),
        (
            "tab",
            "4000\t0.10\n3998\t0.20\n3996\t0.15\n",
            "tab-separated",
        ),
        (
            "semicolon, decimal comma",
            "4000;0,10\n3998;0,20\n3996;0,15\n",
            "semicolon-separated",
        ),
        (
            "spaces",
            "  4000   0.10\n  3998   0.20\n  3996   0.15\n",
            "white-space-separated",
        ),
        (
            "CRLF",
            "4000,0.10\r\n3998,0.20\r\n3996,0.15\r\n",
            "comma-separated",
        ),
    ];
    for (name, src, format) in cases {
        let r = read(src);
        let (x, y, _) = trace(&r);
        assert_eq!(x, [4000.0, 3998.0, 3996.0], "{name}");
        assert_eq!(y, [0.10, 0.20, 0.15], "{name}");
        assert_eq!(
            r.header.format,
            format!("two-column text ({format})"),
            "{name}"
        );
    }
}

#[test]
fn headers_and_comments_are_skipped_and_name_the_units() {
    let src = "# invented export\n% second comment\nWavenumber (cm-1);%T\n4000;95.0\n3999;90.0\n3998;94.0\n";
    let r = read(src);
    let (_, y, ordinate) = trace(&r);
    assert_eq!(ordinate, Ordinate::Transmittance);
    assert!(
        (y[0] - 0.95).abs() < 1e-12,
        "percent converted to a fraction"
    );
    assert!(r.notes.iter().any(|n| n.contains("percent")));
}

#[test]
fn the_monotonic_column_is_the_wavenumber_whatever_its_place() {
    let r = read("0.10 4000\n0.30 3999\n0.20 3998\n0.25 3997\n");
    let (x, y, _) = trace(&r);
    assert_eq!(x, [4000.0, 3999.0, 3998.0, 3997.0]);
    assert_eq!(y, [0.10, 0.30, 0.20, 0.25]);
    assert!(r.notes.iter().any(|n| n.contains("second column")));
}

#[test]
fn unknown_intensity_units_are_guessed_and_the_guess_is_noted() {
    // Mostly near the top of the range: a transmittance trace.
    let r = read("4000 0.95\n3999 0.94\n3998 0.40\n3997 0.96\n3996 0.95\n");
    assert_eq!(trace(&r).2, Ordinate::Transmittance);
    assert!(r.notes.iter().any(|n| n.contains("guessed")));
    // Mostly near the bottom: absorbance.
    let r = read("4000 0.05\n3999 0.04\n3998 0.90\n3997 0.06\n3996 0.05\n");
    assert_eq!(trace(&r).2, Ordinate::Absorbance);
}

#[test]
fn options_fill_in_what_the_file_does_not_say() {
    let options = ReadOptions {
        x_units: Some(XUnits::Micrometre),
        ordinate: Some(Ordinate::Absorbance),
    };
    let r = read_spectrum(b"2.5 0.1\n5.0 0.9\n10.0 0.1\n", "um.txt", &options).unwrap();
    let (x, _, ordinate) = trace(&r);
    assert_eq!(x, [4000.0, 2000.0, 1000.0]);
    assert_eq!(ordinate, Ordinate::Absorbance);
}

#[test]
fn bad_text_files_name_their_line() {
    let cases = [
        ("4000,0.1\n3999,0.2\nabc,0.3\n3997,0.1\n", "error: s.txt:3:1: expected two numbers separated by commas, found \"abc,0.3\""),
        ("4000,0.1\n3999,0.2\n4001,0.3\n3997,0.1\n", "error: s.txt:3:1: neither column is monotonic"),
        ("4000,0.1\n3999,inf\n3998,0.3\n", "error: s.txt:2:6: \"inf\" is not a finite number; expected a number"),
        ("no numbers here\n", "error: s.txt:1:1: no data lines; expected lines of two numbers"),
        ("4000,0.1\n3999,0.2\n", "error: s.txt:2:1: 2 data line(s); expected at least 3"),
        ("1.0 0.1\n1.1 0.2\n1.2 0.1\n", "error: s.txt:1:1: cannot tell the x units (largest X is 1.2); give them as an option (cm-1 or um)"),
    ];
    for (src, expected) in cases {
        let errors = read_spectrum(src.as_bytes(), "s.txt", &ReadOptions::default()).unwrap_err();
        let got = errors[0].to_string();
        assert!(
            got.starts_with(expected),
            "got      {got}\nexpected {expected}"
        );
    }
}
