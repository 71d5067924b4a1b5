//! Sweeps: one given over a range, derived values reported at each point.
//!
//! Points are split into contiguous chunks, one per worker thread (rayon);
//! each worker clones the engine once and walks its chunk with incremental
//! recomputes, so only the part of the workbook downstream of the varied
//! given reruns per point. Rows come back in the order of the values, in
//! batches ([`stream`]) so that a sweep of millions of points runs in the
//! memory of one batch.

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
    let mut out = Vec::with_capacity(values.len());
    stream(
        engine,
        vary,
        values.len(),
        |i| values[i],
        report,
        BATCH,
        |rows| {
            out.extend(rows);
            Ok::<(), BookError>(())
        },
    )?;
    Ok(out)
}

/// Points per batch of [`stream`].
pub const BATCH: usize = 8192;

/// Run a sweep of `count` points (`value_at(i)` is the i-th value) in
/// batches of `batch`: each batch is computed in parallel and handed to
/// `sink` in order, so memory is that of one batch however long the sweep.
/// A value the given cannot take (outside its range) is a problem of that
/// point, never a silent reuse of the previous value.
pub fn stream<E: From<BookError>>(
    engine: &Engine,
    vary: &str,
    count: usize,
    value_at: impl Fn(usize) -> f64 + Sync,
    report: &[String],
    batch: usize,
    mut sink: impl FnMut(Vec<(Row, Option<String>)>) -> Result<(), E>,
) -> Result<(), E> {
    // Paths are resolved once: a point costs an incremental recompute and
    // the reads, no path parsing or lookup by name.
    let readers = report
        .iter()
        .map(|r| {
            engine
                .reader(r)
                .map_err(|e| BookError::Rule(format!("--report: {e}")))
        })
        .collect::<Result<Vec<_>, _>>()?;
    let handle = engine.handle(vary).map_err(|_| BookError::Unknown {
        whose: "the sweep".into(),
        what: "given",
        name: vary.to_string(),
    })?;
    let threads = rayon::current_num_threads().max(1);
    let batch = batch.max(1);
    let mut start = 0;
    while start < count {
        let end = (start + batch).min(count);
        let chunk = (end - start).div_ceil(threads).max(1);
        let idx: Vec<usize> = (start..end).collect();
        let rows: Vec<Vec<(Row, Option<String>)>> = idx
            .par_chunks(chunk)
            .map(|part| {
                let mut e = engine.clone();
                part.iter()
                    .map(|&i| {
                        let x = value_at(i);
                        if let Err(err) = e.set_by(&handle, x) {
                            return ((x, vec![None; readers.len()]), Some(err.to_string()));
                        }
                        let vals = readers.iter().map(|r| e.read(r)).collect();
                        let problem = e.first_problem();
                        ((x, vals), problem)
                    })
                    .collect()
            })
            .collect();
        sink(rows.into_iter().flatten().collect())?;
        start = end;
    }
    Ok(())
}

/// `n` equal steps from `from` to `to` inclusive (n + 1 values).
pub fn linspace(from: f64, to: f64, steps: usize) -> Vec<f64> {
    if steps == 0 {
        return vec![from];
    }
    (0..=steps)
        .map(|i| crate::range::value(from, to, steps, i))
        .collect()
}
