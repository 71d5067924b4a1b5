//! Helpers shared by the workbook commands: loading a workbook; the
//! presentation helpers come from [`crate::present`].

pub use crate::present::*;

use super::Failure;
use crate::book::Workbook;
use crate::engine::Engine;
use std::path::Path;

/// Load a workbook file and build its engine (exit 1 on failure).
pub fn open(path: &Path) -> Result<(Workbook, Engine), Failure> {
    let book =
        crate::format::load(path).map_err(|e| Failure::bad(format!("{}: {e}", path.display())))?;
    let engine = Engine::new(book.clone())
        .map_err(|e| Failure::bad(format!("{}: {}", path.display(), join(&e))))?;
    Ok((book, engine))
}
