//! `stationwise diff`: givens that changed, derived values that moved.

use super::common::{self, quantity, shown, unit_label, with_unit};
use super::{Failure, OutFormat, Units};
use crate::book::paths::{FIGURE_KEYS, STATION_KEYS, SUMMARY_KEYS};
use crate::engine::Engine;
use crate::units::UnitSystem;
use std::path::PathBuf;

/// Compare two workbooks for a reviewer.
///
/// Text: a headline of counts, the summary figures that moved, the givens
/// that changed, structural changes, then one line on the other derived
/// values that moved (`--all` lists each). Comments are ignored unless
/// `--comments`. CSV: one row per difference (section, path, old, new,
/// unit, change in %), values in display units. JSON: the same in SI.
/// Exit 0 when nothing differs, 2 when something does.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The old workbook.
    a: PathBuf,
    /// The new workbook.
    b: PathBuf,
    /// Relative change below which a derived value counts as unmoved.
    #[arg(long, alias = "tolerance", default_value_t = 1e-6)]
    threshold: f64,
    /// List every derived value that moved, not only the summary figures.
    #[arg(long)]
    all: bool,
    /// Also report comments added or removed.
    #[arg(long)]
    comments: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
    /// Display units for text and CSV (JSON is SI).
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
    if !(a.threshold.is_finite() && a.threshold >= 0.0) {
        return Err(Failure::bad(format!(
            "--threshold {}: must be a relative change of 0 or more",
            a.threshold
        )));
    }
    let (ba, ea) = common::open(&a.a)?;
    let (bb, eb) = common::open(&a.b)?;
    let ga = ba.givens();
    let gb = bb.givens();
    let mut givens: Vec<(String, Option<String>, Option<String>)> = Vec::new();
    // The same value written another way ("0 m" and "0 ft", "10" and
    // "10.0"): shown, not counted as a changed given.
    let mut respelt: Vec<(String, String, String)> = Vec::new();
    let same = |x: f64, y: f64| x == y || (x - y).abs() <= 1e-12 * x.abs().max(y.abs());
    for (p, _, t, si) in &ga {
        match gb.iter().find(|(q, ..)| q == p) {
            Some((_, _, t2, si2)) if t2 != t && same(*si, *si2) => {
                respelt.push((p.clone(), t.clone(), t2.clone()))
            }
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
    for (what, old, new) in [
        (
            "station",
            ba.stations.iter().map(|s| &s.name).collect::<Vec<_>>(),
            bb.stations.iter().map(|s| &s.name).collect::<Vec<_>>(),
        ),
        (
            "process",
            ba.processes.iter().map(|s| &s.name).collect(),
            bb.processes.iter().map(|s| &s.name).collect(),
        ),
        (
            "shaft",
            ba.shafts.iter().map(|s| &s.name).collect(),
            bb.shafts.iter().map(|s| &s.name).collect(),
        ),
    ] {
        for n in &old {
            if !new.contains(n) {
                structure.push(format!("{what} {n} removed"));
            }
        }
        for n in &new {
            if !old.contains(n) {
                structure.push(format!("{what} {n} added"));
            }
        }
    }
    let mut comments: Vec<(Option<String>, Option<String>)> = Vec::new();
    if a.comments {
        let (ca, cb) = (ba.comments.texts(), bb.comments.texts());
        for c in &ca {
            if !cb.contains(c) {
                comments.push((Some(c.clone()), None));
            }
        }
        for c in &cb {
            if !ca.contains(c) {
                comments.push((None, Some(c.clone())));
            }
        }
    }
    let moved = moved(&ea, &eb, a.threshold);
    let (summary, other): (Vec<&Moved>, Vec<&Moved>) =
        moved.iter().partition(|(p, ..)| p.starts_with("summary."));
    let system: UnitSystem = a.units.into();
    let differs = !givens.is_empty()
        || !structure.is_empty()
        || !moved.is_empty()
        || !comments.is_empty()
        || !respelt.is_empty();
    let rel = |x: &Option<f64>, y: &Option<f64>| match (x, y) {
        (Some(x), Some(y)) if *x != 0.0 => Some((y - x) / x.abs() * 100.0),
        _ => None,
    };
    let listed: Vec<&Moved> = if a.all {
        moved.iter().collect()
    } else {
        summary.clone()
    };
    match a.format {
        OutFormat::Json => {
            let item = |(p, x, y): &Moved| serde_json::json!({"path": p, "old": x, "new": y, "change_percent": rel(x, y)});
            let v = serde_json::json!({
                "summary": {
                    "givens_changed": givens.len(),
                    "givens_respelt": respelt.len(),
                    "structural_changes": structure.len(),
                    "derived_moved": moved.len(),
                    "threshold": a.threshold,
                    "comments_changed": comments.len(),
                },
                "summary_figures": summary.iter().map(|m| item(m)).collect::<Vec<_>>(),
                "givens": givens.iter().map(|(p, x, y)| serde_json::json!({"path": p, "old": x, "new": y})).collect::<Vec<_>>(),
                "respelt": respelt.iter().map(|(p, x, y)| serde_json::json!({"path": p, "old": x, "new": y})).collect::<Vec<_>>(),
                "structure": structure,
                "derived": other.iter().filter(|_| a.all).map(|m| item(m)).collect::<Vec<_>>(),
                "comments": comments.iter().map(|(x, y)| serde_json::json!({"old": x, "new": y})).collect::<Vec<_>>(),
            });
            println!(
                "{}",
                serde_json::to_string_pretty(&v).map_err(|e| Failure::bad(e.to_string()))?
            );
        }
        OutFormat::Csv => {
            let mut w = csv::Writer::from_writer(std::io::stdout().lock());
            let io = |e: csv::Error| Failure::bad(format!("cannot write the output: {e}"));
            w.write_record(["section", "path", "old", "new", "unit", "change [%]"])
                .map_err(io)?;
            let num = |v: Option<f64>, q| {
                v.map_or(String::new(), |v| {
                    crate::report::sig(shown(v, q, system), crate::report::precision())
                })
            };
            for (p, x, y) in &givens {
                let (x, y) = (x.clone().unwrap_or_default(), y.clone().unwrap_or_default());
                w.write_record(["given", p, &x, &y, "", ""]).map_err(io)?;
            }
            for (p, x, y) in &respelt {
                w.write_record(["respelt", p, x, y, "", ""]).map_err(io)?;
            }
            for s in &structure {
                w.write_record(["structure", s, "", "", "", ""])
                    .map_err(io)?;
            }
            for m in &listed {
                let (p, x, y) = m;
                let q = quantity(p);
                let section = if p.starts_with("summary.") {
                    "summary"
                } else {
                    "derived"
                };
                let r = rel(x, y).map_or(String::new(), |r| {
                    crate::report::sig(r, crate::report::precision())
                });
                w.write_record([
                    section,
                    p,
                    &num(*x, q),
                    &num(*y, q),
                    &unit_label(q, system),
                    &r,
                ])
                .map_err(io)?;
            }
            for (x, y) in &comments {
                let (x, y) = (x.clone().unwrap_or_default(), y.clone().unwrap_or_default());
                w.write_record(["comment", "", &x, &y, "", ""])
                    .map_err(io)?;
            }
            w.flush()
                .map_err(|e| Failure::bad(format!("cannot write the output: {e}")))?;
        }
        OutFormat::Text => {
            let show = |t: &Option<String>| t.clone().unwrap_or_else(|| "(none)".into());
            let plural = |n: usize, one: &str, many: &str| {
                format!("{n} {}", if n == 1 { one } else { many })
            };
            if !differs {
                println!(
                    "no differences (derived values within {:e} relative)",
                    a.threshold
                );
                return Ok(0);
            }
            let mut head = vec![
                plural(givens.len(), "given changed", "givens changed"),
                plural(moved.len(), "derived value moved", "derived values moved")
                    + &format!(" (beyond {:e} relative)", a.threshold),
            ];
            if !respelt.is_empty() {
                head.push(plural(
                    respelt.len(),
                    "given written differently (same value)",
                    "givens written differently (same value)",
                ));
            }
            if !structure.is_empty() {
                head.push(plural(
                    structure.len(),
                    "structural change",
                    "structural changes",
                ));
            }
            if a.comments {
                head.push(plural(
                    comments.len(),
                    "comment changed",
                    "comments changed",
                ));
            }
            println!("{}", head.join(", "));
            let line = |(p, x, y): &Moved| {
                let q = quantity(p);
                let f = |v: &Option<f64>| {
                    v.map_or("(not computed)".to_string(), |v| with_unit(v, q, system))
                };
                let r = rel(x, y).map_or(String::new(), |r| format!("  ({r:+.4} %)"));
                format!("  {p}: {} -> {}{r}", f(x), f(y))
            };
            if !summary.is_empty() {
                println!("summary figures");
                for m in &summary {
                    println!("{}", line(m));
                }
            }
            if !givens.is_empty() {
                println!("givens");
                for (p, x, y) in &givens {
                    println!("  {p}: {} -> {}", show(x), show(y));
                }
            }
            if !respelt.is_empty() {
                println!("written differently, same value");
                for (p, x, y) in &respelt {
                    println!("  {p}: {x} -> {y}");
                }
            }
            if !structure.is_empty() {
                println!("structure");
                for s in &structure {
                    println!("  {s}");
                }
            }
            if !comments.is_empty() {
                println!("comments");
                for (x, y) in &comments {
                    match (x, y) {
                        (Some(x), _) => println!("  removed: {x}"),
                        (_, Some(y)) => println!("  added: {y}"),
                        _ => {}
                    }
                }
            }
            if !other.is_empty() {
                if a.all {
                    println!("other derived values");
                    for m in &other {
                        println!("{}", line(m));
                    }
                } else {
                    let largest = other
                        .iter()
                        // Entropy and absolute enthalpy have arbitrary zeros:
                        // a relative change of them means nothing.
                        .filter(|m| !(m.0.ends_with(".s") || m.0.ends_with(".ht")))
                        // A figure that echoes a changed given is not news.
                        .filter(|m| !givens.iter().any(|g| g.0 == m.0))
                        .filter_map(|m| rel(&m.1, &m.2).map(|r| (r, &m.0)))
                        .max_by(|x, y| x.0.abs().total_cmp(&y.0.abs()));
                    let places: std::collections::BTreeSet<&str> = other
                        .iter()
                        .map(|(p, ..)| p.rsplit_once('.').map_or(p.as_str(), |x| x.0))
                        .collect();
                    let big =
                        largest.map_or(String::new(), |(r, p)| format!("; largest {p} {r:+.4} %"));
                    println!(
                        "{} at {}{big} (--all lists them)",
                        plural(
                            other.len(),
                            "other derived value moved",
                            "other derived values moved"
                        ),
                        plural(places.len(), "place", "places"),
                    );
                }
            }
        }
    }
    Ok(if differs { 2 } else { 0 })
}
