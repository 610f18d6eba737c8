//! Reading a case file and the files it names, with path safety; building its report and
//! record; writing outputs atomically. Shared by `solve`, `review` and `batch` (and public
//! so that tests and benchmarks run exactly what the commands run).

use super::limits::limit_failure;
use super::Failure;
use crate::budget::{Budget, Metered};
use crate::case::digest::sha256_hex;
use crate::case::paths::{check_written_path, is_inside};
use crate::case::{self, Case, ReferencedFile};
use crate::diag::Diagnostic;
use crate::engine::{self, Outcome, SolveOptions};
use crate::report::view::{InputFile, InputRole, QUIDDITY_VERSION};
use crate::report::{self, Format, Provenance};
use crate::rules::Catalogue;
use crate::yaml::{locate_value, KeyPath};
use std::io::Write;
use std::path::{Path, PathBuf};

/// How to load a case.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct LoadOptions {
    /// Let the case name files outside its own directory tree.
    pub allow_outside: bool,
}

/// A case file read and validated, with the files it names and their digests.
#[derive(Clone, Debug)]
pub struct LoadedCase {
    /// The case file as opened.
    pub path: PathBuf,
    /// The case file's text.
    pub src: String,
    /// The validated case.
    pub case: Case,
    /// Warnings found on the way.
    pub warnings: Vec<Diagnostic>,
    /// Every input with its SHA-256: the case file (by file name) first, then the files it
    /// names (as written).
    pub inputs: Vec<InputFile>,
    /// The files the case names, with their bytes.
    pub files: Vec<ReferencedFile>,
    /// The reference library the case names, loaded.
    pub library: Option<CaseLibrary>,
}

/// A case's reference library: the folder as written and its loaded index.
#[derive(Clone, Debug)]
pub struct CaseLibrary {
    /// The path as written in the case.
    pub written: String,
    /// The loaded library.
    pub loaded: super::library::LoadedLibrary,
}

/// The directory a case file's relative paths start from.
fn case_dir(path: &Path) -> PathBuf {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// The file name of a path, for records and provenance (independent of the working
/// directory the command ran in).
pub fn file_name(path: &Path) -> String {
    path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

/// Reads, checks and validates the case file at `path` and the files it names.
pub fn load_case(path: &Path, options: &LoadOptions) -> Result<LoadedCase, Failure> {
    let origin = path.display().to_string();
    let bytes = std::fs::read(path)
        .map_err(|e| Diagnostic::error(&origin, format!("cannot read case file: {e}")))?;
    let src = String::from_utf8(bytes.clone()).map_err(|e| {
        Diagnostic::error(
            &origin,
            format!(
                "the case file is not UTF-8 text (byte {})",
                e.utf8_error().valid_up_to()
            ),
        )
    })?;
    let raw = case::parse_raw_every_error(&src, &origin).map_err(Failure::from)?;
    let dir = case_dir(path);
    let mut files = Vec::new();
    for written in case::referenced_files(&raw) {
        let full = resolve(&dir, &written, options, &src, &origin)?;
        let file_origin = full.display().to_string();
        let bytes = std::fs::read(&full).map_err(|e| {
            place_spectrum(
                Diagnostic::error(&origin, format!("cannot read \"{written}\": {e}")),
                &src,
            )
        })?;
        files.push(ReferencedFile {
            written,
            origin: file_origin,
            bytes,
        });
    }
    let (case, diagnostics) = case::validate_with_files(&raw, &src, &origin, &files);
    let Some(case) = case else {
        return Err(diagnostics.into());
    };
    let mut inputs = vec![InputFile {
        role: InputRole::Case,
        path: file_name(path),
        sha256: sha256_hex(&bytes),
    }];
    inputs.extend(files.iter().map(|f| InputFile {
        role: InputRole::Spectrum,
        path: f.written.clone(),
        sha256: sha256_hex(&f.bytes),
    }));
    let library = match &case.library {
        None => None,
        Some(lib) => {
            let key = KeyPath::key("library");
            let full = resolve_at(&dir, &lib.written, options, &src, &origin, &key)?;
            let loaded = super::library::load_library(&full, false).map_err(|f| {
                let mut all = vec![place_key(
                    Diagnostic::error(
                        &origin,
                        format!("the library \"{}\" cannot be used", lib.written),
                    )
                    .with_help("the problems are listed below"),
                    &src,
                    &key,
                )];
                all.extend(f.diagnostics);
                Failure::from(all)
            })?;
            inputs.push(InputFile {
                role: InputRole::Library,
                path: lib.written.clone(),
                sha256: loaded.index.digest(),
            });
            Some(CaseLibrary {
                written: lib.written.clone(),
                loaded,
            })
        }
    };
    Ok(LoadedCase {
        path: path.to_path_buf(),
        src,
        case,
        warnings: diagnostics,
        inputs,
        files,
        library,
    })
}

fn place_spectrum(d: Diagnostic, src: &str) -> Diagnostic {
    place_key(d, src, &KeyPath::key("ir").with_key("spectrum"))
}

fn place_key(d: Diagnostic, src: &str, path: &KeyPath) -> Diagnostic {
    let d = d.with_key_path(path.to_string());
    match locate_value(src, path) {
        Some(offset) => d.at_offset(src, offset),
        None => d,
    }
}

/// The path a case's written path names, refused when it leaves the case's directory tree
/// (lexically, or through a symbolic link) unless `allow_outside`.
fn resolve(
    dir: &Path,
    written: &str,
    options: &LoadOptions,
    src: &str,
    origin: &str,
) -> Result<PathBuf, Failure> {
    resolve_at(
        dir,
        written,
        options,
        src,
        origin,
        &KeyPath::key("ir").with_key("spectrum"),
    )
}

/// [`resolve`] for the path written at `key`.
fn resolve_at(
    dir: &Path,
    written: &str,
    options: &LoadOptions,
    src: &str,
    origin: &str,
    key: &KeyPath,
) -> Result<PathBuf, Failure> {
    let place_spectrum = |d: Diagnostic, src: &str| place_key(d, src, key);
    let full = dir.join(written);
    if options.allow_outside {
        return Ok(full);
    }
    if let Err(problem) = check_written_path(written) {
        return Err(place_spectrum(
            Diagnostic::error(origin, format!("\"{written}\": {problem}"))
                .with_help("keep spectra beside the case (or pass --allow-outside)"),
            src,
        )
        .into());
    }
    let canonical_dir = dir.canonicalize().map_err(|e| {
        Diagnostic::error(origin, format!("cannot resolve the case directory: {e}"))
    })?;
    let canonical = full.canonicalize().map_err(|e| {
        place_spectrum(
            Diagnostic::error(origin, format!("cannot read \"{written}\": {e}")),
            src,
        )
    })?;
    if !is_inside(&canonical_dir, &canonical) {
        return Err(place_spectrum(
            Diagnostic::error(
                origin,
                format!("\"{written}\" leads outside the case file's directory tree (through a symbolic link)"),
            )
            .with_help("copy the file beside the case (or pass --allow-outside)"),
            src,
        )
        .into());
    }
    Ok(full)
}

/// Checks what of the case only the catalogue can check (the accepted candidate's group
/// ids); errors end the command with exit 2.
pub fn check_against_catalogue(loaded: &LoadedCase, catalogue: &Catalogue) -> Result<(), Failure> {
    let diagnostics = case::check_group_ids(&loaded.case, &loaded.src, catalogue);
    if diagnostics.iter().any(Diagnostic::is_error) {
        return Err(diagnostics.into());
    }
    Ok(())
}

/// Solves a loaded case without a budget (library callers; the commands use
/// [`solve_within`]).
pub fn solve(loaded: &LoadedCase, catalogue: &Catalogue, options: &SolveOptions) -> Outcome {
    let mut outcome = engine::solve(&loaded.case, catalogue, options);
    engine::structures::attach(&mut outcome, &loaded.case, catalogue, options.tolerance_cm1);
    outcome
}

/// Solves a loaded case within `budget`; a spent budget is a failure (exit 2) that
/// names the limit, where it was reached and what to add to the case.
pub fn solve_within(
    loaded: &LoadedCase,
    catalogue: &Catalogue,
    options: &SolveOptions,
    budget: Budget,
) -> Result<Outcome, Failure> {
    let mut meter = Metered::new(budget);
    let mut outcome = engine::solve_within(&loaded.case, catalogue, options, &mut meter)
        .map_err(|stop| limit_failure(&loaded.path.display().to_string(), &stop))?;
    engine::structures::attach(&mut outcome, &loaded.case, catalogue, options.tolerance_cm1);
    Ok(outcome)
}

/// The provenance of a report on `loaded`.
pub fn provenance(
    loaded: &LoadedCase,
    outcome: &Outcome,
    generated_at: Option<String>,
) -> Provenance {
    Provenance {
        quiddity_version: QUIDDITY_VERSION.to_owned(),
        rules_digest: outcome.rules_digest.clone(),
        tolerance_cm1: outcome.tolerance_cm1,
        inputs: loaded.inputs.clone(),
        generated_at,
    }
}

/// The report on `loaded` in `format` (the plot trace is read only for HTML).
pub fn report_text(
    loaded: &LoadedCase,
    outcome: &Outcome,
    format: Format,
    generated_at: Option<String>,
) -> String {
    let plot = if format == Format::Html {
        loaded
            .files
            .first()
            .and_then(|f| report::plot::trace_from_bytes(&f.bytes, &f.origin))
    } else {
        None
    };
    let mut view = report::build(
        &loaded.case,
        outcome,
        provenance(loaded, outcome, generated_at),
        plot,
    );
    if let Some((verdict, overlay)) = library_verdict(loaded, outcome, format == Format::Html) {
        view.library = Some(verdict);
        view.library_overlay = overlay;
    }
    report::render(&view, format)
}

/// Hits shown in a report's library section.
pub const LIBRARY_HITS: usize = 5;
/// Hits drawn over the unknown in the overlay plot.
pub const OVERLAY_HITS: usize = 3;

/// The library verdict of a loaded case (None when the case names no library), and with
/// `overlay` the traces of the unknown and its best hits on the library grid (the hits'
/// files are read again for it).
pub fn library_verdict(
    loaded: &LoadedCase,
    outcome: &Outcome,
    overlay: bool,
) -> Option<(
    crate::verdict::LibraryVerdict,
    Option<report::plot::LibraryOverlay>,
)> {
    let lib = loaded.library.as_ref()?;
    let index = &lib.loaded.index;
    let Some(file) = loaded.files.first() else {
        return Some((
            crate::verdict::not_searched(
                &lib.written,
                index,
                "the case names no spectrum file (a library search compares whole spectra, not band lists)",
            ),
            None,
        ));
    };
    let grid = match crate::library::grid_from_bytes(&file.bytes, &file.origin) {
        Ok(g) => g,
        Err(e) => {
            return Some((
                crate::verdict::not_searched(
                    &lib.written,
                    index,
                    &format!("the case's spectrum cannot go on the library grid: {e}"),
                ),
                None,
            ))
        }
    };
    let query = crate::library::Query::new(grid, crate::verdict::case_phase(&loaded.case));
    let options = crate::library::SearchOptions {
        top: LIBRARY_HITS,
        ..crate::library::SearchOptions::default()
    };
    let found = crate::library::search(index, &query, &options);
    let verdict = crate::verdict::check_hits(&loaded.case, outcome, &lib.written, index, &found);
    let overlay = overlay.then(|| {
        let mut traces = vec![report::plot::OverlayTrace::of_grid(
            "unknown".to_owned(),
            &query.grid,
        )];
        for h in found.hits.iter().take(OVERLAY_HITS) {
            let e = &index.entries()[h.entry];
            let path = lib.loaded.dir.join(&e.path);
            let origin = path.display().to_string();
            if let Some(g) = std::fs::read(&path)
                .ok()
                .and_then(|b| crate::library::grid_from_bytes(&b, &origin).ok())
            {
                traces.push(report::plot::OverlayTrace::of_grid(
                    format!("#{} {}", h.rank, e.meta.name),
                    &g,
                ));
            }
        }
        report::plot::LibraryOverlay { traces }
    });
    Some((verdict, overlay))
}

/// The report format of an output path, from its extension.
pub fn format_of(path: &Path) -> Result<Format, Failure> {
    let ext = path.extension().and_then(|e| e.to_str()).unwrap_or("");
    Format::from_extension(ext).ok_or_else(|| {
        Diagnostic::error(
            path.display().to_string(),
            format!("cannot tell the report format from the extension \"{ext}\""),
        )
        .with_help("use .txt, .md, .json or .html")
        .into()
    })
}

/// The record file of a case: `NAME.record.json` beside `NAME.yaml`.
pub fn record_path(case_path: &Path) -> PathBuf {
    let stem = case_path
        .file_stem()
        .map_or_else(|| "case".to_owned(), |s| s.to_string_lossy().into_owned());
    case_dir(case_path).join(format!("{stem}.record.json"))
}

/// Refuses to write over the case file or any file it names (inputs are never modified).
pub fn refuse_input_overwrite(loaded: &LoadedCase, target: &Path) -> Result<(), Failure> {
    let Ok(target) = target.canonicalize() else {
        return Ok(()); // does not exist yet, so it is no input
    };
    let mut inputs = vec![loaded.path.clone()];
    inputs.extend(loaded.files.iter().map(|f| PathBuf::from(&f.origin)));
    if let Some(lib) = &loaded.library {
        // Any file inside the library folder is an input (a reference, a side file or the
        // index): compared by folder, not file by file, for a library of any size.
        if let Ok(dir) = lib.loaded.dir.canonicalize() {
            if target.starts_with(&dir) {
                return Err(Diagnostic::error(
                    target.display().to_string(),
                    "refusing to write into the reference library folder (an input)",
                )
                .into());
            }
        }
    }
    for input in inputs {
        if input.canonicalize().is_ok_and(|c| c == target) {
            return Err(Diagnostic::error(
                target.display().to_string(),
                "refusing to write over an input file",
            )
            .into());
        }
    }
    Ok(())
}

/// Writes `bytes` to `path` through a temporary file in the same directory and a rename,
/// so that a reader never sees half a file. Without `overwrite`, an existing `path` is
/// left alone and the error is `AlreadyExists`.
pub fn write_atomic(path: &Path, bytes: &[u8], overwrite: bool) -> std::io::Result<()> {
    let dir = case_dir(path);
    let name = file_name(path);
    static COUNTER: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);
    let n = COUNTER.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    let tmp = dir.join(format!(".{name}.tmp-{}-{n}", std::process::id()));
    let result = (|| {
        // `--report out/r.html` names a folder that need not exist yet.
        std::fs::create_dir_all(&dir)?;
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        drop(f);
        if overwrite {
            std::fs::rename(&tmp, path)
        } else {
            // A hard link fails when the target exists, so no other writer can be
            // overwritten between a check and the rename.
            match std::fs::hard_link(&tmp, path) {
                Ok(()) => std::fs::remove_file(&tmp),
                Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => Err(e),
                Err(_) if path.exists() => Err(std::io::Error::new(
                    std::io::ErrorKind::AlreadyExists,
                    "file exists",
                )),
                Err(_) => std::fs::rename(&tmp, path),
            }
        }
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// The current UTC time as `YYYY-MM-DDTHH:MM:SSZ` (only when a report asks for it).
pub fn utc_now() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs());
    utc_from_unix(secs)
}

/// `YYYY-MM-DDTHH:MM:SSZ` of seconds since 1970-01-01 UTC (civil-from-days, proleptic
/// Gregorian calendar).
pub fn utc_from_unix(secs: u64) -> String {
    let days = (secs / 86_400) as i64;
    let rem = secs % 86_400;
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        rem % 3600 / 60,
        rem % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unix_times_convert_to_calendar_dates() {
        // Reference points: the epoch, and 2000-03-01 (day 11017), a date after a leap
        // day in a year divisible by 400 (common practice: POSIX time definition).
        assert_eq!(utc_from_unix(0), "1970-01-01T00:00:00Z");
        assert_eq!(
            utc_from_unix(11_017 * 86_400 + 3661),
            "2000-03-01T01:01:01Z"
        );
        assert_eq!(utc_from_unix(951_782_400), "2000-02-29T00:00:00Z");
    }

    #[test]
    fn atomic_writes_refuse_to_overwrite_unless_asked() {
        let dir = tempfile::tempdir().expect("temp dir");
        let p = dir.path().join("r.txt");
        write_atomic(&p, b"one", false).expect("first write");
        let e = write_atomic(&p, b"two", false).expect_err("second write refused");
        assert_eq!(e.kind(), std::io::ErrorKind::AlreadyExists);
        assert_eq!(std::fs::read(&p).expect("read"), b"one");
        write_atomic(&p, b"three", true).expect("forced write");
        assert_eq!(std::fs::read(&p).expect("read"), b"three");
        let leftovers: Vec<_> = std::fs::read_dir(dir.path())
            .expect("list")
            .flatten()
            .filter(|e| e.file_name().to_string_lossy().contains(".tmp-"))
            .collect();
        assert!(leftovers.is_empty());
    }
}
