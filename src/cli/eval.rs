//! `stationwise eval`: every station, component figures and the summary.

use super::common::{self, figure_meta, stations_table, with_unit};
use super::{Failure, OutFormat, Units};
use crate::engine::{Engine, StationStatus};
use crate::report::{self, Cell, Column, Printer, Table, cell_json};
use crate::units::UnitSystem;
use std::io::Write;
use std::path::PathBuf;

/// Exit 0 when everything computes, 2 when a process has a problem, 1 when
/// the file cannot be read.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// Output format (JSON is always SI; its keys name the units).
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
    /// Display units for text and CSV.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
    /// Store the derived results in the file (sets `keep_results`), so a
    /// version-control diff shows result changes and `check` can compare.
    #[arg(long)]
    store_results: bool,
}

/// JSON key of a summary figure (SI unit in the name).
pub fn summary_json_key(k: &str) -> String {
    match k {
        "thrust_gross" => "thrust_gross_n",
        "thrust_net" => "thrust_net_n",
        "ram_drag" => "ram_drag_n",
        "fuel" => "fuel_kg_s",
        "tsfc" => "tsfc_kg_per_n_s",
        "specific_thrust" => "specific_thrust_n_s_per_kg",
        "air_flow" => "air_flow_kg_s",
        other => other,
    }
    .to_string()
}

/// The whole evaluation as JSON.
pub fn to_json(engine: &Engine) -> serde_json::Value {
    use crate::book::paths::{STATION_KEYS, SUMMARY_KEYS};
    let mut stations = Vec::new();
    for (i, s) in engine.stations().iter().enumerate() {
        let mut m = serde_json::Map::new();
        m.insert("name".into(), s.name.clone().into());
        let v = match engine.station_status(i) {
            StationStatus::Ok(v) => Some(v),
            _ => None,
        };
        for (k, _, _) in STATION_KEYS {
            let x = v.and_then(|v| engine.station_key(v, k));
            m.insert(common::station_json_key(k), cell_json(&Cell::from(x)));
        }
        stations.push(serde_json::Value::Object(m));
    }
    let mut summary = serde_json::Map::new();
    for (k, _, _) in SUMMARY_KEYS {
        summary.insert(
            summary_json_key(k),
            cell_json(&Cell::from(engine.summary().get(k))),
        );
    }
    let mut processes = Vec::new();
    for p in &engine.book().processes {
        let mut figs = serde_json::Map::new();
        if let Some(r) = engine.process(&p.name) {
            for (k, v) in &r.figures {
                figs.insert((*k).to_string(), cell_json(&Cell::from(*v)));
            }
        }
        processes.push(serde_json::json!({
            "name": p.name,
            "kind": crate::kinds::of(&p.kind).name(),
            "figures": figs,
            "note": engine.process(&p.name).and_then(|r| r.note),
        }));
    }
    // Each goal: what it varies and holds, the target, the value found,
    // what was reached, the residual and the evaluations it took.
    let goals: Vec<serde_json::Value> = engine
        .book()
        .goals
        .iter()
        .zip(engine.goal_outcomes())
        .map(|(g, o)| {
            serde_json::json!({
                "vary": g.vary,
                "target": g.target,
                "target_value": g.value.si(),
                "off": g.off,
                "value": o.value,
                "reached": o.reached,
                "residual": o.residual,
                "iterations": o.iterations,
                "met": !g.off && o.problem.is_none() && o.value.is_some(),
                "problem": o.problem,
            })
        })
        .collect();
    let problems: Vec<serde_json::Value> = engine
        .problems()
        .iter()
        .map(|p| serde_json::json!({"where": p.place, "message": p.message}))
        .collect();
    serde_json::json!({
        "title": engine.book().title,
        "stations": stations,
        "processes": processes,
        "summary": summary,
        "goals": goals,
        "problems": problems,
    })
}

/// Text report: header, stations, component figures, shafts, summary, problems.
pub fn text(engine: &Engine, system: UnitSystem, out: &mut dyn Write) -> std::io::Result<()> {
    let b = engine.book();
    writeln!(out, "{}", b.title)?;
    match (engine.model(), engine.ambient()) {
        (Ok(m), Ok(a)) => {
            let gas = match m {
                crate::gas::GasModel::Thermal => {
                    "thermally perfect (NASA Glenn polynomials)".to_string()
                }
                crate::gas::GasModel::Perfect { cold, hot } => format!(
                    "calorically perfect, gamma {}{}",
                    cold.gamma_value(),
                    hot.map_or(String::new(), |h| format!(
                        ", hot section {}",
                        h.gamma_value()
                    ))
                ),
            };
            writeln!(
                out,
                "gas: {gas}; ambient {} {}, flight Mach {}",
                with_unit(a.flow.t, crate::units::Quantity::Temperature, system),
                with_unit(a.flow.p, crate::units::Quantity::Pressure, system),
                report::sig(a.flow.mach, 4)
            )?;
        }
        (Err(e), _) | (_, Err(e)) => writeln!(out, "setup problem: {e}")?,
    }
    writeln!(out)?;
    report::TextPrinter.print(&stations_table(engine, system), out)?;
    writeln!(out)?;
    writeln!(out, "components")?;
    for p in &b.processes {
        if let Some(r) = engine.process(&p.name) {
            if r.figures.is_empty() {
                continue;
            }
            let figs: Vec<String> = r
                .figures
                .iter()
                .map(|(k, v)| {
                    let (label, q) = figure_meta(k);
                    format!("{label} {}", with_unit(*v, q, system))
                })
                .collect();
            writeln!(out, "  {:<14} {}", p.name, figs.join(", "))?;
        }
    }
    for s in &b.shafts {
        if let Some(sh) = engine.shaft(&s.name) {
            let pw = |v: f64| with_unit(v, crate::units::Quantity::Power, system);
            if sh.turbine_power == 0.0 {
                writeln!(
                    out,
                    "  shaft {:<8} compressors {}, offtake {} (no turbine on it: driven from outside the workbook)",
                    s.name,
                    pw(sh.compressor_power),
                    pw(sh.offtake)
                )?;
            } else {
                writeln!(
                    out,
                    "  shaft {:<8} compressors {}, turbines {}, offtake {}, imbalance {}",
                    s.name,
                    pw(sh.compressor_power),
                    pw(sh.turbine_power),
                    pw(sh.offtake),
                    pw(sh.imbalance)
                )?;
            }
        }
    }
    for (i, g) in engine.goal_outcomes().iter().enumerate() {
        if b.goals.get(i).is_some_and(|g| g.off) {
            writeln!(
                out,
                "  goal {}: switched off (kept in the file, not solved)",
                i + 1
            )?;
            continue;
        }
        if let Some(v) = g.value {
            let goal = &b.goals[i];
            // What it reached and how far off, never only the target text.
            let q = crate::book::paths::quantity_of_derived(&goal.target)
                .or_else(|| b.given(&goal.target).map(|(q, _)| q))
                .unwrap_or(crate::units::Quantity::Ratio);
            writeln!(
                out,
                "  goal {}: {} = {} gives {} = {} (target {}, residual {}, {} evaluations){}",
                i + 1,
                goal.vary,
                report::sig(v, 7),
                goal.target,
                g.reached
                    .map_or("not computed".to_string(), |r| with_unit(r, q, system)),
                goal.value.text(),
                g.residual.map_or("-".to_string(), |r| format!("{r:+.2e}")),
                g.iterations,
                if g.problem.is_some() { ": NOT MET" } else { "" }
            )?;
        }
    }
    let summary = crate::present::summary_lines(engine);
    if !summary.is_empty() {
        writeln!(out)?;
        writeln!(out, "summary")?;
        let w = summary
            .iter()
            .map(|l| l.label.chars().count())
            .max()
            .unwrap_or(0)
            .clamp(24, 44);
        for l in summary {
            writeln!(
                out,
                "  {:<w$} {}",
                l.label,
                with_unit(l.value, l.quantity, system)
            )?;
        }
    }
    let notes = engine.notes();
    if !notes.is_empty() {
        writeln!(out)?;
        writeln!(out, "notes")?;
        for p in notes {
            writeln!(out, "  {}: {}", p.place, p.message)?;
        }
    }
    let problems = engine.problems();
    if !problems.is_empty() {
        writeln!(out)?;
        writeln!(out, "problems")?;
        for p in problems {
            writeln!(out, "  {}: {}", p.place, p.message)?;
        }
    }
    Ok(())
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (mut book, engine) = common::open(&a.file)?;
    if a.store_results {
        book.keep_results = true;
        crate::format::refresh_results(&mut book, &engine);
        crate::format::save(&a.file, &book).map_err(Failure::bad)?;
    }
    let system: UnitSystem = a.units.into();
    let mut out = std::io::stdout().lock();
    let io = |e: std::io::Error| Failure::bad(format!("cannot write the output: {e}"));
    match a.format {
        OutFormat::Json => {
            serde_json::to_writer_pretty(&mut out, &to_json(&engine))
                .map_err(|e| Failure::bad(e.to_string()))?;
            writeln!(out).map_err(io)?;
        }
        OutFormat::Csv => {
            // One table a CSV reader can take whole: every derived value
            // (stations, component figures, shafts, summary) as a row, in
            // display units.
            let mut t = Table::new(vec![
                Column::new("path", "path", ""),
                Column::new("value", "value", ""),
                Column::new("unit", "unit", ""),
                Column::new("what", "what", ""),
            ]);
            for ad in engine.addresses().into_iter().filter(|ad| !ad.given) {
                t.rows.push(vec![
                    Cell::from(ad.path),
                    Cell::from(ad.value.map(|v| common::shown(v, ad.quantity, system))),
                    Cell::from(common::unit_label(ad.quantity, system)),
                    Cell::from(ad.label),
                ]);
            }
            report::CsvPrinter.print(&t, &mut out).map_err(io)?;
        }
        OutFormat::Text => text(&engine, system, &mut out).map_err(io)?,
    }
    let problems = engine.problems();
    if !problems.is_empty() && a.format != OutFormat::Text {
        for p in &problems {
            eprintln!("problem: {}: {}", p.place, p.message);
        }
    }
    Ok(if problems.is_empty() { 0 } else { 2 })
}
