//! What every process kind shares: its result, what it can read, the
//! checks on its givens, and finishing a downstream station from its
//! static fix. The kinds themselves are in [`crate::kinds`], one file each;
//! [`run`] hands a process to its kind.
//!
//! A kind returns either a [`ProcessResult`] or a message for a test
//! engineer (the engine attaches it to the process as a problem).

use super::explain::{Tracer, step};
use super::{AmbientState, StationValue};
use crate::book::{Basis, Given, Process, Statics, Station};
use crate::flow::turbo::{Efficiency, Stage};
use crate::flow::{Branch, FlowError, FlowState, isentropic};
use crate::gas::{Composition, Gas, GasModel, Thermo};
use crate::kinds::Io;

/// What a process produced.
#[derive(Debug, Clone, PartialEq)]
pub struct ProcessResult {
    /// The downstream station.
    pub out: StationValue,
    /// The second downstream station (bypass of a split).
    pub out2: Option<Box<StationValue>>,
    /// Component figures: key (see `book::paths::FIGURE_KEYS`) and SI value.
    pub figures: Figures,
    /// Shaft power, W: positive absorbed (compressor), negative delivered (turbine).
    pub power: f64,
    /// Gross thrust, N (nozzles).
    pub thrust: f64,
    /// Kinetic energy flux leaving, W (nozzles).
    pub exit_ke: f64,
    /// Ram drag, N (free-stream entries).
    pub ram_drag: f64,
    /// Kinetic energy flux entering, W (free-stream entries).
    pub entry_ke: f64,
    /// Air entering, kg/s (entries).
    pub air_in: f64,
    /// Fuel burnt, kg/s (combustors).
    pub fuel: f64,
    /// Fuel flow times heating value, W (combustors).
    pub heat_release: f64,
    /// A caution on how the result was obtained (frozen products where
    /// dissociation matters, say); shown with the process, not a problem.
    pub note: Option<&'static str>,
}

impl ProcessResult {
    pub(crate) fn new(out: StationValue) -> ProcessResult {
        ProcessResult {
            out,
            out2: None,
            figures: Figures::new(),
            power: 0.0,
            thrust: 0.0,
            exit_ke: 0.0,
            ram_drag: 0.0,
            entry_ke: 0.0,
            air_in: 0.0,
            fuel: 0.0,
            heat_release: 0.0,
            note: None,
        }
    }
    /// A figure by key.
    pub fn figure(&self, key: &str) -> Option<f64> {
        self.figures
            .iter()
            .find(|(k, _)| *k == key)
            .map(|(_, v)| *v)
    }
}

/// Most figures one process reports (a turbomachine's nine are the most).
pub const MAX_FIGURES: usize = 12;

/// A process's figures, held inline: a result is rebuilt on every
/// recompute, and a heap list per process would cost an allocation each
/// time. Reads as a slice of (key, SI value).
#[derive(Clone, Copy)]
pub struct Figures {
    items: [(&'static str, f64); MAX_FIGURES],
    len: u8,
}

impl Figures {
    /// No figures.
    pub const fn new() -> Figures {
        Figures {
            items: [("", 0.0); MAX_FIGURES],
            len: 0,
        }
    }
    /// Figures from a list (beyond [`MAX_FIGURES`] are dropped; the kinds
    /// report fewer, and a test checks every kind).
    pub fn of(list: &[(&'static str, f64)]) -> Figures {
        let mut f = Figures::new();
        for &x in list {
            f.push(x);
        }
        f
    }
    /// Add a figure at the end.
    pub fn push(&mut self, x: (&'static str, f64)) {
        if let Some(slot) = self.items.get_mut(self.len as usize) {
            *slot = x;
            self.len += 1;
        } else {
            debug_assert!(false, "more than {MAX_FIGURES} figures");
        }
    }
    /// Insert a figure at a position (clamped to the end).
    pub fn insert(&mut self, at: usize, x: (&'static str, f64)) {
        let n = self.len as usize;
        if n >= MAX_FIGURES {
            debug_assert!(false, "more than {MAX_FIGURES} figures");
            return;
        }
        let at = at.min(n);
        self.items.copy_within(at..n, at + 1);
        self.items[at] = x;
        self.len += 1;
    }
    /// Keep only the figures for which `keep` holds.
    pub fn retain(&mut self, mut keep: impl FnMut(&(&'static str, f64)) -> bool) {
        let mut n = 0;
        for i in 0..self.len as usize {
            let x = self.items[i];
            if keep(&x) {
                self.items[n] = x;
                n += 1;
            }
        }
        self.len = n as u8;
    }
}

impl Default for Figures {
    fn default() -> Self {
        Figures::new()
    }
}

impl std::ops::Deref for Figures {
    type Target = [(&'static str, f64)];
    fn deref(&self) -> &Self::Target {
        &self.items[..self.len as usize]
    }
}

impl PartialEq for Figures {
    fn eq(&self, other: &Self) -> bool {
        **self == **other
    }
}

impl std::fmt::Debug for Figures {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_list().entries(self.iter()).finish()
    }
}

impl<'a> IntoIterator for &'a Figures {
    type Item = &'a (&'static str, f64);
    type IntoIter = std::slice::Iter<'a, (&'static str, f64)>;
    fn into_iter(self) -> Self::IntoIter {
        self.iter()
    }
}

/// What a process can read besides its own parameters.
pub struct Ctx<'a> {
    /// Gas model.
    pub model: &'a GasModel,
    /// Ambient state.
    pub ambient: &'a AmbientState,
    /// Power a shaft-work turbine must deliver, W (set by the engine).
    pub shaft_need: Option<f64>,
    /// Speed of the shaft the machine is on, rad/s, when given.
    pub shaft_speed: Option<f64>,
    /// Reference total temperature and pressure of corrected values.
    pub reference: (f64, f64),
}

pub(crate) type Res<T> = Result<T, String>;

pub(crate) fn fe(e: FlowError) -> String {
    e.to_string()
}

pub(crate) fn gas(ctx: &Ctx, c: &Composition) -> Res<Gas> {
    ctx.model.gas(c).map_err(|e| e.to_string())
}

pub(crate) fn ratio(g: &Given, what: &str, lo: f64, hi: f64) -> Res<f64> {
    let v = g.si();
    if v.is_finite() && v >= lo && v <= hi {
        Ok(v)
    } else {
        Err(format!(
            "{what} {} is outside the sensible range {lo} to {hi}",
            g.shown()
        ))
    }
}

pub(crate) fn positive(g: &Given, what: &str) -> Res<f64> {
    let v = g.si();
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(format!("{what} {} must be positive", g.shown()))
    }
}

pub(crate) fn efficiency(g: &Given, basis: Basis, what: &str) -> Res<Efficiency> {
    let v = g.si();
    if !(v.is_finite() && v > 0.0) {
        return Err(format!("{what} efficiency {} must be positive", g.shown()));
    }
    if v > 1.0 {
        return Err(format!(
            "{what} efficiency {} is above 1: no real machine does better than ideal",
            g.shown()
        ));
    }
    Ok(match basis {
        Basis::Isentropic => Efficiency::Isentropic(v),
        Basis::Polytropic => Efficiency::Polytropic(v),
    })
}

pub(crate) fn need_statics<'a>(
    s: &'a StationValue,
    station: &str,
    why: &str,
) -> Res<&'a FlowState> {
    s.flow.as_ref().ok_or_else(|| {
        format!(
            "{why} needs the static state at station \"{station}\": give it a Mach number, static pressure, velocity or area"
        )
    })
}

pub(crate) fn measured<'a>(g: &'a Option<Given>, station: &str, what: &str) -> Res<&'a Given> {
    g.as_ref()
        .ok_or_else(|| format!("the measured mode needs {what} given on station \"{station}\""))
}

/// Finish a downstream station: apply its static fix, or take the state the
/// process set itself.
#[allow(clippy::too_many_arguments)]
pub fn finish(
    gas: &Gas,
    station: &Station,
    w: f64,
    tt: f64,
    pt: f64,
    comp: Composition,
    intrinsic: Option<FlowState>,
    by: &str,
    tr: &mut Tracer,
) -> Res<StationValue> {
    let branch = station.branch.unwrap_or(Branch::Subsonic);
    let flow = match (&station.statics, intrinsic) {
        (Some(_), Some(_)) => {
            return Err(format!(
                "station \"{}\" gives its static state, but the {by} sets it; remove the station's static given",
                station.name
            ));
        }
        (None, Some(f)) => Some(f),
        (None, None) => None,
        (Some(fix), None) => Some(match fix {
            Statics::Mach(m) => {
                let s = isentropic::from_mach(gas, tt, pt, m.si()).map_err(fe)?;
                step!(
                    tr,
                    "T",
                    s.t,
                    Temperature,
                    "static temperature from h(Tt) = h(T) + V^2/2 with V = M a, a^2 = gamma(T) R T",
                    [("Tt", tt, Temperature), ("M", m.si(), Mach)]
                );
                s
            }
            Statics::Pressure(p) => {
                let s = isentropic::from_pressure(gas, tt, pt, p.si()).map_err(fe)?;
                step!(
                    tr,
                    "M",
                    s.mach,
                    Mach,
                    "isentrope phi(T) = phi(Tt) + R ln(p/pt), then V^2 = 2 (h(Tt) - h(T)), M = V/a",
                    [
                        ("Tt", tt, Temperature),
                        ("pt", pt, Pressure),
                        ("p", p.si(), Pressure)
                    ]
                );
                s
            }
            Statics::Velocity(v) => {
                let s = isentropic::from_velocity(gas, tt, pt, v.si()).map_err(fe)?;
                step!(
                    tr,
                    "T",
                    s.t,
                    Temperature,
                    "h(T) = h(Tt) - V^2/2",
                    [("Tt", tt, Temperature), ("V", v.si(), Velocity)]
                );
                s
            }
            Statics::Area(a) => {
                let s = isentropic::from_flow(gas, tt, pt, w, a.si(), branch).map_err(fe)?;
                step!(
                    tr,
                    "M",
                    s.mach,
                    Mach,
                    format!(
                        "mass flux W/A = rho V on the {} branch of the isentrope",
                        match branch {
                            Branch::Subsonic => "subsonic",
                            Branch::Supersonic => "supersonic",
                        }
                    ),
                    [
                        ("W", w, MassFlow),
                        ("A", a.si(), Area),
                        ("Tt", tt, Temperature),
                        ("pt", pt, Pressure)
                    ]
                );
                s
            }
        }),
    };
    let area = match (&station.statics, &flow) {
        (Some(Statics::Area(a)), _) => Some(a.si()),
        (_, Some(f)) if f.flux() > 0.0 => Some(w / f.flux()),
        _ => None,
    };
    if let Some(f) = &flow {
        step!(
            tr,
            "p",
            f.p,
            Pressure,
            "p = pt exp((phi(T) - phi(Tt))/R) (isentropic stagnation)",
            [
                ("pt", pt, Pressure),
                ("T", f.t, Temperature),
                ("Tt", tt, Temperature)
            ]
        );
        step!(
            tr,
            "rho",
            f.rho,
            Density,
            "rho = p/(R T)",
            [
                ("p", f.p, Pressure),
                ("T", f.t, Temperature),
                ("R", gas.r(), SpecificHeat)
            ]
        );
        step!(
            tr,
            "V",
            f.v,
            Velocity,
            "V = sqrt(2 (h(Tt) - h(T)))",
            [("Tt", tt, Temperature), ("T", f.t, Temperature)]
        );
        if let Some(a) = area {
            step!(
                tr,
                "A",
                a,
                Area,
                "A = W/(rho V)",
                [
                    ("W", w, MassFlow),
                    ("rho", f.rho, Density),
                    ("V", f.v, Velocity)
                ]
            );
        }
    }
    Ok(StationValue {
        w,
        tt,
        pt,
        comp,
        flow,
        area,
    })
}

/// Run one process: check the measured values on its exit station are
/// ones its mode reads, then let its kind compute.
pub fn run(ctx: &Ctx, p: &Process, io: &Io, tr: &mut Tracer) -> Res<ProcessResult> {
    let kind = crate::kinds::of(&p.kind);
    // A measured value on the station that this mode does not read is a
    // workbook mistake worth telling about.
    let reads = kind.reads();
    for (given, read, what) in [
        (io.to.tt.is_some(), reads.measured_tt, "Tt"),
        (io.to.pt.is_some(), reads.measured_pt, "pt"),
    ] {
        if given && !read {
            return Err(format!(
                "station \"{}\" has a measured {what}, but the {} in this mode does not read it (use a measured mode, or remove it)",
                io.to.name,
                kind.name()
            ));
        }
    }
    kind.run(ctx, io, tr)
}

pub(crate) fn stage_figures(ctx: &Ctx, st: &Stage, w: f64, i: &StationValue) -> Figures {
    let mut v = Figures::of(&[
        ("pressure_ratio", st.pressure_ratio),
        ("eta_isentropic", st.eta_isentropic),
        ("eta_polytropic", st.eta_polytropic),
        ("work", st.work),
        ("power", st.work * w),
        ("tt_ratio", st.tt_out / i.tt),
        ("tt_ideal", st.tt_ideal),
        (
            "wc_in",
            crate::atmosphere::corrected_flow_to(i.w, i.tt, i.pt, ctx.reference),
        ),
    ]);
    if let Some(n) = ctx.shaft_speed {
        v.push(("nc", n / (i.tt / ctx.reference.0).sqrt()));
    }
    v
}
