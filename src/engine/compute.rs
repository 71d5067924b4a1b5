//! One process: from its input stations and parameters to its output
//! station(s) and component figures.
//!
//! Each function reads SI values from the book's givens, calls the flow
//! relations, records explanation steps when tracing, and returns either a
//! [`ProcessResult`] or a message for a test engineer (the engine attaches
//! it to the process as a problem).

use super::explain::{Tracer, step};
use super::{AmbientState, StationValue};
use crate::book::{
    Basis, Burn, Combustor, Compression, Duct, Entry, Exit, Expansion, Given, Heating, Kind,
    Nozzle, Process, Shape, Statics, Station,
};
use crate::flow::combustion::{self, Burner};
use crate::flow::turbo::{self, Efficiency, Stage};
use crate::flow::{Branch, FlowError, FlowState, fanno, isentropic, rayleigh, shock};
use crate::gas::{Composition, Fuel, Gas, GasModel, Thermo};

/// What a process produced.
#[derive(Debug, Clone, PartialEq)]
pub struct ProcessResult {
    /// The downstream station.
    pub out: StationValue,
    /// The second downstream station (bypass of a split).
    pub out2: Option<StationValue>,
    /// Component figures: key (see `book::paths::FIGURE_KEYS`) and SI value.
    pub figures: Vec<(&'static str, f64)>,
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
}

impl ProcessResult {
    fn new(out: StationValue) -> ProcessResult {
        ProcessResult {
            out,
            out2: None,
            figures: Vec::new(),
            power: 0.0,
            thrust: 0.0,
            exit_ke: 0.0,
            ram_drag: 0.0,
            entry_ke: 0.0,
            air_in: 0.0,
            fuel: 0.0,
            heat_release: 0.0,
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

type Res<T> = Result<T, String>;

fn fe(e: FlowError) -> String {
    e.to_string()
}

fn gas(ctx: &Ctx, c: &Composition) -> Res<Gas> {
    ctx.model.gas(c).map_err(|e| e.to_string())
}

fn ratio(g: &Given, what: &str, lo: f64, hi: f64) -> Res<f64> {
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

fn positive(g: &Given, what: &str) -> Res<f64> {
    let v = g.si();
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(format!("{what} {} must be positive", g.shown()))
    }
}

fn efficiency(g: &Given, basis: Basis, what: &str) -> Res<Efficiency> {
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

fn need_statics<'a>(s: &'a StationValue, station: &str, why: &str) -> Res<&'a FlowState> {
    s.flow.as_ref().ok_or_else(|| {
        format!(
            "{why} needs the static state at station \"{station}\": give it a Mach number, static pressure, velocity or area"
        )
    })
}

fn measured<'a>(g: &'a Option<Given>, station: &str, what: &str) -> Res<&'a Given> {
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

/// Run one process.
pub fn run(
    ctx: &Ctx,
    p: &Process,
    inputs: &[&StationValue],
    to: &Station,
    to2: Option<&Station>,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let input = inputs.first().copied();
    let from_name = p.from.as_deref().unwrap_or("");
    let need_input = || -> Res<&StationValue> {
        input.ok_or_else(|| format!("process \"{}\" has no upstream station", p.name))
    };
    // A measured value on the station that this mode does not read is a
    // workbook mistake worth telling about.
    let uses = uses_measured(&p.kind);
    if to.tt.is_some() && !uses.0 {
        return Err(format!(
            "station \"{}\" has a measured Tt, but the {} in this mode does not read it (use a measured mode, or remove it)",
            to.name,
            kind_name(&p.kind)
        ));
    }
    if to.pt.is_some() && !uses.1 {
        return Err(format!(
            "station \"{}\" has a measured pt, but the {} in this mode does not read it (use a measured mode, or remove it)",
            to.name,
            kind_name(&p.kind)
        ));
    }
    match &p.kind {
        Kind::Entry(e) => entry(ctx, e, to, tr),
        Kind::Duct(d) => duct(ctx, d, need_input()?, from_name, to, tr),
        Kind::Combustor(c) => combustor(ctx, c, need_input()?, to, tr),
        Kind::Heating(h) => heating(ctx, h, need_input()?, from_name, to, tr),
        Kind::Compressor(c) => compressor(ctx, &c.mode, need_input()?, to, tr),
        Kind::Turbine(t) => turbine(ctx, &t.mode, need_input()?, to, tr),
        Kind::NormalShock => normal_shock(ctx, need_input()?, from_name, to, tr),
        Kind::ObliqueShock(o) => {
            let s = need_input()?;
            let g = gas(ctx, &s.comp)?;
            let up = need_statics(s, from_name, "an oblique shock")?;
            let theta = o.deflection.si();
            let ob = shock::oblique(&g, up, theta, o.strength).map_err(fe)?;
            step!(
                tr,
                "beta",
                ob.beta,
                Angle,
                "theta-beta-M relation: tan(beta - theta) = tan(beta) rho1/rho2 with the normal shock on M1 sin(beta)",
                [("M1", up.mach, Mach), ("theta", theta, Angle)]
            );
            let out = finish(
                &g,
                to,
                s.w,
                s.tt,
                ob.down.pt,
                s.comp,
                Some(ob.down),
                "oblique shock",
                tr,
            )?;
            let mut r = ProcessResult::new(out);
            r.figures = vec![
                ("beta", ob.beta),
                ("max_deflection", ob.max_deflection),
                ("mach_in", up.mach),
                ("mach_out", ob.down.mach),
                ("recovery", ob.down.pt / up.pt),
                ("p_ratio", ob.down.p / up.p),
            ];
            Ok(r)
        }
        Kind::Nozzle(n) => nozzle(ctx, n, need_input()?, to, tr),
        Kind::Split(s) => {
            let i = need_input()?;
            let bpr = ratio(&s.bypass_ratio, "bypass ratio", 0.0, 100.0)?;
            let to2 = to2.ok_or_else(|| format!("bypass station \"{}\" is missing", s.bypass))?;
            let g = gas(ctx, &i.comp)?;
            let wc = i.w / (1.0 + bpr);
            step!(
                tr,
                "W core",
                wc,
                MassFlow,
                "W_core = W/(1 + BPR)",
                [("W", i.w, MassFlow), ("BPR", bpr, Ratio)]
            );
            step!(
                tr,
                "W bypass",
                i.w - wc,
                MassFlow,
                "W_bypass = W - W_core (same Tt and pt in both streams)",
                [("W", i.w, MassFlow), ("W core", wc, MassFlow)]
            );
            let core = finish(&g, to, wc, i.tt, i.pt, i.comp, None, "split", tr)?;
            let byp = finish(
                &g,
                to2,
                i.w - wc,
                i.tt,
                i.pt,
                i.comp,
                None,
                "split",
                &mut Tracer::off(),
            )?;
            let mut r = ProcessResult::new(core);
            r.out2 = Some(byp);
            r.figures = vec![("bypass_ratio", bpr), ("w", i.w)];
            Ok(r)
        }
        Kind::Mixer(m) => {
            let a = need_input()?;
            let b = inputs
                .get(1)
                .copied()
                .ok_or_else(|| format!("mixer needs the second stream \"{}\"", m.secondary))?;
            mixer(ctx, a, b, from_name, &m.secondary, to, tr)
        }
    }
}

/// Which measured station values (Tt, pt) a process mode reads.
pub fn uses_measured(k: &Kind) -> (bool, bool) {
    match k {
        Kind::Duct(Duct::MeasuredExit) => (false, true),
        Kind::Combustor(Combustor {
            mode: Burn::Measured(_),
            ..
        }) => (true, false),
        Kind::Compressor(c) if c.mode == Compression::Measured => (true, true),
        Kind::Turbine(t) if t.mode == Expansion::Measured => (true, true),
        _ => (false, false),
    }
}

/// A short name of a process kind for messages.
pub fn kind_name(k: &Kind) -> &'static str {
    match k {
        Kind::Entry(_) => "entry",
        Kind::Duct(_) => "duct",
        Kind::Combustor(_) => "combustor",
        Kind::Heating(_) => "Rayleigh heating",
        Kind::Compressor(_) => "compressor",
        Kind::Turbine(_) => "turbine",
        Kind::NormalShock => "normal shock",
        Kind::ObliqueShock(_) => "oblique shock",
        Kind::Nozzle(_) => "nozzle",
        Kind::Split(_) => "split",
        Kind::Mixer(_) => "mixer",
    }
}

fn entry(ctx: &Ctx, e: &Entry, to: &Station, tr: &mut Tracer) -> Res<ProcessResult> {
    let air = ctx.ambient.air;
    let g = gas(ctx, &air)?;
    let mut r = match e {
        Entry::Freestream { w } => {
            let w = positive(w, "captured mass flow")?;
            let a = ctx.ambient;
            step!(
                tr,
                "Tt",
                a.flow.tt,
                Temperature,
                "h(Tt) = h(T0) + V0^2/2 (free stream brought to rest adiabatically)",
                [("T0", a.flow.t, Temperature), ("V0", a.flow.v, Velocity)]
            );
            step!(
                tr,
                "pt",
                a.flow.pt,
                Pressure,
                "pt = p0 exp((phi(Tt) - phi(T0))/R) (isentropic)",
                [
                    ("p0", a.flow.p, Pressure),
                    ("Tt", a.flow.tt, Temperature),
                    ("T0", a.flow.t, Temperature)
                ]
            );
            let intrinsic = if to.statics.is_none() {
                Some(a.flow)
            } else {
                None
            };
            let out = finish(
                &g,
                to,
                w,
                a.flow.tt,
                a.flow.pt,
                air,
                intrinsic,
                "free stream",
                tr,
            )?;
            let mut r = ProcessResult::new(out);
            r.ram_drag = w * a.flow.v;
            r.entry_ke = 0.5 * w * a.flow.v * a.flow.v;
            r.air_in = w / air.mass_per_kg_air();
            r.figures = vec![("w", w), ("mach_out", a.flow.mach)];
            r
        }
        Entry::Plenum { tt, pt, w } => {
            let (tt, pt, w) = (
                positive(tt, "total temperature")?,
                positive(pt, "total pressure")?,
                positive(w, "mass flow")?,
            );
            let out = finish(&g, to, w, tt, pt, air, None, "entry", tr)?;
            let mut r = ProcessResult::new(out);
            r.air_in = w / air.mass_per_kg_air();
            r.figures = vec![("w", w)];
            r
        }
        Entry::ChokedPlenum {
            tt,
            pt,
            throat_area,
        } => {
            let (tt, pt, at) = (
                positive(tt, "total temperature")?,
                positive(pt, "total pressure")?,
                positive(throat_area, "throat area")?,
            );
            let star = isentropic::sonic(&g, tt, pt).map_err(fe)?;
            let w = star.flux() * at;
            step!(
                tr,
                "W",
                w,
                MassFlow,
                "choked throat: W = rho* a* A* at Mach 1 on the isentrope of (Tt, pt)",
                [
                    ("Tt", tt, Temperature),
                    ("pt", pt, Pressure),
                    ("A*", at, Area)
                ]
            );
            let out = finish(&g, to, w, tt, pt, air, None, "entry", tr)?;
            let mut r = ProcessResult::new(out);
            r.air_in = w / air.mass_per_kg_air();
            r.figures = vec![("w", w), ("throat_area", at)];
            r
        }
    };
    if r.out.w <= 0.0 {
        return Err("mass flow must be positive".into());
    }
    r.out.comp = air;
    Ok(r)
}

/// MIL-E-5008B intake recovery schedule (from memory): 1 up to Mach 1,
/// then 1 - 0.075 (M - 1)^1.35.
pub fn mil_recovery(m: f64) -> f64 {
    if m <= 1.0 {
        1.0
    } else {
        1.0 - 0.075 * (m - 1.0).powf(1.35)
    }
}

fn duct(
    ctx: &Ctx,
    d: &Duct,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let mut figures = Vec::new();
    let (pt, intrinsic) = match d {
        Duct::Recovery { recovery } => {
            let r = recovery.si();
            if !(r.is_finite() && r > 0.0) {
                return Err(format!(
                    "pressure recovery {} must be positive",
                    recovery.shown()
                ));
            }
            if r > 1.0 {
                return Err(format!(
                    "pressure recovery {} is above 1: an adiabatic duct cannot raise total pressure",
                    recovery.shown()
                ));
            }
            step!(
                tr,
                "pt",
                r * i.pt,
                Pressure,
                "pt_out = recovery x pt_in",
                [("pt_in", i.pt, Pressure), ("recovery", r, Ratio)]
            );
            (r * i.pt, None)
        }
        Duct::IntakeSchedule => {
            let m0 = ctx.ambient.flow.mach;
            if m0 >= 5.0 {
                return Err(format!(
                    "the intake recovery schedule covers flight Mach up to 5 (here {m0:.3})"
                ));
            }
            let r = mil_recovery(m0);
            step!(
                tr,
                "recovery",
                r,
                Ratio,
                "MIL-E-5008B schedule: 1 - 0.075 (M0 - 1)^1.35 above Mach 1",
                [("M0", m0, Mach)]
            );
            (r * i.pt, None)
        }
        Duct::LossCoefficient { k } => {
            let k = k.si();
            if !(k.is_finite() && k >= 0.0) {
                return Err("loss coefficient must be zero or positive".into());
            }
            let s = need_statics(i, from, "a loss coefficient on inlet dynamic pressure")?;
            let q = s.dynamic_pressure();
            let pt = i.pt - k * q;
            step!(
                tr,
                "pt",
                pt,
                Pressure,
                "pt_out = pt_in - K q_in, q = rho V^2/2",
                [
                    ("pt_in", i.pt, Pressure),
                    ("K", k, Ratio),
                    ("q_in", q, Pressure)
                ]
            );
            if pt <= 0.0 {
                return Err(format!(
                    "loss coefficient {k} removes all the total pressure"
                ));
            }
            (pt, None)
        }
        Duct::MeasuredExit => {
            let m = measured(&to.pt, &to.name, "the outlet total pressure")?;
            let pt = m.si();
            if pt > i.pt * (1.0 + 1e-9) {
                return Err(format!(
                    "measured outlet pt {} is above the inlet's {:.1} Pa: an adiabatic duct cannot raise total pressure (check the probes)",
                    m.shown(),
                    i.pt
                ));
            }
            (pt, None)
        }
        Duct::Friction {
            length,
            diameter,
            friction,
        } => {
            let l = length.si();
            let dia = positive(diameter, "hydraulic diameter")?;
            let f = friction.si();
            if !(l.is_finite() && l >= 0.0 && f.is_finite() && f >= 0.0) {
                return Err("duct length and friction factor must be zero or positive".into());
            }
            let s = need_statics(i, from, "a friction duct")?;
            let fl = 4.0 * f * l / dia;
            let out = fanno::friction(&g, s, fl).map_err(fe)?;
            let max = fanno::friction_to_sonic(&g, s).map_err(fe)?;
            step!(
                tr,
                "M",
                out.mach,
                Mach,
                "Fanno line: 4fL*/D(M_in) - 4fL/D = 4fL*/D(M_out), same branch",
                [("M_in", s.mach, Mach), ("4fL/D", fl, Ratio)]
            );
            figures.push(("friction_4fl_d", fl));
            figures.push(("max_4fl_d", max));
            figures.push(("mach_out", out.mach));
            (out.pt, Some(out))
        }
    };
    step!(
        tr,
        "Tt",
        i.tt,
        Temperature,
        "adiabatic: total enthalpy, so Tt, unchanged",
        [("Tt_in", i.tt, Temperature)]
    );
    let out = finish(
        &g,
        to,
        i.w,
        i.tt,
        pt,
        i.comp,
        intrinsic,
        "friction duct",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    figures.insert(0, ("recovery", pt / i.pt));
    figures.insert(1, ("loss", 1.0 - pt / i.pt));
    r.figures = figures;
    Ok(r)
}

fn combustor(
    ctx: &Ctx,
    c: &Combustor,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let loss = ratio(&c.pressure_loss, "pressure loss", 0.0, 0.5)?;
    let lhv = positive(&c.lhv, "heating value")?;
    let fuel = Fuel::new(c.hc.si()).map_err(|e| e.to_string())?;
    let air = i.w / i.comp.mass_per_kg_air();
    let eta_given = c.efficiency.si();
    let burner = |eta: f64| Burner {
        fuel,
        lhv,
        efficiency: eta,
    };
    let (burn, eta) = match &c.mode {
        Burn::ExitTemperature(t) => {
            let b = combustion::far_for_temperature(
                ctx.model,
                &i.comp,
                i.tt,
                t.si(),
                &burner(eta_given),
            )
            .map_err(fe)?;
            step!(
                tr,
                "far added",
                b.far_added,
                Ratio,
                "energy balance per kg air: (1+f_out) hs_out(Tt_out) = (1+f_in) hs_in(Tt_in) + eta f LHV, hs = h(T) - h(298.15 K), fuel at 298.15 K",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("Tt_out", t.si(), Temperature),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (b, eta_given)
        }
        Burn::FuelFlow(wf) => {
            let wf = wf.si();
            if !(wf.is_finite() && wf >= 0.0) {
                return Err("fuel flow must be zero or positive".into());
            }
            let b = combustion::exit_temperature(
                ctx.model,
                &i.comp,
                i.tt,
                wf / air,
                &burner(eta_given),
            )
            .map_err(fe)?;
            step!(
                tr,
                "Tt_out",
                b.tt_out,
                Temperature,
                "energy balance per kg air: (1+f_out) hs_out(Tt_out) = (1+f_in) hs_in(Tt_in) + eta f LHV",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("f added = Wf/W_air", wf / air, Ratio),
                    ("eta", eta_given, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            (b, eta_given)
        }
        Burn::Measured(wf) => {
            let wf = positive(wf, "fuel flow")?;
            let t = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let f = wf / air;
            let eta = combustion::measured_efficiency(ctx.model, &i.comp, i.tt, t, f, fuel, lhv)
                .map_err(fe)?;
            step!(
                tr,
                "efficiency",
                eta,
                Ratio,
                "eta = [(1+f_out) hs_out(Tt_out) - (1+f_in) hs_in(Tt_in)] / (f LHV)",
                [
                    ("Tt_in", i.tt, Temperature),
                    ("Tt_out measured", t, Temperature),
                    ("f added", f, Ratio),
                    ("LHV", lhv, SpecificEnergy)
                ]
            );
            if eta > 1.0 {
                return Err(format!(
                    "combustion efficiency {eta:.4} from the measured values is above 1: check the exit temperature and fuel flow readings"
                ));
            }
            if eta <= 0.0 {
                return Err(format!(
                    "combustion efficiency {eta:.4} from the measured values is not positive: exit colder than inlet?"
                ));
            }
            let out = i
                .comp
                .burnt(i.comp.far + f, fuel)
                .map_err(|e| e.to_string())?;
            (
                combustion::Burn {
                    composition: out,
                    tt_out: t,
                    far_added: f,
                },
                eta,
            )
        }
    };
    let wf = burn.far_added * air;
    let pt = i.pt * (1.0 - loss);
    step!(
        tr,
        "fuel flow",
        wf,
        MassFlow,
        "Wf = f_added x W_air",
        [("f added", burn.far_added, Ratio), ("W_air", air, MassFlow)]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = pt_in (1 - loss)",
        [("pt_in", i.pt, Pressure), ("loss", loss, Ratio)]
    );
    let g = gas(ctx, &burn.composition)?;
    let out = finish(
        &g,
        to,
        i.w + wf,
        burn.tt_out,
        pt,
        burn.composition,
        None,
        "combustor",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    r.fuel = wf;
    r.heat_release = wf * lhv;
    r.figures = vec![
        ("fuel_flow", wf),
        ("far_added", burn.far_added),
        ("exit_tt", burn.tt_out),
        ("efficiency", eta),
        ("tt_ratio", burn.tt_out / i.tt),
        ("loss", loss),
    ];
    Ok(r)
}

fn heating(
    ctx: &Ctx,
    h: &Heating,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let s = need_statics(i, from, "Rayleigh heating")?;
    let q = match h {
        Heating::Heat(q) => q.si(),
        Heating::ExitTemperature(t) => {
            let t = positive(t, "exit total temperature")?;
            g.h(t).map_err(|e| e.to_string())? - g.h(i.tt).map_err(|e| e.to_string())?
        }
    };
    let star = rayleigh::sonic_state(&g, s).map_err(fe)?;
    let q_max = g.h(star.tt).map_err(|e| e.to_string())? - g.h(i.tt).map_err(|e| e.to_string())?;
    let out = rayleigh::heat(&g, s, q).map_err(fe)?;
    step!(
        tr,
        "Tt",
        out.tt,
        Temperature,
        "h(Tt_out) = h(Tt_in) + q",
        [("Tt_in", i.tt, Temperature), ("q", q, SpecificEnergy)]
    );
    step!(
        tr,
        "M",
        out.mach,
        Mach,
        "Rayleigh line: rho V and p + rho V^2 constant, same branch; chokes at Mach 1",
        [
            ("M_in", s.mach, Mach),
            ("q", q, SpecificEnergy),
            ("q to choke", q_max, SpecificEnergy)
        ]
    );
    let st = finish(
        &g,
        to,
        i.w,
        out.tt,
        out.pt,
        i.comp,
        Some(out),
        "Rayleigh heating",
        tr,
    )?;
    let mut r = ProcessResult::new(st);
    r.figures = vec![
        ("heat", q),
        ("max_heat", q_max),
        ("exit_tt", out.tt),
        ("mach_in", s.mach),
        ("mach_out", out.mach),
        ("recovery", out.pt / i.pt),
    ];
    Ok(r)
}

fn stage_figures(ctx: &Ctx, st: &Stage, w: f64, i: &StationValue) -> Vec<(&'static str, f64)> {
    let mut v = vec![
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
    ];
    if let Some(n) = ctx.shaft_speed {
        v.push(("nc", n / (i.tt / ctx.reference.0).sqrt()));
    }
    v
}

fn compressor(
    ctx: &Ctx,
    mode: &Compression,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let (st, pt) = match mode {
        Compression::Design {
            pressure_ratio,
            efficiency: e,
            basis,
        } => {
            let pr = ratio(pressure_ratio, "compressor pressure ratio", 1.0, 1000.0)?;
            let eff = efficiency(e, *basis, "compressor")?;
            let st = turbo::compress(&g, i.tt, pr, eff).map_err(fe)?;
            (st, i.pt * pr)
        }
        Compression::Measured => {
            let tt = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let pt = measured(&to.pt, &to.name, "the exit total pressure")?.si();
            if pt < i.pt {
                return Err(format!(
                    "measured exit pt {pt:.1} Pa is below the inlet's {:.1} Pa: this is not a compression",
                    i.pt
                ));
            }
            let st = turbo::measured_compression(&g, i.tt, tt, pt / i.pt).map_err(fe)?;
            if st.eta_isentropic > 1.0 {
                return Err(format!(
                    "isentropic efficiency {:.4} from the measured values is above 1: check the exit temperature and pressure readings",
                    st.eta_isentropic
                ));
            }
            (st, pt)
        }
    };
    let pr = st.pressure_ratio;
    step!(
        tr,
        "Tt_ideal",
        st.tt_ideal,
        Temperature,
        "isentropic exit: phi(Tt_ideal) = phi(Tt_in) + R ln(PR)",
        [
            ("Tt_in", i.tt, Temperature),
            ("PR", pr, Ratio),
            ("R", g.r(), SpecificHeat)
        ]
    );
    let how = if *mode == Compression::Measured {
        "measured; eta_is = (h(Tt_ideal) - h(Tt_in))/(h(Tt_out) - h(Tt_in)), eta_p = R ln(PR)/(phi(Tt_out) - phi(Tt_in))"
    } else {
        "h(Tt_out) = h(Tt_in) + (h(Tt_ideal) - h(Tt_in))/eta_is; polytropic: phi(Tt_out) = phi(Tt_in) + R ln(PR)/eta_p"
    };
    step!(
        tr,
        "Tt",
        st.tt_out,
        Temperature,
        how,
        [
            ("eta_is", st.eta_isentropic, Ratio),
            ("eta_p", st.eta_polytropic, Ratio)
        ]
    );
    step!(
        tr,
        "work",
        st.work,
        SpecificEnergy,
        "w = h(Tt_out) - h(Tt_in)",
        [
            ("Tt_in", i.tt, Temperature),
            ("Tt_out", st.tt_out, Temperature)
        ]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = PR x pt_in",
        [("pt_in", i.pt, Pressure), ("PR", pr, Ratio)]
    );
    let out = finish(&g, to, i.w, st.tt_out, pt, i.comp, None, "compressor", tr)?;
    let mut r = ProcessResult::new(out);
    r.power = st.work * i.w;
    r.figures = stage_figures(ctx, &st, i.w, i);
    Ok(r)
}

fn turbine(
    ctx: &Ctx,
    mode: &Expansion,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let st = match mode {
        Expansion::Design {
            pressure_ratio,
            efficiency: e,
            basis,
        } => {
            let pr = ratio(pressure_ratio, "turbine expansion ratio", 1.0, 1000.0)?;
            turbo::expand(&g, i.tt, pr, efficiency(e, *basis, "turbine")?).map_err(fe)?
        }
        Expansion::ShaftWork {
            efficiency: e,
            basis,
        } => {
            let need = ctx
                .shaft_need
                .ok_or_else(|| "a shaft-work turbine must be on a shaft".to_string())?;
            if need <= 0.0 {
                return Err(format!(
                    "the shaft needs {need:.1} W from this turbine: the other machines on it already balance (check the shaft)"
                ));
            }
            let work = need / i.w;
            step!(
                tr,
                "work",
                work,
                SpecificEnergy,
                "shaft balance: W_t w_t eta_m = sum of compressor powers + offtake - other turbines' powers x eta_m",
                [("power needed", need, Power), ("W_t", i.w, MassFlow)]
            );
            turbo::expand_for_work(&g, i.tt, work, efficiency(e, *basis, "turbine")?).map_err(fe)?
        }
        Expansion::Measured => {
            let tt = measured(&to.tt, &to.name, "the exit total temperature")?.si();
            let pt = measured(&to.pt, &to.name, "the exit total pressure")?.si();
            if pt > i.pt {
                return Err(
                    "measured exit pt is above the inlet's: this is not an expansion".into(),
                );
            }
            let st = turbo::measured_expansion(&g, i.tt, tt, i.pt / pt).map_err(fe)?;
            if st.eta_isentropic > 1.0 {
                return Err(format!(
                    "turbine isentropic efficiency {:.4} from the measured values is above 1: check the readings",
                    st.eta_isentropic
                ));
            }
            st
        }
    };
    let pt = i.pt / st.pressure_ratio;
    step!(
        tr,
        "Tt_ideal",
        st.tt_ideal,
        Temperature,
        "isentropic exit: phi(Tt_ideal) = phi(Tt_in) - R ln(pt_in/pt_out)",
        [
            ("Tt_in", i.tt, Temperature),
            ("ER", st.pressure_ratio, Ratio),
            ("R", g.r(), SpecificHeat)
        ]
    );
    let how = match mode {
        Expansion::Measured => {
            "measured; eta_is = (h(Tt_in) - h(Tt_out))/(h(Tt_in) - h(Tt_ideal)), eta_p = (phi(Tt_in) - phi(Tt_out))/(R ln ER)"
        }
        Expansion::ShaftWork { .. } => {
            "h(Tt_out) = h(Tt_in) - work; the ideal exit h(Tt_ideal) = h(Tt_in) - work/eta_is fixes ER"
        }
        Expansion::Design { .. } => "h(Tt_out) = h(Tt_in) - eta_is (h(Tt_in) - h(Tt_ideal))",
    };
    step!(
        tr,
        "Tt",
        st.tt_out,
        Temperature,
        how,
        [
            ("eta_is", st.eta_isentropic, Ratio),
            ("eta_p", st.eta_polytropic, Ratio)
        ]
    );
    step!(
        tr,
        "pt",
        pt,
        Pressure,
        "pt_out = pt_in / ER",
        [("pt_in", i.pt, Pressure), ("ER", st.pressure_ratio, Ratio)]
    );
    let out = finish(&g, to, i.w, st.tt_out, pt, i.comp, None, "turbine", tr)?;
    let mut r = ProcessResult::new(out);
    r.power = -st.work * i.w;
    r.figures = stage_figures(ctx, &st, i.w, i);
    Ok(r)
}

fn normal_shock(
    ctx: &Ctx,
    i: &StationValue,
    from: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let up = need_statics(i, from, "a normal shock")?;
    let dn = shock::normal(&g, up).map_err(fe)?;
    step!(
        tr,
        "M",
        dn.mach,
        Mach,
        match g {
            Gas::Perfect(_) => "Rankine-Hugoniot: M2^2 = (1 + (g-1)/2 M1^2)/(g M1^2 - (g-1)/2)",
            Gas::Thermal(_) =>
                "mass, momentum and energy conserved across the shock, solved for rho1/rho2 with h(T)",
        },
        [
            ("M1", up.mach, Mach),
            ("T1", up.t, Temperature),
            ("p1", up.p, Pressure)
        ]
    );
    step!(
        tr,
        "pt",
        dn.pt,
        Pressure,
        "pt2 = p2 exp((phi(Tt) - phi(T2))/R), Tt unchanged",
        [("p2", dn.p, Pressure), ("T2", dn.t, Temperature)]
    );
    let out = finish(
        &g,
        to,
        i.w,
        i.tt,
        dn.pt,
        i.comp,
        Some(dn),
        "normal shock",
        tr,
    )?;
    let mut r = ProcessResult::new(out);
    r.figures = vec![
        ("mach_in", up.mach),
        ("mach_out", dn.mach),
        ("recovery", dn.pt / up.pt),
        ("p_ratio", dn.p / up.p),
    ];
    Ok(r)
}

fn nozzle(
    ctx: &Ctx,
    n: &Nozzle,
    i: &StationValue,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let g = gas(ctx, &i.comp)?;
    let cv = ratio(&n.cv, "velocity coefficient", 0.5, 1.0)?;
    let cd = ratio(&n.cd, "discharge coefficient", 0.5, 1.0)?;
    let p_amb = ctx.ambient.flow.p;
    if i.pt <= p_amb {
        return Err(format!(
            "the nozzle cannot discharge: total pressure {:.0} Pa is not above the ambient {p_amb:.0} Pa (reverse flow)",
            i.pt
        ));
    }
    let star = isentropic::sonic(&g, i.tt, i.pt).map_err(fe)?;
    let npr = i.pt / p_amb;
    let choked = star.p >= p_amb;
    step!(
        tr,
        "p*",
        star.p,
        Pressure,
        "sonic static pressure on the isentrope of (Tt, pt); choked when p* >= p_ambient",
        [
            ("Tt", i.tt, Temperature),
            ("pt", i.pt, Pressure),
            ("p ambient", p_amb, Pressure)
        ]
    );
    let throat_eff = if choked { i.w / star.flux() } else { f64::NAN };
    let (exit, area_eff) = match (&n.shape, &n.exit) {
        (Shape::Convergent, Exit::Matched) => {
            let e = if choked {
                star
            } else {
                isentropic::from_pressure(&g, i.tt, i.pt, p_amb).map_err(fe)?
            };
            (e, i.w / e.flux())
        }
        (Shape::ConvergentDivergent, Exit::Matched) => {
            let e = isentropic::from_pressure(&g, i.tt, i.pt, p_amb.min(i.pt)).map_err(fe)?;
            (e, i.w / e.flux())
        }
        (shape, Exit::Area(a)) => {
            let a_eff = positive(a, "nozzle exit area")? * cd;
            let branch = if *shape == Shape::ConvergentDivergent && choked {
                Branch::Supersonic
            } else {
                Branch::Subsonic
            };
            let e = isentropic::from_flow(&g, i.tt, i.pt, i.w, a_eff, branch).map_err(|e| match e {
                FlowError::Choked { max_flow, .. } => format!(
                    "the nozzle is too small for the flow: at these total conditions it passes at most {max_flow:.4} kg/s, and {:.4} kg/s arrives",
                    i.w
                ),
                e => e.to_string(),
            })?;
            if e.mach < 1.0 && (e.p / p_amb - 1.0).abs() > 5e-3 {
                return Err(format!(
                    "the exit area does not match the flow: a subsonic exit at p/p_ambient = {:.4}, but a subsonic jet leaves at ambient pressure; let the area be derived (exit: Matched) or vary an upstream given with a goal",
                    e.p / p_amb
                ));
            }
            if *shape == Shape::ConvergentDivergent && e.mach > 1.0 {
                let after = shock::normal(&g, &e).map_err(fe)?;
                if after.p < p_amb {
                    return Err(format!(
                        "over-expanded beyond a normal shock at the exit (p after a shock {:.0} Pa is below ambient {p_amb:.0} Pa): a shock stands inside the divergent section",
                        after.p
                    ));
                }
            }
            (e, a_eff)
        }
    };
    let v = cv * exit.v;
    let thrust = i.w * v + (exit.p - p_amb) * area_eff;
    step!(
        tr,
        "V exit",
        v,
        Velocity,
        "V = Cv V_ideal, V_ideal = sqrt(2 (h(Tt) - h(T_exit)))",
        [("Cv", cv, Ratio), ("V ideal", exit.v, Velocity)]
    );
    step!(
        tr,
        "gross thrust",
        thrust,
        Force,
        "F = W V + (p_exit - p_ambient) A_exit (A effective = Cd A)",
        [
            ("W", i.w, MassFlow),
            ("V", v, Velocity),
            ("p exit", exit.p, Pressure),
            ("p ambient", p_amb, Pressure),
            ("A effective", area_eff, Area)
        ]
    );
    // The station shows the ideal (isentropic) exit state, consistent in
    // itself; the velocity coefficient acts on the thrust and is reported
    // as the actual exit velocity figure.
    let out = StationValue {
        w: i.w,
        tt: i.tt,
        pt: i.pt,
        comp: i.comp,
        flow: Some(exit),
        area: Some(area_eff / cd),
    };
    if to.statics.is_some() {
        return Err(format!(
            "station \"{}\" gives its static state, but the nozzle sets it; remove the station's static given",
            to.name
        ));
    }
    let mut r = ProcessResult::new(out);
    r.thrust = thrust;
    // Kinetic energy at the effective jet velocity F/W, so pressure thrust counts.
    r.exit_ke = 0.5 * thrust * thrust / i.w;
    r.figures = vec![
        ("thrust", thrust),
        ("area", area_eff / cd),
        ("throat_area", throat_eff / cd),
        (
            "required_area",
            i.w / (if choked { star.flux() } else { exit.flux() }) / cd,
        ),
        ("mach_out", exit.mach),
        ("v_actual", v),
        ("exit_p_ratio", exit.p / p_amb),
        ("npr", npr),
        ("choked", if choked { 1.0 } else { 0.0 }),
    ];
    // An unchoked nozzle has no sonic throat: the figure is absent, not NaN.
    if !choked {
        r.figures.retain(|(k, _)| *k != "throat_area");
    }
    Ok(r)
}

fn mixer(
    ctx: &Ctx,
    a: &StationValue,
    b: &StationValue,
    a_name: &str,
    b_name: &str,
    to: &Station,
    tr: &mut Tracer,
) -> Res<ProcessResult> {
    let sa = need_statics(a, a_name, "a constant-area mixer")?;
    let sb = need_statics(b, b_name, "a constant-area mixer")?;
    let (aa, ab) = (
        a.area.ok_or("mixer needs the primary stream's area")?,
        b.area.ok_or("mixer needs the secondary stream's area")?,
    );
    let ga = gas(ctx, &a.comp)?;
    let gb = gas(ctx, &b.comp)?;
    // Mixed composition per kg dry air, by dry-air flows.
    let air_a = a.w / a.comp.mass_per_kg_air();
    let air_b = b.w / b.comp.mass_per_kg_air();
    let far = (a.comp.far * air_a + b.comp.far * air_b) / (air_a + air_b);
    let war = (a.comp.war * air_a + b.comp.war * air_b) / (air_a + air_b);
    let comp = Composition {
        far,
        war,
        fuel: if a.comp.far > 0.0 {
            a.comp.fuel
        } else {
            b.comp.fuel
        },
    };
    let g = gas(ctx, &comp)?;
    let w = a.w + b.w;
    let e = |gs: &Gas, t: f64| gs.sensible_h(t).map_err(|e| e.to_string());
    let ht = (a.w * e(&ga, a.tt)? + b.w * e(&gb, b.tt)?) / w;
    let impulse = sa.p * aa + a.w * sa.v + sb.p * ab + b.w * sb.v;
    let area = aa + ab;
    let h_ref = g.h(crate::gas::T_REFERENCE).map_err(|e| e.to_string())?;
    let tt =
        crate::gas::invert_h(&g, ht + h_ref, 0.5 * (a.tt + b.tt)).map_err(|e| e.to_string())?;
    step!(
        tr,
        "Tt",
        tt,
        Temperature,
        "energy: W ht = W1 ht1 + W2 ht2 (sensible enthalpies)",
        [
            ("W1", a.w, MassFlow),
            ("Tt1", a.tt, Temperature),
            ("W2", b.w, MassFlow),
            ("Tt2", b.tt, Temperature)
        ]
    );
    let out = rayleigh::on_line(&g, w / area, impulse / area, tt, Branch::Subsonic).map_err(fe)?;
    step!(
        tr,
        "p",
        out.p,
        Pressure,
        "momentum: p A + W V = p1 A1 + W1 V1 + p2 A2 + W2 V2 with A = A1 + A2, subsonic root",
        [
            ("p1", sa.p, Pressure),
            ("p2", sb.p, Pressure),
            ("A", area, Area)
        ]
    );
    let st = finish(&g, to, w, tt, out.pt, comp, Some(out), "mixer", tr)?;
    let mut r = ProcessResult::new(st);
    r.figures = vec![
        ("p_ratio_streams", sb.p / sa.p),
        ("bypass_ratio", b.w / a.w),
        ("mach_out", out.mach),
        ("exit_tt", tt),
    ];
    Ok(r)
}
