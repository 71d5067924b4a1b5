//! `stationwise reduce` and `stationwise uncertainty`: scans through a workbook.

use super::common::{self, with_unit};
use super::{Failure, Units};
use crate::reduce::{self, Options, Plan, ScanResult};
use std::io::{IsTerminal, Write};
use std::path::PathBuf;

/// Reduce every scan of a recorded file; one output row per scan (SI values,
/// keys are the reported paths), a problems column, and with --uncertainty
/// the 95 % expanded uncertainty and the top contributor of each value.
/// A bad cell is a problem of its scan only; exit 2 if any scan had one.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The workbook (with a channel map).
    file: PathBuf,
    /// The scan file: CSV, or tab-separated, with a header row.
    #[arg(long)]
    scans: PathBuf,
    /// Values to report (comma-separated paths); default: every component
    /// and summary figure.
    #[arg(long)]
    report: Option<String>,
    /// Write here instead of standard output.
    #[arg(long)]
    out: Option<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = ScanFormat::Csv)]
    format: ScanFormat,
    /// Add uncertainty columns (ASME PTC 19.1 approach, 95 %).
    #[arg(long)]
    uncertainty: bool,
    /// Monte Carlo samples per scan to cross-check the uncertainty.
    #[arg(long, default_value_t = 0)]
    monte_carlo: usize,
}

/// What `reduce` writes: rows for a program, never an aligned page (a
/// million scans do not make one).
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub(super) enum ScanFormat {
    /// Comma-separated values, SI, the unit in each header ("station.4.tt [K]").
    Csv,
    /// JSON object with `rows`, full-precision SI.
    Json,
}

fn report_list(text: &Option<String>, engine: &crate::engine::Engine) -> Vec<String> {
    match text {
        Some(t) => t
            .split(',')
            .map(|s| s.trim().to_string())
            .filter(|s| !s.is_empty())
            .collect(),
        None => reduce::default_report(engine),
    }
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    let report = report_list(&a.report, &engine);
    if a.monte_carlo > MAX_MC {
        return Err(Failure::bad(format!(
            "--monte-carlo: at most {MAX_MC} samples per scan"
        )));
    }
    let mut reader = reduce::open_scans(&a.scans)
        .map_err(|e| Failure::bad(format!("{}: {e}", a.scans.display())))?;
    // Check the channel map against the header and the report paths before
    // anything is written, so a failed run leaves no half output.
    {
        let header: Vec<String> = reader.header().to_vec();
        Plan::new(engine.book(), &header).map_err(Failure::bad)?;
        for r in &report {
            engine
                .value(r)
                .map_err(|e| Failure::bad(format!("--report: {e}")))?;
        }
    }
    let opts = Options {
        uncertainty: a.uncertainty,
        monte_carlo: a.monte_carlo,
        batch: 4096,
    };
    // The output never lands on an input (same file by device and inode,
    // whatever its name) and goes through the atomic writer: a failed run
    // leaves nothing behind.
    let mut file = match &a.out {
        Some(p) => {
            crate::format::atomic::refuse_inputs(p, &[&a.file, &a.scans]).map_err(Failure::bad)?;
            Some(std::io::BufWriter::new(
                crate::format::AtomicFile::create(p, Default::default()).map_err(Failure::bad)?,
            ))
        }
        None => None,
    };
    let mut stdout = std::io::BufWriter::new(std::io::stdout().lock());
    let out: &mut dyn Write = match &mut file {
        Some(f) => f,
        None => &mut stdout,
    };
    let len = std::fs::metadata(&a.scans).map(|m| m.len()).unwrap_or(0);
    let bar = if std::io::stderr().is_terminal() && len > 1 << 20 {
        let b = indicatif::ProgressBar::new(len);
        b.set_style(
            indicatif::ProgressStyle::with_template(
                "reducing {bar:40} {bytes}/{total_bytes} {eta}",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        Some(b)
    } else {
        None
    };
    // The CSV header names each value's SI unit, as every command's CSV does.
    let with_si = |key: String, path: &str| {
        let q = crate::engine::address::quantity(&engine, path)
            .unwrap_or(crate::units::Quantity::Ratio);
        match q {
            crate::units::Quantity::Ratio | crate::units::Quantity::Mach => key,
            _ => format!("{key} [{}]", q.si_symbol()),
        }
    };
    let mut header = vec!["row".to_string()];
    header.extend(report.iter().map(|r| with_si(r.clone(), r)));
    if a.uncertainty {
        for r in &report {
            header.push(with_si(format!("{r}.u95"), r));
            header.push(format!("{r}.top"));
        }
    }
    if a.monte_carlo > 0 {
        for r in &report {
            header.push(with_si(format!("{r}.mc_u95"), r));
        }
    }
    header.push("problems".into());
    header.push("flags".into());
    let mut bad_scans = 0u64;
    let mut flagged_scans = 0u64;
    let digits = crate::report::precision();
    let cell = |v: Option<f64>| v.map_or(String::new(), |x| crate::report::sig(x, digits));
    let n = report.len();
    // Rows are formatted on the worker threads; the sink only writes.
    let csv_row = |s: &ScanResult| -> ((bool, bool), Vec<String>) {
        let mut rec = Vec::with_capacity(2 + 3 * n);
        rec.push(s.row.to_string());
        rec.extend(s.values.iter().map(|v| cell(*v)));
        if opts.uncertainty {
            for k in 0..n {
                let u = s.uncertainty.get(k).and_then(|u| u.as_ref());
                rec.push(cell(u.map(|u| u.u95)));
                rec.push(u.map_or(String::new(), |u| u.top()));
            }
        }
        if opts.monte_carlo > 0 {
            for k in 0..n {
                rec.push(cell(s.monte_carlo.get(k).copied().flatten()));
            }
        }
        rec.push(s.problems.join("; "));
        rec.push(s.flags.join("; "));
        ((!s.problems.is_empty(), !s.flags.is_empty()), rec)
    };
    let json_row = |s: &ScanResult| -> ((bool, bool), String) {
        let mut m = serde_json::Map::new();
        m.insert("row".into(), s.row.into());
        for (k, v) in report.iter().zip(&s.values) {
            m.insert(k.clone(), crate::report::cell_json(&(*v).into()));
        }
        for (k, u) in report.iter().zip(&s.uncertainty) {
            m.insert(
                format!("{k}.u95"),
                crate::report::cell_json(&u.as_ref().map(|u| u.u95).into()),
            );
            m.insert(
                format!("{k}.top"),
                u.as_ref()
                    .map_or(serde_json::Value::Null, |u| u.top().into()),
            );
        }
        for (k, u) in report.iter().zip(&s.monte_carlo) {
            m.insert(
                format!("{k}.mc_u95"),
                crate::report::cell_json(&(*u).into()),
            );
        }
        m.insert("problems".into(), s.problems.join("; ").into());
        m.insert("flags".into(), s.flags.join("; ").into());
        (
            (!s.problems.is_empty(), !s.flags.is_empty()),
            serde_json::Value::Object(m).to_string(),
        )
    };
    let progress = |b| {
        if let Some(bar) = &bar {
            bar.set_position(b)
        }
    };
    let result = match a.format {
        ScanFormat::Json => {
            let w = out;
            let mut first = true;
            let io = |e: std::io::Error| Failure::bad(format!("cannot write the output: {e}"));
            write!(w, "{{\"rows\": [").map_err(io)?;
            let r = reduce::reduce_with(
                &engine,
                &mut reader,
                &report,
                &opts,
                json_row,
                |((bad, flagged), text)| {
                    bad_scans += u64::from(bad);
                    flagged_scans += u64::from(flagged);
                    let sep = if first { "\n" } else { ",\n" };
                    first = false;
                    write!(w, "{sep}{text}")
                },
                progress,
            );
            writeln!(w, "\n]}}").map_err(io)?;
            w.flush().map_err(io)?;
            r
        }
        ScanFormat::Csv => {
            let mut w = csv::Writer::from_writer(out);
            w.write_record(&header)
                .map_err(|e| Failure::bad(e.to_string()))?;
            let r = reduce::reduce_with(
                &engine,
                &mut reader,
                &report,
                &opts,
                csv_row,
                |((bad, flagged), rec)| {
                    bad_scans += u64::from(bad);
                    flagged_scans += u64::from(flagged);
                    w.write_record(&rec).map_err(std::io::Error::other)
                },
                progress,
            );
            w.flush()
                .map_err(|e| Failure::bad(format!("cannot write the output: {e}")))?;
            r
        }
    };
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let (_, rows) = result.map_err(Failure::bad)?;
    if let Some(f) = file {
        f.into_inner()
            .map_err(|e| Failure::bad(format!("cannot write the output: {}", e.error())))?
            .commit()
            .map_err(Failure::bad)?;
    }
    if rows == 0 {
        eprintln!(
            "stationwise: {}: no scans after the header",
            a.scans.display()
        );
    }
    if flagged_scans > 0 {
        eprintln!(
            "stationwise: {flagged_scans} of {rows} scans had readings left out (see the flags column)"
        );
    }
    if bad_scans > 0 {
        eprintln!(
            "stationwise: {bad_scans} of {rows} scans had problems (see the problems column)"
        );
        return Ok(2);
    }
    Ok(0)
}

/// Uncertainty of the workbook's own derived values from the channel map's
/// uncertainties, at the givens as they are in the file.
#[derive(Debug, clap::Args)]
pub(super) struct UncArgs {
    /// The workbook (with a channel map carrying uncertainties).
    file: PathBuf,
    /// Values to report (comma-separated paths); default: every component and summary figure.
    #[arg(long)]
    report: Option<String>,
    /// Monte Carlo samples to cross-check the linearised result.
    #[arg(long, default_value_t = 0)]
    monte_carlo: usize,
    /// How many contributors to list per value.
    #[arg(long, default_value_t = 3)]
    contributors: usize,
    /// Display units.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
}

/// Largest Monte Carlo sample count accepted.
const MAX_MC: usize = 1_000_000;

pub(super) fn uncertainty(a: UncArgs) -> Result<u8, Failure> {
    if a.monte_carlo != 0 && !(100..=MAX_MC).contains(&a.monte_carlo) {
        return Err(Failure::bad(format!(
            "--monte-carlo: between 100 and {MAX_MC} samples (a spread needs many)"
        )));
    }
    let (book, engine) = common::open(&a.file)?;
    let report = report_list(&a.report, &engine);
    for r in &report {
        engine.value(r).map_err(Failure::bad)?;
    }
    let plan = Plan::without_scans(&book).map_err(Failure::bad)?;
    let mut eng = engine.clone();
    let inputs = plan.nominal(&engine);
    let lin = reduce::linear(&mut eng, &plan, &inputs, &report);
    let mc = if a.monte_carlo > 0 {
        reduce::monte_carlo(&mut eng, &plan, &inputs, &report, a.monte_carlo, 1)
    } else {
        Vec::new()
    };
    let system = a.units.into();
    for (k, r) in report.iter().enumerate() {
        let q =
            crate::engine::address::quantity(&engine, r).unwrap_or(crate::units::Quantity::Ratio);
        let v = engine.value(r).ok().flatten();
        let Some(v) = v else {
            println!("{r}: not computed");
            continue;
        };
        match &lin[k] {
            Some(u) => {
                let mut line = format!(
                    "{r} = {} +/- {} (95 %)",
                    with_unit(v, q, system),
                    with_unit(u.u95, q, system)
                );
                if let Some(Some(m)) = mc.get(k) {
                    line.push_str(&format!("; Monte Carlo +/- {}", with_unit(*m, q, system)));
                }
                println!("{line}");
                for (l, s) in u
                    .contributors
                    .iter()
                    .take(a.contributors)
                    .filter(|(_, s)| *s > 0.0)
                {
                    println!("    {:>5.1} %  {l}", s * 100.0);
                }
            }
            None => println!(
                "{r} = {}: uncertainty not computed",
                with_unit(v, q, system)
            ),
        }
    }
    Ok(0)
}
