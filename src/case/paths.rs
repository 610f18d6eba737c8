//! Path safety: a case file may name files only inside its own directory tree. The lexical
//! check here (no absolute path, no `..` that climbs out) needs no filesystem; the CLI adds
//! the canonical check (symlinks that lead out of the tree) with [`is_inside`].

use std::path::{Component, Path};

/// Why a written path is refused.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PathProblem {
    /// The path is empty.
    Empty,
    /// The path is absolute (or carries a drive or root prefix).
    Absolute,
    /// `..` components climb above the case file's directory.
    ClimbsOut,
}

impl std::fmt::Display for PathProblem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            PathProblem::Empty => "the path is empty",
            PathProblem::Absolute => {
                "absolute paths are refused: name files relative to the case file"
            }
            PathProblem::ClimbsOut => "the path leaves the case file's directory tree",
        })
    }
}

/// Checks a path as written in a case file, without touching the filesystem.
pub fn check_written_path(written: &str) -> Result<(), PathProblem> {
    if written.trim().is_empty() {
        return Err(PathProblem::Empty);
    }
    // A backslash or drive letter is an absolute Windows path on any platform's reading.
    let bytes = written.as_bytes();
    if written.starts_with('\\')
        || (bytes.len() >= 2 && bytes[1] == b':' && bytes[0].is_ascii_alphabetic())
    {
        return Err(PathProblem::Absolute);
    }
    let mut depth: i64 = 0;
    for component in Path::new(written).components() {
        match component {
            Component::RootDir | Component::Prefix(_) => return Err(PathProblem::Absolute),
            Component::ParentDir => {
                depth -= 1;
                if depth < 0 {
                    return Err(PathProblem::ClimbsOut);
                }
            }
            Component::Normal(_) => depth += 1,
            Component::CurDir => {}
        }
    }
    // `a\..\..\b` on a platform where `\` is not a separator is one odd file name; refuse
    // it anyway so a case behaves the same everywhere.
    if written.split(['/', '\\']).filter(|p| *p == "..").count() > 0 {
        let mut depth: i64 = 0;
        for part in written.split(['/', '\\']) {
            match part {
                ".." => depth -= 1,
                "" | "." => {}
                _ => depth += 1,
            }
            if depth < 0 {
                return Err(PathProblem::ClimbsOut);
            }
        }
    }
    Ok(())
}

/// True when the canonical `target` lies inside the canonical `base` directory.
pub fn is_inside(base: &Path, target: &Path) -> bool {
    target.starts_with(base) && target != base
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn relative_paths_inside_the_tree_pass() {
        for ok in [
            "a.jdx",
            "spectra/a.jdx",
            "./spectra/a.jdx",
            "x/../a.jdx",
            "x/y/../../a.jdx",
        ] {
            assert_eq!(check_written_path(ok), Ok(()), "{ok}");
        }
    }

    #[test]
    fn escapes_and_absolute_paths_are_refused() {
        let table = [
            ("", PathProblem::Empty),
            ("/etc/passwd", PathProblem::Absolute),
            ("\\\\server\\share\\a.jdx", PathProblem::Absolute),
            ("C:\\data\\a.jdx", PathProblem::Absolute),
            ("../a.jdx", PathProblem::ClimbsOut),
            ("spectra/../../a.jdx", PathProblem::ClimbsOut),
            ("spectra\\..\\..\\a.jdx", PathProblem::ClimbsOut),
        ];
        for (written, problem) in table {
            assert_eq!(check_written_path(written), Err(problem), "{written:?}");
        }
    }

    #[test]
    fn containment_is_by_whole_components() {
        assert!(is_inside(
            Path::new("/c/cases"),
            Path::new("/c/cases/s/a.jdx")
        ));
        assert!(!is_inside(
            Path::new("/c/cases"),
            Path::new("/c/cases-other/a.jdx")
        ));
        assert!(!is_inside(Path::new("/c/cases"), Path::new("/c/a.jdx")));
    }
}
