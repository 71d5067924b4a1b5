//! Presentation shared by the front ends (command line and terminal):
//! values with display units, the stations table, component figures,
//! summary entries and explanation text. No terminal or argument code here.

use crate::book::paths::{FIGURE_KEYS, STATION_KEYS, SUMMARY_KEYS};
use crate::engine::{Engine, StationStatus};
use crate::report::{Cell, Column, Table};
use crate::units::{self, Quantity, UnitSystem};

/// Join errors with "; ".
pub fn join<E: std::fmt::Display>(v: &[E]) -> String {
    v.iter()
        .map(|e| e.to_string())
        .collect::<Vec<_>>()
        .join("; ")
}

/// Display unit of a quantity in a system (ratios and Mach get none).
pub fn unit_of(q: Quantity, system: UnitSystem) -> &'static units::Unit {
    units::display_unit(q, system)
}

/// Value in display units.
pub fn shown(si: f64, q: Quantity, system: UnitSystem) -> f64 {
    units::from_si(si, unit_of(q, system))
}

/// Label of a unit for a header ("" for dimensionless).
pub fn unit_label(q: Quantity, system: UnitSystem) -> String {
    match q {
        Quantity::Ratio | Quantity::Mach => String::new(),
        _ => unit_of(q, system).symbol.to_string(),
    }
}

/// Quantity of a derived-value path (station, process figure, summary, shaft).
pub fn quantity(path: &str) -> Quantity {
    crate::book::paths::quantity_of_derived(path).unwrap_or(Quantity::Ratio)
}

/// The JSON key of a station column: key plus SI unit.
pub fn station_json_key(key: &str) -> String {
    match key {
        "tt" => "tt_k",
        "pt" => "pt_pa",
        "t" => "t_k",
        "p" => "p_pa",
        "v" => "v_m_s",
        "w" => "w_kg_s",
        "area" => "area_m2",
        "rho" => "rho_kg_m3",
        "wc" => "wc_kg_s",
        "a" => "a_m_s",
        "q" => "q_pa",
        "ht" => "ht_j_kg",
        "s" => "s_j_kg_k",
        other => other,
    }
    .to_string()
}

/// Columns shown for stations in text and CSV.
pub const STATION_COLUMNS: [&str; 12] = [
    "tt", "pt", "t", "p", "mach", "v", "w", "area", "far", "wc", "rho", "s",
];

/// The stations table in display units.
pub fn stations_table(engine: &Engine, system: UnitSystem) -> Table {
    let mut cols = vec![
        Column::new("station", "station", ""),
        Column::new("process", "via", ""),
    ];
    for k in STATION_COLUMNS {
        let (_, label, q) = STATION_KEYS
            .iter()
            .find(|(kk, _, _)| *kk == k)
            .copied()
            .unwrap_or((k, k, Quantity::Ratio));
        cols.push(Column::new(k, label, &unit_label(q, system)));
    }
    let mut t = Table::new(cols);
    for (i, s) in engine.stations().iter().enumerate() {
        let via = engine.book().processes[engine.producer_of(i)].name.clone();
        let mut row = vec![Cell::from(s.name.as_str()), Cell::from(via)];
        match engine.station_status(i) {
            StationStatus::Ok(v) => {
                for k in STATION_COLUMNS {
                    let q = STATION_KEYS
                        .iter()
                        .find(|(kk, _, _)| *kk == k)
                        .map_or(Quantity::Ratio, |x| x.2);
                    row.push(Cell::from(
                        engine.station_key(v, k).map(|x| shown(x, q, system)),
                    ));
                }
            }
            StationStatus::Withheld(why) => {
                row.push(Cell::Text(format!("(withheld: {why})")));
                row.extend(STATION_COLUMNS.iter().skip(1).map(|_| Cell::Empty));
            }
            StationStatus::Failed(p) | StationStatus::Blocked(p) => {
                row.push(Cell::Text(format!("(problem in {p})")));
                row.extend(STATION_COLUMNS.iter().skip(1).map(|_| Cell::Empty));
            }
        }
        t.rows.push(row);
    }
    t
}

/// Format a value with its display unit ("17.611 kN", "19.510 kN",
/// "0.99000"): the quantity's display figures (or `--precision`), trailing
/// zeros kept, as in the tables, so every printed value states its figures
/// the same way.
pub fn with_unit(si: f64, q: Quantity, system: UnitSystem) -> String {
    let u = unit_of(q, system);
    let digits = crate::report::prose_digits(units::display_digits(q, system));
    let n = crate::report::sig(units::shown_in(si, u), digits);
    if u.symbol.is_empty() {
        n
    } else {
        format!("{n} {}", u.symbol)
    }
}

/// Label and quantity of a process figure key.
pub fn figure_meta(key: &str) -> (&'static str, Quantity) {
    FIGURE_KEYS
        .iter()
        .find(|(k, _, _)| *k == key)
        .map_or(("?", Quantity::Ratio), |(_, l, q)| (*l, *q))
}

/// One line of a summary: label, SI value, quantity, and the path that
/// reads it (a summary figure, or a component's figure on a rig sheet).
#[derive(Debug, Clone, PartialEq)]
pub struct SummaryLine {
    /// Label.
    pub label: String,
    /// SI value.
    pub value: f64,
    /// Quantity.
    pub quantity: Quantity,
    /// Path of the value (`summary.thrust_net`, `process.compressor.pressure_ratio`).
    pub path: String,
}

/// The figures a component contributes to a rig sheet's summary.
fn rig_figures(kind: &crate::book::Kind) -> &'static [&'static str] {
    use crate::book::Kind;
    match kind {
        Kind::Compressor(_) => &[
            "pressure_ratio",
            "eta_isentropic",
            "eta_polytropic",
            "wc_in",
            "nc",
            "power",
        ],
        Kind::Turbine(_) => &[
            "pressure_ratio",
            "eta_isentropic",
            "eta_polytropic",
            "wc_in",
            "power",
        ],
        Kind::Combustor(_) => &[
            "efficiency",
            "equivalence_ratio",
            "far_added",
            "loss",
            "exit_tt",
        ],
        Kind::Heating(_) => &["heat", "mach_out"],
        _ => &[],
    }
}

/// The summary as the sheet calls for it: propulsion figures for an
/// engine, test-section figures for a tunnel, each component's figures for
/// a rig; air flow (and fuel when burnt) on every sheet.
pub fn summary_lines(engine: &Engine) -> Vec<SummaryLine> {
    let s = engine.summary();
    let mut out: Vec<SummaryLine> = Vec::new();
    if s.sheet == crate::engine::SheetKind::Rig && s.air_flow.is_some() {
        for p in &engine.book().processes {
            let Some(r) = engine.process(&p.name) else {
                continue;
            };
            for k in rig_figures(&p.kind) {
                if let Some(v) = r.figure(k) {
                    let (label, q) = figure_meta(k);
                    out.push(SummaryLine {
                        label: format!("{}: {label}", p.name),
                        value: v,
                        quantity: q,
                        path: format!("process.{}.{k}", p.name),
                    });
                }
            }
        }
    }
    for (k, label, v, q) in summary_entries(engine) {
        out.push(SummaryLine {
            label: label.to_string(),
            value: v,
            quantity: q,
            path: format!("summary.{k}"),
        });
    }
    out
}

/// Summary entries that are defined: key, label, SI value, quantity.
pub fn summary_entries(engine: &Engine) -> Vec<(&'static str, &'static str, f64, Quantity)> {
    SUMMARY_KEYS
        .iter()
        .filter_map(|(k, l, q)| engine.summary().get(k).map(|v| (*k, *l, v, *q)))
        .collect()
}

/// How the summary was obtained, as text lines (the same layout as a
/// station's explanation). On a rig sheet the component figures are named
/// with the station whose explanation derives them.
pub fn summary_explanation(engine: &Engine, system: UnitSystem) -> Vec<String> {
    let s = engine.summary();
    let mut out = vec![format!(
        "summary of this {} sheet",
        match s.sheet {
            crate::engine::SheetKind::Engine => "engine",
            crate::engine::SheetKind::Tunnel => "tunnel",
            crate::engine::SheetKind::Rig => "rig",
        }
    )];
    if engine.withheld().is_some() || s.air_flow.is_none() {
        out.push("  not computed: see the problems".into());
        return out;
    }
    for l in summary_lines(engine) {
        if let Some(rest) = l.path.strip_prefix("process.")
            && let Some((name, _)) = rest.rsplit_once('.')
            && let Some(p) = engine.book().processes.iter().find(|p| p.name == name)
        {
            out.push(format!(
                "  {} = {}",
                l.label,
                with_unit(l.value, l.quantity, system)
            ));
            out.push(format!(
                "      the figure of {} \"{}\": see the explanation of station {}",
                crate::kinds::of(&p.kind).name(),
                p.name,
                p.to
            ));
        }
    }
    for st in engine.explain_summary() {
        step_lines(&st, system, &mut out);
    }
    out
}

/// One explanation step as text: the value, its relation, its inputs.
fn step_lines(s: &crate::engine::explain::Step, system: UnitSystem, out: &mut Vec<String>) {
    out.push(format!(
        "  {} = {}",
        s.what,
        with_unit(s.value, s.quantity, system)
    ));
    out.push(format!("      {}", s.relation));
    if !s.inputs.is_empty() {
        let ins: Vec<String> = s
            .inputs
            .iter()
            .map(|(n, v, q)| format!("{n} = {}", with_unit(*v, *q, system)))
            .collect();
        out.push(format!("      with {}", ins.join(", ")));
    }
}

/// The explanation as text lines.
pub fn explanation(
    engine: &crate::engine::Engine,
    station: &str,
    system: UnitSystem,
) -> Result<Vec<String>, String> {
    let steps = engine.explain(station)?;
    let idx = engine
        .station_index(station)
        .ok_or_else(|| format!("no station named \"{station}\""))?;
    let p = &engine.book().processes[engine.producer_of(idx)];
    let mut out = vec![format!(
        "station {station}: from {} \"{}\"{}",
        crate::kinds::of(&p.kind).name(),
        p.name,
        p.from
            .as_ref()
            .map_or(String::new(), |f| format!(" (upstream station {f})"))
    )];
    for s in steps {
        step_lines(&s, system, &mut out);
    }
    if let Some(n) = engine.process(&p.name).and_then(|r| r.note) {
        out.push(format!("  note: {n}"));
    }
    if let Some(v) = engine.station(station) {
        out.push("  values:".into());
        for (k, label, q) in STATION_KEYS {
            if let Some(x) = engine.station_key(v, k) {
                out.push(format!("    {label:<14} {}", with_unit(x, q, system)));
            }
        }
    }
    Ok(out)
}
