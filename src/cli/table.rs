//! `stationwise table`: flow tables for a calorically or thermally perfect gas.

use super::{Failure, OutFormat, print_table};
use crate::gas::{Composition, Fuel, Gas, PerfectGas};
use crate::report::Cell;
use crate::table::{self, Pick, Relation, Rows, TableGas};
use crate::units::{self, Quantity};
use clap::ValueEnum;

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub(super) enum RelationArg {
    /// Isentropic ratios: mach, t_tt, p_pt, rho_rhot, a_astar, mach_angle_deg, prandtl_meyer_deg.
    Isentropic,
    /// Normal shock: mach1, mach2, p2_p1, t2_t1, rho2_rho1, pt2_pt1.
    NormalShock,
    /// Oblique shock at --deflection: weak and strong solutions.
    ObliqueShock,
    /// Rayleigh line (constant-area heating): ratios to the sonic state.
    Rayleigh,
    /// Fanno line (constant-area friction): 4fL*/D and ratios to the sonic state.
    Fanno,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub(super) enum GasArg {
    /// Dry air, thermally perfect (NASA Glenn polynomials).
    Air,
    /// Lean products of a hydrocarbon fuel at --far, thermally perfect.
    Products,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub(super) enum BranchArg {
    /// Below Mach 1.
    Subsonic,
    /// Above Mach 1.
    Supersonic,
    /// Every root, a row each.
    Both,
}

/// Rows come from --mach, or from any one column's values with
/// --given KEY=LIST (the Mach number that gives each value is found; where
/// a value is reached both below and above Mach 1, --branch chooses).
/// --area-ratio and --p-pt are short for --given a_astar=... and p_pt=....
/// A row that cannot be computed is printed in place with its reason
/// (exit 2).
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The relation to tabulate.
    relation: RelationArg,
    /// Calorically perfect gas with this ratio of specific heats.
    #[arg(long, conflicts_with = "gas")]
    gamma: Option<f64>,
    /// Gas constant for --gamma, J/(kg K).
    #[arg(long, default_value_t = 287.05, requires = "gamma")]
    r: f64,
    /// Thermally perfect gas.
    #[arg(long)]
    gas: Option<GasArg>,
    /// Fuel-air ratio for --gas products (kg fuel per kg dry air; default 0).
    #[arg(long, conflicts_with = "gamma")]
    far: Option<f64>,
    /// Fuel hydrogen-to-carbon molar ratio for --gas products (default 1.92,
    /// a kerosene).
    #[arg(long, conflicts_with = "gamma")]
    hc: Option<f64>,
    /// Total temperature for a thermally perfect gas ("1500", "1500 K", "2240 degF").
    #[arg(long, default_value = "288.15 K")]
    tt: String,
    /// Mach numbers: values and ranges, comma separated (FROM:TO:STEP a step
    /// size that must land on TO, FROM:TO@N N points).
    #[arg(long, allow_hyphen_values = true)]
    mach: Option<String>,
    /// Any column's values as the input: KEY=LIST, KEY one of the
    /// relation's column keys (as the CSV header names them: p_pt, a_astar,
    /// pt2_pt1, beta_weak_deg, friction_4flstar_d, ...), LIST as for --mach.
    #[arg(long, conflicts_with_all = ["mach", "area_ratio", "p_pt"], allow_hyphen_values = true)]
    given: Option<String>,
    /// Area ratios A/A* (isentropic; short for --given a_astar=LIST).
    #[arg(long, conflicts_with_all = ["mach", "p_pt"])]
    area_ratio: Option<String>,
    /// Which root where a given value is reached below and above Mach 1.
    #[arg(long)]
    branch: Option<BranchArg>,
    /// Static-to-total pressure ratios p/pt (isentropic; short for --given p_pt=LIST).
    #[arg(long, conflicts_with = "mach")]
    p_pt: Option<String>,
    /// Flow deflection for oblique-shock, degrees.
    #[arg(long)]
    deflection: Option<f64>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let list = |flag: &str, s: &str| {
        table::parse_list(s).map_err(|e| Failure::bad(format!("{flag}: {e}")))
    };
    let pick = match a.branch {
        None => Pick::Unstated,
        Some(BranchArg::Subsonic) => Pick::Subsonic,
        Some(BranchArg::Supersonic) => Pick::Supersonic,
        Some(BranchArg::Both) => Pick::Both,
    };
    let given = |key: &str, flag: &str, text: &str| -> Result<Rows, Failure> {
        Ok(Rows::Given {
            key: key.to_string(),
            values: list(flag, text)?,
            branch: pick,
        })
    };
    let rows = if let Some(m) = &a.mach {
        if a.branch.is_some() {
            return Err(Failure::bad(
                "--branch chooses among the roots of --given, --area-ratio or --p-pt; --mach rows have one",
            ));
        }
        Rows::Mach(list("--mach", m)?)
    } else if let Some(g) = &a.given {
        let (key, values) = g.split_once('=').ok_or_else(|| {
            Failure::bad(format!(
                "--given \"{g}\": write KEY=LIST, for example p_pt=0.5,0.6"
            ))
        })?;
        given(key.trim(), "--given", values)?
    } else if let Some(r) = &a.area_ratio {
        given("a_astar", "--area-ratio", r)?
    } else if let Some(p) = &a.p_pt {
        given("p_pt", "--p-pt", p)?
    } else {
        return Err(Failure::bad(
            "give rows with --mach LIST, or --given KEY=LIST (any column), --area-ratio LIST or --p-pt LIST",
        ));
    };
    for (key, v, q) in [
        ("gamma", a.gamma, Quantity::Ratio),
        ("r", a.gamma.map(|_| a.r), Quantity::SpecificHeat),
    ] {
        if let (Some(v), Some(b)) = (v, crate::book::bounds::of("gas", key, q))
            && !b.holds(v)
        {
            return Err(Failure::bad(format!(
                "--{key} {v}: must be {} ({})",
                b.describe(q),
                b.why
            )));
        }
    }
    let gas = match (a.gamma, a.gas) {
        (Some(g), _) => Gas::Perfect(PerfectGas::new(g, a.r).map_err(Failure::bad)?),
        (None, Some(GasArg::Air)) => Gas::Thermal(Composition::dry_air().mixture()),
        (None, Some(GasArg::Products)) => {
            let fuel = match a.hc {
                Some(hc) => Fuel::new(hc).map_err(Failure::bad)?,
                None => Fuel::KEROSENE,
            };
            let c = Composition::dry_air()
                .burnt(a.far.unwrap_or(0.0), fuel)
                .map_err(Failure::bad)?;
            Gas::Thermal(c.mixture())
        }
        (None, None) => Gas::Perfect(PerfectGas::AIR),
    };
    let tt = units::parse(&a.tt, Quantity::Temperature, "--tt")
        .map_err(Failure::bad)?
        .si;
    let rel = match a.relation {
        RelationArg::Isentropic => Relation::Isentropic,
        RelationArg::NormalShock => Relation::NormalShock,
        RelationArg::ObliqueShock => {
            let d = a.deflection.ok_or_else(|| {
                Failure::bad("oblique-shock needs --deflection DEG (flow turning angle)")
            })?;
            Relation::ObliqueShock(d.to_radians())
        }
        RelationArg::Rayleigh => Relation::Rayleigh,
        RelationArg::Fanno => Relation::Fanno,
    };
    if (a.area_ratio.is_some() || a.p_pt.is_some()) && rel != Relation::Isentropic {
        let keys: Vec<&str> = table::columns(rel).iter().map(|c| c.0).collect();
        return Err(Failure::bad(format!(
            "--area-ratio and --p-pt are isentropic columns; for this relation use --given KEY=LIST with KEY one of {}",
            keys.join(", ")
        )));
    }
    if a.deflection.is_some() && !matches!(rel, Relation::ObliqueShock(_)) {
        return Err(Failure::bad("--deflection is for oblique-shock only"));
    }
    if !matches!(a.gas, Some(GasArg::Products)) && (a.far.is_some() || a.hc.is_some()) {
        return Err(Failure::bad(
            "--far and --hc describe --gas products; air has no fuel",
        ));
    }
    let (mut t, failed) = table::build(rel, &TableGas { gas, tt }, &rows).map_err(Failure::bad)?;
    // Aligned text shows the note column only when a row has a note; CSV
    // and JSON always carry `problem`, so a reader's columns never move.
    if a.format == OutFormat::Text {
        for r in &mut t.rows {
            if failed == 0 {
                r.pop();
            } else if let Some(c @ Cell::Empty) = r.last_mut() {
                // A row without a note has a blank note, not "-" (which
                // reads as "not defined").
                *c = Cell::Text(String::new());
            }
        }
        if failed == 0 {
            t.columns.pop();
        }
    }
    print_table(&t, a.format)?;
    if failed > 0 {
        use std::io::Write;
        let _ = writeln!(
            std::io::stderr(),
            "stationwise: {failed} of {} rows could not be computed (see the {} column)",
            t.rows.len(),
            if a.format == OutFormat::Text {
                "note"
            } else {
                "problem"
            }
        );
        return Ok(2);
    }
    Ok(0)
}
