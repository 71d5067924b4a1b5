//! `stationwise sweep`: derived values over a range of one given.

use super::common::{self, shown, unit_label};
use super::{Failure, OutFormat, Units};
use crate::engine::{address, sweep};
use crate::report::{Cell, Column, Table};
use crate::units::{self, Quantity, UnitSystem};
use std::path::PathBuf;

/// WHAT paths: a given is `station.NAME.FIELD`, `process.NAME.FIELD`,
/// `shaft.NAME.FIELD` or `ambient.FIELD` (for example
/// `process.compressor.pressure_ratio`, `ambient.flight_mach`); a reported
/// value is `station.NAME.KEY` (tt, pt, t, p, rho, v, a, mach, w, area, far,
/// ht, s, wc, q, flow_function, gamma), `process.NAME.FIGURE`,
/// `shaft.NAME.imbalance`, `summary.KEY` (thrust_net, tsfc, ...) or any
/// given. `stationwise addresses FILE` lists every path of a workbook.
/// RANGE is FROM:TO:STEP (a step size, which must reach TO in whole steps)
/// or FROM:TO@N (N points), both ends included, as in every command. FROM
/// and TO take units ("1300 K:1600 K:50 K", "59 degF:100 degF@5"); a bare
/// STEP is in FROM's unit.
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// The given to vary: PATH=VALUES, values and ranges comma separated
    /// (FROM:TO:STEP, FROM:TO@N), with units ("6:16:1", "1300 K:1600 K@7,1650 K").
    #[arg(long)]
    vary: String,
    /// Derived values to report, comma separated paths.
    #[arg(long)]
    report: String,
    /// Output format.
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
    /// Display units for text and CSV (JSON is SI).
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
}

/// Most points one sweep may ask for.
const MAX_POINTS: usize = 10_000_001;

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    let (path, range) = a.vary.split_once('=').ok_or_else(|| {
        Failure::bad("--vary: use PATH=FROM:TO:STEP, PATH=FROM:TO@N or PATH=V1,V2,...")
    })?;
    let path = path.trim();
    let q = engine
        .given_address(path)
        .map_err(|e| Failure::bad(format!("--vary: {e}")))?;
    // Gauge pressures are read from the workbook's barometer.
    let baro = engine
        .book()
        .barometer()
        .filter(|_| path != crate::book::BAROMETER);
    let stated = |text: &str, what: &str| {
        units::parse_stated_at(text, q, what, a.units.into(), baro).map_err(Failure::bad)
    };
    let bad = |e: String| Failure::bad(format!("--vary: {e}"));
    // Values and ranges, comma separated, as every command reads them;
    // each part is a segment (from, to, intervals), walked lazily so ten
    // million points take no memory.
    let mut segments: Vec<(f64, f64, usize)> = Vec::new();
    let mut points = 0usize;
    for part in range.split(',') {
        let part = part.trim();
        if part.is_empty() {
            return Err(bad(format!("\"{range}\": empty entry in the list")));
        }
        let seg = match crate::range::split(part).map_err(bad)? {
            crate::range::Spec::One(v) => {
                let v = stated(v, "--vary value")?.si;
                (v, v, 0)
            }
            crate::range::Spec::Points(f, t, n) => {
                let (f, t) = (stated(f, "--vary FROM")?.si, stated(t, "--vary TO")?.si);
                if n > MAX_POINTS {
                    return Err(bad(format!("at most {MAX_POINTS} points")));
                }
                (f, t, n - 1)
            }
            crate::range::Spec::Step(f, t, st) => {
                let from = stated(f, "--vary FROM")?;
                let to = stated(t, "--vary TO")?.si;
                // A step is a difference: a bare one is in FROM's unit (scale
                // only, so 5 after 59 degF is 5 degF of difference).
                let step = match st.trim().parse::<f64>() {
                    Ok(v) => v * from.unit.scale,
                    Err(_) => {
                        let dq = if q == Quantity::Temperature {
                            Quantity::TemperatureDifference
                        } else {
                            q
                        };
                        units::parse(st, dq, "--vary STEP")
                            .map_err(Failure::bad)?
                            .si
                    }
                };
                let n =
                    crate::range::intervals(from.si, to, step, part, MAX_POINTS).map_err(bad)?;
                (from.si, to, n)
            }
        };
        points = points.saturating_add(seg.2 + 1);
        if points > MAX_POINTS {
            return Err(bad(format!("at most {MAX_POINTS} points in all")));
        }
        segments.push(seg);
    }
    // The i-th value: find its segment (a handful), then its place there.
    let starts: Vec<usize> = segments
        .iter()
        .scan(0usize, |acc, s| {
            let at = *acc;
            *acc += s.2 + 1;
            Some(at)
        })
        .collect();
    let value_at = |i: usize| {
        let k = starts.partition_point(|&s| s <= i).saturating_sub(1);
        let (f, t, n) = segments[k];
        crate::range::value(f, t, n, i - starts[k])
    };
    let report: Vec<String> = a
        .report
        .split(',')
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
        .collect();
    let system: UnitSystem = if a.format == OutFormat::Json {
        UnitSystem::Si
    } else {
        a.units.into()
    };
    if report.is_empty() {
        return Err(Failure::bad(
            "--report: name at least one value (stationwise addresses FILE lists them)",
        ));
    }
    // The report paths are checked by `sweep::stream` before any row.
    let qs: Vec<Quantity> = report
        .iter()
        .map(|r| address::quantity(&engine, r).unwrap_or(Quantity::Ratio))
        .collect();
    let mut cols = vec![Column::new(path, path, &unit_label(q, system))];
    for (r, q) in report.iter().zip(&qs) {
        cols.push(Column::new(r, r, &unit_label(*q, system)));
    }
    // Say why a point has no value (choking, a rich mixture, ...): the
    // column is always there, since rows are written before the last point
    // is known.
    cols.push(Column::new("problem", "problem", ""));
    let head = Table::new(cols);
    // JSON carries plain SI (K, Pa, N, kg/s, W, rad/s); text and CSV the display units.
    let json = a.format == OutFormat::Json;
    let conv = |v: f64, q| if json { v } else { shown(v, q, system) };
    let mut streamer = crate::report::Streamer::new(a.format.into());
    let mut out = std::io::BufWriter::new(std::io::stdout().lock());
    let io = |e: std::io::Error| Failure::bad(format!("cannot write the output: {e}"));
    let (mut failed, mut total) = (0u64, 0u64);
    sweep::stream(
        &engine,
        path,
        points,
        value_at,
        &report,
        sweep::BATCH,
        |rows| -> Result<(), Failure> {
            let mut t = Table::new(Vec::new());
            t.columns = head.columns.clone();
            for ((x, vals), problem) in rows {
                total += 1;
                failed += u64::from(problem.is_some());
                let mut row = vec![Cell::from(conv(x, q))];
                for (q, v) in qs.iter().zip(vals) {
                    row.push(Cell::from(v.map(|v| conv(v, *q))));
                }
                row.push(problem.map_or(Cell::Empty, Cell::from));
                t.rows.push(row);
            }
            streamer.chunk(&t, &mut out).map_err(io)
        },
    )?;
    streamer.finish(&mut out).map_err(io)?;
    drop(out);
    if failed > 0 {
        use std::io::Write;
        let _ = writeln!(
            std::io::stderr(),
            "stationwise: {failed} of {total} points had a problem (see the problem column)"
        );
        return Ok(2);
    }
    Ok(0)
}
