//! Sweeps: one given over a range, derived values reported at each point.
//!
//! Points are split into contiguous chunks, one per worker thread (rayon);
//! each worker clones the engine once and walks its chunk with incremental
//! recomputes, so only the part of the workbook downstream of the varied
//! given reruns per point. Rows come back in the order of the values.

use super::Engine;
use crate::book::BookError;
use rayon::prelude::*;

/// One row: the varied value (SI) and each reported value (None where not
/// computed at that point).
pub type Row = (f64, Vec<Option<f64>>);

/// Run a sweep. `report` paths are checked before any work starts.
pub fn run(
    engine: &Engine,
    vary: &str,
    values: &[f64],
    report: &[String],
) -> Result<Vec<Row>, BookError> {
    Ok(run_checked(engine, vary, values, report)?
        .into_iter()
        .map(|(r, _)| r)
        .collect())
}

/// [`run`], with the first problem of each point (why a value is missing).
pub fn run_checked(
    engine: &Engine,
    vary: &str,
    values: &[f64],
    report: &[String],
) -> Result<Vec<(Row, Option<String>)>, BookError> {
    for r in report {
        engine
            .value(r)
            .map_err(|e| BookError::Rule(format!("--report: {e}")))?;
    }
    if !engine.book().givens().iter().any(|(p, ..)| p == vary) {
        return Err(BookError::Unknown {
            whose: "the sweep".into(),
            what: "given",
            name: vary.to_string(),
        });
    }
    let threads = rayon::current_num_threads().max(1);
    let chunk = values.len().div_ceil(threads).max(1);
    let rows: Vec<Vec<(Row, Option<String>)>> = values
        .par_chunks(chunk)
        .map(|part| {
            let mut e = engine.clone();
            part.iter()
                .map(|&x| {
                    let _ = e.set_si(vary, x);
                    let vals = report.iter().map(|r| e.value(r).ok().flatten()).collect();
                    let problem = e
                        .problems()
                        .first()
                        .map(|p| format!("{}: {}", p.place, p.message));
                    ((x, vals), problem)
                })
                .collect()
        })
        .collect();
    Ok(rows.into_iter().flatten().collect())
}

/// `n` equal steps from `from` to `to` inclusive (n + 1 values).
pub fn linspace(from: f64, to: f64, steps: usize) -> Vec<f64> {
    if steps == 0 {
        return vec![from];
    }
    (0..=steps)
        .map(|i| from + (to - from) * i as f64 / steps as f64)
        .collect()
}
