//! The workbook file: RON text, versioned, canonical, saved atomically.
//!
//! * Reading: the format version is checked first (a newer file is refused
//!   before anything else is read), then the whole file is parsed with
//!   unknown fields refused (line and column reported), then every given is
//!   parsed with its field's unit. Any error leaves nothing loaded.
//! * Writing is canonical: a fixed header line, fields in a fixed order,
//!   optional fields left out when empty, four-space indentation. Loading
//!   and saving an unchanged workbook is byte-identical, and changing one
//!   given changes one line.
//! * Saving goes through [`atomic`]: a unique temporary file beside the
//!   target, synced and renamed over it, so a crash leaves either the old or
//!   the new file; links followed, mode and owner kept.
//! * Stored results (when the workbook asks for them) are rounded to six
//!   significant figures so that only real changes show in a diff.

use crate::book::{BookError, FORMAT_VERSION, StoredRow, Workbook};
use crate::engine::{Engine, StationStatus};
use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};

pub mod atomic;
pub mod comments;
pub use atomic::{AtomicFile, WriteError, WriteOptions};

/// The first line of every workbook file.
pub const HEADER: &str =
    "// stationwise workbook: RON text; values keep the units they were typed in.";

/// Why a workbook could not be loaded.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum LoadError {
    /// The file could not be read.
    #[error("cannot read {path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The system error.
        source: io::Error,
    },
    /// RON syntax or an unknown or missing field.
    #[error("line {line}, column {col}: {message}")]
    Syntax {
        /// 1-based line.
        line: usize,
        /// 1-based column.
        col: usize,
        /// What is wrong.
        message: String,
    },
    /// The file's format is newer than this build.
    #[error(
        "this workbook is format {found}; this build reads format {FORMAT_VERSION} or older (update stationwise)"
    )]
    Version {
        /// Version found.
        found: u32,
    },
    /// Givens that do not parse, or a structure that does not hold.
    #[error("{}", .0.iter().map(|e| e.to_string()).collect::<Vec<_>>().join("; "))]
    Book(Vec<BookError>),
}

#[derive(serde::Deserialize)]
struct Probe {
    format: u32,
}

fn syntax(e: ron::error::SpannedError) -> LoadError {
    LoadError::Syntax {
        line: e.span.start.line,
        col: e.span.start.col,
        message: e.code.to_string(),
    }
}

/// Parse workbook text (version, syntax, givens, structure).
pub fn parse(text: &str) -> Result<Workbook, LoadError> {
    // Hand-written files may give optional fields bare, with or without
    // the `#![enable(implicit_some)]` line that saves write.
    let opts =
        ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME);
    if let Ok(p) = opts.from_str::<Probe>(text)
        && p.format > FORMAT_VERSION
    {
        return Err(LoadError::Version { found: p.format });
    }
    let mut book: Workbook = opts.from_str(text).map_err(syntax)?;
    book.resolve().map_err(LoadError::Book)?;
    book.comments = comments::Comments::collect(text);
    // Structural checks live in the engine's compiler; run them here so a
    // file that cannot be evaluated is refused at load time.
    Engine::new(book.clone()).map_err(LoadError::Book)?;
    Ok(book)
}

/// Load a workbook file.
pub fn load(path: &Path) -> Result<Workbook, LoadError> {
    let text = fs::read_to_string(path).map_err(|source| LoadError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    parse(&text)
}

/// The canonical text of a workbook.
pub fn to_text(book: &Workbook) -> String {
    let cfg = ron::ser::PrettyConfig::new()
        .struct_names(false)
        .indentor("    ".to_string())
        .new_line("\n".to_string())
        .separate_tuple_members(false)
        .extensions(ron::extensions::Extensions::IMPLICIT_SOME);
    match ron::ser::to_string_pretty(book, cfg) {
        Ok(body) => book.comments.apply(&format!("{HEADER}\n{body}\n")),
        // Serialising plain data structures cannot fail; keep the
        // signature infallible for callers but never lose data silently.
        Err(e) => format!("{HEADER}\n// serialisation failed: {e}\n"),
    }
}

/// Write bytes atomically (see [`atomic`]). `before_rename` runs between
/// the sync and the rename (tests use it to simulate a crash).
pub fn write_atomic_with(
    path: &Path,
    bytes: &[u8],
    before_rename: impl FnOnce() -> io::Result<()>,
) -> Result<(), WriteError> {
    let mut f = AtomicFile::create(path, WriteOptions::default())?;
    f.write_all(bytes).map_err(|source| WriteError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    f.commit_with(before_rename)
}

/// Save a workbook atomically in canonical form.
pub fn save(path: &Path, book: &Workbook) -> Result<(), WriteError> {
    save_with(path, book, WriteOptions::default())
}

/// Save a workbook atomically, with options (force over a read-only or
/// hard-linked file).
pub fn save_with(path: &Path, book: &Workbook, opts: WriteOptions) -> Result<(), WriteError> {
    atomic::write(path, to_text(book).as_bytes(), opts)
}

/// Keys stored per station.
pub const STORED_STATION_KEYS: [&str; 9] = ["tt", "pt", "t", "p", "mach", "v", "w", "area", "far"];

fn round6(v: f64) -> f64 {
    format!("{v:.5e}").parse().unwrap_or(v)
}

/// The results to store for a workbook, from an engine.
pub fn results_rows(engine: &Engine) -> Vec<StoredRow> {
    let mut rows = Vec::new();
    for (i, s) in engine.stations().iter().enumerate() {
        let mut values = Vec::new();
        if let StationStatus::Ok(v) = engine.station_status(i) {
            for k in STORED_STATION_KEYS {
                if let Some(x) = engine.station_key(v, k) {
                    values.push((k.to_string(), round6(x)));
                }
            }
        }
        rows.push(StoredRow {
            row: s.name.clone(),
            values,
        });
    }
    let mut values = Vec::new();
    for (k, _, _) in crate::book::paths::SUMMARY_KEYS {
        if let Some(x) = engine.summary().get(k) {
            values.push((k.to_string(), round6(x)));
        }
    }
    rows.push(StoredRow {
        row: "summary".into(),
        values,
    });
    rows
}

/// Put fresh results into the book (when it keeps results) before saving.
pub fn refresh_results(book: &mut Workbook, engine: &Engine) {
    book.results = if book.keep_results {
        Some(results_rows(engine))
    } else {
        None
    };
}

/// Stored results that no longer match the computed ones.
pub fn stale_results(book: &Workbook, engine: &Engine) -> Vec<String> {
    let Some(stored) = &book.results else {
        return Vec::new();
    };
    let fresh = results_rows(engine);
    let mut out = Vec::new();
    for row in stored {
        let Some(f) = fresh.iter().find(|r| r.row == row.row) else {
            out.push(format!(
                "{}: stored results for a station that no longer exists",
                row.row
            ));
            continue;
        };
        for (k, v) in &row.values {
            match f.values.iter().find(|(fk, _)| fk == k) {
                Some((_, nv)) => {
                    if (nv - v).abs() > 1e-5 * v.abs().max(nv.abs()) + 1e-12 {
                        out.push(format!("{}.{k}: stored {v}, computed {nv}", row.row));
                    }
                }
                None => out.push(format!("{}.{k}: stored {v}, now not computed", row.row)),
            }
        }
        for (k, nv) in &f.values {
            if !row.values.iter().any(|(sk, _)| sk == k) {
                out.push(format!("{}.{k}: computed {nv}, not stored", row.row));
            }
        }
    }
    out
}
