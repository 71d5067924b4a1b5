//! Flow tables: rows of relation values for a list of Mach numbers.
//!
//! A table is asked for a relation, a gas (a calorically perfect gamma, or a
//! thermally perfect mixture at a total temperature) and rows, either Mach
//! numbers or inverse inputs (an area ratio on a branch, or a static-to-total
//! pressure ratio) that are turned into Mach numbers first. The keys of each
//! relation's columns are part of the command-line contract (JSON and CSV).

use crate::flow::{Branch, FlowState};
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
    /// Mach numbers.
    Mach(Vec<f64>),
    /// Area ratios A/A* on a branch.
    AreaRatio(Vec<f64>, Branch),
    /// Static-to-total pressure ratios.
    PressureRatio(Vec<f64>),
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

/// The Mach numbers of the rows.
pub fn mach_numbers(g: &TableGas, rows: &Rows) -> Result<Vec<f64>, FlowError> {
    match rows {
        Rows::Mach(m) => Ok(m.clone()),
        Rows::AreaRatio(list, branch) => list
            .iter()
            .map(|&r| {
                if !(r.is_finite() && r >= 1.0) {
                    return Err(FlowError::BadInput {
                        what: "area ratio A/A*",
                        value: r,
                        why: "it must be at least 1",
                    });
                }
                // Mass flow per area is G*/ratio: the branch picks the root.
                let star = isentropic::sonic(&g.gas, g.tt, PT)?;
                let area = 1.0 / (star.flux() / r);
                Ok(isentropic::from_flow(&g.gas, g.tt, PT, 1.0, area, *branch)?.mach)
            })
            .collect(),
        Rows::PressureRatio(list) => list
            .iter()
            .map(|&r| {
                if !(r.is_finite() && r > 0.0 && r <= 1.0) {
                    return Err(FlowError::BadInput {
                        what: "pressure ratio p/pt",
                        value: r,
                        why: "it must lie above 0 and at most 1",
                    });
                }
                Ok(isentropic::from_pressure(&g.gas, g.tt, PT, r * PT)?.mach)
            })
            .collect(),
    }
}

/// Build the table.
pub fn build(rel: Relation, g: &TableGas, rows: &Rows) -> Result<Table, FlowError> {
    let machs = mach_numbers(g, rows)?;
    let cols = |v: &[(&str, &str)]| v.iter().map(|(k, l)| Column::new(k, l, "")).collect();
    let mut t = match rel {
        Relation::Isentropic => Table::new(cols(&[
            ("mach", "M"),
            ("t_tt", "T/Tt"),
            ("p_pt", "p/pt"),
            ("rho_rhot", "rho/rhot"),
            ("a_astar", "A/A*"),
            ("mach_angle_deg", "mu deg"),
            ("prandtl_meyer_deg", "nu deg"),
        ])),
        Relation::NormalShock => Table::new(cols(&[
            ("mach1", "M1"),
            ("mach2", "M2"),
            ("p2_p1", "p2/p1"),
            ("t2_t1", "T2/T1"),
            ("rho2_rho1", "rho2/rho1"),
            ("pt2_pt1", "pt2/pt1"),
        ])),
        Relation::ObliqueShock(_) => Table::new(cols(&[
            ("mach1", "M1"),
            ("deflection_deg", "theta deg"),
            ("beta_weak_deg", "beta weak"),
            ("mach2_weak", "M2 weak"),
            ("p2_p1_weak", "p2/p1 weak"),
            ("beta_strong_deg", "beta strong"),
            ("mach2_strong", "M2 strong"),
            ("p2_p1_strong", "p2/p1 strong"),
        ])),
        Relation::Rayleigh => Table::new(cols(&[
            ("mach", "M"),
            ("tt_ttstar", "Tt/Tt*"),
            ("t_tstar", "T/T*"),
            ("p_pstar", "p/p*"),
            ("pt_ptstar", "pt/pt*"),
        ])),
        Relation::Fanno => Table::new(cols(&[
            ("mach", "M"),
            ("friction_4flstar_d", "4fL*/D"),
            ("t_tstar", "T/T*"),
            ("p_pstar", "p/p*"),
            ("pt_ptstar", "pt/pt*"),
        ])),
    };
    for m in machs {
        t.rows.push(row(rel, g, m)?);
    }
    Ok(t)
}

fn row(rel: Relation, g: &TableGas, m: f64) -> Result<Vec<Cell>, FlowError> {
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

/// Parse a list of numbers: "0.5,1,2" or "FROM:TO:STEP" (inclusive of TO
/// within a rounding tolerance), or a mix of both separated by commas.
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
        let pieces: Vec<&str> = part.split(':').collect();
        let (a, s, n) = match pieces.as_slice() {
            [one] => (num(one)?, 0.0, 0usize),
            [a, b, s] => {
                let (a, b, s) = (num(a)?, num(b)?, num(s)?);
                if s <= 0.0 {
                    return Err(format!("\"{part}\": the step must be positive"));
                }
                if b < a {
                    return Err(format!("\"{part}\": TO must not be below FROM"));
                }
                let steps = ((b - a) / s + 1e-9).floor();
                if !steps.is_finite() || steps >= MAX_ROWS as f64 {
                    return Err(format!("\"{part}\": more than {MAX_ROWS} rows"));
                }
                (a, s, steps as usize)
            }
            _ => return Err(format!("\"{part}\": use a number or FROM:TO:STEP")),
        };
        total += n + 1;
        if total > MAX_ROWS {
            return Err(format!(
                "{} rows or more asked for in all; at most {MAX_ROWS}",
                total
            ));
        }
        parts.push((a, s, n));
    }
    let mut out = Vec::with_capacity(total);
    for (a, s, n) in parts {
        for i in 0..=n {
            out.push(a + s * i as f64);
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
    }

    #[test]
    fn area_ratio_rows_recover_mach_two() {
        // NACA 1135 Table I: A/A* = 1.6875 at M = 2 (gamma 1.4, from memory).
        let g = TableGas {
            gas: Gas::Perfect(PerfectGas::AIR),
            tt: 288.15,
        };
        let m = mach_numbers(&g, &Rows::AreaRatio(vec![1.6875], Branch::Supersonic)).unwrap();
        assert!((m[0] - 2.0).abs() < 1e-4);
    }
}
