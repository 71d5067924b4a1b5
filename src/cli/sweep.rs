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
/// FROM and TO take units ("1300 K:1600 K:6"); STEPS equal steps give
/// STEPS + 1 rows.
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// The given to vary: PATH=FROM:TO:STEPS.
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

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    let (path, range) = a
        .vary
        .split_once('=')
        .ok_or_else(|| Failure::bad("--vary: use PATH=FROM:TO:STEPS"))?;
    let path = path.trim();
    let q = engine
        .given_address(path)
        .map_err(|e| Failure::bad(format!("--vary: {e}")))?;
    let parts: Vec<&str> = range.split(':').collect();
    let [from, to, steps] = parts.as_slice() else {
        return Err(Failure::bad("--vary: use PATH=FROM:TO:STEPS"));
    };
    let from = units::parse_stated(from, q, "--vary FROM", a.units.into())
        .map_err(Failure::bad)?
        .si;
    let to = units::parse_stated(to, q, "--vary TO", a.units.into())
        .map_err(Failure::bad)?
        .si;
    let steps: usize = steps
        .trim()
        .parse()
        .map_err(|_| Failure::bad(format!("--vary: STEPS \"{steps}\" is not a whole number")))?;
    if steps > 10_000_000 {
        return Err(Failure::bad("--vary: at most 10 000 000 steps"));
    }
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
        steps + 1,
        |i| sweep::step_value(from, to, steps, i),
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
