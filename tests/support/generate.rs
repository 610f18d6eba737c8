//! Generates many demo-sized cases for batch tests and the batch benchmark: copies of the
//! band-list demo cases under `cases/` with new identifiers and every band shifted by a
//! few cm⁻¹ (−3 … +3), so that each case is distinct but stays chemically the same story.
//! Invented data, like the demo cases they come from.

use std::path::Path;

/// The band-list demo cases (those naming no spectrum file), as text, in name order.
pub fn templates(cases_dir: &Path) -> Vec<String> {
    let mut paths: Vec<_> = std::fs::read_dir(cases_dir)
        .expect("cases directory")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
        .collect();
    paths.sort();
    paths
        .iter()
        .map(|p| std::fs::read_to_string(p).expect("case text"))
        .filter(|t| !t.contains("spectrum:"))
        .collect()
}

/// Case `i` made from `template`: identifier `GEN-i`, bands shifted by `i mod 7 − 3`.
pub fn variant(template: &str, i: usize) -> String {
    let shift = (i % 7) as f64 - 3.0;
    let mut out = String::new();
    for line in template.lines() {
        if line.starts_with("case:") {
            out.push_str(&format!("case: GEN-{i:05}\n"));
            continue;
        }
        match line.find("{ at: ") {
            Some(start) => {
                let rest = &line[start + 6..];
                let end = rest.find(',').unwrap_or(rest.len());
                let at: f64 = rest[..end].trim().parse().expect("band position");
                out.push_str(&line[..start + 6]);
                out.push_str(&format!("{}", at + shift));
                out.push_str(&rest[end..]);
                out.push('\n');
            }
            None => {
                out.push_str(line);
                out.push('\n');
            }
        }
    }
    out
}

/// Writes `n` generated cases into `dir` as `gen-00000.yaml` …; returns their ids in order.
pub fn write_cases(cases_dir: &Path, dir: &Path, n: usize) -> Vec<String> {
    let templates = templates(cases_dir);
    assert!(!templates.is_empty(), "no band-list demo case to copy");
    (0..n)
        .map(|i| {
            let text = variant(&templates[i % templates.len()], i);
            std::fs::write(dir.join(format!("gen-{i:05}.yaml")), text).expect("write case");
            format!("GEN-{i:05}")
        })
        .collect()
}
