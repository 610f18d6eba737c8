//! JCAMP-DX writer: evenly spaced infrared spectra as `##XYDATA=(X++(Y..Y))` in AFFN or
//! DIFDUP form, lines of at most 80 characters, with the DIF Y-value check at the start of
//! every line that follows a line ending in DIF form (and a closing check line).
//!
//! Ordinates are written as integers of YFACTOR: the stated precision. A round trip
//! through the reader gives every ordinate back within YFACTOR / 2.

/// Data form of the written ordinates.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum JcampForm {
    /// Plain numbers separated by spaces (ASCII free-format numeric).
    Affn,
    /// Differences with duplicate suppression, the most compact ASDF form.
    DifDup,
}

/// What the writer needs: an evenly spaced spectrum and its header.
#[derive(Clone, Debug, PartialEq)]
pub struct WriteSpectrum {
    /// `##TITLE=`.
    pub title: String,
    /// Lines written as `$$` comments right after the version records.
    pub comments: Vec<String>,
    /// Further header records `(label, value)`, written as `##label=value`.
    pub fields: Vec<(String, String)>,
    /// Wavenumber of the first ordinate, cm⁻¹.
    pub first_x: f64,
    /// Spacing between ordinates, cm⁻¹ (negative for a decreasing axis).
    pub delta_x: f64,
    /// Ordinates.
    pub y: Vec<f64>,
    /// `ABSORBANCE` or `TRANSMITTANCE`.
    pub y_units: String,
    /// The precision of the ordinates: each is written as an integer multiple of it.
    pub y_factor: f64,
}

/// Longest data line written.
const MAX_LINE: usize = 80;

/// Shortest decimal text of `v` with at most 6 decimals.
fn affn(v: f64) -> String {
    let s = format!("{v:.6}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" || s.is_empty() {
        "0".to_owned()
    } else {
        s.to_owned()
    }
}

/// Pseudo-digit form of an integer: `zero` for 0, `pos[d-1]` / `neg[d-1]` for the sign and
/// leading digit, then the remaining digits.
fn pseudo(v: i64, zero: char, pos: &[u8; 9], neg: &[u8; 9]) -> String {
    let digits = v.unsigned_abs().to_string();
    let lead = digits.as_bytes()[0] - b'0';
    let mut out = String::with_capacity(digits.len());
    if lead == 0 {
        out.push(zero);
    } else if v < 0 {
        out.push(neg[usize::from(lead - 1)] as char);
    } else {
        out.push(pos[usize::from(lead - 1)] as char);
    }
    out.push_str(&digits[1..]);
    out
}

/// SQZ form of an actual value.
pub fn sqz(v: i64) -> String {
    pseudo(v, '@', b"ABCDEFGHI", b"abcdefghi")
}

/// DIF form of a difference.
pub fn dif(v: i64) -> String {
    pseudo(v, '%', b"JKLMNOPQR", b"jklmnopqr")
}

/// DUP form of a count (at least 2 to be useful).
pub fn dup(count: u64) -> String {
    let digits = count.to_string();
    let lead = usize::from(digits.as_bytes()[0] - b'0');
    let mut out = String::new();
    out.push(b"?STUVWXYZs"[lead] as char);
    out.push_str(&digits[1..]);
    out
}

/// Appends one labelled-data record `##LABEL=value` and its line break.
fn push_ldr(out: &mut String, label: &str, value: &str) {
    out.push_str("##");
    out.push_str(label);
    out.push('=');
    out.push_str(value);
    out.push('\n');
}

/// Writes `spectrum` as a JCAMP-DX 4.24 infrared file in `form`.
pub fn write_jcamp(spectrum: &WriteSpectrum, form: JcampForm) -> String {
    let n = spectrum.y.len();
    let factor = if spectrum.y_factor > 0.0 && spectrum.y_factor.is_finite() {
        spectrum.y_factor
    } else {
        1.0
    };
    let ints: Vec<i64> = spectrum
        .y
        .iter()
        .map(|v| (v / factor).round() as i64)
        .collect();
    let x_at = |i: usize| spectrum.first_x + i as f64 * spectrum.delta_x;
    let mut out = String::new();
    push_ldr(&mut out, "TITLE", &spectrum.title);
    push_ldr(&mut out, "JCAMP-DX", "4.24");
    push_ldr(&mut out, "DATA TYPE", "INFRARED SPECTRUM");
    for c in &spectrum.comments {
        out.push_str("$$ ");
        out.push_str(c);
        out.push('\n');
    }
    for (label, value) in &spectrum.fields {
        push_ldr(&mut out, label, value);
    }
    push_ldr(&mut out, "XUNITS", "1/CM");
    push_ldr(&mut out, "YUNITS", &spectrum.y_units);
    push_ldr(&mut out, "XFACTOR", "1");
    push_ldr(&mut out, "YFACTOR", &format!("{factor:E}"));
    push_ldr(&mut out, "FIRSTX", &affn(spectrum.first_x));
    push_ldr(&mut out, "LASTX", &affn(x_at(n.saturating_sub(1))));
    push_ldr(&mut out, "DELTAX", &affn(spectrum.delta_x));
    push_ldr(&mut out, "NPOINTS", &n.to_string());
    if let Some(&first) = ints.first() {
        push_ldr(&mut out, "FIRSTY", &format!("{:E}", first as f64 * factor));
        let max = ints.iter().copied().max().unwrap_or(0);
        let min = ints.iter().copied().min().unwrap_or(0);
        push_ldr(&mut out, "MAXY", &format!("{:E}", max as f64 * factor));
        push_ldr(&mut out, "MINY", &format!("{:E}", min as f64 * factor));
    }
    push_ldr(&mut out, "XYDATA", "(X++(Y..Y))");
    match form {
        JcampForm::Affn => write_affn(&mut out, &ints, &x_at),
        JcampForm::DifDup => write_difdup(&mut out, &ints, &x_at),
    }
    out.push_str("##END=\n");
    out
}

fn write_affn(out: &mut String, ints: &[i64], x_at: &dyn Fn(usize) -> f64) {
    let mut i = 0;
    while i < ints.len() {
        let mut line = affn(x_at(i));
        while i < ints.len() {
            let token = ints[i].to_string();
            if line.len() + 1 + token.len() > MAX_LINE {
                break;
            }
            line.push(' ');
            line.push_str(&token);
            i += 1;
        }
        out.push_str(&line);
        out.push('\n');
    }
}

fn write_difdup(out: &mut String, ints: &[i64], x_at: &dyn Fn(usize) -> f64) {
    let n = ints.len();
    let mut start = 0;
    while start < n {
        let mut line = affn(x_at(start));
        line.push_str(&sqz(ints[start]));
        let mut j = start + 1;
        let mut has_dif = false;
        while j < n {
            let d = ints[j] - ints[j - 1];
            let mut run = 1;
            while j + run < n && ints[j + run] - ints[j + run - 1] == d {
                run += 1;
            }
            // Keep room on the line; shorten the run rather than overflow.
            let mut token = dif(d);
            if run > 1 {
                token.push_str(&dup(run as u64));
            }
            if line.len() + token.len() > MAX_LINE {
                let single = dif(d);
                if line.len() + single.len() > MAX_LINE {
                    break;
                }
                token = single;
                run = 1;
            }
            line.push_str(&token);
            j += run;
            has_dif = true;
        }
        out.push_str(&line);
        out.push('\n');
        if j >= n {
            if has_dif {
                // Closing Y-check line: the last ordinate again.
                let mut check = affn(x_at(n - 1));
                check.push_str(&sqz(ints[n - 1]));
                out.push_str(&check);
                out.push('\n');
            }
            break;
        }
        // The next line starts with the last ordinate written (Y-value check).
        start = if has_dif { j - 1 } else { j };
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pseudo_digits_follow_table_vii() {
        // McDonald & Wilks 1988, Table VII (from memory): SQZ @ A-I a-i, DIF % J-R j-r,
        // DUP S-Z s.
        assert_eq!(sqz(0), "@");
        assert_eq!(sqz(1234), "A234");
        assert_eq!(sqz(-56), "e6");
        assert_eq!(dif(0), "%");
        assert_eq!(dif(-9), "r");
        assert_eq!(dif(90), "R0");
        assert_eq!(dup(4), "V");
        assert_eq!(dup(9), "s");
        assert_eq!(dup(23), "T3");
    }
}
