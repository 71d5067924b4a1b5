//! `stationwise diff`: givens that changed, derived values that moved.

use super::common::{self, quantity, with_unit};
use super::{Failure, OutFormat, Units};
use crate::book::paths::{FIGURE_KEYS, STATION_KEYS, SUMMARY_KEYS};
use crate::engine::Engine;
use crate::units::UnitSystem;
use std::path::PathBuf;

/// Compare two workbooks: givens (by path) and derived values beyond a tolerance.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The old workbook.
    a: PathBuf,
    /// The new workbook.
    b: PathBuf,
    /// Relative tolerance for derived values.
    #[arg(long, default_value_t = 1e-6)]
    tolerance: f64,
    /// Output format (text or json).
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
    /// Display units for text.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
}

/// One derived value that moved: path, old, new (SI).
pub type Moved = (String, Option<f64>, Option<f64>);

/// Derived values (every station key, process figure and summary figure)
/// of two engines that differ beyond `tol` relative.
pub fn moved(a: &Engine, b: &Engine, tol: f64) -> Vec<Moved> {
    let mut paths = Vec::new();
    for s in a.stations() {
        if b.station_index(&s.name).is_some() {
            for (k, _, _) in STATION_KEYS {
                paths.push(format!("station.{}.{k}", s.name));
            }
        }
    }
    for p in &a.book().processes {
        if b.book().processes.iter().any(|q| q.name == p.name) {
            for (k, _, _) in FIGURE_KEYS {
                paths.push(format!("process.{}.{k}", p.name));
            }
        }
    }
    for (k, _, _) in SUMMARY_KEYS {
        paths.push(format!("summary.{k}"));
    }
    let mut out = Vec::new();
    for p in paths {
        let x = a.value(&p).ok().flatten();
        let y = b.value(&p).ok().flatten();
        let differs = match (x, y) {
            (Some(x), Some(y)) => (x - y).abs() > tol * x.abs().max(y.abs()) + 1e-300,
            (None, None) => false,
            _ => true,
        };
        if differs {
            out.push((p, x, y));
        }
    }
    out
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (ba, ea) = common::open(&a.a)?;
    let (bb, eb) = common::open(&a.b)?;
    let ga = ba.givens();
    let gb = bb.givens();
    let mut givens: Vec<(String, Option<String>, Option<String>)> = Vec::new();
    for (p, _, t, si) in &ga {
        match gb.iter().find(|(q, ..)| q == p) {
            Some((_, _, t2, si2)) if t2 != t || si2 != si => {
                givens.push((p.clone(), Some(t.clone()), Some(t2.clone())))
            }
            Some(_) => {}
            None => givens.push((p.clone(), Some(t.clone()), None)),
        }
    }
    for (p, _, t, _) in &gb {
        if !ga.iter().any(|(q, ..)| q == p) {
            givens.push((p.clone(), None, Some(t.clone())));
        }
    }
    let mut structure = Vec::new();
    for s in &ba.stations {
        if bb.station(&s.name).is_none() {
            structure.push(format!("station {} removed", s.name));
        }
    }
    for s in &bb.stations {
        if ba.station(&s.name).is_none() {
            structure.push(format!("station {} added", s.name));
        }
    }
    let moved = moved(&ea, &eb, a.tolerance);
    let system: UnitSystem = a.units.into();
    if a.format == OutFormat::Json {
        let v = serde_json::json!({
            "givens": givens.iter().map(|(p, x, y)| serde_json::json!({"path": p, "old": x, "new": y})).collect::<Vec<_>>(),
            "structure": structure,
            "derived": moved.iter().map(|(p, x, y)| serde_json::json!({"path": p, "old": x, "new": y})).collect::<Vec<_>>(),
        });
        println!(
            "{}",
            serde_json::to_string_pretty(&v).map_err(|e| Failure::bad(e.to_string()))?
        );
    } else {
        let show = |t: &Option<String>| t.clone().unwrap_or_else(|| "(none)".into());
        if givens.is_empty() && structure.is_empty() && moved.is_empty() {
            println!("no differences");
        }
        if !givens.is_empty() {
            println!("givens");
            for (p, x, y) in &givens {
                println!("  {p}: {} -> {}", show(x), show(y));
            }
        }
        if !structure.is_empty() {
            println!("structure");
            for s in &structure {
                println!("  {s}");
            }
        }
        if !moved.is_empty() {
            println!(
                "derived values that moved (beyond {} relative)",
                a.tolerance
            );
            for (p, x, y) in &moved {
                let q = quantity(p);
                let f = |v: &Option<f64>| {
                    v.map_or("(not computed)".to_string(), |v| with_unit(v, q, system))
                };
                let rel = match (x, y) {
                    (Some(x), Some(y)) if *x != 0.0 => {
                        format!(" ({:+.4} %)", (y - x) / x.abs() * 100.0)
                    }
                    _ => String::new(),
                };
                println!("  {p}: {} -> {}{rel}", f(x), f(y));
            }
        }
    }
    Ok(
        if givens.is_empty() && structure.is_empty() && moved.is_empty() {
            0
        } else {
            2
        },
    )
}
