//! `quiddity library index DIR` and `quiddity library search DIR SPECTRUM`: the
//! laboratory's reference library. Also the loader `solve`, `review` and `batch` use for a
//! case's `library:` folder.
//!
//! Loading a library folder: every `*.jdx *.dx *.jcm *.jcamp *.csv` below it (hidden
//! entries skipped), each with its side file `NAME.yaml` when there is one; the index file
//! `quiddity-library.idx` at its top is reused for every file whose size and modification
//! time (or digest) are unchanged. Only `library index` writes the index file: a case's
//! library is an input and is never written (a stale index is rebuilt in memory and said
//! so on stderr).

use super::casefile::write_atomic;
use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::diag::Diagnostic;
use crate::library::{
    grid_from_bytes, search, BuildStats, Builder, LibraryIndex, Phase, PhaseRule, Query,
    SearchOptions, SearchOutcome, SourceFile, Stamp, INDEX_FILE_NAME, SIDE_EXTENSIONS,
    SPECTRUM_EXTENSIONS,
};
use clap::{Args, Subcommand};
use serde::Serialize;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Arguments of `quiddity library`.
#[derive(Debug, Args)]
pub struct LibraryArgs {
    #[command(subcommand)]
    command: LibraryCommand,
}

#[derive(Debug, Subcommand)]
enum LibraryCommand {
    /// Build (or bring up to date) the index of a library folder.
    Index(IndexArgs),
    /// Compare a spectrum file with a library folder's references.
    Search(SearchArgs),
}

/// Arguments of `quiddity library index`.
#[derive(Debug, Args)]
struct IndexArgs {
    /// The library folder.
    dir: PathBuf,
    /// Read and hash every file, whatever its size and modification time say.
    #[arg(long)]
    verify: bool,
    /// Print the summary as one JSON document.
    #[arg(long)]
    json: bool,
}

/// Arguments of `quiddity library search`.
#[derive(Debug, Args)]
struct SearchArgs {
    /// The library folder.
    dir: PathBuf,
    /// The unknown's spectrum file (JCAMP-DX or two-column text).
    spectrum: PathBuf,
    /// The unknown's phase: vapour (gas) or condensed (ATR, KBr, film, ...).
    #[arg(long, value_name = "PHASE")]
    phase: Option<String>,
    /// Compare references of the other phase too (their hits are marked).
    #[arg(long)]
    any_phase: bool,
    /// Show at most N hits.
    #[arg(long, value_name = "N", default_value_t = 10)]
    top: usize,
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// What state the index file was in when a library was loaded.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case", tag = "state")]
pub enum IndexState {
    /// Up to date: nothing had to be read.
    Current,
    /// No index file: built in memory.
    Missing,
    /// Files changed since the index was written (rebuilt in memory).
    Stale,
    /// Only stamps moved (touched or copied files, same bytes).
    StampsMoved,
    /// The index file could not be used.
    Unusable {
        /// Why.
        why: String,
    },
}

/// A library folder loaded for searching.
#[derive(Clone, Debug)]
pub struct LoadedLibrary {
    /// The folder as opened.
    pub dir: PathBuf,
    /// The index (up to date with the folder).
    pub index: LibraryIndex,
    /// Problems of the folder's files (errors: files left out; warnings).
    pub diagnostics: Vec<Diagnostic>,
    /// How the rebuild went.
    pub stats: BuildStats,
    /// The index file's state before loading.
    pub state: IndexState,
}

impl LoadedLibrary {
    /// The stderr lines a command that uses the library shows (the index state, then every
    /// problem).
    pub fn notices(&self) -> Vec<String> {
        let dir = self.dir.display();
        let mut out = Vec::new();
        match &self.state {
            IndexState::Current | IndexState::StampsMoved => {}
            IndexState::Missing => out.push(format!(
                "note: {dir} has no index file; indexed in memory ({} files read): run `quiddity library index {dir}` to keep the index",
                self.stats.n_indexed
            )),
            IndexState::Stale => out.push(format!(
                "note: the index of {dir} is out of date ({} file(s) indexed anew, {} removed); brought up to date in memory: run `quiddity library index {dir}` to keep it",
                self.stats.n_indexed, self.stats.n_removed
            )),
            IndexState::Unusable { why } => out.push(format!(
                "note: the index file of {dir} cannot be used ({why}); indexed in memory: run `quiddity library index {dir}`"
            )),
        }
        out.extend(self.diagnostics.iter().map(Diagnostic::render));
        out
    }
}

fn stamp_of(meta: &std::fs::Metadata) -> Stamp {
    let modified_ns = meta
        .modified()
        .ok()
        .and_then(|t| t.duration_since(std::time::UNIX_EPOCH).ok())
        .map_or(0, |d| u64::try_from(d.as_nanos()).unwrap_or(0));
    Stamp {
        size: meta.len(),
        modified_ns,
    }
}

fn extension(path: &Path) -> String {
    path.extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase()
}

/// Every reference file below `dir` with its side file, in path order; side files with
/// no spectrum are warnings.
pub fn list_files(dir: &Path) -> Result<(Vec<SourceFile>, Vec<Diagnostic>), Failure> {
    let origin = dir.display().to_string();
    if !dir.is_dir() {
        return Err(Diagnostic::error(&origin, "not a library folder (no such directory)").into());
    }
    let mut spectra = Vec::new();
    let mut sides = Vec::new();
    let mut warnings = Vec::new();
    let mut pending = vec![(dir.to_path_buf(), String::new())];
    while let Some((folder, prefix)) = pending.pop() {
        let entries = std::fs::read_dir(&folder).map_err(|e| {
            Diagnostic::error(
                folder.display().to_string(),
                format!("cannot read the folder: {e}"),
            )
        })?;
        for entry in entries.flatten() {
            let name = entry.file_name().to_string_lossy().into_owned();
            if name.starts_with('.') || name == INDEX_FILE_NAME {
                continue;
            }
            let path = entry.path();
            let relative = format!("{prefix}{name}");
            match entry.metadata() {
                Ok(m) if m.is_dir() => pending.push((path, format!("{relative}/"))),
                Ok(m) if m.is_file() => {
                    let ext = extension(&path);
                    if SPECTRUM_EXTENSIONS.contains(&ext.as_str()) {
                        spectra.push((relative, path, stamp_of(&m)));
                    } else if SIDE_EXTENSIONS.contains(&ext.as_str()) {
                        sides.push((relative, path, stamp_of(&m)));
                    }
                }
                Ok(_) => {}
                Err(e) => warnings.push(Diagnostic::error(
                    path.display().to_string(),
                    format!("cannot read the file's metadata: {e}: left out of the library"),
                )),
            }
        }
    }
    spectra.sort_by(|a, b| a.0.cmp(&b.0));
    sides.sort_by(|a, b| a.0.cmp(&b.0));
    let stem_of = |relative: &str| {
        relative
            .rsplit_once('.')
            .map_or(relative, |(s, _)| s)
            .to_owned()
    };
    let mut used = vec![false; sides.len()];
    let files = spectra
        .into_iter()
        .map(|(relative, path, stamp)| {
            let stem = stem_of(&relative);
            let side = sides
                .iter()
                .enumerate()
                .find(|(_, (r, _, _))| stem_of(r) == stem)
                .map(|(i, (r, p, s))| {
                    used[i] = true;
                    (r.clone(), p.display().to_string(), *s)
                });
            SourceFile {
                path: relative,
                origin: path.display().to_string(),
                stamp,
                side,
            }
        })
        .collect::<Vec<_>>();
    for (i, (_, path, _)) in sides.iter().enumerate() {
        if !used[i] {
            warnings.push(
                Diagnostic::warning(
                    path.display().to_string(),
                    "a side file with no spectrum file of the same name beside it: ignored",
                )
                .with_help("name it after its spectrum: NAME.jdx and NAME.yaml"),
            );
        }
    }
    Ok((files, warnings))
}

/// Loads the library folder `dir`: its index file when usable, every changed file read
/// again. `verify` reads and hashes every file. An empty library is an error.
pub fn load_library(dir: &Path, verify: bool) -> Result<LoadedLibrary, Failure> {
    let (files, mut diagnostics) = list_files(dir)?;
    if files.is_empty() {
        return Err(Diagnostic::error(
            dir.display().to_string(),
            format!(
                "empty library: no reference spectrum (*.{}) in this folder",
                SPECTRUM_EXTENSIONS.join(", *.")
            ),
        )
        .with_help(
            "put the laboratory's reference spectra (JCAMP-DX or two-column text) in the folder",
        )
        .into());
    }
    let index_path = dir.join(INDEX_FILE_NAME);
    let (old, mut state) = match std::fs::read(&index_path) {
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => (None, IndexState::Missing),
        Err(e) => (None, IndexState::Unusable { why: e.to_string() }),
        Ok(bytes) => match LibraryIndex::from_bytes(&bytes) {
            Ok(index) => (Some(index), IndexState::Current),
            Err(e) => (None, IndexState::Unusable { why: e.to_string() }),
        },
    };
    let mut builder = Builder::new(old.as_ref());
    for file in &files {
        if !verify {
            if let Some(i) = builder.unchanged(file) {
                builder.reuse(i, &file.origin);
                continue;
            }
        }
        let bytes = match std::fs::read(&file.origin) {
            Ok(b) => b,
            Err(e) => {
                diagnostics.push(Diagnostic::error(
                    &file.origin,
                    format!("cannot read the file: {e}: left out of the library"),
                ));
                continue;
            }
        };
        let side_text = match &file.side {
            None => None,
            Some((_, origin, _)) => match std::fs::read(origin).map(String::from_utf8) {
                Ok(Ok(t)) => Some(t),
                Ok(Err(_)) => {
                    diagnostics.push(Diagnostic::error(
                        origin,
                        "the side file is not UTF-8 text: its spectrum is left out of the library",
                    ));
                    continue;
                }
                Err(e) => {
                    diagnostics.push(Diagnostic::error(
                        origin,
                        format!("cannot read the side file: {e}: its spectrum is left out of the library"),
                    ));
                    continue;
                }
            },
        };
        builder.add(file, &bytes, side_text.as_deref());
    }
    let (index, found, stats) = builder.finish();
    diagnostics.extend(found);
    if state == IndexState::Current {
        // Files left out (unreadable, duplicates) are read on every load and reported
        // again; only a change of what the index holds makes it stale.
        if old.as_ref().is_some_and(|o| o.digest() != index.digest()) {
            state = IndexState::Stale;
        } else if stats.n_same_digest > 0 {
            state = IndexState::StampsMoved;
        }
    }
    if index.is_empty() {
        let mut all = diagnostics;
        all.push(Diagnostic::error(
            dir.display().to_string(),
            "empty library: none of its files could be used (see above)",
        ));
        return Err(all.into());
    }
    Ok(LoadedLibrary {
        dir: dir.to_path_buf(),
        index,
        diagnostics,
        stats,
        state,
    })
}

/// Runs `quiddity library`.
pub fn run(args: &LibraryArgs, out: &mut dyn Write) -> CommandResult {
    match &args.command {
        LibraryCommand::Index(a) => run_index(a, out),
        LibraryCommand::Search(a) => run_search(a, out),
    }
}

#[derive(Serialize)]
struct IndexSummary<'a> {
    library: String,
    index_file: String,
    n_references: usize,
    digest: String,
    memory_bytes: usize,
    bytes_per_reference: usize,
    stats: &'a BuildStats,
    problems: Vec<String>,
}

fn run_index(args: &IndexArgs, out: &mut dyn Write) -> CommandResult {
    let loaded = load_library(&args.dir, args.verify)?;
    let path = args.dir.join(INDEX_FILE_NAME);
    write_atomic(&path, &loaded.index.to_bytes(), true).map_err(|e| {
        Diagnostic::error(
            path.display().to_string(),
            format!("cannot write the index: {e}"),
        )
    })?;
    let n = loaded.index.len();
    let memory = loaded.index.memory_bytes();
    let summary = IndexSummary {
        library: args.dir.display().to_string(),
        index_file: path.display().to_string(),
        n_references: n,
        digest: loaded.index.digest(),
        memory_bytes: memory,
        bytes_per_reference: memory / n.max(1),
        stats: &loaded.stats,
        problems: loaded.diagnostics.iter().map(ToString::to_string).collect(),
    };
    let mut err = std::io::stderr().lock();
    for d in &loaded.diagnostics {
        let _ = writeln!(err, "{}", d.render());
    }
    if args.json {
        print_json(out, &summary)?;
    } else {
        let s = &loaded.stats;
        let text = format!(
            "index written: {}\n  {n} reference(s); {} file(s) listed: {} unchanged, {} with moved stamps but the same bytes, {} indexed anew ({} changed), {} left out; {} removed since the last index\n  library digest {}\n  in memory {:.1} MB ({} bytes a reference)\n",
            path.display(),
            s.n_files,
            s.n_unchanged,
            s.n_same_digest,
            s.n_indexed,
            s.n_changed,
            s.n_left_out,
            s.n_removed,
            summary.digest,
            memory as f64 / 1e6,
            summary.bytes_per_reference
        );
        out.write_all(text.as_bytes()).map_err(io_failure)?;
    }
    if loaded.diagnostics.iter().any(Diagnostic::is_error) {
        return Err(Diagnostic::error(
            args.dir.display().to_string(),
            format!(
                "{} file(s) left out of the library (listed above); the index holds the rest",
                loaded.stats.n_left_out
            ),
        )
        .into());
    }
    Ok(Status::Success)
}

fn parse_phase(word: &str) -> Result<Phase, Failure> {
    Phase::from_word(word).ok_or_else(|| {
        Diagnostic::error("--phase", format!("unknown phase \"{word}\""))
            .with_help("use vapour (gas) or condensed (ATR, KBr, film, solution, mull)")
            .into()
    })
}

#[derive(Serialize)]
struct SearchView<'a> {
    library: String,
    library_digest: String,
    spectrum: String,
    outcome: &'a SearchOutcome,
    references: Vec<&'a crate::library::Entry>,
    caution: &'static str,
}

/// The caution every library result carries.
pub const LIBRARY_CAUTION: &str = crate::verdict::LIBRARY_CAUTION;

fn run_search(args: &SearchArgs, out: &mut dyn Write) -> CommandResult {
    if args.top == 0 {
        return Err(Diagnostic::error("--top", "--top must be at least 1").into());
    }
    let phase = args
        .phase
        .as_deref()
        .map(parse_phase)
        .transpose()?
        .unwrap_or(Phase::Unknown);
    let origin = args.spectrum.display().to_string();
    let bytes = std::fs::read(&args.spectrum)
        .map_err(|e| Diagnostic::error(&origin, format!("cannot read the spectrum file: {e}")))?;
    let grid = grid_from_bytes(&bytes, &origin).map_err(|e| match e {
        crate::library::GridError::Unreadable(d) => Failure::from(d),
        other => Diagnostic::error(&origin, other.to_string()).into(),
    })?;
    let loaded = load_library(&args.dir, false)?;
    let mut err = std::io::stderr().lock();
    for n in loaded.notices() {
        let _ = writeln!(err, "{n}");
    }
    let query = Query::new(grid, phase);
    let options = SearchOptions {
        top: args.top,
        phase_rule: if args.any_phase {
            PhaseRule::Any
        } else {
            PhaseRule::Same
        },
        exclude: None,
    };
    let outcome = search(&loaded.index, &query, &options);
    if args.json {
        return print_json(
            out,
            &SearchView {
                library: args.dir.display().to_string(),
                library_digest: loaded.index.digest(),
                spectrum: origin,
                references: outcome
                    .hits
                    .iter()
                    .map(|h| &loaded.index.entries()[h.entry])
                    .collect(),
                outcome: &outcome,
                caution: LIBRARY_CAUTION,
            },
        );
    }
    let text = render_search_text(&loaded.index, &outcome, &origin);
    out.write_all(text.as_bytes()).map_err(io_failure)?;
    Ok(Status::Success)
}

/// The search in words: what was compared, the hit table, each hit's regions.
pub fn render_search_text(index: &LibraryIndex, o: &SearchOutcome, spectrum: &str) -> String {
    let mut s = format!(
        "{spectrum} against {} reference(s): {} compared (unknown's phase {})\n",
        o.n_references,
        o.n_compared,
        o.query_phase.word()
    );
    for line in crate::verdict::comparison_notes(o) {
        s.push_str(&format!("  {line}\n"));
    }
    if o.hits.is_empty() {
        s.push_str("no reference could be compared\n");
    } else {
        s.push_str(&format!(
            "\n rank  similarity  {:<28}  {:<10}  file\n",
            "name", "formula"
        ));
        for h in &o.hits {
            let e = &index.entries()[h.entry];
            s.push_str(&format!(
                "{:>5}  {:>10.4}  {:<28}  {:<10}  {}{}\n",
                h.rank,
                h.score,
                e.meta.name,
                e.meta.formula.as_deref().unwrap_or("?"),
                e.path,
                h.phase_note
                    .as_ref()
                    .map(|n| format!("  ({n})"))
                    .unwrap_or_default()
            ));
        }
        for h in &o.hits {
            let e = &index.entries()[h.entry];
            s.push_str(&format!(
                "\n#{} {} — compared over {:.0}–{:.0} cm⁻¹\n",
                h.rank, e.meta.name, h.compared_cm1.0, h.compared_cm1.1
            ));
            for r in &h.regions {
                s.push_str(&format!(
                    "    {:<46} {}{}\n",
                    r.region,
                    r.agreement.words(),
                    r.similarity
                        .filter(|_| r.agreement != crate::library::Agreement::BothEmpty)
                        .map(|v| format!(" ({v:.2})"))
                        .unwrap_or_default()
                ));
            }
        }
    }
    s.push_str(&format!("\ncaution: {LIBRARY_CAUTION}.\n"));
    s
}
