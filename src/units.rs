//! Units at the edges: turning what an engineer types ("14.7 psia",
//! "-40 degF", "1e5 Pa") into SI numbers, and SI numbers back into text
//! ("101.325 kPa", "14.696 psia").
//!
//! # Invariants
//!
//! - Everything behind this module is SI: K, Pa, kg/s, m/s, m2, m, J/kg,
//!   J/kg/K, W, N, kg/m3, rad/s (shaft speed), rad (angle), s, kg/N/s
//!   (TSFC) and N s/kg (specific thrust). Ratios and Mach numbers are bare
//!   numbers. A value only carries a unit while it is text.
//! - A unit converts by `si = value * scale + offset`. Only absolute
//!   temperature scales have an offset. A temperature *difference* (a hot
//!   day "ISA +15 degC") is a separate [`Quantity`] with no offset, so
//!   15 degC of difference is 15 K, never 288.15 K.
//! - Every quantity lists its units in a fixed order. The first one is
//!   what a bare number means. That is the SI storage unit everywhere
//!   except rotational speed (a bare number is rpm) and angle (a bare
//!   number is degrees), where a bare rad/s or radian would surprise an
//!   engineer by a factor of about 10 or 57.
//! - Pressures are absolute. Gauge units (psig, barg, kPag) are read as
//!   the barometer plus the reading where a barometer is known
//!   ([`parse_at`]: a workbook with a measured ambient pressure); without
//!   one they are refused with the reason. Through [`to_si`] and
//!   [`from_si`] a gauge unit converts only a pressure *difference* from
//!   ambient.
//! - Parsing never guesses. "1,000" is not a number. A unit belonging to
//!   another quantity is refused with the units that would fit. NaN and
//!   infinity are refused. So are temperatures below absolute zero and
//!   negative absolute pressures. Nothing here panics on any input.
//! - Letter case matters only where it carries meaning. "psia", "PSIA" and
//!   "Psia" are the same unit. "MPa" and "mPa" are not (mega against
//!   milli), so units whose case is a prefix (MPa, MW, MJ/kg, mbar, mm,
//!   mg/N/s) must be typed in their own case. A wrong-case spelling gets a
//!   "did you mean" hint rather than a silent conversion.

use std::f64::consts::PI;
use std::fmt;

use thiserror::Error;

/// A physical quantity that a workbook field can hold.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Quantity {
    /// Absolute (thermodynamic) temperature; SI K.
    Temperature,
    /// A difference of temperatures, such as a hot-day offset; SI K.
    TemperatureDifference,
    /// Absolute pressure; SI Pa.
    Pressure,
    /// Mass flow rate; SI kg/s.
    MassFlow,
    /// Fuel mass flow rate; SI kg/s, read in any mass-flow unit, shown in
    /// lbm/h (pph) in US customary units as the trade does.
    FuelFlow,
    /// Speed of a gas or a vehicle; SI m/s.
    Velocity,
    /// Area; SI m2.
    Area,
    /// Length; SI m.
    Length,
    /// Energy per unit mass (enthalpy, work); SI J/kg.
    SpecificEnergy,
    /// Heat capacity or gas constant per unit mass; SI J/kg/K.
    SpecificHeat,
    /// Power; SI W.
    Power,
    /// Force (thrust); SI N.
    Force,
    /// Density; SI kg/m3.
    Density,
    /// Shaft speed; SI rad/s (a bare number is rpm).
    RotationalSpeed,
    /// Plane angle; SI rad (a bare number is degrees).
    Angle,
    /// Dimensionless ratio; a bare number or a percentage.
    Ratio,
    /// Mach number; a bare number only.
    Mach,
    /// Time; SI s.
    Time,
    /// Thrust-specific fuel consumption; SI kg/N/s.
    ThrustSpecificFuelConsumption,
    /// Thrust per unit air mass flow; SI N s/kg.
    SpecificThrust,
    /// A difference of pressures (dynamic pressure, a differential
    /// reading): SI Pa, shown in psi rather than psia in US units.
    PressureDifference,
    /// Per unit length (a Reynolds number per metre): SI 1/m.
    PerLength,
    /// Flow function W sqrt(Tt)/(A pt): SI kg K^0.5/(N s).
    FlowFunction,
}

impl Quantity {
    /// Every quantity, in declaration order.
    pub const ALL: [Quantity; 23] = [
        Quantity::Temperature,
        Quantity::TemperatureDifference,
        Quantity::Pressure,
        Quantity::MassFlow,
        Quantity::FuelFlow,
        Quantity::Velocity,
        Quantity::Area,
        Quantity::Length,
        Quantity::SpecificEnergy,
        Quantity::SpecificHeat,
        Quantity::Power,
        Quantity::Force,
        Quantity::Density,
        Quantity::RotationalSpeed,
        Quantity::Angle,
        Quantity::Ratio,
        Quantity::Mach,
        Quantity::Time,
        Quantity::ThrustSpecificFuelConsumption,
        Quantity::SpecificThrust,
        Quantity::PressureDifference,
        Quantity::PerLength,
        Quantity::FlowFunction,
    ];

    /// The quantity's name in lower case, as used in messages.
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Temperature => "temperature",
            Quantity::TemperatureDifference => "temperature difference",
            Quantity::Pressure => "pressure",
            Quantity::MassFlow => "mass flow",
            Quantity::FuelFlow => "fuel flow",
            Quantity::Velocity => "velocity",
            Quantity::Area => "area",
            Quantity::Length => "length",
            Quantity::SpecificEnergy => "specific energy",
            Quantity::SpecificHeat => "specific heat",
            Quantity::Power => "power",
            Quantity::Force => "force",
            Quantity::Density => "density",
            Quantity::RotationalSpeed => "rotational speed",
            Quantity::Angle => "angle",
            Quantity::Ratio => "ratio",
            Quantity::Mach => "Mach number",
            Quantity::Time => "time",
            Quantity::ThrustSpecificFuelConsumption => "thrust-specific fuel consumption",
            Quantity::SpecificThrust => "specific thrust",
            Quantity::PressureDifference => "pressure difference",
            Quantity::PerLength => "quantity per length",
            Quantity::FlowFunction => "flow function",
        }
    }

    /// The name with its indefinite article: "a pressure", "an area".
    fn with_article(self) -> String {
        let name = self.name();
        let article = match name.chars().next() {
            Some('a' | 'e' | 'i' | 'o' | 'u') => "an",
            _ => "a",
        };
        format!("{article} {name}")
    }

    /// The unit a bare number means in a field of this quantity: the first
    /// unit of [`units_for`].
    pub fn default_unit(self) -> &'static Unit {
        match self {
            Quantity::Temperature => &T_K,
            Quantity::TemperatureDifference => &DT_K,
            Quantity::Pressure => &PA,
            Quantity::MassFlow | Quantity::FuelFlow => &KG_S,
            Quantity::Velocity => &M_S,
            Quantity::Area => &M2,
            Quantity::Length => &M,
            Quantity::SpecificEnergy => &J_KG,
            Quantity::SpecificHeat => &J_KG_K,
            Quantity::Power => &W,
            Quantity::Force => &N,
            Quantity::Density => &KG_M3,
            Quantity::RotationalSpeed => &RPM,
            Quantity::Angle => &DEG,
            Quantity::Ratio => &RATIO,
            Quantity::Mach => &MACH,
            Quantity::Time => &S,
            Quantity::ThrustSpecificFuelConsumption => &KG_N_S,
            Quantity::SpecificThrust => &N_S_KG,
            Quantity::PressureDifference => &DP_PA,
            Quantity::PerLength => &PER_M,
            Quantity::FlowFunction => &FF_SI,
        }
    }

    /// The quantity whose units this one is read in (a fuel flow is a
    /// mass flow).
    pub fn unit_kind(self) -> Quantity {
        match self {
            Quantity::FuelFlow => Quantity::MassFlow,
            other => other,
        }
    }

    /// The SI symbol of the stored value, e.g. "rad/s" for a rotational
    /// speed. Empty for dimensionless quantities.
    pub fn si_symbol(self) -> &'static str {
        match self {
            Quantity::RotationalSpeed => RAD_S.symbol,
            Quantity::Angle => RAD.symbol,
            other => other.default_unit().symbol,
        }
    }
}

impl fmt::Display for Quantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Which set of units [`format`] and [`display_unit`] use.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum UnitSystem {
    /// SI with engineering prefixes (kPa, kJ/kg, kN).
    #[default]
    Si,
    /// U.S. customary as used on test stands (psia, degR, lbm/s, lbf).
    Us,
}

/// One unit: how to convert it to SI and how an engineer may spell it.
#[derive(Debug, PartialEq)]
pub struct Unit {
    /// The spelling used when printing, e.g. "psia". Empty for a bare number.
    pub symbol: &'static str,
    /// The quantity this unit measures.
    pub quantity: Quantity,
    /// SI value of one of this unit, leaving the offset aside.
    pub scale: f64,
    /// SI value of this unit's zero. Non-zero only for degC and degF.
    pub offset: f64,
    /// Other accepted spellings, e.g. "psi" for psia or "°C" for degC.
    pub aliases: &'static [&'static str],
    /// Whether any letter case is accepted. False where case is a prefix
    /// (MPa against mPa).
    pub fold_case: bool,
    /// A gauge pressure unit, known but refused by [`parse`].
    pub gauge: bool,
}

impl Unit {
    const fn new(
        symbol: &'static str,
        quantity: Quantity,
        scale: f64,
        aliases: &'static [&'static str],
    ) -> Unit {
        Unit {
            symbol,
            quantity,
            scale,
            offset: 0.0,
            aliases,
            fold_case: true,
            gauge: false,
        }
    }

    const fn with_offset(self, offset: f64) -> Unit {
        Unit { offset, ..self }
    }

    const fn case_sensitive(self) -> Unit {
        Unit {
            fold_case: false,
            ..self
        }
    }

    const fn gauge_reading(self) -> Unit {
        Unit {
            gauge: true,
            ..self
        }
    }

    fn spellings(&self) -> impl Iterator<Item = &'static str> {
        std::iter::once(self.symbol).chain(self.aliases.iter().copied())
    }
}

impl fmt::Display for Unit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.symbol)
    }
}

// Exact definitions that the table is built from.
/// International pound, kg (exact by definition).
const LBM: f64 = 0.453_592_37;
/// International foot, m (exact by definition).
const FT: f64 = 0.3048;
/// International inch, m (exact by definition).
const INCH: f64 = 0.0254;
/// Standard gravity, m/s2 (exact by definition).
const G0: f64 = 9.806_65;
/// Pound-force: one pound under standard gravity, N (exact).
const LBF: f64 = LBM * G0;
/// International Table BTU per pound, J/kg: 1055.05585262 J / 0.45359237 kg
/// is 2326 J/kg exactly.
const BTU_PER_LBM: f64 = 2326.0;
/// Conventional inch of mercury: a 1 in column of mercury of density
/// 13595.1 kg/m3 (mercury at 0 degC = 32 degF) under standard gravity,
/// about 3386.389 Pa (density value from memory).
const IN_HG: f64 = 13_595.1 * G0 * INCH;
/// Five ninths: the size of a Fahrenheit or Rankine degree in kelvin.
const RANKINE: f64 = 5.0 / 9.0;

use Quantity as Q;

static T_K: Unit = Unit::new("K", Q::Temperature, 1.0, &["kelvin"]);
static T_DEGC: Unit = Unit::new("degC", Q::Temperature, 1.0, &["deg C", "°C"]).with_offset(273.15);
static T_DEGF: Unit =
    Unit::new("degF", Q::Temperature, RANKINE, &["deg F", "°F"]).with_offset(459.67 * RANKINE);
static T_DEGR: Unit = Unit::new("degR", Q::Temperature, RANKINE, &["deg R", "°R", "R"]);

static DT_K: Unit = Unit::new("K", Q::TemperatureDifference, 1.0, &["kelvin"]);
static DT_DEGC: Unit = Unit::new("degC", Q::TemperatureDifference, 1.0, &["deg C", "°C"]);
static DT_DEGF: Unit = Unit::new("degF", Q::TemperatureDifference, RANKINE, &["deg F", "°F"]);
static DT_DEGR: Unit = Unit::new(
    "degR",
    Q::TemperatureDifference,
    RANKINE,
    &["deg R", "°R", "R"],
);

static PA: Unit = Unit::new("Pa", Q::Pressure, 1.0, &[]);
static KPA: Unit = Unit::new("kPa", Q::Pressure, 1.0e3, &[]);
static MPA: Unit = Unit::new("MPa", Q::Pressure, 1.0e6, &[]).case_sensitive();
static BAR: Unit = Unit::new("bar", Q::Pressure, 1.0e5, &["bara"]);
static MBAR: Unit = Unit::new("mbar", Q::Pressure, 100.0, &["mBar"]).case_sensitive();
static HPA: Unit = Unit::new("hPa", Q::Pressure, 100.0, &[]);
static ATM: Unit = Unit::new("atm", Q::Pressure, 101_325.0, &[]);
static PSIA: Unit = Unit::new(
    "psia",
    Q::Pressure,
    LBF / (INCH * INCH),
    &["psi", "lbf/in2", "lbf/in^2", "lbf/in²"],
);
static INHG: Unit = Unit::new("inHg", Q::Pressure, IN_HG, &["in Hg"]);
static PSIG: Unit = Unit::new("psig", Q::Pressure, LBF / (INCH * INCH), &[]).gauge_reading();
static BARG: Unit = Unit::new("barg", Q::Pressure, 1.0e5, &[]).gauge_reading();
static KPAG: Unit = Unit::new("kPag", Q::Pressure, 1.0e3, &[]).gauge_reading();

static KG_S: Unit = Unit::new("kg/s", Q::MassFlow, 1.0, &[]);
static LBM_S: Unit = Unit::new("lbm/s", Q::MassFlow, LBM, &["lb/s"]);
static KG_H: Unit = Unit::new("kg/h", Q::MassFlow, 1.0 / 3600.0, &["kg/hr"]);
static LBM_H: Unit = Unit::new(
    "lbm/h",
    Q::MassFlow,
    LBM / 3600.0,
    &["lb/h", "lbm/hr", "lb/hr", "pph"],
);

static M_S: Unit = Unit::new("m/s", Q::Velocity, 1.0, &[]);
static FT_S: Unit = Unit::new("ft/s", Q::Velocity, FT, &["fps"]);
static KT: Unit = Unit::new(
    "kt",
    Q::Velocity,
    1852.0 / 3600.0,
    &["kts", "knot", "knots"],
);
static KM_H: Unit = Unit::new("km/h", Q::Velocity, 1000.0 / 3600.0, &["kph"]);
static MPH: Unit = Unit::new("mph", Q::Velocity, 1609.344 / 3600.0, &["mi/h"]);

static M2: Unit = Unit::new("m2", Q::Area, 1.0, &["m^2", "m²", "sq m"]);
static CM2: Unit = Unit::new("cm2", Q::Area, 1.0e-4, &["cm^2", "cm²", "sq cm"]);
static MM2: Unit = Unit::new("mm2", Q::Area, 1.0e-6, &["mm^2", "mm²", "sq mm"]).case_sensitive();
static IN2: Unit = Unit::new("in2", Q::Area, INCH * INCH, &["in^2", "in²", "sq in"]);
static FT2: Unit = Unit::new("ft2", Q::Area, FT * FT, &["ft^2", "ft²", "sq ft"]);

static M: Unit = Unit::new("m", Q::Length, 1.0, &[]);
static CM: Unit = Unit::new("cm", Q::Length, 0.01, &[]);
static MM: Unit = Unit::new("mm", Q::Length, 0.001, &[]).case_sensitive();
static IN: Unit = Unit::new("in", Q::Length, INCH, &["inch", "inches"]);
static FOOT: Unit = Unit::new("ft", Q::Length, FT, &["feet", "foot"]);
static KM: Unit = Unit::new("km", Q::Length, 1000.0, &[]);

static J_KG: Unit = Unit::new("J/kg", Q::SpecificEnergy, 1.0, &[]);
static KJ_KG: Unit = Unit::new("kJ/kg", Q::SpecificEnergy, 1.0e3, &[]);
static MJ_KG: Unit = Unit::new("MJ/kg", Q::SpecificEnergy, 1.0e6, &[]).case_sensitive();
static BTU_LBM: Unit = Unit::new("BTU/lbm", Q::SpecificEnergy, BTU_PER_LBM, &["BTU/lb"]);

static J_KG_K: Unit = Unit::new(
    "J/kg/K",
    Q::SpecificHeat,
    1.0,
    &["J/(kg K)", "J/kg-K", "J/kg K"],
);
static KJ_KG_K: Unit = Unit::new(
    "kJ/kg/K",
    Q::SpecificHeat,
    1.0e3,
    &["kJ/(kg K)", "kJ/kg-K", "kJ/kg K"],
);
static BTU_LBM_R: Unit = Unit::new(
    "BTU/lbm/degR",
    Q::SpecificHeat,
    BTU_PER_LBM / RANKINE,
    &[
        "BTU/(lbm degR)",
        "BTU/lbm-degR",
        "BTU/lbm/°R",
        "BTU/lbm/R",
        "BTU/lb/degR",
        "BTU/lb/R",
        "BTU/lbm/degF",
        "BTU/(lbm degF)",
    ],
);

static W: Unit = Unit::new("W", Q::Power, 1.0, &[]);
static KW: Unit = Unit::new("kW", Q::Power, 1.0e3, &[]);
static MW: Unit = Unit::new("MW", Q::Power, 1.0e6, &[]).case_sensitive();
static HP: Unit = Unit::new("hp", Q::Power, 550.0 * FT * LBF, &[]);

static N: Unit = Unit::new("N", Q::Force, 1.0, &[]);
static KN: Unit = Unit::new("kN", Q::Force, 1.0e3, &[]);
static POUND_FORCE: Unit = Unit::new("lbf", Q::Force, LBF, &[]);

static KG_M3: Unit = Unit::new("kg/m3", Q::Density, 1.0, &["kg/m^3", "kg/m³"]);
static LBM_FT3: Unit = Unit::new(
    "lbm/ft3",
    Q::Density,
    LBM / (FT * FT * FT),
    &["lbm/ft^3", "lbm/ft³", "lb/ft3", "lb/ft^3", "lb/ft³"],
);

static RPM: Unit = Unit::new("rpm", Q::RotationalSpeed, 2.0 * PI / 60.0, &["rev/min"]);
static RAD_S: Unit = Unit::new("rad/s", Q::RotationalSpeed, 1.0, &[]);
static RPS: Unit = Unit::new("rps", Q::RotationalSpeed, 2.0 * PI, &["rev/s"]);

static DEG: Unit = Unit::new("deg", Q::Angle, PI / 180.0, &["°", "degree", "degrees"]);
static RAD: Unit = Unit::new("rad", Q::Angle, 1.0, &["radian", "radians"]);

static RATIO: Unit = Unit::new("", Q::Ratio, 1.0, &[]);
static PERCENT: Unit = Unit::new("%", Q::Ratio, 0.01, &[]);
static G_PER_KG: Unit = Unit::new("g/kg", Q::Ratio, 0.001, &[]);

static MACH: Unit = Unit::new("", Q::Mach, 1.0, &[]);

static S: Unit = Unit::new("s", Q::Time, 1.0, &["sec"]);
static MIN: Unit = Unit::new("min", Q::Time, 60.0, &[]);
static H: Unit = Unit::new("h", Q::Time, 3600.0, &["hr"]);

static KG_N_S: Unit = Unit::new(
    "kg/N/s",
    Q::ThrustSpecificFuelConsumption,
    1.0,
    &["kg/(N s)"],
);
static G_KN_S: Unit = Unit::new(
    "g/(kN s)",
    Q::ThrustSpecificFuelConsumption,
    1.0e-6,
    &["g/kN/s"],
);
static MG_N_S: Unit = Unit::new(
    "mg/N/s",
    Q::ThrustSpecificFuelConsumption,
    1.0e-6,
    &["mg/(N s)"],
)
.case_sensitive();
static LBM_LBF_H: Unit = Unit::new(
    "lbm/(lbf h)",
    Q::ThrustSpecificFuelConsumption,
    LBM / (LBF * 3600.0),
    &[
        "lbm/lbf/h",
        "lbm/lbf/hr",
        "lb/lbf/h",
        "lb/lbf/hr",
        "lb/(lbf h)",
    ],
);

static N_S_KG: Unit = Unit::new("N s/kg", Q::SpecificThrust, 1.0, &["N/(kg/s)", "Ns/kg"]);
static LBF_S_LBM: Unit = Unit::new(
    "lbf s/lbm",
    Q::SpecificThrust,
    LBF / LBM,
    &["lbf/(lbm/s)", "lbf s/lb", "lbf/(lb/s)"],
);

static DP_PA: Unit = Unit::new("Pa", Q::PressureDifference, 1.0, &["Pad"]);
static DP_KPA: Unit = Unit::new("kPa", Q::PressureDifference, 1.0e3, &["kPad"]);
static DP_BAR: Unit = Unit::new("bar", Q::PressureDifference, 1.0e5, &["bard"]);
static DP_MBAR: Unit = Unit::new("mbar", Q::PressureDifference, 100.0, &["mBar"]).case_sensitive();
// "psid", the trade's differential psi: "psi" alone is psia in this
// program, and one spelling never means two units.
static DP_PSI: Unit = Unit::new("psid", Q::PressureDifference, LBF / (INCH * INCH), &[]);

static PER_M: Unit = Unit::new("/m", Q::PerLength, 1.0, &["per m", "per metre"]);
static PER_FT: Unit = Unit::new("/ft", Q::PerLength, 1.0 / FT, &["per ft", "per foot"]);

static FF_SI: Unit = Unit::new("kg K^0.5/(N s)", Q::FlowFunction, 1.0, &["kg K^0.5/N/s"]);
/// lbm R^0.5/(lbf s): the US form of W sqrt(Tt)/(A pt), with A in in2 and
/// pt in psia folded into the lbf.
static FF_US: Unit = Unit::new(
    "lbm R^0.5/(lbf s)",
    Q::FlowFunction,
    // 1 lbm sqrt(degR) / (1 lbf 1 s) in kg sqrt(K) / (N s): sqrt(5/9) for
    // the root of the temperature scale.
    LBM * 0.745_355_992_499_929_9 / LBF,
    &["lbm R^0.5/lbf/s"],
);

/// Every unit, grouped by quantity; within a quantity the first is what a
/// bare number means.
static UNITS: &[&Unit] = &[
    &T_K,
    &T_DEGC,
    &T_DEGF,
    &T_DEGR,
    &DT_K,
    &DT_DEGC,
    &DT_DEGF,
    &DT_DEGR,
    &PA,
    &KPA,
    &MPA,
    &BAR,
    &MBAR,
    &HPA,
    &ATM,
    &PSIA,
    &INHG,
    &PSIG,
    &BARG,
    &KPAG,
    &KG_S,
    &LBM_S,
    &KG_H,
    &LBM_H,
    &M_S,
    &FT_S,
    &KT,
    &KM_H,
    &MPH,
    &M2,
    &CM2,
    &MM2,
    &IN2,
    &FT2,
    &M,
    &CM,
    &MM,
    &IN,
    &FOOT,
    &KM,
    &J_KG,
    &KJ_KG,
    &MJ_KG,
    &BTU_LBM,
    &J_KG_K,
    &KJ_KG_K,
    &BTU_LBM_R,
    &W,
    &KW,
    &MW,
    &HP,
    &N,
    &KN,
    &POUND_FORCE,
    &KG_M3,
    &LBM_FT3,
    &RPM,
    &RAD_S,
    &RPS,
    &DEG,
    &RAD,
    &RATIO,
    &PERCENT,
    &G_PER_KG,
    &MACH,
    &S,
    &MIN,
    &H,
    &KG_N_S,
    &G_KN_S,
    &MG_N_S,
    &LBM_LBF_H,
    &N_S_KG,
    &LBF_S_LBM,
    &DP_PA,
    &DP_KPA,
    &DP_BAR,
    &DP_MBAR,
    &DP_PSI,
    &PER_M,
    &PER_FT,
    &FF_SI,
    &FF_US,
];

/// Bare letters that engineers type for temperatures but which this module
/// does not accept (C is also the coulomb, F the farad, and R reads as the
/// gas constant on a data sheet), with the spelling to suggest instead.
const BARE_LETTER_HINTS: &[(&str, &str)] = &[
    ("C", "degC"),
    ("c", "degC"),
    ("F", "degF"),
    ("f", "degF"),
    ("R", "degR"),
    ("r", "degR"),
];

/// Why a typed value was refused. Every variant names the field and quotes
/// what was typed, so the message stands on its own in a problem list.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum UnitError {
    /// Nothing but white space was entered.
    #[error("{field}: no value entered; {}", accepts_phrase(.expected))]
    Empty {
        /// The field's label.
        field: String,
        /// What the field holds.
        expected: Quantity,
    },
    /// The text does not start with a plain decimal number.
    #[error("{field} \"{text}\": not a number{}", not_a_number_hint(.text))]
    NotANumber {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
    },
    /// The unit is not in the table at all.
    #[error(
        "{field} \"{text}\": \"{unit}\" is not a known unit{}; {}",
        .suggestion.map(|s| format!(" (did you mean {s}?)")).unwrap_or_default(),
        accepts_phrase(.expected)
    )]
    UnknownUnit {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// The unit part of what was typed.
        unit: String,
        /// What the field holds.
        expected: Quantity,
        /// The field's accepted units, as [`accepted`] lists them.
        accepted: String,
        /// A known spelling the engineer probably meant (a case slip such
        /// as "mpa", or a bare "C").
        suggestion: Option<&'static str>,
    },
    /// The unit is known but measures something else.
    #[error(
        "{field} \"{text}\": {unit} is {} unit; {}",
        .found.with_article(),
        accepts_phrase(.expected)
    )]
    WrongQuantity {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// The unit's symbol.
        unit: &'static str,
        /// What the field holds.
        expected: Quantity,
        /// What the unit measures.
        found: Quantity,
        /// The field's accepted units, as [`accepted`] lists them.
        accepted: String,
    },
    /// A bare number typed where the screen shows a unit: refused rather
    /// than read in the SI base unit (60 typed under "psia" is not 60 Pa).
    #[error(
        "{field} \"{text}\": say the unit ({}); a number without one would be read in {}",
        accepted(*.expected),
        .expected.default_unit().symbol
    )]
    NoUnit {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// What the field holds.
        expected: Quantity,
    },
    /// NaN, infinity, or a number that overflows once converted to SI.
    #[error("{field} \"{text}\": not a finite number")]
    NotFinite {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
    },
    /// A gauge pressure unit (psig, barg), which needs a barometer reading.
    #[error(
        "{field} \"{text}\": {unit} is a gauge reading, relative to the local \
         barometer, and this workbook has none: give the ambient block a \
         measured pressure (set-up, g: ambient measured p and T), or enter an \
         absolute pressure ({})",
        accepted(Quantity::Pressure)
    )]
    GaugePressure {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// The gauge unit's symbol.
        unit: &'static str,
    },
    /// An absolute temperature below 0 K.
    #[error("{field} \"{text}\": {kelvin:.2} K is below absolute zero")]
    BelowAbsoluteZero {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// The value converted to kelvin.
        kelvin: f64,
    },
    /// An absolute pressure below 0 Pa.
    #[error("{field} \"{text}\": an absolute pressure cannot be negative")]
    NegativePressure {
        /// The field's label.
        field: String,
        /// What was typed.
        text: String,
        /// The value converted to pascal.
        pascal: f64,
    },
}

fn not_a_number_hint(text: &str) -> &'static str {
    if text.contains(',') {
        " (write 1000 or 1e3: a comma is read neither as a thousands separator nor as a decimal point)"
    } else {
        ""
    }
}

/// "a pressure accepts Pa, kPa, ..." or "a Mach number takes no unit".
fn accepts_phrase(quantity: &Quantity) -> String {
    let quantity = *quantity;
    let named: Vec<&str> = units_for(quantity)
        .map(|u| u.symbol)
        .filter(|s| !s.is_empty())
        .collect();
    let bare_allowed = units_for(quantity).any(|u| u.symbol.is_empty());
    let who = quantity.with_article();
    match (bare_allowed, named.is_empty()) {
        (true, true) => format!("{who} takes no unit"),
        (true, false) => format!("{who} accepts no unit or {}", named.join(", ")),
        _ => format!(
            "{who} accepts {} (a bare number is {})",
            named.join(", "),
            quantity.default_unit().symbol
        ),
    }
}

/// A parsed value: its SI value and the unit it was typed in (the field's
/// default unit when no unit was typed), so a front end can echo it back in
/// the engineer's own unit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parsed {
    /// The value in SI.
    pub si: f64,
    /// The unit as typed.
    pub unit: &'static Unit,
}

/// The units accepted for a quantity, first the one a bare number means.
/// Gauge units are left out: they are known but not accepted.
pub fn units_for(quantity: Quantity) -> impl Iterator<Item = &'static Unit> {
    UNITS
        .iter()
        .copied()
        .filter(move |u| u.quantity == quantity.unit_kind() && !u.gauge)
}

/// Every unit known, including gauge units.
pub fn all_units() -> impl Iterator<Item = &'static Unit> {
    UNITS.iter().copied()
}

/// The accepted symbols of a quantity, comma separated: "K, degC, degF,
/// degR". A bare number shows as "no unit".
pub fn accepted(quantity: Quantity) -> String {
    units_for(quantity)
        // g/kg is read for a humidity but not offered for every ratio (a
        // nozzle coefficient in g/kg would only confuse).
        .filter(|u| !std::ptr::eq(*u, &G_PER_KG))
        .map(|u| {
            if u.symbol.is_empty() {
                "no unit"
            } else {
                u.symbol
            }
        })
        .collect::<Vec<_>>()
        .join(", ")
}

/// Collapse white space, drop spaces around "/", "(", ")" and "^", and
/// read "·", "*" and "×" as a space, so "N*s / kg" reads as "N s/kg".
fn normalize_symbol(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut space = false;
    for c in text.trim().chars() {
        let c = match c {
            '·' | '⋅' | '*' | '×' => ' ',
            'º' | '˚' => '°',
            other => other,
        };
        if c.is_whitespace() {
            space = true;
            continue;
        }
        let glue = |x: char| matches!(x, '/' | '(' | ')' | '^' | '°');
        if space && !out.is_empty() && !glue(c) && !out.ends_with(glue) {
            out.push(' ');
        }
        space = false;
        out.push(c);
    }
    out
}

/// Find `symbol` (already normalized) among the units of `scope`, or all
/// units when `scope` is `None`: an exact spelling first, then any letter
/// case for units whose case carries no meaning.
fn find_in(scope: Option<Quantity>, symbol: &str) -> Option<&'static Unit> {
    let in_scope = move |u: &&'static Unit| scope.is_none_or(|q| u.quantity == q.unit_kind());
    if let Some(u) = all_units()
        .filter(in_scope)
        .find(|u| u.spellings().any(|s| s == symbol))
    {
        return Some(u);
    }
    let lower = symbol.to_lowercase();
    all_units()
        .filter(in_scope)
        .filter(|u| u.fold_case)
        .find(|u| u.spellings().any(|s| s.to_lowercase() == lower))
}

/// Look a unit up by what an engineer typed, across all quantities.
///
/// An exact spelling wins; otherwise any letter case is accepted for units
/// whose case carries no meaning. Symbols shared by two quantities ("K",
/// "degC" for a temperature and a temperature difference) give the
/// absolute temperature; use [`find_unit_for`] when the quantity is known.
/// An empty symbol gives `None`.
pub fn find_unit(symbol: &str) -> Option<&'static Unit> {
    let symbol = normalize_symbol(symbol);
    if symbol.is_empty() {
        return None;
    }
    find_in(None, &symbol)
}

/// Look a unit up, preferring the units of `quantity`, then any quantity.
/// Gauge units are found (so [`parse`] can say why it refuses them).
pub fn find_unit_for(symbol: &str, quantity: Quantity) -> Option<&'static Unit> {
    let symbol = normalize_symbol(symbol);
    if symbol.is_empty() {
        return None;
    }
    find_in(Some(quantity), &symbol).or_else(|| find_in(None, &symbol))
}

/// A spelling the engineer probably meant: a case slip on a case-sensitive
/// unit ("mpa"), or a bare temperature letter ("C").
fn suggest(symbol: &str, quantity: Quantity) -> Option<&'static str> {
    let symbol = normalize_symbol(symbol);
    if let Some((_, hint)) = BARE_LETTER_HINTS.iter().find(|(bare, _)| *bare == symbol) {
        return Some(hint);
    }
    let lower = symbol.to_lowercase();
    let matches = |u: &&'static Unit| u.spellings().any(|s| s.to_lowercase() == lower);
    all_units()
        .filter(|u| u.quantity == quantity.unit_kind())
        .find(matches)
        .or_else(|| all_units().find(matches))
        .map(|u| u.symbol)
}

/// Split a leading decimal number ("-1.5e3") from the rest of the text.
/// The number is: optional sign, digits with an optional point, and an
/// exponent only when digits follow the "e".
fn split_number(text: &str) -> (&str, &str) {
    let bytes = text.as_bytes();
    let mut i = 0;
    if matches!(bytes.first(), Some(b'+' | b'-')) {
        i += 1;
    }
    let digits_start = i;
    while bytes.get(i).is_some_and(u8::is_ascii_digit) {
        i += 1;
    }
    let mut mantissa_digits = i - digits_start;
    if bytes.get(i) == Some(&b'.') {
        let frac_start = i + 1;
        let mut j = frac_start;
        while bytes.get(j).is_some_and(u8::is_ascii_digit) {
            j += 1;
        }
        mantissa_digits += j - frac_start;
        if mantissa_digits > 0 {
            i = j;
        }
    }
    if mantissa_digits == 0 {
        return ("", text);
    }
    if matches!(bytes.get(i), Some(b'e' | b'E')) {
        let mut j = i + 1;
        if matches!(bytes.get(j), Some(b'+' | b'-')) {
            j += 1;
        }
        let exp_start = j;
        while bytes.get(j).is_some_and(u8::is_ascii_digit) {
            j += 1;
        }
        if j > exp_start {
            i = j;
        }
    }
    // Every byte consumed is ASCII, so `i` is a character boundary.
    text.split_at_checked(i).unwrap_or(("", text))
}

fn names_non_finite(text: &str) -> bool {
    let lower = text.trim_start_matches(['+', '-']).to_ascii_lowercase();
    lower.starts_with("inf") || lower.starts_with("nan")
}

/// The gauge reading (Pa above the barometer) of a text with a gauge unit
/// ("5 psig"); `None` for an absolute value or a text that does not parse.
pub fn gauge_reading(text: &str) -> Option<f64> {
    let text = text.trim().replace('\u{2212}', "-");
    let (number, rest) = split_number(&text);
    let unit = find_unit_for(rest.trim(), Quantity::Pressure).filter(|u| u.gauge)?;
    let v: f64 = number.parse().ok()?;
    Some(to_si(v, unit)).filter(|x| x.is_finite())
}

/// Parse what a user typed at a prompt or on the command line, where
/// values are shown in `system`'s display units: as [`parse`], but a bare
/// number is refused where the display unit is not the one a bare number
/// is read in (60 typed where pressures show in kPa or psia is not 60 Pa).
/// Zero is zero in any unit, but for temperatures.
pub fn parse_stated(
    text: &str,
    quantity: Quantity,
    field: &str,
    system: UnitSystem,
) -> Result<Parsed, UnitError> {
    parse_stated_at(text, quantity, field, system, None)
}

/// [`parse_stated`] where the barometer (Pa) is known: gauge pressures are
/// read from it ([`parse_at`]).
pub fn parse_stated_at(
    text: &str,
    quantity: Quantity,
    field: &str,
    system: UnitSystem,
    barometer: Option<f64>,
) -> Result<Parsed, UnitError> {
    let bare = text.trim().parse::<f64>().ok();
    let shown_as_read = display_unit(quantity, system).symbol == quantity.default_unit().symbol;
    if let Some(v) = bare
        && !shown_as_read
        && (v != 0.0 || quantity == Quantity::Temperature)
    {
        return Err(UnitError::NoUnit {
            field: field.to_string(),
            text: text.trim().to_string(),
            expected: quantity,
        });
    }
    parse_at(text, quantity, field, barometer)
}

/// Parse what an engineer typed into a field holding `quantity`.
///
/// Accepts a decimal number, optionally followed (with or without a space)
/// by a unit of that quantity: "14.7 psia", "14.7psia", " 1350 K ",
/// "-40 degF", "1e5 Pa", "4 %". A bare number is in the quantity's
/// [`Quantity::default_unit`]. `field` names the field in any error.
pub fn parse(text: &str, quantity: Quantity, field: &str) -> Result<Parsed, UnitError> {
    parse_at(text, quantity, field, None)
}

/// [`parse`] where the local barometric pressure is known (Pa): a gauge
/// pressure ("5 psig", "0.3 barg") is read as the barometer plus the
/// reading. Without a barometer a gauge unit is refused.
pub fn parse_at(
    text: &str,
    quantity: Quantity,
    field: &str,
    barometer: Option<f64>,
) -> Result<Parsed, UnitError> {
    let original = text;
    let text = text.trim().replace('\u{2212}', "-");
    let field_s = || field.to_string();
    let text_s = || original.trim().to_string();
    if text.is_empty() {
        return Err(UnitError::Empty {
            field: field_s(),
            expected: quantity,
        });
    }
    let (number, rest) = split_number(&text);
    if number.is_empty() {
        return Err(if names_non_finite(&text) {
            UnitError::NotFinite {
                field: field_s(),
                text: text_s(),
            }
        } else {
            UnitError::NotANumber {
                field: field_s(),
                text: text_s(),
            }
        });
    }
    let rest = rest.trim();
    // "1,000", "1.2.3" or "1 000": more number-like text follows the number.
    if rest
        .chars()
        .next()
        .is_some_and(|c| c.is_ascii_digit() || matches!(c, ',' | '.' | '_' | '\'' | '+' | '-'))
    {
        return Err(UnitError::NotANumber {
            field: field_s(),
            text: text_s(),
        });
    }
    let value: f64 = number.parse().map_err(|_| UnitError::NotANumber {
        field: field_s(),
        text: text_s(),
    })?;
    if !value.is_finite() {
        return Err(UnitError::NotFinite {
            field: field_s(),
            text: text_s(),
        });
    }
    let unit = if rest.is_empty() {
        quantity.default_unit()
    } else {
        find_unit_for(rest, quantity).ok_or_else(|| UnitError::UnknownUnit {
            field: field_s(),
            text: text_s(),
            unit: rest.to_string(),
            expected: quantity,
            accepted: accepted(quantity),
            suggestion: suggest(rest, quantity),
        })?
    };
    if unit.quantity != quantity.unit_kind() {
        return Err(UnitError::WrongQuantity {
            field: field_s(),
            text: text_s(),
            unit: unit.symbol,
            expected: quantity,
            found: unit.quantity,
            accepted: accepted(quantity),
        });
    }
    let base = match (unit.gauge, barometer) {
        (false, _) => 0.0,
        (true, Some(b)) if b.is_finite() => b,
        (true, _) => {
            return Err(UnitError::GaugePressure {
                field: field_s(),
                text: text_s(),
                unit: unit.symbol,
            });
        }
    };
    let si = to_si(value, unit) + base;
    if !si.is_finite() {
        return Err(UnitError::NotFinite {
            field: field_s(),
            text: text_s(),
        });
    }
    match quantity {
        Quantity::Temperature if si < 0.0 => Err(UnitError::BelowAbsoluteZero {
            field: field_s(),
            text: text_s(),
            kelvin: si,
        }),
        Quantity::Pressure if si < 0.0 => Err(UnitError::NegativePressure {
            field: field_s(),
            text: text_s(),
            pascal: si,
        }),
        _ => Ok(Parsed { si, unit }),
    }
}

/// Convert a value in `unit` to SI: `value * scale + offset`.
pub fn to_si(value: f64, unit: &Unit) -> f64 {
    value * unit.scale + unit.offset
}

/// Convert an SI value to `unit`: `(si - offset) / scale`.
pub fn from_si(si: f64, unit: &Unit) -> f64 {
    (si - unit.offset) / unit.scale
}

/// The unit [`format`] prints a quantity in for a unit system.
pub fn display_unit(quantity: Quantity, system: UnitSystem) -> &'static Unit {
    use UnitSystem::{Si, Us};
    match (quantity, system) {
        (Q::Temperature, Si) => &T_K,
        (Q::Temperature, Us) => &T_DEGR,
        (Q::TemperatureDifference, Si) => &DT_K,
        (Q::TemperatureDifference, Us) => &DT_DEGF,
        (Q::Pressure, Si) => &KPA,
        (Q::Pressure, Us) => &PSIA,
        (Q::MassFlow, Si) => &KG_S,
        (Q::MassFlow, Us) => &LBM_S,
        (Q::FuelFlow, Si) => &KG_S,
        // The trade's pounds per hour (pph).
        (Q::FuelFlow, Us) => &LBM_H,
        (Q::Velocity, Si) => &M_S,
        (Q::Velocity, Us) => &FT_S,
        (Q::Area, Si) => &M2,
        (Q::Area, Us) => &IN2,
        (Q::Length, Si) => &M,
        // Feet: altitudes and duct lengths read naturally (472441 in did not).
        (Q::Length, Us) => &FOOT,
        (Q::SpecificEnergy, Si) => &KJ_KG,
        (Q::SpecificEnergy, Us) => &BTU_LBM,
        (Q::SpecificHeat, Si) => &J_KG_K,
        (Q::SpecificHeat, Us) => &BTU_LBM_R,
        (Q::Power, Si) => &KW,
        (Q::Power, Us) => &HP,
        (Q::Force, Si) => &KN,
        (Q::Force, Us) => &POUND_FORCE,
        (Q::Density, Si) => &KG_M3,
        (Q::Density, Us) => &LBM_FT3,
        (Q::RotationalSpeed, _) => &RPM,
        (Q::Angle, _) => &DEG,
        (Q::Ratio, _) => &RATIO,
        (Q::Mach, _) => &MACH,
        (Q::Time, _) => &S,
        (Q::ThrustSpecificFuelConsumption, Si) => &G_KN_S,
        (Q::ThrustSpecificFuelConsumption, Us) => &LBM_LBF_H,
        (Q::SpecificThrust, Si) => &N_S_KG,
        (Q::SpecificThrust, Us) => &LBF_S_LBM,
        (Q::PressureDifference, Si) => &DP_KPA,
        (Q::PressureDifference, Us) => &DP_PSI,
        (Q::PerLength, Si) => &PER_M,
        (Q::PerLength, Us) => &PER_FT,
        (Q::FlowFunction, Si) => &FF_SI,
        (Q::FlowFunction, Us) => &FF_US,
    }
}

/// Significant digits [`format`] shows. Five everywhere, except six for
/// pressures in kPa: "101.325 kPa" then resolves 1 Pa, about what "14.696
/// psia" resolves (7 Pa).
pub fn display_digits(quantity: Quantity, system: UnitSystem) -> usize {
    match (quantity, system) {
        (Quantity::Pressure, UnitSystem::Si) => 6,
        _ => 5,
    }
}

/// Print an SI value in the display unit of `system`, e.g. "101.325 kPa"
/// or "14.696 psia", with [`display_digits`] significant digits.
pub fn format(si: f64, quantity: Quantity, system: UnitSystem) -> String {
    format_in(
        si,
        display_unit(quantity, system),
        display_digits(quantity, system),
    )
}

/// Print an SI value in `unit` with `digits` significant digits (1 to 17),
/// trailing zeros dropped, never "-0". Very large or small magnitudes
/// (below 1e-4 or from 1e9) are printed as "1.2345e-5". The result parses
/// back with [`parse`].
pub fn format_in(si: f64, unit: &Unit, digits: usize) -> String {
    let number = format_significant(shown_in(si, unit), digits);
    if unit.symbol.is_empty() {
        number
    } else {
        format!("{number} {}", unit.symbol)
    }
}

/// An SI value in `unit` for printing: a unit with an offset turns, say,
/// 255.3722 K into 1e-14 degF by rounding; that is printed as the zero it is.
pub fn shown_in(si: f64, unit: &Unit) -> f64 {
    let value = from_si(si, unit);
    if unit.offset != 0.0 && value.abs() <= 1e-9 * (unit.offset / unit.scale).abs() {
        0.0
    } else {
        value
    }
}

/// `value` to `digits` significant digits, trailing zeros dropped.
fn format_significant(value: f64, digits: usize) -> String {
    if !value.is_finite() {
        return format!("{value}");
    }
    if value == 0.0 {
        return "0".to_string();
    }
    let digits = digits.clamp(1, 17);
    // Rust's exponent formatting rounds correctly, including a carry into
    // the next decade (9.99996 -> 1.0000e1), so take digits and exponent
    // from it and place the point ourselves.
    let sci = format!("{:.*e}", digits - 1, value.abs());
    let (mantissa, exponent) = sci.split_once('e').unwrap_or((sci.as_str(), "0"));
    let exponent: i32 = exponent.parse().unwrap_or(0);
    let sign = if value < 0.0 { "-" } else { "" };
    if !(-4..9).contains(&exponent) {
        let mantissa = trim_fraction(mantissa);
        return format!("{sign}{mantissa}e{exponent}");
    }
    let all: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let text = if exponent >= 0 {
        let int_len = exponent as usize + 1;
        if all.len() <= int_len {
            format!("{all}{}", "0".repeat(int_len - all.len()))
        } else {
            let (int_part, frac) = all.split_at(int_len);
            format!("{int_part}.{frac}")
        }
    } else {
        let zeros = "0".repeat((-exponent - 1) as usize);
        format!("0.{zeros}{all}")
    };
    format!("{sign}{}", trim_fraction(&text))
}

fn trim_fraction(text: &str) -> &str {
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.')
    } else {
        text
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    fn si(text: &str, quantity: Quantity) -> f64 {
        parse(text, quantity, "test field").unwrap().si
    }

    fn err(text: &str, quantity: Quantity, field: &str) -> UnitError {
        parse(text, quantity, field).unwrap_err()
    }

    #[test]
    fn a_stated_value_with_a_dimension_must_say_its_unit() {
        let (si, us) = (UnitSystem::Si, UnitSystem::Us);
        // 60 typed where pressures show in kPa is not 60 Pa: refused, with the units.
        let e = parse_stated("60", Quantity::Pressure, "pt", si).unwrap_err();
        assert!(matches!(e, UnitError::NoUnit { .. }), "{e}");
        assert!(
            e.to_string().contains("psia") && e.to_string().contains("read in Pa"),
            "{e}"
        );
        // Where temperatures show in K, 300 is 300 K; where they show in
        // degF it must say so, zero included.
        assert_eq!(
            parse_stated("300", Quantity::Temperature, "tt", si)
                .unwrap()
                .si,
            300.0
        );
        assert!(parse_stated("300", Quantity::Temperature, "tt", us).is_err());
        assert!(parse_stated("0", Quantity::Temperature, "tt", us).is_err());
        // Zero of a length is zero in any unit; ratios and Mach numbers
        // have no unit to say.
        assert_eq!(
            parse_stated("0", Quantity::Length, "altitude", us)
                .unwrap()
                .si,
            0.0
        );
        assert_eq!(
            parse_stated("0.98", Quantity::Ratio, "cv", us).unwrap().si,
            0.98
        );
        assert_eq!(
            parse_stated("2.5", Quantity::Mach, "M", si).unwrap().si,
            2.5
        );
        // With the unit, as parse: 1 psi = 6894.757293168 Pa (NIST SP 811, from memory).
        assert_relative_eq!(
            parse_stated("14.7 psia", Quantity::Pressure, "pt", us)
                .unwrap()
                .si,
            14.7 * 6894.757293168,
            max_relative = 1e-12
        );
    }

    // ---- Exact definitions -------------------------------------------

    #[test]
    fn psia_from_the_international_pound_and_inch() {
        // 1 psi = 4.4482216152605 N / (0.0254 m)^2 = 6894.757293168 Pa;
        // 14.7 psia = 101352.932 Pa.
        assert!((si("14.7 psia", Q::Pressure) - 101_352.932).abs() < 5e-4);
        assert_relative_eq!(
            si("1 psi", Q::Pressure),
            6_894.757_293_168,
            max_relative = 1e-12
        );
    }

    #[test]
    fn fahrenheit_and_celsius_by_definition() {
        // degF = degR - 459.67, degR = 5/9 K, degC = K - 273.15 (definitions).
        assert_relative_eq!(si("59 degF", Q::Temperature), 288.15, max_relative = 1e-12);
        assert_relative_eq!(si("-40 degF", Q::Temperature), 233.15, max_relative = 1e-12);
        assert_relative_eq!(si("-40 degC", Q::Temperature), 233.15, max_relative = 1e-12);
        assert_relative_eq!(si("0 °C", Q::Temperature), 273.15, max_relative = 1e-12);
        assert_relative_eq!(
            si("518.67 degR", Q::Temperature),
            288.15,
            max_relative = 1e-12
        );
        assert_relative_eq!(si("212 °F", Q::Temperature), 373.15, max_relative = 1e-12);
    }

    #[test]
    fn temperature_differences_have_no_offset() {
        // A 1 degC step is 1 K; a 1 degF step is 5/9 K (definitions).
        assert_relative_eq!(
            si("+15 degC", Q::TemperatureDifference),
            15.0,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            si("27 degF", Q::TemperatureDifference),
            15.0,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            si("-9 degR", Q::TemperatureDifference),
            -5.0,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            si("15", Q::TemperatureDifference),
            15.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn atmosphere_and_mercury() {
        // 1 atm = 101325 Pa exactly (definition). Conventional inHg:
        // 13595.1 kg/m3 x 9.80665 m/s2 x 0.0254 m = 3386.389 Pa, so 1 atm is
        // 29.921 inHg, the familiar altimeter setting (from memory).
        assert_eq!(si("1 atm", Q::Pressure), 101_325.0);
        assert_relative_eq!(si("1 inHg", Q::Pressure), 3386.389, max_relative = 1e-6);
        assert_relative_eq!(101_325.0 / IN_HG, 29.9213, max_relative = 2e-6);
        assert_eq!(si("1013.25 hPa", Q::Pressure), 101_325.0);
        assert_eq!(si("1013.25 mbar", Q::Pressure), 101_325.0);
        assert_relative_eq!(
            si("1.01325 bar", Q::Pressure),
            101_325.0,
            max_relative = 1e-15
        );
        assert_relative_eq!(
            si("0.101325 MPa", Q::Pressure),
            101_325.0,
            max_relative = 1e-15
        );
    }

    #[test]
    fn velocities_by_definition() {
        // 1 kt = 1852 m/h (international nautical mile); 1 mph = 1609.344 m/h.
        assert_relative_eq!(si("1 kt", Q::Velocity), 0.514_444, max_relative = 1e-6);
        assert_relative_eq!(si("1 mph", Q::Velocity), 0.447_04, max_relative = 1e-12);
        assert_relative_eq!(si("3.6 km/h", Q::Velocity), 1.0, max_relative = 1e-12);
        assert_relative_eq!(si("1 ft/s", Q::Velocity), 0.3048, max_relative = 1e-15);
    }

    #[test]
    fn areas_and_lengths_by_definition() {
        // 1 in = 0.0254 m exactly, so 1 in2 = 6.4516e-4 m2 exactly.
        assert_relative_eq!(si("1 in2", Q::Area), 6.4516e-4, max_relative = 1e-15);
        assert_relative_eq!(si("1 sq in", Q::Area), 6.4516e-4, max_relative = 1e-15);
        assert_relative_eq!(si("1 ft²", Q::Area), 0.092_903_04, max_relative = 1e-15);
        assert_relative_eq!(si("250 mm2", Q::Area), 2.5e-4, max_relative = 1e-15);
        assert_relative_eq!(si("12 in", Q::Length), 0.3048, max_relative = 1e-15);
        assert_relative_eq!(si("1 km", Q::Length), 1000.0, max_relative = 1e-15);
    }

    #[test]
    fn force_energy_and_power_by_definition() {
        // 1 lbf = 0.45359237 kg x 9.80665 m/s2 = 4.4482216152605 N exactly.
        assert_relative_eq!(
            si("1 lbf", Q::Force),
            4.448_221_615_260_5,
            max_relative = 1e-15
        );
        // International Table BTU = 1055.05585262 J, so 1 BTU/lbm is
        // 1055.05585262 / 0.45359237 = 2326 J/kg exactly.
        assert_relative_eq!(1_055.055_852_62 / LBM, 2326.0, max_relative = 1e-14);
        assert_eq!(si("1 BTU/lbm", Q::SpecificEnergy), 2326.0);
        // 1 BTU/lbm/degR = 2326 J/kg / (5/9 K) = 4186.8 J/kg/K exactly.
        assert_relative_eq!(
            si("1 BTU/lbm/degR", Q::SpecificHeat),
            4186.8,
            max_relative = 1e-14
        );
        // Mechanical horsepower: 550 ft lbf/s = 745.69987158227022 W.
        assert_relative_eq!(
            si("1 hp", Q::Power),
            745.699_871_582_270_2,
            max_relative = 1e-15
        );
        assert_relative_eq!(si("2.5 MW", Q::Power), 2.5e6, max_relative = 1e-15);
    }

    #[test]
    fn mass_flow_density_and_speeds_by_definition() {
        assert_relative_eq!(
            si("1 lbm/s", Q::MassFlow),
            0.453_592_37,
            max_relative = 1e-15
        );
        assert_relative_eq!(
            si("3600 lb/h", Q::MassFlow),
            0.453_592_37,
            max_relative = 1e-15
        );
        assert_relative_eq!(si("3600 kg/h", Q::MassFlow), 1.0, max_relative = 1e-15);
        // 1 lbm/ft3 = 0.45359237 / 0.3048^3 = 16.018463 kg/m3.
        assert_relative_eq!(si("1 lbm/ft3", Q::Density), 16.018_463, max_relative = 1e-7);
        // 60 rpm is one revolution, 2 pi rad, per second.
        assert_relative_eq!(
            si("60 rpm", Q::RotationalSpeed),
            2.0 * PI,
            max_relative = 1e-15
        );
        assert_relative_eq!(
            si("1 rps", Q::RotationalSpeed),
            2.0 * PI,
            max_relative = 1e-15
        );
        assert_relative_eq!(si("90 deg", Q::Angle), PI / 2.0, max_relative = 1e-15);
        assert_relative_eq!(si("2 min", Q::Time), 120.0, max_relative = 1e-15);
    }

    #[test]
    fn propulsion_units_by_definition() {
        // 1 lbf s/lbm = g0 N s/kg exactly (the pound mass cancels).
        assert_relative_eq!(
            si("1 lbf s/lbm", Q::SpecificThrust),
            9.806_65,
            max_relative = 1e-15
        );
        // 1 lbm/(lbf h) = 0.45359237 / (4.4482216152605 x 3600) kg/N/s
        // = 28.32545 g/kN/s.
        let tsfc = si("1 lbm/lbf/h", Q::ThrustSpecificFuelConsumption);
        assert_relative_eq!(tsfc, 28.325_45e-6, max_relative = 1e-6);
        assert_relative_eq!(
            si("17 g/kN/s", Q::ThrustSpecificFuelConsumption),
            si("17 mg/N/s", Q::ThrustSpecificFuelConsumption),
            max_relative = 1e-15
        );
        assert_relative_eq!(
            si("1.7e-5 kg/(N s)", Q::ThrustSpecificFuelConsumption),
            17e-6,
            max_relative = 1e-15
        );
    }

    #[test]
    fn ratios_and_mach() {
        assert_relative_eq!(si("4 %", Q::Ratio), 0.04, max_relative = 1e-15);
        assert_relative_eq!(si("4%", Q::Ratio), 0.04, max_relative = 1e-15);
        assert_eq!(si("0.85", Q::Ratio), 0.85);
        assert_eq!(si("0.85", Q::Mach), 0.85);
        let e = err("0.8 %", Q::Mach, "Mach number");
        assert_eq!(
            e.to_string(),
            "Mach number \"0.8 %\": % is a ratio unit; a Mach number takes no unit"
        );
    }

    // ---- Parsing forms -------------------------------------------------

    #[test]
    fn spacing_and_case_variants() {
        let p = si("14.7 psia", Q::Pressure);
        assert_eq!(si("14.7psia", Q::Pressure), p);
        assert_eq!(si("  14.7   PSIA ", Q::Pressure), p);
        assert_eq!(si("14.7 psi", Q::Pressure), p);
        assert_eq!(si(" 1350 K ", Q::Temperature), 1350.0);
        assert_eq!(si("1350 kelvin", Q::Temperature), 1350.0);
        assert_eq!(si("1e5 Pa", Q::Pressure), 1.0e5);
        assert_eq!(si("1E5Pa", Q::Pressure), 1.0e5);
        assert_eq!(si("0.25 m2", Q::Area), 0.25);
        assert_eq!(si("0.25 m^2", Q::Area), 0.25);
        assert_eq!(si("0.25 m²", Q::Area), 0.25);
        assert_eq!(si(".5 m", Q::Length), 0.5);
        assert_eq!(si("5. m", Q::Length), 5.0);
        assert_relative_eq!(
            si("\u{2212}40 degC", Q::Temperature),
            233.15,
            max_relative = 1e-15
        );
        assert_relative_eq!(si("15 deg C", Q::Temperature), 288.15, max_relative = 1e-15);
        assert_relative_eq!(si("15 ºC", Q::Temperature), 288.15, max_relative = 1e-15);
        assert_relative_eq!(si("15 ° C", Q::Temperature), 288.15, max_relative = 1e-15);
        assert_eq!(si("800 N*s / kg", Q::SpecificThrust), 800.0);
        assert_eq!(si("800 N·s/kg", Q::SpecificThrust), 800.0);
        assert_eq!(si("800 N/(kg/s)", Q::SpecificThrust), 800.0);
        assert_eq!(si("1005 J/(kg·K)", Q::SpecificHeat), 1005.0);
        assert_eq!(si("10 KN", Q::Force), 10_000.0);
        assert_eq!(si("2 Btu/lbm", Q::SpecificEnergy), 4652.0);
    }

    #[test]
    fn bare_numbers_take_the_first_unit() {
        assert_eq!(si("1350", Q::Temperature), 1350.0);
        assert_eq!(si("101325", Q::Pressure), 101_325.0);
        assert_relative_eq!(
            si("6000", Q::RotationalSpeed),
            200.0 * PI,
            max_relative = 1e-15
        );
        assert_relative_eq!(si("180", Q::Angle), PI, max_relative = 1e-15);
        for q in Quantity::ALL {
            assert!(
                std::ptr::eq(units_for(q).next().unwrap(), q.default_unit()),
                "{q}"
            );
        }
    }

    #[test]
    fn commas_are_not_numbers() {
        let e = err("1,000", Q::Pressure, "total pressure");
        assert!(matches!(e, UnitError::NotANumber { .. }), "{e:?}");
        assert!(
            e.to_string()
                .starts_with("total pressure \"1,000\": not a number")
        );
        for text in ["1.2.3 K", "1 000 K", "12'000 rpm", "- 40 degF", "1e5e5"] {
            let q = if text.ends_with("rpm") {
                Q::RotationalSpeed
            } else {
                Q::Temperature
            };
            let e = err(text, q, "x");
            assert!(
                matches!(
                    e,
                    UnitError::NotANumber { .. } | UnitError::UnknownUnit { .. }
                ),
                "{text}: {e:?}"
            );
        }
    }

    #[test]
    fn not_a_number_message() {
        let e = err("abc", Q::Ratio, "pressure ratio");
        assert_eq!(e.to_string(), "pressure ratio \"abc\": not a number");
    }

    #[test]
    fn non_finite_rejected() {
        for text in [
            "NaN",
            "nan K",
            "inf",
            "-inf Pa",
            "infinity",
            "1e400 Pa",
            "1e308 MPa",
        ] {
            let e = err(text, Q::Pressure, "p");
            assert!(matches!(e, UnitError::NotFinite { .. }), "{text}: {e:?}");
        }
    }

    #[test]
    fn empty_field() {
        let e = err("   ", Q::Temperature, "total temperature");
        assert_eq!(
            e,
            UnitError::Empty {
                field: "total temperature".into(),
                expected: Q::Temperature
            }
        );
        assert_eq!(
            e.to_string(),
            "total temperature: no value entered; a temperature accepts K, degC, degF, degR \
             (a bare number is K)"
        );
    }

    #[test]
    fn wrong_quantity_names_field_and_accepted_units() {
        let e = err("14.7 K", Q::Pressure, "total pressure");
        assert_eq!(
            e,
            UnitError::WrongQuantity {
                field: "total pressure".into(),
                text: "14.7 K".into(),
                unit: "K",
                expected: Q::Pressure,
                found: Q::Temperature,
                accepted: "Pa, kPa, MPa, bar, mbar, hPa, atm, psia, inHg".into(),
            }
        );
        assert_eq!(
            e.to_string(),
            "total pressure \"14.7 K\": K is a temperature unit; a pressure accepts \
             Pa, kPa, MPa, bar, mbar, hPa, atm, psia, inHg (a bare number is Pa)"
        );
        let e = err("3 m/s", Q::Area, "throat area");
        assert!(
            e.to_string()
                .contains("m/s is a velocity unit; an area accepts m2")
        );
    }

    #[test]
    fn gauge_pressures_are_known_but_refused() {
        for text in ["5 psig", "0.3 barg", "5 PSIG"] {
            let e = err(text, Q::Pressure, "inlet pressure");
            assert!(
                matches!(e, UnitError::GaugePressure { .. }),
                "{text}: {e:?}"
            );
            assert!(e.to_string().contains("barometer"), "{e}");
        }
        assert!(find_unit("psig").unwrap().gauge);
        assert!(units_for(Q::Pressure).all(|u| !u.gauge));
        // Through to_si a gauge unit converts a difference from ambient.
        assert_relative_eq!(to_si(1.0, find_unit("barg").unwrap()), 1.0e5);
    }

    #[test]
    fn absolute_scales_cannot_go_negative() {
        let e = err("-500 degF", Q::Temperature, "total temperature");
        match e {
            UnitError::BelowAbsoluteZero { kelvin, .. } => {
                // (-500 + 459.67) x 5/9 = -22.41 K
                assert_relative_eq!(kelvin, -22.405_555_6, max_relative = 1e-8);
            }
            other => panic!("{other:?}"),
        }
        assert!(matches!(
            err("-1 kPa", Q::Pressure, "p"),
            UnitError::NegativePressure { .. }
        ));
        // Zero itself is a value, and negative differences are fine.
        assert_eq!(si("0 K", Q::Temperature), 0.0);
        assert_eq!(si("-10 K", Q::TemperatureDifference), -10.0);
        assert_eq!(si("-3 kg/s", Q::MassFlow), -3.0);
    }

    #[test]
    fn case_carries_meaning_for_prefixes() {
        // "mpa" could be MPa or mPa: refused, with a hint.
        let e = err("2 mpa", Q::Pressure, "p");
        match &e {
            UnitError::UnknownUnit { suggestion, .. } => assert_eq!(*suggestion, Some("MPa")),
            other => panic!("{other:?}"),
        }
        assert!(e.to_string().contains("(did you mean MPa?)"), "{e}");
        assert!(matches!(
            err("1 mW", Q::Power, "p"),
            UnitError::UnknownUnit { .. }
        ));
        assert!(matches!(
            err("3 MM", Q::Length, "l"),
            UnitError::UnknownUnit { .. }
        ));
        assert_eq!(si("10 mBar", Q::Pressure), 1000.0);
        assert_eq!(si("10 kpa", Q::Pressure), 10_000.0);
    }

    #[test]
    fn bare_temperature_letters_get_a_hint() {
        for (text, hint) in [("15 C", "degC"), ("59 F", "degF")] {
            match err(text, Q::Temperature, "t") {
                UnitError::UnknownUnit {
                    suggestion, unit, ..
                } => {
                    assert_eq!(suggestion, Some(hint));
                    assert_eq!(unit, &text[text.len() - 1..]);
                }
                other => panic!("{text}: {other:?}"),
            }
        }
        // R alone is Rankine: no other temperature unit is written R
        // (518.67 R is 288.15 K, the Rankine degree being 5/9 K).
        assert_relative_eq!(si("518.67 R", Q::Temperature), 288.15, max_relative = 1e-12);
        assert_relative_eq!(
            si("9 R", Q::TemperatureDifference),
            5.0,
            max_relative = 1e-12
        );
        let e = err("12 furlongs", Q::Length, "duct length");
        assert_eq!(
            e.to_string(),
            "duct length \"12 furlongs\": \"furlongs\" is not a known unit; a length accepts \
             m, cm, mm, in, ft, km (a bare number is m)"
        );
    }

    #[test]
    fn pressure_differences_flow_function_and_per_length_in_us_units() {
        // A pressure difference is psi, not psia (1 psi = 6894.757 Pa, NIST SP 811).
        assert_eq!(
            format(6894.757, Q::PressureDifference, UnitSystem::Us),
            "1 psid"
        );
        assert_relative_eq!(
            si("2 psid", Q::PressureDifference),
            13_789.514,
            max_relative = 1e-6
        );
        // The choked flow function of air (gamma 1.4, R 287.05): sqrt(gamma/R)
        // (2/(gamma+1))^((gamma+1)/(2(gamma-1))) = 0.0404 kg K^0.5/(N s),
        // the trade's 0.5318 lbm R^0.5/(lbf s) (from memory).
        let g: f64 = 1.4;
        let ff = (g / 287.05).sqrt() * (2.0 / (g + 1.0)).powf((g + 1.0) / (2.0 * (g - 1.0)));
        assert_relative_eq!(ff, 0.0404, max_relative = 1e-3);
        let us = from_si(ff, display_unit(Q::FlowFunction, UnitSystem::Us));
        assert!((us - 0.5318).abs() < 5e-4, "{us}");
        // Per metre to per foot: 0.3048 m in a foot.
        assert_relative_eq!(
            from_si(1.0e6, display_unit(Q::PerLength, UnitSystem::Us)),
            304_800.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn us_fuel_flow_is_pounds_per_hour_and_tsfc_per_pound_force_hour() {
        // The pound is 0.45359237 kg and the pound-force 4.4482216152605 N
        // by definition (NIST SP 811): 1 kg/s = 3600 / 0.45359237 lbm/h.
        assert_eq!(format(1.0, Q::FuelFlow, UnitSystem::Us), "7936.6 lbm/h");
        assert_eq!(format(1.0, Q::MassFlow, UnitSystem::Us), "2.2046 lbm/s");
        // 1 kg/(N s) = 3600 * 4.4482216152605 / 0.45359237 lbm/(lbf h).
        let per = 3600.0 * 4.4482216152605 / 0.45359237;
        let u = display_unit(Q::ThrustSpecificFuelConsumption, UnitSystem::Us);
        assert_relative_eq!(from_si(27.691e-6, u), 27.691e-6 * per, max_relative = 1e-12);
        // A fuel flow reads any mass-flow unit, pph included.
        assert_relative_eq!(
            si("3600 pph", Q::FuelFlow),
            0.45359237,
            max_relative = 1e-15
        );
        assert!(parse("3 kN", Q::FuelFlow, "fuel").is_err());
    }

    #[test]
    fn shared_symbols_resolve_by_field() {
        let t = find_unit_for("degC", Q::Temperature).unwrap();
        let dt = find_unit_for("degC", Q::TemperatureDifference).unwrap();
        assert_eq!(t.quantity, Q::Temperature);
        assert_eq!(dt.quantity, Q::TemperatureDifference);
        assert_eq!(find_unit("degC").unwrap().quantity, Q::Temperature);
        assert_eq!(find_unit("°f").unwrap().symbol, "degF");
        assert!(find_unit("").is_none());
        assert!(find_unit("C").is_none());
        assert!(find_unit("F").is_none());
    }

    // ---- The table itself ----------------------------------------------

    #[test]
    fn table_accepted_lists() {
        assert_eq!(accepted(Q::Temperature), "K, degC, degF, degR");
        assert_eq!(accepted(Q::Ratio), "no unit, %");
        assert_eq!(accepted(Q::Mach), "no unit");
    }

    #[test]
    fn every_quantity_has_its_si_unit() {
        for q in Quantity::ALL {
            let si_unit = units_for(q).find(|u| u.scale == 1.0 && u.offset == 0.0);
            assert!(si_unit.is_some(), "{q} has no unit with scale 1");
            assert_eq!(si_unit.unwrap().symbol, q.si_symbol(), "{q}");
            let d_si = display_unit(q, UnitSystem::Si);
            let d_us = display_unit(q, UnitSystem::Us);
            assert_eq!(d_si.quantity, q.unit_kind());
            assert_eq!(d_us.quantity, q.unit_kind());
            assert!(!d_si.gauge && !d_us.gauge);
        }
    }

    #[test]
    fn no_spelling_means_two_different_units() {
        // Two units may share a spelling only if they share the symbol and
        // scale (K for temperature and temperature difference); otherwise
        // lookup would depend on table order. Case-folded spellings count
        // where either unit folds case.
        let all: Vec<&Unit> = all_units().collect();
        for (i, a) in all.iter().enumerate() {
            for b in &all[i + 1..] {
                if a.symbol == b.symbol && a.scale == b.scale {
                    continue;
                }
                for sa in a.spellings() {
                    for sb in b.spellings() {
                        let clash = if a.fold_case && b.fold_case {
                            sa.to_lowercase() == sb.to_lowercase()
                        } else {
                            sa == sb
                        };
                        assert!(
                            !clash || sa.is_empty(),
                            "{sa:?} ({}) vs {sb:?} ({})",
                            a.quantity,
                            b.quantity
                        );
                    }
                }
            }
        }
    }

    #[test]
    fn every_spelling_finds_its_unit() {
        for u in all_units() {
            for s in u.spellings().filter(|s| !s.is_empty()) {
                let found = find_unit_for(s, u.quantity).unwrap();
                assert!(std::ptr::eq(found, u), "{s:?} found {}", found.symbol);
            }
        }
    }

    // ---- Formatting -----------------------------------------------------

    #[test]
    fn format_examples() {
        assert_eq!(
            format(101_325.0, Q::Pressure, UnitSystem::Si),
            "101.325 kPa"
        );
        assert_eq!(
            format(101_325.0, Q::Pressure, UnitSystem::Us),
            "14.696 psia"
        );
        assert_eq!(format(288.15, Q::Temperature, UnitSystem::Si), "288.15 K");
        assert_eq!(
            format(288.15, Q::Temperature, UnitSystem::Us),
            "518.67 degR"
        );
        assert_eq!(format(1350.0, Q::Temperature, UnitSystem::Si), "1350 K");
        assert_eq!(
            format(15.0, Q::TemperatureDifference, UnitSystem::Us),
            "27 degF"
        );
        assert_eq!(format(0.85, Q::Mach, UnitSystem::Si), "0.85");
        assert_eq!(
            format(2.0 * PI * 200.0, Q::RotationalSpeed, UnitSystem::Si),
            "12000 rpm"
        );
        assert_eq!(format(123_456.0, Q::Force, UnitSystem::Si), "123.46 kN");
        assert_eq!(format(1.234_567e6, Q::Power, UnitSystem::Si), "1234.6 kW");
        assert_eq!(
            format(0.373_38, Q::Pressure, UnitSystem::Si),
            "0.00037338 kPa"
        );
        assert_eq!(format(0.001, Q::Pressure, UnitSystem::Si), "1e-6 kPa");
        assert_eq!(
            format(17e-6, Q::ThrustSpecificFuelConsumption, UnitSystem::Si),
            "17 g/(kN s)"
        );
        // The trade's spelling reads back.
        assert_relative_eq!(
            si("17 g/(kN s)", Q::ThrustSpecificFuelConsumption),
            17e-6,
            max_relative = 1e-15
        );
        let us = format(
            28.32545e-6,
            Q::ThrustSpecificFuelConsumption,
            UnitSystem::Us,
        );
        assert!(us.ends_with(" lbm/(lbf h)"), "{us}");
        assert_relative_eq!(
            si(&us, Q::ThrustSpecificFuelConsumption),
            28.32545e-6,
            max_relative = 1e-4
        );
        assert_eq!(format_in(0.04, &PERCENT, 5), "4 %");
        assert_eq!(format_in(123_456.0, &PA, 3), "123000 Pa");
        assert_eq!(format_in(9.999_96, &M, 5), "10 m");
        assert_eq!(format_in(2.0e10, &W, 5), "2e10 W");
    }

    #[test]
    fn format_never_prints_negative_zero() {
        assert_eq!(format(-0.0, Q::MassFlow, UnitSystem::Si), "0 kg/s");
        assert_eq!(format_in(-1e-30, &M, 5), "-1e-30 m");
        // 0 degF is 255.372 K; the offset's rounding must not show as -1e-14.
        let zero_f = to_si(0.0, &T_DEGF);
        assert_eq!(format_in(zero_f, &T_DEGF, 5), "0 degF");
        assert_eq!(format_in(zero_f + 1e-13, &T_DEGF, 5), "0 degF");
        assert_eq!(format_in(zero_f - 1e-13, &T_DEGF, 5), "0 degF");
        assert_eq!(format_in(273.15, &T_DEGC, 5), "0 degC");
        assert_eq!(format_in(f64::NAN, &M, 5), "NaN m");
    }

    fn parseable_units() -> Vec<&'static Unit> {
        all_units().filter(|u| !u.gauge).collect()
    }

    proptest! {
        #[test]
        fn si_round_trip_every_unit(
            index in 0..UNITS.len(),
            mantissa in 1.0f64..10.0,
            exponent in -6i32..9,
            negative in any::<bool>(),
        ) {
            let unit = UNITS[index];
            // Offset units lose digits near their zero when the SI value is
            // tiny next to the offset, so they get physical temperatures.
            let x = if unit.offset != 0.0 {
                mantissa * 10f64.powi(exponent.clamp(0, 3))
            } else {
                let m = mantissa * 10f64.powi(exponent);
                if negative { -m } else { m }
            };
            let back = to_si(from_si(x, unit), unit);
            prop_assert!((back - x).abs() <= 1e-12 * x.abs(), "{} {x} -> {back}", unit.symbol);
        }

        #[test]
        fn parse_recovers_formatted_value(
            index in any::<proptest::sample::Index>(),
            mantissa in 1.0f64..10.0,
            exponent in -6i32..10,
            negative in any::<bool>(),
            digits in 1usize..10,
        ) {
            let units = parseable_units();
            let unit = units[index.index(units.len())];
            // Stay on the physical side of absolute scales.
            let absolute = matches!(unit.quantity, Q::Temperature | Q::Pressure);
            let magnitude = mantissa * 10f64.powi(exponent);
            let shown = if negative && !absolute { -magnitude } else { magnitude };
            let x = to_si(shown, unit);
            let text = format_in(x, unit, digits);
            let parsed = parse(&text, unit.quantity, "round trip").unwrap();
            prop_assert!(std::ptr::eq(parsed.unit, unit), "{text}");
            let v = from_si(x, unit);
            let w = from_si(parsed.si, unit);
            let decade = 10f64.powi(v.abs().log10().floor() as i32);
            let display_step = 0.5 * decade * 10f64.powi(1 - digits as i32);
            let offset_noise = 1e-9 * (unit.offset / unit.scale).abs();
            let tolerance = 1.000_001 * display_step.max(offset_noise) + 1e-12 * v.abs();
            prop_assert!((w - v).abs() <= tolerance, "{text}: {v} -> {w}");
        }
    }
}
