//! The workbook model: ambient, gas settings, stations, processes, shafts
//! and goals, as the user wrote them.
//!
//! Every number a user gives is a [`Given`]: the text as typed ("14.7 psia")
//! and its SI value. The text is what a file stores, so a save keeps the
//! user's units; the SI value is what the engine reads. A given's quantity
//! comes from the field it sits in, so [`Workbook::visit_givens`] walks every
//! field with its path ("process.compressor.pressure_ratio") and quantity:
//! loading, editing by path, diffing, sweeping and goals all use it.
//!
//! The model derives serde for the file format (`crate::format` owns
//! reading and writing); it knows nothing of terminals or the engine.

pub mod bounds;
pub mod edit;
pub mod paths;

pub use paths::{AddressError, Path, PathError};

use crate::flow::Branch;
use crate::flow::shock::Strength;
use crate::units::{self, Quantity, UnitError};
use serde::{Deserialize, Deserializer, Serialize, Serializer};

/// The file format version this build writes and reads.
pub const FORMAT_VERSION: u32 = 1;

/// A number as the user typed it, with its SI value.
#[derive(Debug, Clone, PartialEq)]
pub struct Given {
    text: String,
    si: f64,
    /// Set when the SI value no longer comes from the text (a scan, a
    /// sweep point, a goal or an uncertainty trial set it).
    varied: bool,
}

impl Given {
    /// Parse `text` as a value of `quantity`; `field` names it in errors.
    pub fn parse(text: &str, quantity: Quantity, field: &str) -> Result<Given, UnitError> {
        let p = units::parse(text, quantity, field)?;
        Ok(Given {
            text: text.trim().to_string(),
            si: p.si,
            varied: false,
        })
    }

    /// An unparsed zero (a default in the file format).
    pub fn zero() -> Given {
        Given::raw("0")
    }

    /// An unparsed given (from a file, before [`Workbook::resolve`]).
    pub fn raw(text: &str) -> Given {
        Given {
            text: text.to_string(),
            si: f64::NAN,
            varied: false,
        }
    }

    /// The SI value.
    pub fn si(&self) -> f64 {
        self.si
    }

    /// The text as typed.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// Set the SI value without changing the text (a goal varies a given).
    pub fn set_si(&mut self, si: f64) {
        self.si = si;
        self.varied = true;
    }

    /// Whether the SI value was set apart from the text.
    pub fn is_varied(&self) -> bool {
        self.varied
    }

    /// The value for a message: the text as typed, or the SI value in use
    /// when a scan, sweep or goal has set it.
    pub fn shown(&self) -> String {
        if self.varied {
            format!("{} (SI value in use)", crate::report::sig(self.si, 6))
        } else {
            self.text.clone()
        }
    }

    fn resolve(
        &mut self,
        q: Quantity,
        field: &str,
        barometer: Option<f64>,
    ) -> Result<(), UnitError> {
        self.si = units::parse_at(&self.text, q, field, barometer)?.si;
        self.varied = false;
        Ok(())
    }

    /// Parse `text` where the barometer (Pa) is known: a gauge pressure is
    /// the barometer plus the reading.
    pub fn parse_at(
        text: &str,
        quantity: Quantity,
        field: &str,
        barometer: Option<f64>,
    ) -> Result<Given, UnitError> {
        let p = units::parse_at(text, quantity, field, barometer)?;
        Ok(Given {
            text: text.trim().to_string(),
            si: p.si,
            varied: false,
        })
    }

    /// The reading of a gauge pressure given (Pa above the barometer), or
    /// `None` for an absolute one.
    pub fn gauge(&self) -> Option<f64> {
        units::gauge_reading(&self.text)
    }

    /// Follow a new barometer: the SI value of a gauge given typed as text
    /// (not one a program set) is the barometer plus its reading. Returns
    /// whether it changed.
    pub fn follow_barometer(&mut self, barometer: f64) -> bool {
        match self.gauge() {
            Some(g) if !self.varied && self.si != g + barometer => {
                self.si = g + barometer;
                true
            }
            _ => false,
        }
    }
}

impl GivenField<'_> {
    /// Check a value for this field against its range: every range when a
    /// user states it (`stated`), only the hard ones when a sweep, goal or
    /// scan sets it (see [`bounds`]).
    pub fn check(&self, si: f64, text: &str, stated: bool) -> Result<(), BookError> {
        self.check_with(si, || text.to_string(), stated)
    }

    /// [`Self::check`] for a value set by a program: its text is made only
    /// when there is something to say (a sweep sets thousands of values).
    pub fn check_si(&self, si: f64) -> Result<(), BookError> {
        self.check_with(si, || crate::report::sig(si, 6), false)
    }

    fn check_with(
        &self,
        si: f64,
        text: impl Fn() -> String,
        stated: bool,
    ) -> Result<(), BookError> {
        match bounds::of(self.scope, self.key, self.quantity) {
            Some(b) if (stated || b.hard) && !b.holds(si) => Err(BookError::OutOfRange {
                field: self.path(),
                text: text(),
                range: b.describe(self.quantity),
                why: b.why,
            }),
            _ if !si.is_finite() => Err(BookError::OutOfRange {
                field: self.path(),
                text: text(),
                range: "a finite number".into(),
                why: "not a number or infinite",
            }),
            _ => Ok(()),
        }
    }
}

impl Serialize for Given {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(&self.text)
    }
}

impl<'de> Deserialize<'de> for Given {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let text = String::deserialize(d)?;
        Ok(Given::raw(&text))
    }
}

fn is_false(b: &bool) -> bool {
    !*b
}

/// A whole workbook.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Workbook {
    /// File format version.
    pub format: u32,
    /// A title.
    pub title: String,
    /// A note (what the workbook is for, where its data came from).
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub note: String,
    /// Ambient and flight condition.
    pub ambient: Ambient,
    /// Gas model.
    pub gas: GasSettings,
    /// Stations in flow order.
    pub stations: Vec<Station>,
    /// Processes in flow order.
    pub processes: Vec<Process>,
    /// Shafts joining compressors and turbines.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub shafts: Vec<Shaft>,
    /// Goals: vary a given until a derived value reaches a target.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub goals: Vec<Goal>,
    /// Channel map: which scan columns feed which givens (test-data reduction).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub channels: Option<Channels>,
    /// How corrected (standard-day) figures are formed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub corrections: Option<Corrections>,
    /// Store derived results in the file on save.
    #[serde(default, skip_serializing_if = "is_false")]
    pub keep_results: bool,
    /// Stored derived results (written when `keep_results` is set).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub results: Option<Vec<StoredRow>>,
    /// The `//` and `/* */` comments of the file it was read from, put
    /// back in place on every save (not a field of the file itself).
    #[serde(skip)]
    pub comments: crate::format::comments::Comments,
}

/// Stored results of one station or of the summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StoredRow {
    /// Station name, or "summary".
    pub row: String,
    /// Key and value (SI, six significant figures), in a fixed key order.
    pub values: Vec<(String, f64)>,
}

/// Channel map of a workbook for test-data reduction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Channels {
    /// Barometer channel: makes gauge readings absolute.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub barometer: Option<Channel>,
    /// Channels feeding givens.
    pub map: Vec<Channel>,
}

/// One channel: scan columns (averaged) feeding a given.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Channel {
    /// Path of the given it feeds (empty for the barometer).
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub given: String,
    /// Scan columns; several are averaged (probes of a rake).
    pub columns: Vec<String>,
    /// Area weights of the columns (empty: arithmetic mean).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub weights: Vec<f64>,
    /// Unit of the recorded values ("psig", "degF", "kg/s").
    pub unit: String,
    /// Systematic standard uncertainty, in a unit of the quantity or as "%" of the reading.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub systematic: Option<String>,
    /// Random standard uncertainty (of the averaged value), same forms.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub random: Option<String>,
}

/// How corrected figures are formed: theta = Tt / T_ref and delta =
/// pt / p_ref at a reference station.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Corrections {
    /// The station whose total state gives theta and delta (by default the
    /// engine face, the inflow of the first compressor; without one, the
    /// first entry's exit, the free-stream total).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub station: Option<String>,
    /// Exponent of theta in the corrected fuel flow Wf / (delta theta^x)
    /// (0.5 when not given).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub theta_exponent: Option<Given>,
    /// Heating value the corrected fuel flow is referred to: the fuel flow
    /// is scaled by LHV_burnt / LHV_reference (not referred when absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lhv: Option<Given>,
}

/// Reference condition for standard-day corrections.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Reference {
    /// Reference total temperature.
    pub temperature: Given,
    /// Reference total pressure.
    pub pressure: Given,
}

/// The ambient block.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Ambient {
    /// Static pressure and temperature of the surroundings.
    pub condition: Condition,
    /// Flight condition (Mach 0 or speed 0 for a static stand).
    pub flight: Flight,
    /// Specific humidity of the air (kg vapour per kg moist air; "g/kg"
    /// reads in grams).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub humidity: Option<Given>,
    /// Relative humidity ("60 %") at the ambient temperature and pressure;
    /// instead of `humidity`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_humidity: Option<Given>,
    /// Reference condition of corrected values (ISA sea level if absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reference: Option<Reference>,
}

/// How the ambient static state is given.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Condition {
    /// The standard atmosphere at an altitude with a temperature offset.
    Standard {
        /// Altitude (geopotential unless `geometric`).
        altitude: Given,
        /// Hot- or cold-day offset from the standard temperature.
        offset: Given,
        /// Altitude is geometric.
        #[serde(default, skip_serializing_if = "is_false")]
        geometric: bool,
    },
    /// Measured static pressure and temperature (a test cell, a barometer).
    Measured {
        /// Static pressure.
        pressure: Given,
        /// Static temperature.
        temperature: Given,
    },
}

/// Flight condition.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Flight {
    /// Flight Mach number.
    Mach(Given),
    /// Flight speed (true air speed).
    Speed(Given),
}

/// Gas model settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum GasSettings {
    /// Constant gamma and R; optionally a separate hot-section gas for
    /// stations carrying combustion products.
    CaloricallyPerfect {
        /// Ratio of specific heats of air.
        gamma: Given,
        /// Gas constant of air.
        r: Given,
        /// Ratio of specific heats of combustion products.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        hot_gamma: Option<Given>,
        /// Gas constant of combustion products.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        hot_r: Option<Given>,
    },
    /// Thermally perfect mixtures (NASA Glenn polynomials).
    ThermallyPerfect,
}

/// What fixes a station's static state, when the process into it does not.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Statics {
    /// Mach number given.
    Mach(Given),
    /// Static pressure given.
    Pressure(Given),
    /// Velocity given.
    Velocity(Given),
    /// Flow area given (Mach on the station's branch).
    Area(Given),
}

/// A named flow station.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Station {
    /// Free-text name ("2", "plenum", "test section").
    pub name: String,
    /// A note.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub note: String,
    /// Measured total temperature (read by processes in a measured mode).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tt: Option<Given>,
    /// Measured total pressure (read by processes in a measured mode).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pt: Option<Given>,
    /// What fixes the static state.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub statics: Option<Statics>,
    /// Branch where the static state is double-valued (default subsonic).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub branch: Option<Branch>,
}

impl Station {
    /// A station with only a name.
    pub fn named(name: &str) -> Station {
        Station {
            name: name.to_string(),
            note: String::new(),
            tt: None,
            pt: None,
            statics: None,
            branch: None,
        }
    }
}

/// A process from one station to the next.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Process {
    /// Unique name ("intake", "compressor").
    pub name: String,
    /// Upstream station (absent for an entry).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub from: Option<String>,
    /// Downstream station.
    pub to: String,
    /// What it does and in which mode.
    pub kind: Kind,
    /// A note.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub note: String,
}

/// Process kinds, each with its mode.
// A workbook holds tens of processes, read far more than moved: the
// combustor's optional fuel fields stay inline rather than boxed.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Kind {
    /// Where flow enters the workbook.
    Entry(Entry),
    /// Adiabatic duct (total temperature unchanged).
    Duct(Duct),
    /// Combustor burning fuel.
    Combustor(Combustor),
    /// Constant-area heating or cooling (Rayleigh line).
    Heating(Heating),
    /// Compressor or fan.
    Compressor(Compressor),
    /// Turbine.
    Turbine(Turbine),
    /// Normal shock.
    NormalShock,
    /// Oblique shock.
    ObliqueShock(Oblique),
    /// Nozzle to ambient.
    Nozzle(Nozzle),
    /// Flow split into core (`to`) and bypass streams.
    Split(Split),
    /// Constant-area mixer of `from` and a second stream.
    Mixer(Mixer),
    /// Air taken off a stream at its total state (overboard, customer or
    /// cooling air).
    Bleed(Bleed),
    /// A trivial kind that exists only in unit tests, to show what adding
    /// a kind costs (see `kinds::probe`).
    #[cfg(test)]
    Probe(crate::kinds::probe::Probe),
}

/// Entry modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Entry {
    /// Free stream from the ambient block and flight condition.
    Freestream {
        /// Mass flow captured.
        w: Given,
    },
    /// Given total conditions (rig plenum, tunnel reservoir) and mass flow.
    Plenum {
        /// Total temperature.
        tt: Given,
        /// Total pressure.
        pt: Given,
        /// Mass flow.
        w: Given,
    },
    /// Given total conditions; mass flow set by a choked throat.
    ChokedPlenum {
        /// Total temperature.
        tt: Given,
        /// Total pressure.
        pt: Given,
        /// Sonic throat area.
        throat_area: Given,
    },
}

/// Adiabatic duct modes (how the total-pressure loss is set).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Duct {
    /// Total-pressure recovery pt_out/pt_in given.
    Recovery {
        /// pt_out/pt_in.
        recovery: Given,
    },
    /// Loss of total pressure as a multiple of the inlet dynamic pressure.
    LossCoefficient {
        /// (pt_in - pt_out) / q_in.
        k: Given,
    },
    /// Outlet total pressure measured on the downstream station; recovery derived.
    MeasuredExit,
    /// Constant-area duct with wall friction (Fanno line).
    Friction {
        /// Duct length.
        length: Given,
        /// Hydraulic diameter.
        diameter: Given,
        /// Fanning friction factor.
        friction: Given,
    },
    /// Supersonic intake recovery from the flight Mach number by the
    /// MIL-E-5008B schedule.
    IntakeSchedule,
}

/// Combustor.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Combustor {
    /// Which of exit temperature and fuel flow is given.
    pub mode: Burn,
    /// Total-pressure loss as a fraction of inlet total pressure.
    pub pressure_loss: Given,
    /// Combustion efficiency (ignored in the measured mode, where it is derived).
    pub efficiency: Given,
    /// Fuel lower heating value.
    pub lhv: Given,
    /// Fuel hydrogen-to-carbon molar ratio of a hydrocarbon C H_n (a
    /// kerosene-like 1.92 when neither this nor `fuel` is given).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub hc: Option<Given>,
    /// The fuel by its atoms per molecule (instead of `hc`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fuel: Option<FuelAtoms>,
    /// The fuel's temperature where it enters (298.15 K when not given).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fuel_tt: Option<Given>,
    /// The fuel's specific heat, for a fuel without its own polynomial
    /// (hydrogen and methane have one); 2.0 kJ/(kg K) when not given.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fuel_cp: Option<Given>,
    /// Exit composition: complete (frozen) products, or in chemical
    /// equilibrium at the exit total state.
    #[serde(default, skip_serializing_if = "Products::is_frozen")]
    pub products: Products,
}

/// A fuel C_c H_h O_o N_n by its atoms per molecule.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FuelAtoms {
    /// Carbon atoms.
    pub c: Given,
    /// Hydrogen atoms.
    pub h: Given,
    /// Oxygen atoms.
    #[serde(default = "Given::zero")]
    pub o: Given,
    /// Nitrogen atoms.
    #[serde(default = "Given::zero")]
    pub n: Given,
}

/// How a burner's exit composition is found.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum Products {
    /// Complete lean combustion: CO2, H2O, N2 and the oxygen left over.
    #[default]
    Frozen,
    /// Chemical equilibrium of twelve species at the exit total temperature
    /// and pressure, frozen from there on.
    Equilibrium,
}

impl Products {
    fn is_frozen(&self) -> bool {
        *self == Products::Frozen
    }
}

/// Combustor modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Burn {
    /// Exit total temperature given; fuel flow derived.
    ExitTemperature(Given),
    /// Fuel flow given; exit total temperature derived.
    FuelFlow(Given),
    /// Fuel flow given and exit total temperature measured on the
    /// downstream station; combustion efficiency derived.
    Measured(Given),
}

/// Rayleigh heating modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Heating {
    /// Heat added per unit mass (negative removes heat).
    Heat(Given),
    /// Exit total temperature given.
    ExitTemperature(Given),
}

/// Efficiency basis.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Basis {
    /// Isentropic (adiabatic) efficiency.
    Isentropic,
    /// Polytropic efficiency.
    Polytropic,
}

/// Compressor or fan.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Compressor {
    /// Mode.
    pub mode: Compression,
    /// Shaft it is on.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shaft: Option<String>,
    /// Air bled between its stages.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bleed: Option<StageBleed>,
}

/// An interstage bleed: a fraction of a compressor's inflow leaves at a
/// stated fraction of its total-pressure rise and of its work.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StageBleed {
    /// The station the bled air goes to.
    pub station: String,
    /// Bled flow over the compressor's inflow.
    pub fraction: Given,
    /// Where it is taken: the fraction of the pressure rise and of the
    /// specific work done on it (0 at entry, 1 at delivery).
    pub position: Given,
}

/// Air taken off a stream at its total state.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Bleed {
    /// How much.
    pub amount: BleedAmount,
    /// The station the bled air goes to: a turbine's cooling air, or a
    /// station nothing takes from (overboard or customer bleed, counted in
    /// the summary).
    pub bled: String,
}

/// How much a bleed takes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum BleedAmount {
    /// A fraction of the flow entering the bleed.
    Fraction(Given),
    /// A mass flow.
    Flow(Given),
}

/// Compressor modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Compression {
    /// Pressure ratio and efficiency given; exit derived.
    Design {
        /// pt_out/pt_in.
        pressure_ratio: Given,
        /// Efficiency.
        efficiency: Given,
        /// Which efficiency.
        basis: Basis,
    },
    /// Exit total pressure and temperature measured on the downstream
    /// station; pressure ratio, efficiencies and work derived.
    Measured,
}

/// Turbine.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Turbine {
    /// Mode.
    pub mode: Expansion,
    /// Shaft it is on.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shaft: Option<String>,
    /// Station whose air cools the nozzle guide vanes: mixed in before the
    /// rotor, so it does work.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub vane_cooling: Option<String>,
    /// Station whose air cools the rotor: mixed in after the work.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rotor_cooling: Option<String>,
}

/// Turbine modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Expansion {
    /// Expansion ratio pt_in/pt_out and efficiency given.
    Design {
        /// pt_in/pt_out.
        pressure_ratio: Given,
        /// Efficiency.
        efficiency: Given,
        /// Which efficiency.
        basis: Basis,
    },
    /// Work set by the shaft balance; expansion ratio derived.
    ShaftWork {
        /// Efficiency.
        efficiency: Given,
        /// Which efficiency.
        basis: Basis,
    },
    /// Exit total pressure and temperature measured; efficiency derived.
    Measured,
}

/// Oblique shock.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Oblique {
    /// Flow deflection.
    pub deflection: Given,
    /// Weak or strong solution.
    pub strength: Strength,
}

/// Nozzle shapes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Shape {
    /// Convergent only.
    Convergent,
    /// Convergent-divergent.
    ConvergentDivergent,
}

/// Nozzle exit modes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Exit {
    /// Exit area derived: a convergent nozzle passes the flow at the
    /// ambient pressure or choked; a convergent-divergent one expands fully.
    Matched,
    /// Exit area given (geometric).
    Area(Given),
}

/// Nozzle to ambient.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Nozzle {
    /// Shape.
    pub shape: Shape,
    /// Exit mode.
    pub exit: Exit,
    /// Gross thrust coefficient: actual gross thrust over that of the ideal
    /// (isentropic) nozzle of this shape at the same total state, flow and
    /// pressure ratio.
    pub cfg: Given,
    /// Flow (discharge) coefficient: actual mass flow over the ideal mass
    /// flow through the geometric area at the same total state and
    /// pressure ratio (effective over geometric area).
    pub cd: Given,
}

/// Flow split.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Split {
    /// Bypass mass flow over core mass flow.
    pub bypass_ratio: Given,
    /// Station receiving the bypass stream.
    pub bypass: String,
}

/// Constant-area mixer.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Mixer {
    /// Station of the second stream.
    pub secondary: String,
    /// Largest mismatch of the two streams' static pressures at the mixing
    /// plane, |p2/p1 - 1|, before the mix is a problem (default 0.05).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_mismatch: Option<Given>,
}

/// A shaft.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Shaft {
    /// Name.
    pub name: String,
    /// Mechanical efficiency: turbine power times it covers compressors and offtake.
    pub mechanical_efficiency: Given,
    /// Power taken off (generator, pumps).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub offtake: Option<Given>,
    /// Shaft speed (for corrected speed).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub speed: Option<Given>,
}

/// Vary a given until a derived value reaches a target.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Goal {
    /// Path of the given to vary ("process.freestream.w").
    pub vary: String,
    /// Path of the derived value ("process.nozzle.area").
    pub target: String,
    /// Target value, in the target's quantity.
    pub value: Given,
    /// Lowest value to try for the varied given.
    pub low: Given,
    /// Highest value to try.
    pub high: Given,
    /// Switched off: kept in the file, not solved (the varied given keeps
    /// its typed value).
    #[serde(default, skip_serializing_if = "is_false")]
    pub off: bool,
}

/// One given field met by [`Workbook::visit_givens`]. The path is built
/// only on request, so walking every given to find one is cheap.
pub struct GivenField<'a> {
    /// Scope ("ambient", "gas", "station", "process", "shaft").
    pub scope: &'static str,
    /// Station, process or shaft name (empty for ambient and gas).
    pub name: &'a str,
    /// Field key.
    pub key: &'a str,
    /// Its quantity.
    pub quantity: Quantity,
    /// The given.
    pub given: &'a mut Given,
}

/// The path of the measured ambient pressure: the barometer gauge
/// pressures are read from.
pub const BAROMETER: &str = "ambient.pressure";

/// One given met by [`Workbook::visit_givens_ref`].
pub struct GivenRef<'a> {
    /// Scope ("ambient", "gas", "station", "process", "shaft").
    pub scope: &'static str,
    /// Station, process or shaft name (empty for ambient and gas).
    pub name: &'a str,
    /// Field key.
    pub key: &'a str,
    /// Its quantity.
    pub quantity: Quantity,
    /// The given.
    pub given: &'a Given,
}

impl GivenRef<'_> {
    /// The full path.
    pub fn path(&self) -> String {
        path_of(self.scope, self.name, self.key)
    }

    /// Whether this field has the path `p` (no allocation).
    pub fn is(&self, p: &str) -> bool {
        path_is(self.scope, self.name, self.key, p)
    }
}

fn path_of(scope: &str, name: &str, key: &str) -> String {
    if name.is_empty() {
        format!("{scope}.{key}")
    } else {
        format!("{scope}.{name}.{key}")
    }
}

impl GivenField<'_> {
    /// The full path ("process.compressor.pressure_ratio").
    pub fn path(&self) -> String {
        path_of(self.scope, self.name, self.key)
    }

    /// Whether this field has the path `p` (no allocation).
    pub fn is(&self, p: &str) -> bool {
        path_is(self.scope, self.name, self.key, p)
    }
}

fn path_is(scope: &str, name: &str, key: &str, p: &str) -> bool {
    let Some(rest) = p.strip_prefix(scope).and_then(|r| r.strip_prefix('.')) else {
        return false;
    };
    let Some(rest) = rest.strip_suffix(key).and_then(|r| {
        r.strip_suffix('.')
            .or(if name.is_empty() { Some(r) } else { None })
    }) else {
        return false;
    };
    if name.is_empty() {
        rest.is_empty()
    } else {
        rest == name
    }
}

/// Errors of the workbook structure.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum BookError {
    /// A given could not be parsed.
    #[error("{0}")]
    Unit(#[from] UnitError),
    /// Two stations or processes with one name.
    #[error("two {what} are named \"{name}\"; names must be unique")]
    Duplicate {
        /// "stations" or "processes".
        what: &'static str,
        /// The name.
        name: String,
    },
    /// A reference to a station, shaft or process that does not exist.
    #[error("{whose} refers to {what} \"{name}\", which does not exist")]
    Unknown {
        /// Who refers.
        whose: String,
        /// "station", "shaft".
        what: &'static str,
        /// The missing name.
        name: String,
    },
    /// A station fed by no process or by several.
    #[error("station \"{station}\" {why}")]
    Feed {
        /// The station.
        station: String,
        /// What is wrong.
        why: String,
    },
    /// A loop in the flow path.
    #[error("the flow path loops: {0}")]
    Cycle(String),
    /// A structural rule broken.
    #[error("{0}")]
    Rule(String),
    /// A given outside its physical range.
    #[error("{field} \"{text}\": must be {range} ({why})")]
    OutOfRange {
        /// The given's path.
        field: String,
        /// The value as typed (or its SI value when set by a program).
        text: String,
        /// The range in words, with units.
        range: String,
        /// Why the range is what it is.
        why: &'static str,
    },
    /// A reference (goal, channel) to a path that names nothing.
    #[error("{whose}: {error}")]
    Address {
        /// Who refers ("goal 1 target", "channel 3").
        whose: String,
        /// What is wrong, with the valid keys.
        error: Box<AddressError>,
    },
    /// Format version newer than this build.
    #[error(
        "this workbook is format {found}; this build reads format {FORMAT_VERSION} (update stationwise)"
    )]
    Version {
        /// Version in the file.
        found: u32,
    },
}

/// The walk over every given of a workbook, written once and expanded for
/// shared (`visit_givens_ref`) and exclusive (`visit_givens`) access, as
/// `iter` and `iter_mut` are.
/// A part of a workbook whose givens can be walked on their own.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Part {
    /// Everything.
    All,
    /// The ambient block and the gas settings.
    Ambient,
    /// One station, by index.
    Station(usize),
    /// One process, by index.
    Process(usize),
    /// One shaft, by index.
    Shaft(usize),
}

impl Part {
    fn ambient(self) -> bool {
        matches!(self, Part::All | Part::Ambient)
    }
    fn station(self, i: usize) -> bool {
        matches!(self, Part::All) || self == Part::Station(i)
    }
    fn process(self, i: usize) -> bool {
        matches!(self, Part::All) || self == Part::Process(i)
    }
    fn shaft(self, i: usize) -> bool {
        matches!(self, Part::All) || self == Part::Shaft(i)
    }
}

macro_rules! walk_givens {
    (@kind $p:ident, mut) => {
        |f: &mut dyn FnMut(&'static str, Quantity, &mut Given)| {
            crate::kinds::of_mut(&mut $p.kind).visit_givens_mut(f)
        }
    };
    (@kind $p:ident,) => {
        |f: &mut dyn FnMut(&'static str, Quantity, &Given)| crate::kinds::of(&$p.kind).visit_givens(f)
    };
    ($book:ident, $g:ident, $part:expr, $($m:tt)*) => {{
        let book = $book;
        let mut g = $g;
        let part: Part = $part;
        if part.ambient() {
        match & $($m)* book.ambient.condition {
            Condition::Standard {
                altitude, offset, ..
            } => {
                g("ambient", "", "altitude", Quantity::Length, altitude);
                g(
                    "ambient",
                    "",
                    "offset",
                    Quantity::TemperatureDifference,
                    offset,
                );
            }
            Condition::Measured {
                pressure,
                temperature,
            } => {
                g("ambient", "", "pressure", Quantity::Pressure, pressure);
                g(
                    "ambient",
                    "",
                    "temperature",
                    Quantity::Temperature,
                    temperature,
                );
            }
        }
        match & $($m)* book.ambient.flight {
            Flight::Mach(m) => g("ambient", "", "flight_mach", Quantity::Mach, m),
            Flight::Speed(v) => g("ambient", "", "flight_speed", Quantity::Velocity, v),
        }
        if let Some(r) = & $($m)* book.ambient.reference {
            g(
                "ambient",
                "",
                "reference_temperature",
                Quantity::Temperature,
                & $($m)* r.temperature,
            );
            g(
                "ambient",
                "",
                "reference_pressure",
                Quantity::Pressure,
                & $($m)* r.pressure,
            );
        }
        if let Some(c) = & $($m)* book.corrections {
            if let Some(x) = & $($m)* c.theta_exponent {
                g("ambient", "", "reference_theta_exponent", Quantity::Ratio, x);
            }
            if let Some(x) = & $($m)* c.lhv {
                g("ambient", "", "reference_lhv", Quantity::SpecificEnergy, x);
            }
        }
        if let Some(h) = & $($m)* book.ambient.humidity {
            g("ambient", "", "humidity", Quantity::Ratio, h);
        }
        if let Some(h) = & $($m)* book.ambient.relative_humidity {
            g("ambient", "", "relative_humidity", Quantity::Ratio, h);
        }
        if let GasSettings::CaloricallyPerfect {
            gamma,
            r,
            hot_gamma,
            hot_r,
        } = & $($m)* book.gas
        {
            g("gas", "", "gamma", Quantity::Ratio, gamma);
            g("gas", "", "r", Quantity::SpecificHeat, r);
            if let Some(x) = hot_gamma {
                g("gas", "", "hot_gamma", Quantity::Ratio, x);
            }
            if let Some(x) = hot_r {
                g("gas", "", "hot_r", Quantity::SpecificHeat, x);
            }
        }
        }
        for (at, s) in (& $($m)* book.stations).into_iter().enumerate() {
            if !part.station(at) {
                continue;
            }
            let name = s.name.as_str();
            if let Some(x) = & $($m)* s.tt {
                g("station", name, "tt", Quantity::Temperature, x);
            }
            if let Some(x) = & $($m)* s.pt {
                g("station", name, "pt", Quantity::Pressure, x);
            }
            match & $($m)* s.statics {
                Some(Statics::Mach(x)) => g("station", name, "mach", Quantity::Mach, x),
                Some(Statics::Pressure(x)) => g("station", name, "p", Quantity::Pressure, x),
                Some(Statics::Velocity(x)) => g("station", name, "v", Quantity::Velocity, x),
                Some(Statics::Area(x)) => g("station", name, "area", Quantity::Area, x),
                None => {}
            }
        }
        for (at, p) in (& $($m)* book.processes).into_iter().enumerate() {
            if !part.process(at) {
                continue;
            }
            let name = p.name.as_str();
            walk_givens!(@kind p, $($m)*)(&mut |field: &'static str, quantity: Quantity, given| {
                g("process", name, field, quantity, given)
            });
        }
        for (at, s) in (& $($m)* book.shafts).into_iter().enumerate() {
            if !part.shaft(at) {
                continue;
            }
            let name = s.name.as_str();
            g(
                "shaft",
                name,
                "mechanical_efficiency",
                Quantity::Ratio,
                & $($m)* s.mechanical_efficiency,
            );
            if let Some(x) = & $($m)* s.offtake {
                g("shaft", name, "offtake", Quantity::Power, x);
            }
            if let Some(x) = & $($m)* s.speed {
                g("shaft", name, "speed", Quantity::RotationalSpeed, x);
            }
        }
    }};
}

impl Workbook {
    /// Walk every given with its path and quantity.
    pub fn visit_givens(&mut self, f: &mut dyn FnMut(GivenField<'_>)) {
        self.visit_givens_in(Part::All, f);
    }

    /// Walk the givens of one part of the workbook only (the ambient block
    /// and gas, one station, one process or one shaft), in the order
    /// [`Workbook::visit_givens`] meets them: what a handle to one given
    /// needs, without walking the rest.
    pub fn visit_givens_in(&mut self, part: Part, f: &mut dyn FnMut(GivenField<'_>)) {
        let g =
            |scope: &'static str, name: &str, key: &str, quantity: Quantity, given: &mut Given| {
                f(GivenField {
                    scope,
                    name,
                    key,
                    quantity,
                    given,
                })
            };
        let book = self;
        walk_givens!(book, g, part, mut);
    }

    /// As [`Workbook::visit_givens_in`], without changing any.
    pub fn visit_givens_ref_in(&self, part: Part, f: &mut dyn FnMut(GivenRef<'_>)) {
        let g = |scope: &'static str, name: &str, key: &str, quantity: Quantity, given: &Given| {
            f(GivenRef {
                scope,
                name,
                key,
                quantity,
                given,
            })
        };
        let book = self;
        walk_givens!(book, g, part,);
    }

    /// Walk every given without changing any (no copy of the workbook).
    pub fn visit_givens_ref(&self, f: &mut dyn FnMut(GivenRef<'_>)) {
        self.visit_givens_ref_in(Part::All, f);
    }

    /// Parse every given with its field's quantity. All errors are
    /// collected; the workbook is usable only when there are none.
    pub fn resolve(&mut self) -> Result<(), Vec<BookError>> {
        let mut errors = Vec::new();
        if self.format > FORMAT_VERSION {
            errors.push(BookError::Version { found: self.format });
            return Err(errors);
        }
        // The barometer first: gauge pressures elsewhere are read from it.
        if let Condition::Measured { pressure, .. } = &mut self.ambient.condition {
            let _ = pressure.resolve(Quantity::Pressure, BAROMETER, None);
        }
        let baro = self.barometer();
        self.visit_givens(&mut |f| {
            let at = if f.is(BAROMETER) { None } else { baro };
            if let Err(e) = f.given.resolve(f.quantity, &f.path(), at) {
                errors.push(e.into());
            } else if let Err(e) = f.check(f.given.si, &f.given.text, true) {
                errors.push(e);
            }
        });
        // Goal values take the quantity of their target.
        // A target naming neither a derived value nor a given is refused
        // when the workbook compiles, with the keys of its place; its value
        // is not read against a quantity guessed for it.
        let target_q: Vec<Option<Quantity>> = self
            .goals
            .iter()
            .map(|g| {
                paths::quantity_of_derived(&g.target)
                    .or_else(|| self.given(&g.target).map(|(q, _)| q))
            })
            .collect();
        for (i, goal) in self.goals.iter_mut().enumerate() {
            let Some(q) = target_q[i] else {
                continue;
            };
            if let Err(e) = goal
                .value
                .resolve(q, &format!("goal {} value", i + 1), baro)
            {
                errors.push(e.into());
            }
        }
        // Bounds take the quantity of the varied given.
        let mut bounds: Vec<(usize, Quantity)> = Vec::new();
        {
            let goals: Vec<String> = self.goals.iter().map(|g| g.vary.clone()).collect();
            self.visit_givens(&mut |f| {
                for (i, v) in goals.iter().enumerate() {
                    if f.is(v) {
                        bounds.push((i, f.quantity));
                    }
                }
            });
        }
        for (i, goal) in self.goals.iter_mut().enumerate() {
            // A varied path naming no given is refused when the workbook
            // compiles, with the givens that place has.
            if let Some((_, q)) = bounds.iter().find(|(j, _)| *j == i) {
                for (b, name) in [(&mut goal.low, "low"), (&mut goal.high, "high")] {
                    if let Err(e) = b.resolve(*q, &format!("goal {} {name}", i + 1), baro) {
                        errors.push(e.into());
                    }
                }
            }
        }
        if errors.is_empty() {
            Ok(())
        } else {
            Err(errors)
        }
    }

    /// The local barometric pressure (Pa) gauge readings are relative to:
    /// the measured ambient pressure, when the ambient block is measured.
    pub fn barometer(&self) -> Option<f64> {
        match &self.ambient.condition {
            Condition::Measured { pressure, .. } if pressure.si.is_finite() => Some(pressure.si),
            _ => None,
        }
    }

    /// Every gauge given follows the barometer now in use; the paths of
    /// those that changed.
    pub fn follow_barometer(&mut self) -> Vec<String> {
        let Some(b) = self.barometer() else {
            return Vec::new();
        };
        let mut moved = Vec::new();
        self.visit_givens(&mut |f| {
            if !f.is(BAROMETER) && f.given.follow_barometer(b) {
                moved.push(f.path());
            }
        });
        moved
    }

    /// Set the given at `path` from typed text. On error the old value
    /// stays. A gauge pressure is read from the barometer; a new barometer
    /// moves every gauge given with it.
    pub fn set_given(&mut self, path: &str, text: &str) -> Result<(), BookError> {
        let mut result: Option<Result<(), BookError>> = None;
        let baro = self.barometer();
        // A new barometer moves the gauge givens: all of it or none.
        let before = (path == BAROMETER).then(|| self.clone());
        self.visit_givens(&mut |f| {
            if f.is(path) {
                let at = if f.is(BAROMETER) { None } else { baro };
                result = Some(match Given::parse_at(text, f.quantity, &f.path(), at) {
                    Ok(g) => match f.check(g.si, &g.text, true) {
                        Ok(()) => {
                            *f.given = g;
                            Ok(())
                        }
                        Err(e) => Err(e),
                    },
                    Err(e) => Err(e.into()),
                });
            }
        });
        if let (Some(Ok(())), Some(before)) = (&result, before) {
            // Each gauge given read again from the new barometer, and
            // checked as if typed.
            let baro = self.barometer();
            let mut bad: Option<BookError> = None;
            self.visit_givens(&mut |f| {
                if bad.is_some() || f.is(BAROMETER) || f.given.gauge().is_none() || f.given.varied {
                    return;
                }
                bad = match f.given.resolve(f.quantity, &f.path(), baro) {
                    Err(e) => Some(e.into()),
                    Ok(()) => f.check(f.given.si, &f.given.text, true).err(),
                };
            });
            if let Some(e) = bad {
                *self = before;
                return Err(e);
            }
        }
        result.unwrap_or_else(|| {
            Err(BookError::Unknown {
                whose: "the edit".into(),
                what: "given",
                name: path.to_string(),
            })
        })
    }

    /// Every given as (path, quantity, text, SI value), in file order.
    pub fn givens(&self) -> Vec<(String, Quantity, String, f64)> {
        let mut out = Vec::new();
        self.visit_givens_ref(&mut |f| {
            out.push((f.path(), f.quantity, f.given.text.clone(), f.given.si));
        });
        out
    }

    /// One given by path, with its quantity.
    pub fn given(&self, path: &str) -> Option<(Quantity, Given)> {
        let mut out = None;
        self.visit_givens_ref(&mut |f| {
            if f.is(path) {
                out = Some((f.quantity, f.given.clone()));
            }
        });
        out
    }

    /// The station with this name.
    pub fn station(&self, name: &str) -> Option<&Station> {
        self.stations.iter().find(|s| s.name == name)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sheet() -> Workbook {
        crate::format::parse(include_str!("../../sheets/turbofan.ron")).unwrap()
    }

    #[test]
    fn every_given_path_round_trips_through_is_and_set_given() {
        let mut b = sheet();
        let all = b.givens();
        assert!(all.iter().any(|(p, ..)| p.starts_with("shaft.")));
        for (p, _, text, _) in &all {
            let mut hits = 0;
            b.visit_givens(&mut |f| {
                if f.is(p) {
                    assert_eq!(&f.path(), p);
                    hits += 1;
                }
            });
            assert_eq!(hits, 1, "{p}");
            b.set_given(p, text).unwrap();
        }
        assert!(b.set_given("process.nosuch.w", "1").is_err());
    }
}
