//! Physical ranges of givens: what a value must lie within to describe a
//! real gas flow, checked when a given is loaded or typed.
//!
//! Two strengths. A *hard* range is physics or sanity that no measurement
//! or sweep may cross (an absolute temperature above 0 K, a mass flow below
//! a ceiling no facility reaches); it is checked on every value set,
//! including those a sweep, goal or scan puts in. A *design* range holds
//! for what a user states as a design given (an efficiency from 0 to 1)
//! but not for a value measured or perturbed around it: a measured
//! efficiency of 1.002 is scatter, not an error, and an uncertainty
//! calculation perturbs an efficiency of 1 both ways.
//!
//! The ceilings are far above any air-breathing engine, rig or tunnel and
//! are listed in the README; they exist so that a slip such as "1e300" is
//! refused instead of producing numbers that mean nothing.

use crate::units::Quantity;

/// A range a given must lie in (SI).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bound {
    /// Lowest value.
    pub low: f64,
    /// Whether the lowest value itself is allowed.
    pub low_ok: bool,
    /// Highest value.
    pub high: f64,
    /// Whether the highest value itself is allowed.
    pub high_ok: bool,
    /// Checked on every set (true) or only on what a user states (false).
    pub hard: bool,
    /// Why, for the message.
    pub why: &'static str,
}

const fn b(
    low: f64,
    low_ok: bool,
    high: f64,
    high_ok: bool,
    hard: bool,
    why: &'static str,
) -> Bound {
    Bound {
        low,
        low_ok,
        high,
        high_ok,
        hard,
        why,
    }
}

/// Lowest absolute temperature accepted, K.
pub const MIN_TEMPERATURE: f64 = 1.0;
/// Lowest absolute pressure accepted, Pa.
pub const MIN_PRESSURE: f64 = 1.0e-3;
/// Highest absolute temperature accepted, K.
pub const MAX_TEMPERATURE: f64 = 1.0e4;
/// Highest absolute pressure accepted, Pa (1 GPa).
pub const MAX_PRESSURE: f64 = 1.0e9;
/// Lowest and highest mass flow of a stream, kg/s.
pub const MASS_FLOW: (f64, f64) = (1.0e-6, 1.0e5);

impl Bound {
    /// Whether `si` lies in the range.
    pub fn holds(&self, si: f64) -> bool {
        si.is_finite()
            && (si > self.low || (self.low_ok && si == self.low))
            && (si < self.high || (self.high_ok && si == self.high))
    }

    /// "between 0 and 1", "above 0 and at most 1e+09".
    pub fn describe(&self, quantity: Quantity) -> String {
        let f = |x: f64| crate::units::format(x, quantity, crate::units::UnitSystem::Si);
        let lo = if self.low_ok { "at least" } else { "above" };
        let hi = if self.high_ok { "at most" } else { "below" };
        format!("{lo} {} and {hi} {}", f(self.low), f(self.high))
    }
}

/// The range of the given `key` (the last part of its path) of `scope`
/// ("ambient", "gas", "station", "process", "shaft") with quantity `q`.
pub fn of(scope: &str, key: &str, q: Quantity) -> Option<Bound> {
    use Quantity as Q;
    Some(match (scope, key, q) {
        (_, "gamma" | "hot_gamma", _) => b(
            1.0,
            false,
            1.67,
            true,
            true,
            "the ratio of specific heats of a real gas lies above 1 and at most 5/3, a monatomic gas's",
        ),
        (_, "r" | "hot_r", _) => b(
            20.0,
            true,
            4200.0,
            true,
            true,
            "real gases lie between about 24 J/kg/K (uranium hexafluoride) and 4124 J/kg/K (hydrogen) (from memory)",
        ),
        (_, "efficiency" | "mechanical_efficiency", _) => b(
            0.0,
            false,
            1.0,
            true,
            false,
            "an efficiency above 1 would make energy; 0 or less transfers none",
        ),
        (_, "recovery", _) => b(
            0.0,
            false,
            1.0,
            true,
            false,
            "an adiabatic duct cannot raise total pressure",
        ),
        (_, "cfg" | "cd", _) => b(
            0.0,
            false,
            1.0,
            true,
            false,
            "a nozzle coefficient is a fraction of the ideal",
        ),
        (_, "pressure_loss", _) => b(
            0.0,
            true,
            1.0,
            false,
            false,
            "a fraction of the inlet total pressure",
        ),
        (_, "pressure_ratio", _) => b(
            1.0,
            true,
            1000.0,
            true,
            false,
            "a compressor's pt_out/pt_in or a turbine's pt_in/pt_out is at least 1",
        ),
        (_, "bypass_ratio", _) => b(1.0e-4, true, 100.0, true, false, "both streams carry flow"),
        (_, "k", _) => b(
            0.0,
            true,
            100.0,
            true,
            false,
            "a loss coefficient is not negative",
        ),
        (_, "friction", _) => b(
            0.0,
            true,
            0.5,
            true,
            false,
            "a wall friction factor is not negative (0.002 to 0.01 is usual, common practice)",
        ),
        (_, "relative_humidity", _) => b(
            0.0,
            true,
            1.0,
            true,
            true,
            "relative humidity from 0 to 100 % (above 100 % the air is supersaturated)",
        ),
        (_, "humidity", _) => b(
            0.0,
            true,
            0.2,
            true,
            true,
            "specific humidity in kg of water per kg of moist air, or g/kg (saturated air at 50 degC holds about 0.08, from memory)",
        ),
        (_, "hc", _) => b(
            0.0,
            false,
            4.0,
            true,
            true,
            "hydrogen atoms per carbon atom of the fuel",
        ),
        (_, "reference_theta_exponent", _) => b(
            0.0,
            true,
            1.0,
            true,
            true,
            "the exponent of theta in a corrected fuel flow lies between 0 and 1 (0.5 is common practice)",
        ),
        (_, "lhv" | "reference_lhv", _) => b(
            0.0,
            false,
            1.5e8,
            true,
            true,
            "heating values of fuels lie below hydrogen's 120 MJ/kg (from memory)",
        ),
        (_, "fuel_flow", _) => b(
            0.0,
            true,
            MASS_FLOW.1,
            true,
            true,
            "a fuel flow is not negative",
        ),
        (_, "heat", _) => b(
            -1.0e8,
            true,
            1.0e8,
            true,
            true,
            "within 100 MJ/kg either way",
        ),
        (_, "offtake", _) => b(-1.0e9, true, 1.0e9, true, true, "within 1 GW either way"),
        (_, "speed", _) => b(
            0.0,
            true,
            1.0e5,
            true,
            true,
            "a spool speed is not negative (1e5 rad/s is about 950,000 rpm)",
        ),
        (_, "deflection", _) => b(
            0.0,
            false,
            std::f64::consts::FRAC_PI_2,
            false,
            true,
            "a flow deflection lies between 0 and 90 degrees",
        ),
        (_, "altitude", _) => b(
            -1.0e5,
            true,
            1.0e6,
            true,
            true,
            "within 1000 km; the standard atmosphere itself ends at 86 km",
        ),
        (_, "offset", _) => b(
            -150.0,
            true,
            150.0,
            true,
            true,
            "hot- and cold-day offsets are tens of kelvin",
        ),
        (_, "flight_mach" | "mach", _) => b(0.0, true, 30.0, true, true, "Mach 0 to 30"),
        (_, "bleed_fraction", _) => b(
            0.0,
            true,
            1.0,
            false,
            true,
            "a bleed takes a fraction from 0 up to (not including) the whole flow",
        ),
        (_, "bleed_position", _) => b(
            0.0,
            true,
            1.0,
            true,
            true,
            "the fraction of the compressor's pressure rise and work done on the bled air, 0 (entry) to 1 (delivery)",
        ),
        (_, "fuel_c" | "fuel_h" | "fuel_o" | "fuel_n", _) => b(
            0.0,
            true,
            100.0,
            true,
            true,
            "atoms per fuel molecule, 0 to 100",
        ),
        (_, "fuel_tt", _) => b(
            200.0,
            true,
            1000.0,
            true,
            true,
            "a fuel enters between 200 K (the species data's floor) and 1000 K",
        ),
        (_, "fuel_cp", _) => b(
            500.0,
            true,
            20000.0,
            true,
            true,
            "fuel specific heats lie between about 0.5 and 15 kJ/(kg K) (hydrogen gas, 14.3; from memory)",
        ),
        (_, "w", _) => b(
            MASS_FLOW.0,
            true,
            MASS_FLOW.1,
            true,
            true,
            "a stream's mass flow lies between 1 mg/s and 100,000 kg/s",
        ),
        (_, _, Q::Temperature) => b(
            MIN_TEMPERATURE,
            true,
            MAX_TEMPERATURE,
            true,
            true,
            "an absolute temperature of a gas flow lies above 1 K; the gas data end at 6000 K",
        ),
        (_, _, Q::Pressure) => b(
            MIN_PRESSURE,
            true,
            MAX_PRESSURE,
            true,
            true,
            "an absolute pressure of a gas flow lies between 1 mPa (far into the rarefied range) and 1 GPa",
        ),
        (_, _, Q::MassFlow) => b(
            0.0,
            true,
            MASS_FLOW.1,
            true,
            true,
            "not negative, below 100,000 kg/s",
        ),
        (_, _, Q::Velocity) => b(0.0, true, 1.0e4, true, true, "not negative, below 10 km/s"),
        (_, "diameter", Q::Length) => b(0.0, false, 1.0e3, true, true, "a duct has a diameter"),
        (_, _, Q::Length) => b(0.0, true, 1.0e4, true, true, "not negative, below 10 km"),
        (_, _, Q::Area) => b(
            1.0e-10,
            true,
            1.0e6,
            true,
            true,
            "an area lies between 1e-10 m2 and 1 km2",
        ),
        _ => return None,
    })
}
