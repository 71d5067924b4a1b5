//! Flow tables: rows of relation values for a list of Mach numbers.
//!
//! A table is asked for a relation, a gas (a calorically perfect gamma, or a
//! thermally perfect mixture at a total temperature) and rows, either Mach
//! numbers or inverse inputs (an area ratio on a branch, or a static-to-total
//! pressure ratio) that are turned into Mach numbers first. The keys of each
//! relation's columns are part of the command-line contract (JSON and CSV).

use crate::flow::FlowState;
use crate::flow::{
    FlowError, fanno, isentropic, rayleigh,
    shock::{self, Strength},
};
use crate::gas::{Gas, Thermo};
use crate::report::{Cell, Column, Table};

/// The relations a table can show.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Relation {
    /// Isentropic flow ratios.
    Isentropic,
    /// Normal shock.
    NormalShock,
    /// Oblique shock at a deflection (rad).
    ObliqueShock(f64),
    /// Rayleigh line.
    Rayleigh,
    /// Fanno line.
    Fanno,
}

/// How the rows are chosen.
#[derive(Debug, Clone, PartialEq)]
pub enum Rows {
    /// The relation's Mach number (M1 for the shocks).
    Mach(Vec<f64>),
    /// Values of any one of the relation's columns, each turned into the
    /// Mach number (or numbers) that gives it.
    Given {
        /// The column key ("p_pt", "a_astar", "pt2_pt1", "beta_weak_deg", ...).
        key: String,
        /// The values, in the column's own terms (a ratio, degrees).
        values: Vec<f64>,
        /// Which root where a value is reached at more than one Mach number.
        branch: Pick,
    },
}

/// Which root of an inverse to print.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Pick {
    /// Not chosen: a value with roots on both sides of Mach 1 is a row problem
    /// that asks for a choice.
    Unstated,
    /// Roots below Mach 1.
    Subsonic,
    /// Roots above Mach 1.
    Supersonic,
    /// Every root, a row each.
    Both,
}

/// A gas for a table: the gas and the total temperature that fixes the
/// thermally perfect isentrope (ignored by a perfect gas).
#[derive(Debug, Clone)]
pub struct TableGas {
    /// The gas.
    pub gas: Gas,
    /// Total temperature, K.
    pub tt: f64,
}

const PT: f64 = 101_325.0;

fn state(g: &TableGas, m: f64) -> Result<FlowState, FlowError> {
    isentropic::from_mach(&g.gas, g.tt, PT, m)
}

/// The column keys and labels of a relation, in order (the first is the
/// row's Mach number).
pub fn columns(rel: Relation) -> &'static [(&'static str, &'static str)] {
    match rel {
        Relation::Isentropic => &[
            ("mach", "M"),
            ("t_tt", "T/Tt"),
            ("p_pt", "p/pt"),
            ("rho_rhot", "rho/rhot"),
            ("a_astar", "A/A*"),
            ("mach_angle_deg", "mu deg"),
            ("prandtl_meyer_deg", "nu deg"),
        ],
        Relation::NormalShock => &[
            ("mach1", "M1"),
            ("mach2", "M2"),
            ("p2_p1", "p2/p1"),
            ("t2_t1", "T2/T1"),
            ("rho2_rho1", "rho2/rho1"),
            ("pt2_pt1", "pt2/pt1"),
        ],
        Relation::ObliqueShock(_) => &[
            ("mach1", "M1"),
            ("deflection_deg", "theta deg"),
            ("beta_weak_deg", "beta weak"),
            ("mach2_weak", "M2 weak"),
            ("p2_p1_weak", "p2/p1 weak"),
            ("beta_strong_deg", "beta strong"),
            ("mach2_strong", "M2 strong"),
            ("p2_p1_strong", "p2/p1 strong"),
        ],
        Relation::Rayleigh => &[
            ("mach", "M"),
            ("tt_ttstar", "Tt/Tt*"),
            ("t_tstar", "T/T*"),
            ("p_pstar", "p/p*"),
            ("pt_ptstar", "pt/pt*"),
        ],
        Relation::Fanno => &[
            ("mach", "M"),
            ("friction_4flstar_d", "4fL*/D"),
            ("t_tstar", "T/T*"),
            ("p_pstar", "p/p*"),
            ("pt_ptstar", "pt/pt*"),
        ],
    }
}

/// The range of the row's Mach number over which a relation is defined.
fn mach_range(rel: Relation) -> (f64, f64) {
    match rel {
        Relation::Isentropic => (0.0, MACH_MAX),
        Relation::NormalShock | Relation::ObliqueShock(_) => (1.0, MACH_MAX),
        Relation::Rayleigh | Relation::Fanno => (1e-6, MACH_MAX),
    }
}

/// Highest Mach number an inverse searches.
pub const MACH_MAX: f64 = 100.0;

/// Sample Mach numbers for an inverse over `[lo, hi]`: dense near the low
/// end and around Mach 1, geometric above, with Mach 1 itself included.
fn samples(lo: f64, hi: f64) -> Vec<f64> {
    let mut v = Vec::with_capacity(800);
    let lo_pos = lo.max(1e-6);
    if lo < 1.0 {
        if lo == 0.0 {
            v.push(0.0);
        }
        // Geometric from lo to 0.05, linear to 1.
        let n = 60;
        let r = (0.05 / lo_pos).ln() / n as f64;
        for i in 0..n {
            v.push(lo_pos * (r * i as f64).exp());
        }
        let n = 300;
        for i in 0..n {
            v.push(0.05 + (1.0 - 0.05) * i as f64 / n as f64);
        }
    }
    let n = 400;
    let r = (hi / 1.0f64).ln() / n as f64;
    for i in 0..=n {
        v.push((r * i as f64).exp());
    }
    v
}

/// The value of column `idx` at Mach `m` (None where undefined).
fn column_at(rel: Relation, g: &TableGas, m: f64, idx: usize) -> Option<f64> {
    match row(rel, g, m).ok()?.get(idx)? {
        Cell::Num(v) => Some(*v),
        _ => None,
    }
}

/// Every Mach number in the relation's range at which column `idx` equals
/// `target`: the column is sampled, each sign change of (column - target)
/// between neighbouring samples is bracketed and refined by the Illinois
/// method to adjacent doubles, and a sample that hits the value exactly is
/// a root itself. Ascending; empty where no Mach number reaches the value.
pub fn invert(rel: Relation, g: &TableGas, idx: usize, target: f64) -> Vec<f64> {
    let (lo, hi) = mach_range(rel);
    let xs = samples(lo, hi);
    let f = |m: f64| column_at(rel, g, m, idx).map(|v| v - target);
    let mut roots: Vec<f64> = Vec::new();
    let mut prev: Option<(f64, f64)> = None;
    for &x in &xs {
        let Some(y) = f(x) else {
            prev = None;
            continue;
        };
        if y == 0.0 {
            roots.push(x);
        } else if let Some((px, py)) = prev
            && py != 0.0
            && py.signum() != y.signum()
        {
            let r = refine(&f, px, py, x, y);
            // A sign change across a pole or a jump (the oblique shock's
            // detachment) refines onto the jump: keep only true roots.
            if let Some(m) = r
                && let Some(y) = f(m)
                && y.abs() <= 1e-9 * target.abs().max(1.0)
            {
                roots.push(m);
            }
        }
        prev = Some((x, y));
    }
    roots.dedup_by(|a, b| (*a - *b).abs() <= 1e-12 * b.abs().max(1.0));
    roots
}

/// Refine a bracketed sign change of `f` on `[a, b]` by the Illinois
/// (modified regula falsi) method, which keeps the bracket and converges
/// superlinearly, down to adjacent doubles; None where `f` is undefined
/// inside. The caller judges whether the point is a root or a jump.
fn refine(
    f: &impl Fn(f64) -> Option<f64>,
    mut a: f64,
    mut fa: f64,
    mut b: f64,
    mut fb: f64,
) -> Option<f64> {
    let mut side = 0i8;
    for _ in 0..200 {
        let width = (b - a).abs();
        if width <= 2.0 * f64::EPSILON * a.abs().max(b.abs()) {
            break;
        }
        let mut c = (a * fb - b * fa) / (fb - fa);
        // Keep strictly inside; fall back to bisection on a bad secant.
        if !(c > a.min(b) && c < a.max(b)) {
            c = 0.5 * (a + b);
        }
        let fc = f(c)?;
        if fc == 0.0 {
            return Some(c);
        }
        if fc.signum() == fb.signum() {
            b = c;
            fb = fc;
            if side == -1 {
                fa *= 0.5;
            }
            side = -1;
        } else {
            a = c;
            fa = fc;
            if side == 1 {
                fb *= 0.5;
            }
            side = 1;
        }
    }
    Some(if fa.abs() < fb.abs() { a } else { b })
}

/// Build the table: every row is computed on its own, a row that cannot be
/// computed keeps its place with its given value and its reason in the
/// `problem` column (the last). Returns the table and the number of rows
/// that failed.
pub fn build(rel: Relation, g: &TableGas, rows: &Rows) -> Result<(Table, usize), String> {
    let keys = columns(rel);
    let mut cols: Vec<Column> = keys.iter().map(|(k, l)| Column::new(k, l, "")).collect();
    cols.push(Column::new("problem", "note", ""));
    let mut t = Table::new(cols);
    let mut failed = 0;
    // A row is its cells and, where it failed, the reason (the last column).
    let mut push = |t: &mut Table, mut cells: Vec<Cell>, problem: Option<String>| {
        failed += usize::from(problem.is_some());
        cells.push(problem.map_or(Cell::Empty, Cell::Text));
        t.rows.push(cells);
    };
    // A failed row keeps the given value in its own column.
    let blank = |idx: usize, v: f64| {
        let mut c = vec![Cell::Empty; keys.len()];
        c[idx] = Cell::from(v);
        c
    };
    // Mach rows are rows given by the first column.
    let (idx, values, branch) = match rows {
        Rows::Mach(ms) => (0, ms, Pick::Unstated),
        Rows::Given {
            key,
            values,
            branch,
        } => {
            let idx = keys.iter().position(|(k, _)| k == key).ok_or_else(|| {
                format!(
                    "no column \"{key}\" in this relation; it has {}",
                    keys.iter().map(|k| k.0).collect::<Vec<_>>().join(", ")
                )
            })?;
            if let Relation::ObliqueShock(_) = rel
                && idx == 1
            {
                return Err("the deflection is set by --deflection; give another column".into());
            }
            (idx, values, *branch)
        }
    };
    let label = keys[idx].1;
    for &v in values {
        if idx == 0 {
            match row(rel, g, v) {
                Ok(cells) => push(&mut t, cells, None),
                Err(e) => push(
                    &mut t,
                    blank(0, v),
                    Some(format!("at {label} {}: {e}", short(v))),
                ),
            }
            continue;
        }
        let why = |why: String| Some(format!("{label} = {}: {why}", short(v)));
        if !v.is_finite() {
            push(&mut t, blank(idx, v), why("not a finite number".into()));
            continue;
        }
        let roots = invert(rel, g, idx, v);
        let sub: Vec<f64> = roots.iter().copied().filter(|m| *m < 1.0).collect();
        let sup: Vec<f64> = roots.iter().copied().filter(|m| *m >= 1.0).collect();
        let chosen: Vec<f64> = match branch {
            Pick::Subsonic => sub.clone(),
            Pick::Supersonic => sup.clone(),
            Pick::Both => roots.clone(),
            Pick::Unstated if !sub.is_empty() && !sup.is_empty() => {
                let list = |v: &[f64]| {
                    v.iter()
                        .map(|m| crate::report::sig(*m, 6))
                        .collect::<Vec<_>>()
                        .join(", ")
                };
                push(
                    &mut t,
                    blank(idx, v),
                    why(format!(
                        "reached below Mach 1 (M {}) and above (M {}): choose with --branch subsonic, supersonic or both",
                        list(&sub),
                        list(&sup)
                    )),
                );
                continue;
            }
            Pick::Unstated => roots.clone(),
        };
        if chosen.is_empty() {
            let reason = if roots.is_empty() {
                let (lo, hi) = mach_range(rel);
                format!("not reached at any Mach number from {lo} to {hi}")
            } else {
                format!(
                    "reached only on the other branch (M {})",
                    crate::report::sig(roots[0], 6)
                )
            };
            push(&mut t, blank(idx, v), why(reason));
            continue;
        }
        for m in chosen {
            match row(rel, g, m) {
                Ok(cells) => push(&mut t, cells, None),
                Err(e) => push(&mut t, blank(idx, v), why(e.to_string())),
            }
        }
    }
    Ok((t, failed))
}

/// A number for a message as typed when short, else in exponent form
/// (1e-200, not two hundred zeros).
fn short(v: f64) -> String {
    let s = format!("{v}");
    if s.len() > 14 { format!("{v:e}") } else { s }
}

/// A computed value as a cell; a value that overflowed (an infinite or NaN
/// result at an extreme Mach number or gamma) is the row's problem, never
/// a silently empty cell.
fn num(v: f64, what: &'static str) -> Result<Cell, FlowError> {
    if v.is_finite() {
        Ok(Cell::Num(v))
    } else {
        Err(FlowError::BadInput {
            what,
            value: v,
            why: "the value overflows double precision at this Mach number and gamma",
        })
    }
}

fn row(rel: Relation, g: &TableGas, m: f64) -> Result<Vec<Cell>, FlowError> {
    if !(m.is_finite() && m >= 0.0) {
        return Err(FlowError::BadInput {
            what: "Mach number",
            value: m,
            why: "it must be zero or positive",
        });
    }
    let cells = row_cells(rel, g, m)?;
    // Only the Mach angle and the Prandtl-Meyer angle are undefined below
    // Mach 1; anything else empty has overflowed.
    for (i, c) in cells.iter().enumerate() {
        let optional = matches!(rel, Relation::Isentropic) && i >= 5 && m < 1.0
            || matches!(rel, Relation::Isentropic) && i == 4 && m == 0.0;
        if *c == Cell::Empty && !optional {
            num(f64::NAN, columns(rel)[i].1)?;
        }
    }
    Ok(cells)
}

fn row_cells(rel: Relation, g: &TableGas, m: f64) -> Result<Vec<Cell>, FlowError> {
    let s = state(g, m)?;
    Ok(match rel {
        Relation::Isentropic => {
            let rho_t = PT / (g.gas.r() * g.tt);
            let supersonic = m >= 1.0;
            vec![
                m.into(),
                (s.t / g.tt).into(),
                (s.p / PT).into(),
                (s.rho / rho_t).into(),
                isentropic::area_ratio(&g.gas, g.tt, PT, m)?.into(),
                if supersonic {
                    isentropic::closed::mach_angle(m).to_degrees().into()
                } else {
                    Cell::Empty
                },
                if supersonic {
                    isentropic::prandtl_meyer(&g.gas, g.tt, m)?
                        .to_degrees()
                        .into()
                } else {
                    Cell::Empty
                },
            ]
        }
        Relation::NormalShock => {
            let d = shock::normal(&g.gas, &s)?;
            vec![
                m.into(),
                d.mach.into(),
                (d.p / s.p).into(),
                (d.t / s.t).into(),
                (d.rho / s.rho).into(),
                (d.pt / s.pt).into(),
            ]
        }
        Relation::ObliqueShock(theta) => {
            let w = shock::oblique(&g.gas, &s, theta, Strength::Weak)?;
            let st = shock::oblique(&g.gas, &s, theta, Strength::Strong)?;
            vec![
                m.into(),
                theta.to_degrees().into(),
                w.beta.to_degrees().into(),
                w.down.mach.into(),
                (w.down.p / s.p).into(),
                st.beta.to_degrees().into(),
                st.down.mach.into(),
                (st.down.p / s.p).into(),
            ]
        }
        Relation::Rayleigh => {
            if m <= 0.0 {
                return Err(FlowError::BadInput {
                    what: "Mach number",
                    value: m,
                    why: "the Rayleigh line needs flow (Mach above 0)",
                });
            }
            let r = rayleigh::ratios(&g.gas, &s)?;
            vec![m.into(), r[0].into(), r[1].into(), r[2].into(), r[3].into()]
        }
        Relation::Fanno => {
            if m <= 0.0 {
                return Err(FlowError::BadInput {
                    what: "Mach number",
                    value: m,
                    why: "the Fanno line needs flow (Mach above 0)",
                });
            }
            let r = fanno::ratios(&g.gas, &s)?;
            vec![m.into(), r[0].into(), r[1].into(), r[2].into(), r[3].into()]
        }
    })
}

/// Parse a list of numbers: values, `FROM:TO:STEP` (a step size) and
/// `FROM:TO@N` (N points) ranges, mixed with commas (see [`crate::range`]).
pub fn parse_list(text: &str) -> Result<Vec<f64>, String> {
    // Every part is read and counted before any row is made, so the cap
    // holds for the whole request, however it is spelt.
    let mut parts: Vec<(f64, f64, usize)> = Vec::new();
    let mut total = 0usize;
    for part in text.split(',') {
        let part = part.trim();
        if part.is_empty() {
            return Err(format!("\"{text}\": empty entry in the list"));
        }
        let num = |s: &str| -> Result<f64, String> {
            let v: f64 = s
                .trim()
                .parse()
                .map_err(|_| format!("\"{s}\" is not a number"))?;
            if v.is_finite() {
                Ok(v)
            } else {
                Err(format!("\"{s}\" is not a finite number"))
            }
        };
        let (a, b, n) = match crate::range::split(part)? {
            crate::range::Spec::One(v) => (num(v)?, num(v)?, 0),
            crate::range::Spec::Step(a, b, s) => {
                let (a, b, s) = (num(a)?, num(b)?, num(s)?);
                (a, b, crate::range::intervals(a, b, s, part, MAX_ROWS)?)
            }
            crate::range::Spec::Points(a, b, n) => {
                let (a, b) = (num(a)?, num(b)?);
                if b < a {
                    return Err(format!("\"{part}\": TO must not be below FROM"));
                }
                (a, b, n - 1)
            }
        };
        total = total.saturating_add(n + 1);
        if total > MAX_ROWS {
            return Err(format!(
                "{} rows or more asked for in all; at most {MAX_ROWS}",
                total
            ));
        }
        parts.push((a, b, n));
    }
    let mut out = Vec::with_capacity(total);
    for (a, b, n) in parts {
        for i in 0..=n {
            out.push(crate::range::value(a, b, n, i));
        }
    }
    Ok(out)
}

/// Most rows one request may ask for.
pub const MAX_ROWS: usize = 100_000;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::PerfectGas;

    #[test]
    fn list_syntax() {
        assert_eq!(parse_list("0.5,2").unwrap(), vec![0.5, 2.0]);
        assert_eq!(parse_list("1:2:0.5").unwrap(), vec![1.0, 1.5, 2.0]);
        assert!(parse_list("abc").is_err());
        assert!(parse_list("1:2:0").is_err());
        assert_eq!(parse_list("0:1@3").unwrap(), vec![0.0, 0.5, 1.0]);
        assert!(parse_list("0:1:0.3").is_err(), "a step that misses TO");
    }

    #[test]
    fn area_ratio_rows_recover_mach_two() {
        // NACA 1135 Table I: A/A* = 1.6875 at M = 2 (gamma 1.4, from memory).
        let g = TableGas {
            gas: Gas::Perfect(PerfectGas::AIR),
            tt: 288.15,
        };
        let m = invert(Relation::Isentropic, &g, 4, 1.6875);
        assert_eq!(m.len(), 2, "{m:?}");
        assert!((m[1] - 2.0).abs() < 1e-4, "{m:?}");
        assert!(m[0] < 1.0);
    }
}
