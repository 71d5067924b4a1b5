//! Paths that name a given or a derived value.
//!
//! Syntax: `SCOPE.NAME.KEY` for stations, processes and shafts
//! (`station.3.tt`, `process.compressor.pressure_ratio`,
//! `station.test section.mach`), and `SCOPE.KEY` for the ambient block, the
//! gas settings and the summary (`ambient.flight_mach`,
//! `summary.thrust_net`). NAME may contain spaces and dots: the scope is
//! the text before the first dot and the key the text after the last one.

use crate::units::Quantity;

/// Scopes of a path.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scope {
    /// `ambient.KEY`.
    Ambient,
    /// `gas.KEY`.
    Gas,
    /// `station.NAME.KEY`.
    Station,
    /// `process.NAME.KEY`.
    Process,
    /// `shaft.NAME.KEY`.
    Shaft,
    /// `summary.KEY`.
    Summary,
}

impl Scope {
    /// The scope as written in a path.
    pub fn word(self) -> &'static str {
        match self {
            Scope::Ambient => "ambient",
            Scope::Gas => "gas",
            Scope::Station => "station",
            Scope::Process => "process",
            Scope::Shaft => "shaft",
            Scope::Summary => "summary",
        }
    }

    /// Whether paths of this scope carry a name (`station.NAME.KEY`).
    pub fn named(self) -> bool {
        matches!(self, Scope::Station | Scope::Process | Scope::Shaft)
    }
}

/// A parsed path.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Path {
    /// Scope.
    pub scope: Scope,
    /// Station, process or shaft name (empty for ambient, gas, summary).
    pub name: String,
    /// Field or value key.
    pub key: String,
}

/// A path that does not parse.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error(
    "\"{0}\" is not a path: use station.NAME.KEY, process.NAME.KEY, shaft.NAME.KEY, ambient.KEY, gas.KEY or summary.KEY"
)]
pub struct PathError(pub String);

impl Path {
    /// Parse a path.
    pub fn parse(text: &str) -> Result<Path, PathError> {
        let err = || PathError(text.to_string());
        let (scope, rest) = text.split_once('.').ok_or_else(err)?;
        let scope = match scope.trim() {
            "ambient" => Scope::Ambient,
            "gas" => Scope::Gas,
            "station" => Scope::Station,
            "process" => Scope::Process,
            "shaft" => Scope::Shaft,
            "summary" => Scope::Summary,
            _ => return Err(err()),
        };
        match scope {
            Scope::Ambient | Scope::Gas | Scope::Summary => {
                if rest.is_empty() || rest.contains('.') {
                    return Err(err());
                }
                Ok(Path {
                    scope,
                    name: String::new(),
                    key: rest.to_string(),
                })
            }
            _ => {
                let (name, key) = rest.rsplit_once('.').ok_or_else(err)?;
                if name.is_empty() || key.is_empty() {
                    return Err(err());
                }
                Ok(Path {
                    scope,
                    name: name.to_string(),
                    key: key.to_string(),
                })
            }
        }
    }
}

/// A path that parses but names nothing in this workbook. The message
/// lists what that place does have, so a user need not guess.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum AddressError {
    /// Not a path at all.
    #[error(transparent)]
    Syntax(#[from] PathError),
    /// No station, process or shaft of that name.
    #[error(
        "{path}: the workbook has no {what} named \"{name}\"; its {} are {}",
        plural(what),
        list(have)
    )]
    NoPlace {
        /// The path as written.
        path: String,
        /// "station", "process", "shaft".
        what: &'static str,
        /// The name asked for.
        name: String,
        /// The names there are.
        have: Vec<String>,
    },
    /// The place exists but has no such key.
    #[error(
        "{path}: {place} has no {what} \"{key}\"; its {what}s are {}",
        list(have)
    )]
    NoKey {
        /// The path as written.
        path: String,
        /// The place in words ("process \"nozzle\" (nozzle)").
        place: String,
        /// "value" (anything readable) or "given" (what can be set).
        what: &'static str,
        /// The key asked for.
        key: String,
        /// The keys it has.
        have: Vec<String>,
    },
    /// A given was asked for where only a derived value exists, or the
    /// other way round.
    #[error("{path}: {why}")]
    Misplaced {
        /// The path as written.
        path: String,
        /// What is wrong.
        why: String,
    },
}

fn plural(what: &str) -> String {
    match what {
        "process" => "processes".into(),
        w => format!("{w}s"),
    }
}

fn list(v: &[String]) -> String {
    if v.is_empty() {
        "none".into()
    } else {
        v.join(", ")
    }
}

/// Derived keys of a station: key, label, quantity.
pub const STATION_KEYS: [(&str, &str, Quantity); 17] = [
    ("tt", "Tt", Quantity::Temperature),
    ("pt", "pt", Quantity::Pressure),
    ("t", "T", Quantity::Temperature),
    ("p", "p", Quantity::Pressure),
    ("rho", "rho", Quantity::Density),
    ("v", "V", Quantity::Velocity),
    ("a", "a", Quantity::Velocity),
    ("mach", "M", Quantity::Mach),
    ("w", "W", Quantity::MassFlow),
    ("area", "A", Quantity::Area),
    ("far", "FAR", Quantity::Ratio),
    ("ht", "ht", Quantity::SpecificEnergy),
    ("s", "s", Quantity::SpecificHeat),
    ("wc", "Wc", Quantity::MassFlow),
    ("q", "q", Quantity::PressureDifference),
    (
        "flow_function",
        "W\u{221a}Tt/(A pt)",
        Quantity::FlowFunction,
    ),
    ("gamma", "gamma", Quantity::Ratio),
];

/// Summary keys: key, label, quantity.
pub const SUMMARY_KEYS: [(&str, &str, Quantity); 19] = [
    ("thrust_gross", "gross thrust", Quantity::Force),
    ("ram_drag", "ram drag", Quantity::Force),
    ("thrust_net", "net thrust", Quantity::Force),
    ("fuel", "fuel flow", Quantity::FuelFlow),
    ("tsfc", "TSFC", Quantity::ThrustSpecificFuelConsumption),
    (
        "specific_thrust",
        "specific thrust",
        Quantity::SpecificThrust,
    ),
    ("eta_thermal", "thermal efficiency", Quantity::Ratio),
    ("eta_propulsive", "propulsive efficiency", Quantity::Ratio),
    ("eta_overall", "overall efficiency", Quantity::Ratio),
    ("air_flow", "air flow", Quantity::MassFlow),
    ("bleed_overboard", "bleed overboard", Quantity::MassFlow),
    ("thrust_corrected", "corrected net thrust", Quantity::Force),
    ("fuel_corrected", "corrected fuel flow", Quantity::FuelFlow),
    (
        "egt_corrected",
        "corrected exhaust Tt",
        Quantity::Temperature,
    ),
    ("test_mach", "test-section Mach", Quantity::Mach),
    ("test_q", "test-section q", Quantity::PressureDifference),
    ("test_re", "test-section Re per length", Quantity::PerLength),
    ("start_pt_ratio", "starting shock pt ratio", Quantity::Ratio),
    (
        "start_throat_ratio",
        "min diffuser/nozzle throat",
        Quantity::Ratio,
    ),
];

/// Process figure keys: key, label, quantity (a process reports a subset).
pub const FIGURE_KEYS: [(&str, &str, Quantity); 49] = [
    ("pressure_ratio", "pressure ratio", Quantity::Ratio),
    ("tt_ratio", "Tt ratio", Quantity::Ratio),
    ("eta_isentropic", "isentropic efficiency", Quantity::Ratio),
    ("eta_polytropic", "polytropic efficiency", Quantity::Ratio),
    ("work", "specific work", Quantity::SpecificEnergy),
    ("power", "power", Quantity::Power),
    ("tt_ideal", "ideal exit Tt", Quantity::Temperature),
    ("wc_in", "inlet corrected flow", Quantity::MassFlow),
    ("nc", "corrected speed", Quantity::RotationalSpeed),
    ("recovery", "pt recovery", Quantity::Ratio),
    ("loss", "pt loss", Quantity::Ratio),
    ("far_stoich", "stoichiometric FAR", Quantity::Ratio),
    ("equivalence_ratio", "equivalence ratio", Quantity::Ratio),
    ("friction_4fl_d", "4fL/D", Quantity::Ratio),
    ("fuel_flow", "fuel flow", Quantity::FuelFlow),
    ("far_added", "fuel-air ratio added", Quantity::Ratio),
    ("exit_tt", "exit Tt", Quantity::Temperature),
    ("efficiency", "combustion efficiency", Quantity::Ratio),
    ("heat", "heat added", Quantity::SpecificEnergy),
    (
        "max_heat",
        "heat to thermal choke",
        Quantity::SpecificEnergy,
    ),
    ("mach_in", "inlet Mach", Quantity::Mach),
    ("mach_out", "exit Mach", Quantity::Mach),
    (
        "v_effective",
        "effective jet velocity (gross thrust / W)",
        Quantity::Velocity,
    ),
    ("v_ideal", "ideal exit velocity", Quantity::Velocity),
    ("thrust_ideal", "ideal gross thrust", Quantity::Force),
    ("beta", "wave angle", Quantity::Angle),
    ("max_deflection", "max deflection", Quantity::Angle),
    ("thrust", "gross thrust", Quantity::Force),
    ("area", "exit area", Quantity::Area),
    ("throat_area", "throat area", Quantity::Area),
    ("required_area", "area to pass the flow", Quantity::Area),
    ("exit_p_ratio", "p exit/p ambient", Quantity::Ratio),
    ("npr", "nozzle pressure ratio", Quantity::Ratio),
    ("choked", "choked (1 yes)", Quantity::Ratio),
    ("bypass_ratio", "bypass ratio", Quantity::Ratio),
    ("bleed_flow", "bled flow", Quantity::MassFlow),
    ("bleed_fraction", "bled fraction of inflow", Quantity::Ratio),
    ("bleed_tt", "bled air Tt", Quantity::Temperature),
    ("bleed_pt", "bled air pt", Quantity::Pressure),
    ("vane_cooling_flow", "vane cooling flow", Quantity::MassFlow),
    (
        "rotor_cooling_flow",
        "rotor cooling flow",
        Quantity::MassFlow,
    ),
    (
        "rotor_inlet_tt",
        "rotor inlet Tt (after vane cooling)",
        Quantity::Temperature,
    ),
    ("p_ratio_streams", "p secondary/p primary", Quantity::Ratio),
    (
        "air_ratio_streams",
        "air secondary/primary (fuel excluded)",
        Quantity::Ratio,
    ),
    ("w", "mass flow", Quantity::MassFlow),
    ("max_4fl_d", "4fL*/D to choke", Quantity::Ratio),
    ("imbalance", "shaft imbalance", Quantity::Power),
    ("p_ratio", "static p ratio", Quantity::Ratio),
    ("velocity_ratio", "V exit/V inlet", Quantity::Ratio),
];

/// Derived keys of the ambient block (the free stream): key, label, quantity.
pub const AMBIENT_KEYS: [(&str, &str, Quantity); 6] = [
    ("t", "static temperature", Quantity::Temperature),
    ("p", "static pressure", Quantity::Pressure),
    ("v", "flight speed", Quantity::Velocity),
    ("mach", "flight Mach number", Quantity::Mach),
    ("tt", "free-stream total temperature", Quantity::Temperature),
    ("pt", "free-stream total pressure", Quantity::Pressure),
];

/// Derived keys of a shaft: key, label, quantity.
pub const SHAFT_KEYS: [(&str, &str, Quantity); 3] = [
    ("compressor_power", "power absorbed", Quantity::Power),
    ("turbine_power", "power delivered", Quantity::Power),
    ("imbalance", "power imbalance", Quantity::Power),
];

/// The table of derived keys of a scope.
pub fn derived_keys(scope: Scope) -> &'static [(&'static str, &'static str, Quantity)] {
    match scope {
        Scope::Station => &STATION_KEYS,
        Scope::Summary => &SUMMARY_KEYS,
        Scope::Process => &FIGURE_KEYS,
        Scope::Shaft => &SHAFT_KEYS,
        Scope::Ambient => &AMBIENT_KEYS,
        Scope::Gas => &[],
    }
}

/// The quantity of a derived value path, if the key is known.
pub fn quantity_of_derived(path: &str) -> Option<Quantity> {
    let p = Path::parse(path).ok()?;
    derived_keys(p.scope)
        .iter()
        .find(|(k, _, _)| *k == p.key)
        .map(|(_, _, q)| *q)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_with_spaces_and_dots() {
        let p = Path::parse("station.test section.mach").unwrap();
        assert_eq!(
            (p.scope, p.name.as_str(), p.key.as_str()),
            (Scope::Station, "test section", "mach")
        );
        let p = Path::parse("process.stage 1.5.pressure_ratio").unwrap();
        assert_eq!(p.name, "stage 1.5");
        assert!(Path::parse("summary.thrust_net").is_ok());
        assert!(Path::parse("station.tt").is_err());
        assert!(Path::parse("nothing").is_err());
    }
}
