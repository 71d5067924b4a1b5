//! Flow relations for one-dimensional compressible flow.
//!
//! Every relation takes a [`Gas`]: a calorically perfect gas goes through the
//! closed forms (`closed` submodules), a thermally perfect mixture through
//! the general form, which solves the conservation equations with the gas's
//! `h(T)` and `phi(T)`. The general forms are generic over
//! [`Thermo`](crate::gas::Thermo), so tests run them on a perfect gas and
//! compare against the closed forms.
//!
//! * [`isentropic`]: static from total and back, mass-flow function, A/A*.
//! * [`shock`]: normal and oblique shocks, Prandtl-Meyer expansion.
//! * [`rayleigh`]: constant-area heating and cooling, thermal choking.
//! * [`fanno`]: constant-area adiabatic friction, friction choking.
//! * [`turbo`]: compression and expansion with isentropic or polytropic
//!   efficiency.
//! * [`combustion`]: fuel-air ratio and exit temperature energy balance.
//! * [`solve`]: the bracketed root finders ([`crate::roots`]), with stop reasons.
//!
//! Invariants: SI units everywhere; total temperature is conserved by every
//! adiabatic relation to round-off; a request outside a relation's domain is
//! a [`FlowError`] naming what failed, never a NaN.

pub mod combustion;
pub mod fanno;
pub mod isentropic;
pub mod rayleigh;
pub mod shock;
pub use crate::roots as solve;
pub mod turbo;

use crate::gas::GasError;
use thiserror::Error;

pub use isentropic::{Branch, FlowState};

/// Errors of the flow relations, written for a test engineer.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum FlowError {
    /// The gas model could not give a property.
    #[error(transparent)]
    Gas(#[from] GasError),
    /// An input outside its physical domain.
    #[error("{what} = {value}: {why}")]
    BadInput {
        /// Which input.
        what: &'static str,
        /// Its value.
        value: f64,
        /// Why it is refused.
        why: &'static str,
    },
    /// Mass flow above what the area can pass at the given totals.
    #[error(
        "choked: the area passes at most {max_flow:.4} kg/s at these total conditions (asked {flow:.4} kg/s); the sonic area for the asked flow is {sonic_area:.6} m2"
    )]
    Choked {
        /// Largest mass flow through the area, kg/s.
        max_flow: f64,
        /// The mass flow asked for, kg/s.
        flow: f64,
        /// Area that would pass the asked flow at Mach 1, m2.
        sonic_area: f64,
    },
    /// Normal shock with subsonic upstream flow.
    #[error("a shock needs supersonic upstream flow; upstream Mach number is {mach:.4}")]
    SubsonicShock {
        /// Upstream (normal) Mach number.
        mach: f64,
    },
    /// Oblique shock turning beyond the maximum deflection.
    #[error(
        "detached shock: deflection {deflection_deg:.3} deg exceeds the maximum {max_deg:.3} deg for Mach {mach:.4}"
    )]
    Detached {
        /// Asked deflection, degrees.
        deflection_deg: f64,
        /// Largest deflection with an attached shock, degrees.
        max_deg: f64,
        /// Upstream Mach number.
        mach: f64,
    },
    /// Heat addition past thermal choking.
    #[error(
        "thermal choking: at most {max_heat:.1} J/kg can be added on this Rayleigh line (exit total temperature {max_tt:.2} K); asked {heat:.1} J/kg"
    )]
    ThermalChoke {
        /// Largest heat addition, J/kg.
        max_heat: f64,
        /// Exit total temperature at the maximum, K.
        max_tt: f64,
        /// Heat asked for, J/kg.
        heat: f64,
    },
    /// Duct longer than the friction-choking length.
    #[error(
        "friction choking: 4fL/D = {asked:.5} exceeds the limit {max:.5} for the inlet Mach number (the flow reaches Mach 1 first)"
    )]
    FrictionChoke {
        /// Largest 4fL/D, dimensionless.
        max: f64,
        /// Asked 4fL/D.
        asked: f64,
    },
    /// An iterative solution that did not converge.
    #[error(
        "{what}: no converged solution after {iterations} iterations (residual {residual:.3e})"
    )]
    NoConvergence {
        /// The relation being solved.
        what: &'static str,
        /// Iterations made.
        iterations: u32,
        /// Last residual.
        residual: f64,
    },
    /// A burner's exit temperature above what its fuel can reach.
    #[error(
        "exit total temperature {asked:.1} K is above what this fuel can reach: the adiabatic flame temperature at stoichiometric is {flame:.1} K ({products} products)"
    )]
    AboveFlame {
        /// The exit total temperature asked for, K.
        asked: f64,
        /// The adiabatic flame temperature at the stoichiometric ratio, K.
        flame: f64,
        /// "frozen" or "equilibrium".
        products: &'static str,
    },
    /// An equation without a root in its physical range.
    #[error("{what}: no solution in the physical range")]
    NoSolution {
        /// The relation being solved.
        what: &'static str,
    },
}

impl FlowError {
    /// Turn a solver failure into an error naming the relation.
    pub(crate) fn from_solve(what: &'static str, e: solve::SolveError<FlowError>) -> FlowError {
        match e {
            solve::SolveError::Inner(e) => e,
            solve::SolveError::Stopped(solve::Failure::IterationCap {
                iterations,
                residual,
            }) => FlowError::NoConvergence {
                what,
                iterations,
                residual,
            },
            solve::SolveError::Stopped(
                solve::Failure::NoRoot { .. } | solve::Failure::Jump { .. },
            ) => FlowError::NoSolution { what },
        }
    }
}

/// Refuse non-finite or non-positive values.
pub(crate) fn positive(what: &'static str, value: f64) -> Result<f64, FlowError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(FlowError::BadInput {
            what,
            value,
            why: "it must be a positive finite number",
        })
    }
}

/// Refuse a state holding a non-finite value (inputs near zero or
/// infinity can overflow a relation that is right for ordinary values).
pub(crate) fn finite_state(what: &'static str, s: FlowState) -> Result<FlowState, FlowError> {
    let vals = [s.tt, s.pt, s.t, s.p, s.rho, s.v, s.a, s.mach];
    match vals.iter().find(|v| !v.is_finite()) {
        None => Ok(s),
        Some(&value) => Err(FlowError::BadInput {
            what,
            value,
            why: "the state overflows finite arithmetic (an input too near zero or too large)",
        }),
    }
}

/// Refuse non-finite or negative values.
pub(crate) fn non_negative(what: &'static str, value: f64) -> Result<f64, FlowError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(FlowError::BadInput {
            what,
            value,
            why: "it must be zero or positive",
        })
    }
}
