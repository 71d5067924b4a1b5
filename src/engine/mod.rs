//! The workbook engine: dependency graph, incremental recompute, problems,
//! goals and explanations.
//!
//! A workbook compiles into a graph whose nodes are processes; a process
//! depends on the processes that produce its input stations and, for a
//! shaft-work turbine, on the other machines on its shaft. Nodes run in
//! topological order. An edit marks the nodes that read the edited given
//! dirty; a node reruns when it is dirty or when a node it depends on
//! produced a different result in this pass, and a rerun whose result equals
//! the old one stops the propagation there (backdating). A node that fails
//! becomes a [`Problem`] on that process; the nodes downstream of it are
//! blocked by it; the rest still compute.
//!
//! Goals (vary a given until a derived value reaches a target) close loops
//! that the graph cannot: each is solved by Brent's method inside its
//! bracket, every trial being an incremental recompute.
//!
//! The engine never touches files or terminals; the file format, the CLI and
//! the TUI are front ends over it.

pub mod address;
pub mod compute;
mod coupled;
pub mod explain;
pub mod path;
pub mod sweep;

use crate::atmosphere::{self, AltitudeKind};
use crate::book::paths::Scope;
use crate::book::{BookError, Condition, Flight, GasSettings, Path, Station, Workbook};
use crate::flow::{FlowState, isentropic, solve};
use crate::gas::{Composition, GasModel, PerfectGas, T_REFERENCE, Thermo};
use address::Touch;
use compute::{Ctx, ProcessResult};
use explain::{Step, Tracer};
use std::collections::HashMap;

/// A computed station.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StationValue {
    /// Mass flow, kg/s.
    pub w: f64,
    /// Total temperature, K.
    pub tt: f64,
    /// Total pressure, Pa.
    pub pt: f64,
    /// Composition.
    pub comp: Composition,
    /// Static state, when something fixes it.
    pub flow: Option<FlowState>,
    /// Flow area, m2, when known.
    pub area: Option<f64>,
}

/// The ambient static state, free stream and air composition.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AmbientState {
    /// Free stream: static ambient state, flight velocity and its totals.
    pub flow: FlowState,
    /// Composition of the air.
    pub air: Composition,
}

/// A problem attached to a process (or a goal).
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    /// Where: the process name, or "goal N", or "ambient", "gas".
    pub place: String,
    /// Message for a test engineer.
    pub message: String,
}

/// The state of a station after evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StationStatus<'a> {
    /// Computed.
    Ok(&'a StationValue),
    /// Its own process failed (name).
    Failed(&'a str),
    /// A process upstream failed (name).
    Blocked(&'a str),
    /// The whole workbook's values are withheld (a recorded scan that could
    /// not be applied): the reason.
    Withheld(&'a str),
}

/// The outcome of one process in the last pass.
#[derive(Debug, Clone, PartialEq)]
enum NodeOut {
    /// Computed.
    Done(Box<ProcessResult>),
    /// The process itself could not be computed (the message says why).
    Failed(String),
    /// The gas settings or the ambient block it reads failed: reported
    /// once, at that source, not on every process that reads it.
    NoSettings(String),
    /// A process it depends on failed (that process's name).
    Blocked(String),
}

/// Compiled structure of a workbook.
#[derive(Debug, Clone, Default)]
struct Graph {
    station_index: HashMap<String, usize>,
    process_index: HashMap<String, usize>,
    shaft_index: HashMap<String, usize>,
    order: Vec<usize>,
    inputs: Vec<Vec<usize>>,
    producer: Vec<usize>,
    deps: Vec<Vec<usize>>,
    shaft_of: Vec<Option<usize>>,
    uses_ambient: Vec<bool>,
    /// Some entry takes its flow from the free stream (with a nozzle, an
    /// engine sheet).
    freestream: bool,
    /// The process discharges to the ambient (a nozzle).
    discharges: Vec<bool>,
    /// The first entry in evaluation order (the inlet of corrections).
    first_entry: Option<usize>,
    /// The station whose totals give theta and delta of corrected figures.
    reference_station: Option<usize>,
    /// The exit of the last turbine in flow order (corrected exhaust Tt).
    exhaust_station: Option<usize>,
    to_index: Vec<usize>,
    /// Output stations of each process: `to`, then a second stream.
    outputs: Vec<Vec<usize>>,
    /// Some process is a mixer (its balance is checked after each solve).
    has_mixer: bool,
    /// Per process: a bleed (or a compressor's interstage bleed) whose
    /// bled station feeds nothing, so its flow leaves the engine.
    overboard: Vec<bool>,
    /// Some process bleeds air.
    has_bleed: bool,
}

/// A goal's outcome.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct GoalOutcome {
    /// The solved value of the varied given, SI.
    pub value: Option<f64>,
    /// Why it could not be met.
    pub problem: Option<String>,
    /// The target's value reached, SI (after every goal was solved).
    pub reached: Option<f64>,
    /// (reached - target) / |target|.
    pub residual: Option<f64>,
    /// Evaluations of the workbook it took (bracketing, then the coupled
    /// Newton steps shared by all goals).
    pub iterations: u32,
}

/// What a workbook is, for its summary: an engine (a free-stream entry and
/// a nozzle) gets propulsion figures, a tunnel (a supersonic station that is
/// not a nozzle exit) its test-section figures, any other sheet is a rig
/// whose summary is its components' figures.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SheetKind {
    /// A free-stream entry and a nozzle.
    Engine,
    /// A supersonic station that no nozzle discharges.
    Tunnel,
    /// Anything else (component rigs).
    #[default]
    Rig,
}

/// Summary figures (None where not applicable or not computed).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Summary {
    /// What the sheet is (which figures it gets).
    pub sheet: SheetKind,
    /// The tunnel's test section (station index): its fastest supersonic
    /// station that is not a nozzle exit.
    pub test_station: Option<usize>,
    /// Test-section Mach number.
    pub test_mach: Option<f64>,
    /// Test-section dynamic pressure rho V^2 / 2, Pa.
    pub test_q: Option<f64>,
    /// Test-section unit Reynolds number rho V / mu, 1/m (Sutherland air).
    pub test_re: Option<f64>,
    /// Total-pressure ratio of a normal shock at the test-section Mach number.
    pub start_pt_ratio: Option<f64>,
    /// Smallest diffuser throat over nozzle throat that swallows the
    /// starting shock: the inverse of that total-pressure ratio.
    pub start_throat_ratio: Option<f64>,
    /// Gross thrust, N.
    pub thrust_gross: Option<f64>,
    /// Ram drag, N.
    pub ram_drag: Option<f64>,
    /// Net thrust, N.
    pub thrust_net: Option<f64>,
    /// Fuel flow, kg/s.
    pub fuel: Option<f64>,
    /// Thrust-specific fuel consumption, kg/(N s).
    pub tsfc: Option<f64>,
    /// Net thrust per air flow, N s/kg.
    pub specific_thrust: Option<f64>,
    /// Thermal efficiency.
    pub eta_thermal: Option<f64>,
    /// Propulsive efficiency.
    pub eta_propulsive: Option<f64>,
    /// Overall efficiency.
    pub eta_overall: Option<f64>,
    /// Air entering, kg/s.
    pub air_flow: Option<f64>,
    /// Net thrust corrected to the reference: F / delta, delta at the
    /// reference station (the engine face unless stated).
    pub thrust_corrected: Option<f64>,
    /// Fuel flow corrected to the reference: Wf (LHV / LHV_ref) / (delta
    /// theta^x), x 0.5 unless stated.
    pub fuel_corrected: Option<f64>,
    /// Exhaust total temperature (the last turbine's exit) over theta, K.
    pub egt_corrected: Option<f64>,
    /// Air bled overboard or to customers (bleeds whose air no process
    /// takes), kg/s.
    pub bleed_overboard: Option<f64>,
}

impl Summary {
    /// A summary figure by key.
    pub fn get(&self, key: &str) -> Option<f64> {
        match key {
            "thrust_gross" => self.thrust_gross,
            "ram_drag" => self.ram_drag,
            "thrust_net" => self.thrust_net,
            "fuel" => self.fuel,
            "tsfc" => self.tsfc,
            "specific_thrust" => self.specific_thrust,
            "eta_thermal" => self.eta_thermal,
            "eta_propulsive" => self.eta_propulsive,
            "eta_overall" => self.eta_overall,
            "air_flow" => self.air_flow,
            "thrust_corrected" => self.thrust_corrected,
            "fuel_corrected" => self.fuel_corrected,
            "egt_corrected" => self.egt_corrected,
            "bleed_overboard" => self.bleed_overboard,
            "test_mach" => self.test_mach,
            "test_q" => self.test_q,
            "test_re" => self.test_re,
            "start_pt_ratio" => self.start_pt_ratio,
            "start_throat_ratio" => self.start_throat_ratio,
            _ => None,
        }
    }
}

/// The state corrected figures are formed from.
struct CorrectionState {
    station: String,
    tt: f64,
    pt: f64,
    theta: f64,
    delta: f64,
    exponent: f64,
    lhv_ref: Option<f64>,
}

impl CorrectionState {
    /// The factor referring a fuel flow of heating value `lhv` to the
    /// reference heating value (1 without one).
    fn lhv_ratio(&self, lhv: f64) -> f64 {
        match self.lhv_ref {
            Some(r) if lhv.is_finite() => lhv / r,
            _ => 1.0,
        }
    }
}

/// Power balance of a shaft, W.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ShaftBalance {
    /// Power absorbed by its compressors.
    pub compressor_power: f64,
    /// Power delivered by its turbines.
    pub turbine_power: f64,
    /// Offtake.
    pub offtake: f64,
    /// Turbine power times mechanical efficiency minus compressors and offtake.
    pub imbalance: f64,
}

/// The engine over one workbook.
#[derive(Debug, Clone)]
pub struct Engine {
    book: Workbook,
    graph: Graph,
    model: Result<GasModel, String>,
    ambient: Result<AmbientState, String>,
    nodes: Vec<Option<NodeOut>>,
    dirty: Vec<bool>,
    /// Scratch marks of the processes a recompute changed.
    changed: Vec<bool>,
    /// Problems of the converged state (a mixer out of balance).
    checks: Vec<Problem>,
    /// Some given is a gauge pressure (it follows the barometer).
    gauged: bool,
    goals: Vec<GoalOutcome>,
    summary: Summary,
    evaluations: u64,
    /// Why no value is to be shown (see [`Engine::withhold`]).
    withheld: Option<String>,
}

fn gas_model(g: &GasSettings) -> Result<GasModel, String> {
    match g {
        GasSettings::ThermallyPerfect => Ok(GasModel::Thermal),
        GasSettings::CaloricallyPerfect {
            gamma,
            r,
            hot_gamma,
            hot_r,
        } => {
            let cold = PerfectGas::new(gamma.si(), r.si()).map_err(|e| e.to_string())?;
            let hot = match (hot_gamma, hot_r) {
                (None, None) => None,
                (hg, hr) => Some(
                    PerfectGas::new(
                        hg.as_ref().map_or(gamma.si(), |g| g.si()),
                        hr.as_ref().map_or(r.si(), |g| g.si()),
                    )
                    .map_err(|e| format!("hot section: {e}"))?,
                ),
            };
            Ok(GasModel::Perfect { cold, hot })
        }
    }
}

fn ambient_state(book: &Workbook, model: &GasModel) -> Result<AmbientState, String> {
    let a = &book.ambient;
    let (t, p) = match &a.condition {
        Condition::Standard {
            altitude,
            offset,
            geometric,
        } => {
            let kind = if *geometric {
                AltitudeKind::Geometric
            } else {
                AltitudeKind::Geopotential
            };
            let s = atmosphere::standard(altitude.si(), kind, offset.si())
                .map_err(|e| e.to_string())?;
            (s.temperature_k, s.pressure_pa)
        }
        Condition::Measured {
            pressure,
            temperature,
        } => (temperature.si(), pressure.si()),
    };
    if !(t.is_finite() && t > 0.0 && p.is_finite() && p > 0.0) {
        return Err("ambient pressure and temperature must be positive".into());
    }
    // Humidity: specific (checked against saturation at the ambient
    // temperature and pressure) or relative; not both.
    let q = match (&a.humidity, &a.relative_humidity) {
        (Some(_), Some(_)) => {
            return Err(
                "give humidity (specific, kg/kg or g/kg) or relative_humidity (%), not both".into(),
            );
        }
        (Some(q), None) => {
            if q.text().contains('%') {
                return Err(format!(
                    "humidity \"{}\" is a specific humidity (kg of vapour per kg of air, or g/kg); a relative humidity goes in relative_humidity",
                    q.text()
                ));
            }
            let sat = crate::psychro::saturated(t, p)?;
            if q.si() > sat {
                return Err(format!(
                    "humidity {} kg/kg is above saturation: air at {:.2} K and {:.0} Pa holds at most {} kg/kg (100 % relative humidity)",
                    crate::report::sig(q.si(), 4),
                    t,
                    p,
                    crate::report::sig(sat, 4)
                ));
            }
            Some(q.si())
        }
        (None, Some(rh)) => Some(crate::psychro::from_relative(rh.si(), t, p)?),
        (None, None) => None,
    };
    let air = match q {
        Some(q) => Composition::humid_air(q).map_err(|e| e.to_string())?,
        None => Composition::dry_air(),
    };
    let gas = model.gas(&air).map_err(|e| e.to_string())?;
    let v = match &a.flight {
        Flight::Mach(m) => {
            let m = m.si();
            if !(m.is_finite() && (0.0..=20.0).contains(&m)) {
                return Err(format!("flight Mach number {m} must lie between 0 and 20"));
            }
            m * (gas.gamma(t).map_err(|e| e.to_string())? * gas.r() * t).sqrt()
        }
        Flight::Speed(v) => v.si(),
    };
    let flow = isentropic::totals(&gas, t, p, v).map_err(|e| format!("free stream: {e}"))?;
    Ok(AmbientState { flow, air })
}

fn compile(book: &Workbook) -> Result<Graph, Vec<BookError>> {
    let mut errors = Vec::new();
    let mut g = Graph::default();
    for (i, s) in book.stations.iter().enumerate() {
        if g.station_index.insert(s.name.clone(), i).is_some() {
            errors.push(BookError::Duplicate {
                what: "stations",
                name: s.name.clone(),
            });
        }
    }
    for (i, p) in book.processes.iter().enumerate() {
        if g.process_index.insert(p.name.clone(), i).is_some() {
            errors.push(BookError::Duplicate {
                what: "processes",
                name: p.name.clone(),
            });
        }
    }
    for (i, s) in book.shafts.iter().enumerate() {
        if g.shaft_index.insert(s.name.clone(), i).is_some() {
            errors.push(BookError::Duplicate {
                what: "shafts",
                name: s.name.clone(),
            });
        }
    }
    let n = book.processes.len();
    let mut producer: Vec<Option<usize>> = vec![None; book.stations.len()];
    g.inputs = vec![Vec::new(); n];
    g.shaft_of = vec![None; n];
    g.uses_ambient = vec![false; n];
    let station = |whose: &str, name: &str, errors: &mut Vec<BookError>| -> Option<usize> {
        let r = g.station_index.get(name).copied();
        if r.is_none() {
            errors.push(BookError::Unknown {
                whose: whose.to_string(),
                what: "station",
                name: name.to_string(),
            });
        }
        r
    };
    let mut outputs: Vec<Vec<usize>> = vec![Vec::new(); n];
    for (i, p) in book.processes.iter().enumerate() {
        let whose = format!("process \"{}\"", p.name);
        let kind = crate::kinds::of(&p.kind);
        let is_entry = kind.is_entry();
        g.freestream |= matches!(
            p.kind,
            crate::book::Kind::Entry(crate::book::Entry::Freestream { .. })
        );
        match (&p.from, is_entry) {
            (Some(_), true) => errors.push(BookError::Rule(format!(
                "{whose} is an entry and takes its flow from the ambient block or its own givens: remove `from`"
            ))),
            (None, false) => errors.push(BookError::Rule(format!(
                "{whose} needs an upstream station (`from`)"
            ))),
            (Some(f), false) => {
                if let Some(s) = station(&whose, f, &mut errors) {
                    g.inputs[i].push(s);
                }
            }
            (None, true) => {}
        }
        // Further streams in (a mixer's second stream, a turbine's cooling
        // air), in the order the kind names them.
        let mut more = Vec::new();
        kind.visit_names(&mut |of, name| {
            if of == crate::kinds::NameOf::Input {
                more.push(name.to_string());
            }
        });
        for second in &more {
            if let Some(s) = station(&whose, second, &mut errors) {
                g.inputs[i].push(s);
            }
        }
        if let Some(s) = station(&whose, &p.to, &mut errors) {
            outputs[i].push(s);
        }
        if let Some(second) = kind.second_output()
            && let Some(s) = station(&whose, second, &mut errors)
        {
            outputs[i].push(s);
        }
        if let Some(sh) = kind.shaft() {
            match g.shaft_index.get(sh) {
                Some(&k) => g.shaft_of[i] = Some(k),
                None => errors.push(BookError::Unknown {
                    whose: whose.clone(),
                    what: "shaft",
                    name: sh.to_string(),
                }),
            }
        }
        g.uses_ambient[i] = kind.reads().ambient;
        g.discharges.push(kind.discharges());
    }
    for (i, outs) in outputs.iter().enumerate() {
        for &s in outs {
            match producer[s] {
                None => producer[s] = Some(i),
                Some(j) => errors.push(BookError::Feed {
                    station: book.stations[s].name.clone(),
                    why: format!(
                        "is fed by both \"{}\" and \"{}\"; each station has one process into it",
                        book.processes[j].name, book.processes[i].name
                    ),
                }),
            }
        }
    }
    for (s, p) in producer.iter().enumerate() {
        if p.is_none() {
            errors.push(BookError::Feed {
                station: book.stations[s].name.clone(),
                why: "is fed by no process".into(),
            });
        }
    }
    // Flow conservation: a station's flow goes on into at most one process
    // (a split divides it explicitly), and nothing takes flow from a
    // nozzle's exit, which discharges to the ambient. Without these a
    // station feeding two processes would count its flow twice.
    let mut consumers: Vec<Vec<usize>> = vec![Vec::new(); book.stations.len()];
    for (i, ins) in g.inputs.iter().enumerate() {
        for &s in ins {
            if !consumers[s].contains(&i) {
                consumers[s].push(i);
            }
        }
    }
    g.has_bleed = book.processes.iter().any(|p| match &p.kind {
        crate::book::Kind::Bleed(_) => true,
        crate::book::Kind::Compressor(c) => c.bleed.is_some(),
        _ => false,
    });
    g.overboard = outputs
        .iter()
        .zip(&book.processes)
        .map(|(o, p)| {
            matches!(
                p.kind,
                crate::book::Kind::Bleed(_) | crate::book::Kind::Compressor(_)
            ) && o.get(1).is_some_and(|&s| consumers[s].is_empty())
        })
        .collect();
    for (s, c) in consumers.iter().enumerate() {
        if c.len() > 1 {
            let names: Vec<String> = c
                .iter()
                .map(|&i| format!("\"{}\"", book.processes[i].name))
                .collect();
            errors.push(BookError::Feed {
                station: book.stations[s].name.clone(),
                why: format!(
                    "feeds {} processes ({}); its flow would be counted {} times. A station feeds one process: divide a stream with a split",
                    c.len(),
                    names.join(", "),
                    c.len()
                ),
            });
        }
        if let (Some(&consumer), Some(prod)) = (c.first(), producer[s])
            && crate::kinds::of(&book.processes[prod].kind).discharges()
        {
            errors.push(BookError::Feed {
                station: book.stations[s].name.clone(),
                why: format!(
                    "is the exit of nozzle \"{}\", which discharges to the ambient; \"{}\" cannot take flow from it",
                    book.processes[prod].name, book.processes[consumer].name
                ),
            });
        }
    }
    // Shaft-work turbines depend on the other machines on their shaft.
    let mut work_turbines: HashMap<usize, usize> = HashMap::new();
    for (i, p) in book.processes.iter().enumerate() {
        if crate::kinds::of(&p.kind).takes_shaft_work() {
            match g.shaft_of[i] {
                None => errors.push(BookError::Rule(format!(
                    "turbine \"{}\" takes its work from a shaft balance: name its shaft",
                    p.name
                ))),
                Some(k) => {
                    if let Some(other) = work_turbines.insert(k, i) {
                        errors.push(BookError::Rule(format!(
                                "shaft \"{}\" has two turbines whose work the balance sets (\"{}\" and \"{}\"); give one a pressure ratio",
                                book.shafts[k].name, book.processes[other].name, p.name
                            )));
                    }
                }
            }
        }
    }
    if book.stations.is_empty() || book.processes.is_empty() {
        errors.push(BookError::Rule(
            "a workbook needs at least one station and the process (an entry) that feeds it".into(),
        ));
    }
    if !errors.is_empty() {
        return Err(errors);
    }
    g.producer = producer.into_iter().map(|p| p.unwrap_or(0)).collect();
    g.to_index = outputs
        .iter()
        .map(|o| o.first().copied().unwrap_or(0))
        .collect();
    g.outputs = outputs;
    g.deps = (0..n)
        .map(|i| {
            let mut d: Vec<usize> = g.inputs[i].iter().map(|&s| g.producer[s]).collect();
            if let Some(k) = g.shaft_of[i]
                && work_turbines.get(&k) == Some(&i)
            {
                d.extend((0..n).filter(|&j| j != i && g.shaft_of[j] == Some(k)));
            }
            d.sort_unstable();
            d.dedup();
            d
        })
        .collect();
    // Kahn's algorithm, keeping file order among ready nodes.
    let mut indeg: Vec<usize> = g.deps.iter().map(|d| d.len()).collect();
    let mut done = vec![false; n];
    while g.order.len() < n {
        let Some(next) = (0..n).find(|&i| !done[i] && indeg[i] == 0) else {
            let stuck: Vec<String> = (0..n)
                .filter(|&i| !done[i])
                .map(|i| book.processes[i].name.clone())
                .collect();
            return Err(vec![BookError::Cycle(format!(
                "{} depend on each other (a station feeding its own upstream, or a shaft-work turbine upstream of a compressor it drives); break the loop, or close it with a goal",
                stuck.join(", ")
            ))]);
        };
        done[next] = true;
        g.order.push(next);
        for (d, deg) in g.deps.iter().zip(indeg.iter_mut()) {
            if d.contains(&next) {
                *deg -= 1;
            }
        }
    }
    g.first_entry = g
        .order
        .iter()
        .copied()
        .find(|&i| crate::kinds::of(&book.processes[i].kind).is_entry());
    // Corrections: a stated station, else the engine face (what the first
    // compressor takes in), else the first entry's exit.
    let stated = book.corrections.as_ref().and_then(|c| c.station.as_ref());
    g.reference_station = match stated {
        Some(name) => match g.station_index.get(name) {
            Some(&k) => Some(k),
            None => {
                return Err(vec![BookError::Unknown {
                    whose: "the corrections".into(),
                    what: "station",
                    name: name.clone(),
                }]);
            }
        },
        None => g
            .order
            .iter()
            .find(|&&i| matches!(book.processes[i].kind, crate::book::Kind::Compressor(_)))
            .and_then(|&i| g.inputs[i].first().copied())
            .or_else(|| g.first_entry.map(|i| g.to_index[i])),
    };
    g.exhaust_station = g
        .order
        .iter()
        .rev()
        .find(|&&i| matches!(book.processes[i].kind, crate::book::Kind::Turbine(_)))
        .map(|&i| g.to_index[i]);
    g.has_mixer = book
        .processes
        .iter()
        .any(|p| matches!(p.kind, crate::book::Kind::Mixer(_)));
    Ok(g)
}

impl Engine {
    /// Compile and evaluate a resolved workbook.
    pub fn new(book: Workbook) -> Result<Engine, Vec<BookError>> {
        let graph = compile(&book)?;
        let n = book.processes.len();
        let model = gas_model(&book.gas);
        let ambient = match &model {
            Ok(m) => ambient_state(&book, m),
            Err(e) => Err(e.clone()),
        };
        let mut e = Engine {
            graph,
            model,
            ambient,
            nodes: vec![None; n],
            dirty: vec![true; n],
            changed: Vec::new(),
            checks: Vec::new(),
            goals: Vec::new(),
            summary: Summary::default(),
            evaluations: 0,
            withheld: None,
            gauged: book
                .givens()
                .iter()
                .any(|(_, _, t, _)| crate::units::gauge_reading(t).is_some()),
            book,
        };
        let bad = e.check_references();
        if !bad.is_empty() {
            return Err(bad);
        }
        e.recompute();
        Ok(e)
    }

    /// The composition of the ambient air (dry air and its water), when
    /// the ambient block computes.
    pub fn ambient_air(&self) -> Option<Composition> {
        self.ambient.as_ref().ok().map(|a| a.air)
    }

    /// The workbook as evaluated (goals may have varied some SI values).
    pub fn book(&self) -> &Workbook {
        &self.book
    }

    /// Number of process evaluations since the engine was built.
    pub fn evaluations(&self) -> u64 {
        self.evaluations
    }

    /// Replace the workbook after a structural edit: recompile and recompute.
    pub fn replace_book(&mut self, book: Workbook) -> Result<(), Vec<BookError>> {
        *self = Engine::new(book)?;
        Ok(())
    }

    /// Withhold every computed value (`Some(reason)`), or compute again
    /// (`None`). While withheld no station, process, figure or summary value
    /// is reported, edits still change the workbook, and the reason is the
    /// first problem. The scan browser withholds the values of a scan it
    /// cannot apply, so the screen never shows another scan's numbers.
    pub fn withhold(&mut self, why: Option<String>) {
        match why {
            Some(w) => {
                self.withheld = Some(w);
                self.nodes.iter_mut().for_each(|n| *n = None);
                self.summary = Summary::default();
                self.goals.clear();
            }
            None => {
                if self.withheld.take().is_some() {
                    self.dirty.iter_mut().for_each(|d| *d = true);
                    self.recompute();
                }
            }
        }
    }

    /// Why the values are withheld, if they are.
    pub fn withheld(&self) -> Option<&str> {
        self.withheld.as_deref()
    }

    /// Set a given from typed text and recompute what depends on it.
    /// A bad value is refused and the old one kept.
    pub fn set_given(&mut self, path: &str, text: &str) -> Result<(), BookError> {
        self.book.set_given(path, text)?;
        self.gauged |= crate::units::gauge_reading(text).is_some();
        // A new barometer moved the gauge givens with it.
        if self.gauged && path == crate::book::BAROMETER {
            for (p, _, t, _) in self.book.givens() {
                if crate::units::gauge_reading(&t).is_some() {
                    self.touch(&p);
                }
            }
        }
        self.touch(path);
        self.recompute();
        Ok(())
    }

    /// Set a given's SI value directly (sweeps, goals, uncertainty), keeping
    /// its text; recompute what depends on it.
    pub fn set_si(&mut self, path: &str, si: f64) -> Result<(), BookError> {
        let mut found = None;
        self.book.visit_givens(&mut |f| {
            if f.is(path) {
                let r = f.check_si(si);
                if r.is_ok() {
                    f.given.set_si(si);
                }
                found = Some(r);
            }
        });
        if let Some(r) = found {
            r?;
        } else {
            return Err(BookError::Unknown {
                whose: "the change".into(),
                what: "given",
                name: path.to_string(),
            });
        }
        self.touch(path);
        self.recompute();
        Ok(())
    }

    /// Set several givens' SI values at once, then recompute once.
    pub fn set_si_many(&mut self, values: &[(&str, f64)]) -> Result<(), BookError> {
        for (path, si) in values {
            let mut found = None;
            self.book.visit_givens(&mut |f| {
                if f.is(path) {
                    let r = f.check_si(*si);
                    if r.is_ok() {
                        f.given.set_si(*si);
                    }
                    found = Some(r);
                }
            });
            if let Some(Err(e)) = found {
                self.recompute();
                return Err(e);
            }
            if found.is_none() {
                self.recompute();
                return Err(BookError::Unknown {
                    whose: "the change".into(),
                    what: "given",
                    name: path.to_string(),
                });
            }
            self.touch(path);
        }
        self.recompute();
        Ok(())
    }

    /// Mark what reads the given at `path` as dirty.
    fn touch(&mut self, path: &str) {
        let Ok(p) = Path::parse(path) else {
            return;
        };
        let t = match p.scope {
            Scope::Gas => Touch::Gas,
            Scope::Ambient if p.key.starts_with("reference") => Touch::All,
            Scope::Ambient => Touch::Ambient,
            Scope::Station => self
                .graph
                .station_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&s| Touch::Process(self.graph.producer[s])),
            Scope::Process => self
                .graph
                .process_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&i| Touch::Process(i)),
            Scope::Shaft => self
                .graph
                .shaft_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&k| Touch::Shaft(k)),
            Scope::Summary => Touch::Nothing,
        };
        self.touch_resolved(t);
    }

    /// Mark what a resolved change reaches as dirty.
    fn touch_resolved(&mut self, t: Touch) {
        match t {
            Touch::Gas => {
                self.model = gas_model(&self.book.gas);
                self.refresh_ambient();
                self.dirty.iter_mut().for_each(|d| *d = true);
            }
            Touch::All => self.dirty.iter_mut().for_each(|d| *d = true),
            Touch::Ambient => {
                self.refresh_ambient();
                for (i, d) in self.dirty.iter_mut().enumerate() {
                    if self.graph.uses_ambient[i] {
                        *d = true;
                    }
                }
            }
            Touch::Process(i) => {
                if let Some(d) = self.dirty.get_mut(i) {
                    *d = true;
                }
            }
            Touch::Shaft(k) => {
                for (i, d) in self.dirty.iter_mut().enumerate() {
                    if self.graph.shaft_of[i] == Some(k) {
                        *d = true;
                    }
                }
            }
            Touch::Nothing => {}
        }
    }

    fn refresh_ambient(&mut self) {
        self.ambient = match &self.model {
            Ok(m) => ambient_state(&self.book, m),
            Err(e) => Err(e.clone()),
        };
    }

    fn recompute(&mut self) {
        // Gauge givens follow the barometer in use (a scan's or a sweep's
        // ambient pressure included).
        if self.gauged {
            for p in self.book.follow_barometer() {
                self.touch(&p);
            }
        }
        self.run_nodes();
        if !self.book.goals.is_empty() && self.withheld.is_none() {
            self.solve_goals();
        }
        self.check_mixers();
    }

    /// A mixer whose streams arrive at static pressures further apart than
    /// its allowed mismatch (default 5 %) is a problem once goals have had
    /// their say (a goal may be what balances it): the constant-area mix
    /// is computed, but a real mixer would not run there.
    fn check_mixers(&mut self) {
        self.checks.clear();
        if !self.graph.has_mixer {
            return;
        }
        for (i, p) in self.book.processes.iter().enumerate() {
            let crate::book::Kind::Mixer(m) = &p.kind else {
                continue;
            };
            let Some(NodeOut::Done(r)) = &self.nodes[i] else {
                continue;
            };
            let Some(ratio) = r
                .figures
                .iter()
                .find(|(k, _)| *k == "p_ratio_streams")
                .map(|x| x.1)
            else {
                continue;
            };
            let tol = m.max_mismatch.as_ref().map_or(0.05, |g| g.si());
            if (ratio - 1.0).abs() > tol {
                self.checks.push(Problem {
                    place: format!("mixer \"{}\"", p.name),
                    message: format!(
                        "the second stream meets the first at {:.3} times its static pressure (allowed 1 +- {}): balance them with a goal (vary the bypass ratio or an area so that process.{}.p_ratio_streams = 1), or state max_mismatch",
                        ratio,
                        crate::report::sig(tol, 3),
                        p.name
                    ),
                });
            }
        }
    }

    fn run_nodes(&mut self) {
        if self.withheld.is_some() {
            return;
        }
        // The changed marks are a buffer kept between runs (no allocation
        // per recompute); a result replaces the old one in its box.
        let mut changed = std::mem::take(&mut self.changed);
        changed.clear();
        changed.resize(self.nodes.len(), false);
        for oi in 0..self.graph.order.len() {
            let i = self.graph.order[oi];
            let need = self.dirty[i]
                || self.nodes[i].is_none()
                || self.graph.deps[i].iter().any(|&d| changed[d]);
            if !need {
                continue;
            }
            let out = self.evaluate_raw(i, &mut Tracer::off());
            self.evaluations += 1;
            self.dirty[i] = false;
            match (&mut self.nodes[i], out) {
                (Some(NodeOut::Done(old)), Ok(r)) => {
                    if **old != r {
                        **old = r;
                        changed[i] = true;
                    }
                }
                (slot, out) => {
                    let out = match out {
                        Ok(r) => NodeOut::Done(Box::new(r)),
                        Err(o) => o,
                    };
                    if slot.as_ref() != Some(&out) {
                        changed[i] = true;
                        *slot = Some(out);
                    }
                }
            }
        }
        self.changed = changed;
        self.summary = self.build_summary();
    }

    /// Inputs of node `i` (at most three: the upstream station, a second
    /// stream or two cooling flows), or the name of the process that
    /// blocks it.
    fn node_inputs(&self, i: usize) -> Result<([Option<&StationValue>; 3], usize), String> {
        let mut v = [None, None, None];
        let ins = &self.graph.inputs[i];
        for (slot, &s) in v.iter_mut().zip(ins) {
            *slot = Some(self.station_value(s)?);
        }
        Ok((v, ins.len().min(3)))
    }

    fn station_value(&self, s: usize) -> Result<&StationValue, String> {
        let p = self.graph.producer[s];
        match self.nodes[p].as_ref() {
            Some(NodeOut::Done(r)) => {
                if self.graph.to_index[p] == s {
                    Ok(&r.out)
                } else {
                    r.out2
                        .as_deref()
                        .ok_or_else(|| self.book.processes[p].name.clone())
                }
            }
            Some(NodeOut::Blocked(by)) => Err(by.clone()),
            _ => Err(self.book.processes[p].name.clone()),
        }
    }

    /// The power a shaft-work turbine must deliver, or the outcome that
    /// stops it (a bad shaft given, a machine on the shaft not computed).
    fn shaft_need(&self, i: usize) -> Result<Option<f64>, NodeOut> {
        let Some(k) = self.graph.shaft_of[i] else {
            return Ok(None);
        };
        let sh = &self.book.shafts[k];
        let eta_m = sh.mechanical_efficiency.si();
        if !(eta_m.is_finite() && eta_m > 0.0 && eta_m <= 1.0) {
            return Err(NodeOut::Failed(format!(
                "shaft \"{}\": mechanical efficiency {} must lie above 0 and at most 1",
                sh.name,
                sh.mechanical_efficiency.shown()
            )));
        }
        let offtake = sh.offtake.as_ref().map_or(0.0, |g| g.si());
        let mut absorbed = offtake;
        let mut delivered = 0.0;
        for &d in &self.graph.deps[i] {
            if self.graph.shaft_of[d] != Some(k) {
                continue;
            }
            match self.nodes[d].as_ref() {
                Some(NodeOut::Done(r)) => {
                    if r.power > 0.0 {
                        absorbed += r.power;
                    } else {
                        delivered -= r.power;
                    }
                }
                _ => return Err(NodeOut::Blocked(self.book.processes[d].name.clone())),
            }
        }
        Ok(Some(absorbed / eta_m - delivered))
    }

    fn evaluate(&self, i: usize, tr: &mut Tracer) -> NodeOut {
        match self.evaluate_raw(i, tr) {
            Ok(r) => NodeOut::Done(Box::new(r)),
            Err(o) => o,
        }
    }

    /// Run process `i`: its result, or the outcome that stands instead.
    fn evaluate_raw(&self, i: usize, tr: &mut Tracer) -> Result<ProcessResult, NodeOut> {
        let p = &self.book.processes[i];
        let model = match &self.model {
            Ok(m) => m,
            Err(e) => return Err(NodeOut::NoSettings(format!("gas settings: {e}"))),
        };
        let ambient = match &self.ambient {
            Ok(a) => a,
            Err(e) => return Err(NodeOut::NoSettings(format!("ambient: {e}"))),
        };
        let (ins, n_in) = match self.node_inputs(i) {
            Ok(v) => v,
            Err(by) => return Err(NodeOut::Blocked(by)),
        };
        let three;
        let pair;
        let one;
        let inputs: &[&StationValue] = match ins {
            [Some(a), Some(b), Some(c)] if n_in == 3 => {
                three = [a, b, c];
                &three
            }
            [Some(a), Some(b), _] if n_in == 2 => {
                pair = [a, b];
                &pair
            }
            [Some(a), _, _] => {
                one = [a];
                &one
            }
            _ => &[],
        };
        let kind = crate::kinds::of(&p.kind);
        let shaft_need = if kind.takes_shaft_work() {
            self.shaft_need(i)?
        } else {
            None
        };
        let shaft_speed = self.graph.shaft_of[i]
            .and_then(|k| self.book.shafts[k].speed.as_ref())
            .map(|g| g.si());
        let ctx = Ctx {
            model,
            ambient,
            shaft_need,
            shaft_speed,
            reference: self.reference(),
        };
        let to = &self.book.stations[self.graph.to_index[i]];
        let to2 = self.graph.outputs[i]
            .get(1)
            .map(|&k| &self.book.stations[k]);
        let io = crate::kinds::Io {
            name: &p.name,
            from: p.from.as_deref().unwrap_or(""),
            inputs,
            to,
            to2,
        };
        compute::run(&ctx, p, &io, tr).map_err(NodeOut::Failed)
    }

    fn build_summary(&self) -> Summary {
        let mut s = Summary::default();
        let mut gross = 0.0;
        let mut ram = 0.0;
        let mut fuel = 0.0;
        let mut heat = 0.0;
        let mut air = 0.0;
        let mut ke_out = 0.0;
        let mut ke_in = 0.0;
        let mut nozzles = 0;
        let mut overboard = 0.0;
        for (i, n) in self.nodes.iter().enumerate() {
            match n {
                Some(NodeOut::Done(r)) => {
                    if self.graph.overboard[i]
                        && let Some(b) = &r.out2
                    {
                        overboard += b.w;
                    }
                    gross += r.thrust;
                    ram += r.ram_drag;
                    fuel += r.fuel;
                    heat += r.heat_release;
                    air += r.air_in;
                    ke_out += r.exit_ke;
                    ke_in += r.entry_ke;
                    if self.graph.discharges[i] {
                        nozzles += 1;
                    }
                }
                _ => return s,
            }
        }
        let offtake: f64 = self
            .book
            .shafts
            .iter()
            .filter_map(|sh| sh.offtake.as_ref().map(|g| g.si()))
            .sum();
        s.air_flow = Some(air);
        if self.graph.has_bleed {
            s.bleed_overboard = Some(overboard);
        }
        s.sheet = if self.graph.freestream && nozzles > 0 {
            SheetKind::Engine
        } else {
            self.tunnel_figures(&mut s);
            if s.test_station.is_some() {
                SheetKind::Tunnel
            } else {
                SheetKind::Rig
            }
        };
        if s.sheet != SheetKind::Engine {
            // A rig or tunnel: fuel only when some is burnt, no propulsion
            // figure (a plenum-fed nozzle's thrust is its own figure).
            if fuel > 0.0 {
                s.fuel = Some(fuel);
            }
            return s;
        }
        s.fuel = Some(fuel);
        // Corrections use the totals of the reference station.
        let corr = self.correction_state().map(|c| (c.theta, c.delta));
        if let Some(c) = self.correction_state() {
            if fuel > 0.0 {
                s.fuel_corrected =
                    Some(fuel * c.lhv_ratio(heat / fuel) / (c.delta * c.theta.powf(c.exponent)));
            }
            if let Some(k) = self.graph.exhaust_station
                && let Ok(v) = self.station_value(k)
            {
                s.egt_corrected = Some(v.tt / c.theta);
            }
        }
        if nozzles > 0 {
            let net = gross - ram;
            s.thrust_gross = Some(gross);
            s.thrust_corrected = corr.map(|(_, delta)| net / delta);
            s.ram_drag = Some(ram);
            s.thrust_net = Some(net);
            if air > 0.0 {
                s.specific_thrust = Some(net / air);
            }
            if fuel > 0.0 && net > 0.0 {
                s.tsfc = Some(fuel / net);
            }
            // Efficiencies only where they mean something: a positive
            // kinetic-energy gain, positive net thrust, and a propulsive
            // efficiency of at most one (with fuel mass carried, F/W jet
            // velocities near flight speed can push the ratio past one).
            let v0 = self.ambient.as_ref().map_or(0.0, |a| a.flow.v);
            let dke = ke_out - ke_in + offtake;
            if heat > 0.0 && dke > 0.0 {
                s.eta_thermal = Some(dke / heat);
                if v0 > 0.0 && net > 0.0 {
                    s.eta_overall = Some(net * v0 / heat);
                }
            }
            // Propulsive: thrust power over the jets' kinetic-power gain
            // alone (shaft offtake is useful work, but not the jets').
            let dke_jet = ke_out - ke_in;
            if v0 > 0.0 && dke_jet > 0.0 && net > 0.0 && net * v0 <= dke_jet {
                s.eta_propulsive = Some(net * v0 / dke_jet);
            }
        }
        s
    }

    /// How each summary figure was obtained: one step per defined figure,
    /// with the relation and the values it used (empty while anything is
    /// not computed). A rig sheet's component figures are explained with
    /// their process (`explain` of its exit station).
    pub fn explain_summary(&self) -> Vec<Step> {
        use crate::units::Quantity as Q;
        let s = &self.summary;
        let mut out = Vec::new();
        let mut push =
            |what: &str, v: Option<f64>, q: Q, rel: String, inputs: Vec<(String, f64, Q)>| {
                if let Some(v) = v {
                    out.push(Step {
                        what: what.to_string(),
                        value: v,
                        quantity: q,
                        relation: rel,
                        inputs,
                    });
                }
            };
        let named = |f: &dyn Fn(&ProcessResult) -> f64, q: Q| -> Vec<(String, f64, Q)> {
            self.book
                .processes
                .iter()
                .enumerate()
                .filter_map(|(i, p)| match &self.nodes[i] {
                    Some(NodeOut::Done(r)) if f(r) != 0.0 => Some((p.name.clone(), f(r), q)),
                    _ => None,
                })
                .collect()
        };
        push(
            "air flow",
            s.air_flow,
            Q::MassFlow,
            "sum of the air entering at every entry".into(),
            named(&|r| r.air_in, Q::MassFlow),
        );
        push(
            "fuel flow",
            s.fuel,
            Q::FuelFlow,
            "sum of the fuel burnt in every combustor".into(),
            named(&|r| r.fuel, Q::FuelFlow),
        );
        let v0 = self.ambient.as_ref().map_or(0.0, |a| a.flow.v);
        if s.sheet == SheetKind::Engine {
            push(
                "gross thrust",
                s.thrust_gross,
                Q::Force,
                "sum of the nozzles' gross thrust (momentum plus pressure thrust at each exit)"
                    .into(),
                named(&|r| r.thrust, Q::Force),
            );
            push(
                "ram drag",
                s.ram_drag,
                Q::Force,
                "D_ram = W0 V0 at every free-stream entry".into(),
                vec![("V0".into(), v0, Q::Velocity)],
            );
            let (fg, dr) = (s.thrust_gross.unwrap_or(0.0), s.ram_drag.unwrap_or(0.0));
            let net = s.thrust_net.unwrap_or(0.0);
            push(
                "net thrust",
                s.thrust_net,
                Q::Force,
                "F_net = F_gross - D_ram".into(),
                vec![
                    ("F_gross".into(), fg, Q::Force),
                    ("D_ram".into(), dr, Q::Force),
                ],
            );
            let wf = s.fuel.unwrap_or(0.0);
            push(
                "TSFC",
                s.tsfc,
                Q::ThrustSpecificFuelConsumption,
                "TSFC = Wf / F_net".into(),
                vec![
                    ("Wf".into(), wf, Q::FuelFlow),
                    ("F_net".into(), net, Q::Force),
                ],
            );
            push(
                "specific thrust",
                s.specific_thrust,
                Q::SpecificThrust,
                "F_net / W_air".into(),
                vec![
                    ("F_net".into(), net, Q::Force),
                    ("W_air".into(), s.air_flow.unwrap_or(0.0), Q::MassFlow),
                ],
            );
            let heat: f64 = named(&|r| r.heat_release, Q::Power)
                .iter()
                .map(|x| x.1)
                .sum();
            push(
                "thermal efficiency",
                s.eta_thermal,
                Q::Ratio,
                "(kinetic power out - kinetic power in + shaft offtake) / (Wf LHV)".into(),
                vec![("Wf LHV".into(), heat, Q::Power)],
            );
            push(
                "propulsive efficiency",
                s.eta_propulsive,
                Q::Ratio,
                "F_net V0 / (kinetic power out - kinetic power in)".into(),
                vec![
                    ("F_net".into(), net, Q::Force),
                    ("V0".into(), v0, Q::Velocity),
                ],
            );
            push(
                "overall efficiency",
                s.eta_overall,
                Q::Ratio,
                "F_net V0 / (Wf LHV)".into(),
                vec![
                    ("F_net".into(), net, Q::Force),
                    ("V0".into(), v0, Q::Velocity),
                    ("Wf LHV".into(), heat, Q::Power),
                ],
            );
            let (t_ref, p_ref) = self.reference();
            if let Some(c) = self.correction_state() {
                let st = &c.station;
                let how = if self
                    .book
                    .corrections
                    .as_ref()
                    .is_some_and(|c| c.station.is_some())
                {
                    "the stated reference station"
                } else if self.graph.first_entry.is_some_and(|i| {
                    self.graph.to_index[i] == self.graph.reference_station.unwrap_or(usize::MAX)
                }) {
                    "the first entry's exit"
                } else {
                    "the engine face, the first compressor's inflow"
                };
                push(
                    "corrected net thrust",
                    s.thrust_corrected,
                    Q::Force,
                    format!("F_net / delta, delta = pt / p_ref with pt of station {st} ({how})"),
                    vec![
                        ("F_net".into(), net, Q::Force),
                        (format!("pt{st}"), c.pt, Q::Pressure),
                        ("p_ref".into(), p_ref, Q::Pressure),
                    ],
                );
                let lhv = if wf > 0.0 { heat / wf } else { f64::NAN };
                let mut inputs = vec![
                    ("Wf".into(), wf, Q::FuelFlow),
                    (format!("Tt{st}"), c.tt, Q::Temperature),
                    (format!("pt{st}"), c.pt, Q::Pressure),
                    ("T_ref".into(), t_ref, Q::Temperature),
                    ("p_ref".into(), p_ref, Q::Pressure),
                    ("x".into(), c.exponent, Q::Ratio),
                ];
                let referral = match c.lhv_ref {
                    Some(r) => {
                        inputs.push(("LHV burnt".into(), lhv, Q::SpecificEnergy));
                        inputs.push(("LHV_ref".into(), r, Q::SpecificEnergy));
                        " (LHV burnt / LHV_ref)"
                    }
                    None => "",
                };
                push(
                    "corrected fuel flow",
                    s.fuel_corrected,
                    Q::FuelFlow,
                    format!(
                        "Wf{referral} / (delta theta^x), theta = Tt / T_ref and delta = pt / p_ref of station {st} ({how})"
                    ),
                    inputs,
                );
                if let Some(k) = self.graph.exhaust_station {
                    let ex = &self.book.stations[k].name;
                    let tt = self.station_value(k).map_or(f64::NAN, |v| v.tt);
                    push(
                        "corrected exhaust Tt",
                        s.egt_corrected,
                        Q::Temperature,
                        format!(
                            "Tt{ex} / theta, station {ex} the last turbine's exit, theta = Tt{st} / T_ref"
                        ),
                        vec![
                            (format!("Tt{ex}"), tt, Q::Temperature),
                            (format!("Tt{st}"), c.tt, Q::Temperature),
                            ("T_ref".into(), t_ref, Q::Temperature),
                        ],
                    );
                }
            }
        }
        if let Some(i) = s.test_station
            && let Ok(v) = self.station_value(i)
            && let Some(f) = v.flow
        {
            let st = &self.book.stations[i].name;
            push(
                "test-section Mach",
                s.test_mach,
                Q::Mach,
                format!(
                    "the Mach number of station {st}, the fastest supersonic station no nozzle discharges"
                ),
                vec![],
            );
            push(
                "test-section q",
                s.test_q,
                Q::PressureDifference,
                "q = rho V^2 / 2".into(),
                vec![
                    ("rho".into(), f.rho, Q::Density),
                    ("V".into(), f.v, Q::Velocity),
                ],
            );
            push(
                "test-section Re per length",
                s.test_re,
                Q::PerLength,
                "Re/L = rho V / mu, mu = 1.458e-6 T^1.5 / (T + 110.4) (Sutherland, U.S. Standard Atmosphere 1976 constants)".into(),
                vec![
                    ("rho".into(), f.rho, Q::Density),
                    ("V".into(), f.v, Q::Velocity),
                    ("T".into(), f.t, Q::Temperature),
                ],
            );
            push(
                "starting shock pt ratio",
                s.start_pt_ratio,
                Q::Ratio,
                "pt2/pt1 of a normal shock at the test-section Mach number (the shock a starting tunnel must pass through the test section)".into(),
                vec![("M".into(), f.mach, Q::Mach)],
            );
            push(
                "min diffuser/nozzle throat",
                s.start_throat_ratio,
                Q::Ratio,
                "A*_diffuser / A*_nozzle >= pt1/pt2: the diffuser throat must pass the flow at the total pressure behind the starting shock".into(),
                vec![("pt2/pt1".into(), s.start_pt_ratio.unwrap_or(f64::NAN), Q::Ratio)],
            );
        }
        out
    }

    /// The test section of a tunnel sheet and its figures: the fastest
    /// supersonic station whose producer does not discharge to ambient.
    fn tunnel_figures(&self, s: &mut Summary) {
        let mut best: Option<(usize, FlowState)> = None;
        for (i, _) in self.book.stations.iter().enumerate() {
            let p = self.graph.producer[i];
            if self.graph.discharges[p] {
                continue;
            }
            if let Ok(v) = self.station_value(i)
                && let Some(f) = v.flow
                && f.mach > 1.0
                && best.is_none_or(|(_, b)| f.mach > b.mach)
            {
                best = Some((i, f));
            }
        }
        let Some((i, f)) = best else {
            return;
        };
        s.test_station = Some(i);
        s.test_mach = Some(f.mach);
        s.test_q = Some(0.5 * f.rho * f.v * f.v);
        s.test_re = Some(f.rho * f.v / atmosphere::air_viscosity(f.t));
        let gas = self
            .model
            .as_ref()
            .ok()
            .and_then(|m| self.station_value(i).ok().and_then(|v| m.gas(&v.comp).ok()));
        if let Some(g) = gas
            && let Ok(down) = crate::flow::shock::normal(&g, &f)
            && down.pt > 0.0
        {
            s.start_pt_ratio = Some(down.pt / f.pt);
            s.start_throat_ratio = Some(f.pt / down.pt);
        }
    }

    fn solve_goals(&mut self) {
        let goals = self.book.goals.clone();
        self.goals.clear();
        for g in &goals {
            // A goal switched off is kept, not solved.
            if g.off {
                self.goals.push(GoalOutcome::default());
                continue;
            }
            let target = g.value.si();
            let scale = target.abs().max(1e-12);
            let mut last_problem: Option<String> = None;
            let evaluations = std::cell::Cell::new(0u32);
            let f = |eng: &mut Engine, x: f64| -> Result<f64, String> {
                evaluations.set(evaluations.get() + 1);
                eng.set_si_quiet(&g.vary, x)?;
                eng.run_nodes();
                match eng.value(&g.target) {
                    Ok(Some(v)) => Ok((v - target) / scale),
                    Ok(None) => Err(format!(
                        "{} is not computed with {} = {x:.6} ({})",
                        g.target,
                        g.vary,
                        eng.problems()
                            .first()
                            .map_or(String::new(), |p| p.message.clone())
                    )),
                    Err(e) => Err(e.to_string()),
                }
            };
            let (lo, hi) = (g.low.si(), g.high.si());
            if lo.partial_cmp(&hi) != Some(std::cmp::Ordering::Less) {
                self.goals.push(GoalOutcome {
                    value: None,
                    problem: Some(format!(
                        "the bracket low {} must lie below high {}",
                        g.low.text(),
                        g.high.text()
                    )),
                    ..GoalOutcome::default()
                });
                continue;
            }
            let original = self
                .book
                .givens()
                .into_iter()
                .find(|(p, ..)| *p == g.vary)
                .map(|(_, _, _, si)| si);
            let result = {
                let eng = &mut *self;
                solve::brent(|x| f(eng, x), lo, hi, 1e-12, 100)
            };
            let outcome = match result {
                Ok(x) => {
                    let _ = self.set_si_quiet(&g.vary, x);
                    self.run_nodes();
                    GoalOutcome {
                        value: Some(x),
                        iterations: evaluations.get(),
                        ..GoalOutcome::default()
                    }
                }
                Err(e) => {
                    let msg = match e {
                        solve::SolveError::Inner(m) => m,
                        solve::SolveError::Stopped(solve::Failure::NoRoot { at_lo, at_hi }) => {
                            format!(
                                "{} cannot reach {} by varying {} between {} and {} (it misses by {:+.3} % and {:+.3} % there)",
                                g.target,
                                g.value.text(),
                                g.vary,
                                g.low.text(),
                                g.high.text(),
                                at_lo * 100.0,
                                at_hi * 100.0
                            )
                        }
                        solve::SolveError::Stopped(solve::Failure::IterationCap {
                            iterations,
                            residual,
                        }) => format!(
                            "no convergence: stopped at the cap of {iterations} trials (residual {:+.3} %)",
                            residual * 100.0
                        ),
                        solve::SolveError::Stopped(solve::Failure::Jump { at, residual }) => {
                            format!(
                                "no convergence: {} jumps across {} where {} = {} (SI), missing it by {:+.3} % on the nearer side; it takes no value in between",
                                g.target,
                                g.value.text(),
                                g.vary,
                                crate::report::sig(at, 6),
                                residual * 100.0
                            )
                        }
                    };
                    // Leave the varied given where the user put it.
                    if let Some(x) = original {
                        let _ = self.set_si_quiet(&g.vary, x);
                        self.run_nodes();
                    }
                    last_problem = Some(msg);
                    GoalOutcome {
                        value: None,
                        problem: last_problem.clone(),
                        iterations: evaluations.get(),
                        ..GoalOutcome::default()
                    }
                }
            };
            let _ = last_problem;
            self.goals.push(outcome);
        }
        // Goals met one after another disturb each other: solve them
        // together, then report what each reached.
        self.couple_goals(&goals);
        self.report_goals(&goals);
    }

    fn set_si_quiet(&mut self, path: &str, si: f64) -> Result<(), String> {
        let mut found = false;
        self.book.visit_givens(&mut |f| {
            if f.is(path) {
                f.given.set_si(si);
                found = true;
            }
        });
        if !found {
            return Err(format!("no given at {path}"));
        }
        self.touch(path);
        Ok(())
    }

    /// Every problem: processes that failed, goals that could not be met.
    pub fn problems(&self) -> Vec<Problem> {
        let mut v = Vec::new();
        if let Some(why) = &self.withheld {
            v.push(Problem {
                place: "values withheld".to_string(),
                message: why.clone(),
            });
        }
        // A bad ambient block or gas setting fails every process that reads
        // it: report it once, at its source.
        for (place, text) in [
            ("gas settings", &self.model.as_ref().err()),
            ("ambient", &self.ambient.as_ref().err()),
        ] {
            if let Some(m) = text {
                v.push(Problem {
                    place: place.to_string(),
                    message: (*m).clone(),
                });
            }
        }
        for &i in &self.graph.order {
            if let Some(NodeOut::Failed(m)) = &self.nodes[i] {
                let p = &self.book.processes[i];
                // The kind before the name, unless the name says it already
                // (a process named "compressor" is not a compressor
                // "compressor").
                let kind = crate::kinds::of(&p.kind).name();
                let place = if p.name.eq_ignore_ascii_case(kind) {
                    format!("\"{}\"", p.name)
                } else {
                    format!("{kind} \"{}\"", p.name)
                };
                v.push(Problem {
                    place,
                    message: m.clone(),
                });
            }
        }
        for (k, g) in self.goals.iter().enumerate() {
            if let Some(m) = &g.problem {
                v.push(Problem {
                    place: format!("goal {}", k + 1),
                    message: m.clone(),
                });
            }
        }
        v.extend(self.checks.iter().cloned());
        v
    }

    /// Cautions on results that computed (not problems): each process's
    /// note, such as frozen products where dissociation matters.
    pub fn notes(&self) -> Vec<Problem> {
        let mut v = Vec::new();
        for &i in &self.graph.order {
            if let Some(NodeOut::Done(r)) = &self.nodes[i]
                && let Some(n) = r.note
            {
                let p = &self.book.processes[i];
                v.push(Problem {
                    place: format!("{} \"{}\"", crate::kinds::of(&p.kind).name(), p.name),
                    message: n.to_string(),
                });
            }
        }
        v
    }

    /// The first of [`Engine::problems`] as "place: message", built only
    /// when there is one (a sweep asks at every point).
    pub fn first_problem(&self) -> Option<String> {
        let none = self.model.is_ok()
            && self.ambient.is_ok()
            && !self
                .nodes
                .iter()
                .any(|n| matches!(n, Some(NodeOut::Failed(_))))
            && self.goals.iter().all(|g| g.problem.is_none())
            && self.checks.is_empty();
        if none {
            return None;
        }
        self.problems()
            .into_iter()
            .next()
            .map(|p| format!("{}: {}", p.place, p.message))
    }

    /// Goal outcomes, in workbook order.
    pub fn goal_outcomes(&self) -> &[GoalOutcome] {
        &self.goals
    }

    /// The status of a station by index (file order).
    pub fn station_status(&self, s: usize) -> StationStatus<'_> {
        if let Some(why) = &self.withheld {
            return StationStatus::Withheld(why);
        }
        let Some(&p) = self.graph.producer.get(s) else {
            return StationStatus::Failed("(no such station)");
        };
        match self.nodes[p].as_ref() {
            Some(NodeOut::Done(_)) => match self.station_value(s) {
                Ok(v) => StationStatus::Ok(v),
                Err(_) => StationStatus::Failed(&self.book.processes[p].name),
            },
            Some(NodeOut::Blocked(by)) => StationStatus::Blocked(by),
            _ => StationStatus::Failed(&self.book.processes[p].name),
        }
    }

    /// The computed value of a station by name.
    pub fn station(&self, name: &str) -> Option<&StationValue> {
        let &s = self.graph.station_index.get(name)?;
        self.station_value(s).ok()
    }

    /// The result of a process by name.
    pub fn process(&self, name: &str) -> Option<&ProcessResult> {
        let &i = self.graph.process_index.get(name)?;
        match self.nodes[i].as_ref() {
            Some(NodeOut::Done(r)) => Some(r),
            _ => None,
        }
    }

    /// The process that produces a station (by station index).
    pub fn producer_of(&self, s: usize) -> usize {
        self.graph.producer[s]
    }

    /// Reference total temperature and pressure of corrected values
    /// (ISA sea level unless the ambient block names one).
    pub fn reference(&self) -> (f64, f64) {
        match &self.book.ambient.reference {
            Some(r) => (r.temperature.si(), r.pressure.si()),
            None => (
                atmosphere::SEA_LEVEL_TEMPERATURE_K,
                atmosphere::SEA_LEVEL_PRESSURE_PA,
            ),
        }
    }

    /// Theta, delta and the settings of corrected figures, where the
    /// reference station has computed.
    fn correction_state(&self) -> Option<CorrectionState> {
        let k = self.graph.reference_station?;
        let v = self.station_value(k).ok()?;
        let (t_ref, p_ref) = self.reference();
        let c = self.book.corrections.as_ref();
        Some(CorrectionState {
            station: self.book.stations[k].name.clone(),
            tt: v.tt,
            pt: v.pt,
            theta: v.tt / t_ref,
            delta: v.pt / p_ref,
            exponent: c
                .and_then(|c| c.theta_exponent.as_ref())
                .map_or(0.5, |g| g.si()),
            lhv_ref: c.and_then(|c| c.lhv.as_ref()).map(|g| g.si()),
        })
    }

    /// The summary.
    pub fn summary(&self) -> &Summary {
        &self.summary
    }

    /// The ambient state, or why it could not be computed.
    pub fn ambient(&self) -> Result<&AmbientState, &str> {
        self.ambient.as_ref().map_err(|e| e.as_str())
    }

    /// The gas model, or why it could not be built.
    pub fn model(&self) -> Result<&GasModel, &str> {
        self.model.as_ref().map_err(|e| e.as_str())
    }

    /// Power balance of a shaft by name.
    pub fn shaft(&self, name: &str) -> Option<ShaftBalance> {
        let &k = self.graph.shaft_index.get(name)?;
        let sh = &self.book.shafts[k];
        let mut b = ShaftBalance {
            offtake: sh.offtake.as_ref().map_or(0.0, |g| g.si()),
            ..ShaftBalance::default()
        };
        for i in 0..self.nodes.len() {
            if self.graph.shaft_of[i] != Some(k) {
                continue;
            }
            match self.nodes[i].as_ref() {
                Some(NodeOut::Done(r)) if r.power > 0.0 => b.compressor_power += r.power,
                Some(NodeOut::Done(r)) => b.turbine_power -= r.power,
                _ => return None,
            }
        }
        b.imbalance =
            b.turbine_power * sh.mechanical_efficiency.si() - b.compressor_power - b.offtake;
        Some(b)
    }

    /// A derived station value by key (see `book::paths::STATION_KEYS`).
    pub fn station_key(&self, v: &StationValue, key: &str) -> Option<f64> {
        let f = v.flow.as_ref();
        let gas = || self.model.as_ref().ok()?.gas(&v.comp).ok();
        match key {
            "tt" => Some(v.tt),
            "pt" => Some(v.pt),
            "w" => Some(v.w),
            "far" => Some(v.comp.far),
            // A stream at rest has no finite capture area: not defined there.
            "area" => v.area.filter(|a| a.is_finite()),
            "t" => f.map(|f| f.t),
            "p" => f.map(|f| f.p),
            "rho" => f.map(|f| f.rho),
            "v" => f.map(|f| f.v),
            "a" => f.map(|f| f.a),
            "mach" => f.map(|f| f.mach),
            "q" => f.map(|f| f.dynamic_pressure()),
            "wc" => Some(atmosphere::corrected_flow_to(
                v.w,
                v.tt,
                v.pt,
                self.reference(),
            )),
            "ht" => gas()?.sensible_h(v.tt).ok(),
            "s" => {
                let g = gas()?;
                Some(
                    g.phi(v.tt).ok()?
                        - g.phi(T_REFERENCE).ok()?
                        - g.r() * (v.pt / atmosphere::SEA_LEVEL_PRESSURE_PA).ln(),
                )
            }
            "flow_function" => v
                .area
                .filter(|a| a.is_finite())
                .map(|a| v.w * v.tt.sqrt() / (a * v.pt)),
            "gamma" => gas()?.gamma(f.map_or(v.tt, |f| f.t)).ok(),
            _ => None,
        }
    }

    /// The relations and numbers behind a station's values.
    pub fn explain(&self, station: &str) -> Result<Vec<Step>, String> {
        let &s = self
            .graph
            .station_index
            .get(station)
            .ok_or_else(|| format!("no station named \"{station}\""))?;
        let p = self.graph.producer[s];
        let mut steps = Vec::new();
        let out = self.evaluate(p, &mut Tracer::on(&mut steps));
        match out {
            NodeOut::Done(_) => {}
            NodeOut::Failed(m) | NodeOut::NoSettings(m) => return Err(m),
            NodeOut::Blocked(by) => {
                return Err(format!("blocked by a problem upstream in \"{by}\""));
            }
        }
        if let Some(v) = self.station(station) {
            let mut tr = Tracer::on(&mut steps);
            let reference = self.reference();
            let wc = atmosphere::corrected_flow_to(v.w, v.tt, v.pt, reference);
            explain::step!(
                tr,
                "Wc",
                wc,
                MassFlow,
                "corrected flow W sqrt(Tt/T_ref) / (pt/p_ref), to the workbook's reference",
                [
                    ("W", v.w, MassFlow),
                    ("Tt", v.tt, Temperature),
                    ("pt", v.pt, Pressure),
                    ("T_ref", reference.0, Temperature),
                    ("p_ref", reference.1, Pressure)
                ]
            );
            if let Some(s_val) = self.station_key(v, "s") {
                explain::step!(
                    tr,
                    "s",
                    s_val,
                    SpecificHeat,
                    "entropy from 298.15 K, 101325 Pa: s = phi(Tt) - phi(298.15) - R ln(pt/101325)",
                    [("Tt", v.tt, Temperature), ("pt", v.pt, Pressure)]
                );
            }
        }
        Ok(steps)
    }

    /// Station index by name.
    pub fn station_index(&self, name: &str) -> Option<usize> {
        self.graph.station_index.get(name).copied()
    }

    /// Stations in the order the flow passes them (producer order).
    pub fn stations(&self) -> &[Station] {
        &self.book.stations
    }
}
