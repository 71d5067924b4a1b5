//! Process kinds: one file per kind, each implementing [`ProcessKind`].
//!
//! The trait says everything about a kind: its name and mode labels, the
//! givens of each mode, the figures it reports, its ports (a second stream
//! in or out, the shaft it is on), what it reads besides its inputs (the
//! ambient block, measured values on its exit station, a shaft balance),
//! how its mode changes (starting from the figures computed now), and its
//! computation with explanation steps. What a kind adds to the summary
//! travels in its [`ProcessResult`] (thrust, ram drag, fuel, heat release,
//! kinetic energy fluxes, air taken in).
//!
//! The workbook walk over givens, the engine's compile step, the summary,
//! problems, explanations and the terminal's choosers all ask the trait;
//! [`of`] and [`of_mut`] are the only places that match on [`Kind`]. A new
//! kind is its own file here, its variant in [`Kind`] (the file format),
//! and one line in the `registry!` list below.

mod bleed;
mod combustor;
mod compressor;
mod duct;
mod entry;
mod heating;
mod mixer;
mod normal_shock;
mod nozzle;
mod oblique_shock;
mod split;
mod turbine;

#[cfg(test)]
pub(crate) mod probe;

pub use duct::mil_recovery;

use crate::book::{Given, Kind, Station};
use crate::engine::StationValue;
use crate::engine::compute::{ProcessResult, Res};
use crate::units::Quantity;

/// The stations a process sees when it runs.
pub struct Io<'a> {
    /// The process's name.
    pub name: &'a str,
    /// Name of the upstream station (empty for an entry).
    pub from: &'a str,
    /// Input stations: the upstream one first, then a second stream.
    pub inputs: &'a [&'a StationValue],
    /// The downstream station.
    pub to: &'a Station,
    /// A second downstream station (the bypass of a split).
    pub to2: Option<&'a Station>,
}

impl<'a> Io<'a> {
    /// The upstream station.
    pub fn input(&self) -> Res<&'a StationValue> {
        self.inputs
            .first()
            .copied()
            .ok_or_else(|| format!("process \"{}\" has no upstream station", self.name))
    }
}

/// What a kind reads besides its input stations and its own givens.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Reads {
    /// The ambient block (an entry's free stream, a nozzle's back pressure).
    pub ambient: bool,
    /// A measured total temperature on the exit station.
    pub measured_tt: bool,
    /// A measured total pressure on the exit station.
    pub measured_pt: bool,
}

/// Which other workbook item a name in a process refers to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NameOf {
    /// A station the process takes flow from (a mixer's second stream).
    Input,
    /// A station the process delivers flow to (a split's bypass).
    Output,
    /// A shaft.
    Shaft,
}

/// Everything about one process kind.
pub trait ProcessKind {
    /// Short name for messages and choosers ("duct", "nozzle").
    fn name(&self) -> &'static str;
    /// The kind and its current mode in words.
    fn mode_label(&self) -> String;
    /// Walk the givens of the current mode: key, quantity, given.
    fn visit_givens(&self, f: &mut dyn FnMut(&'static str, Quantity, &Given));
    /// The same walk with exclusive access.
    fn visit_givens_mut(&mut self, f: &mut dyn FnMut(&'static str, Quantity, &mut Given));
    /// The figures this kind can report in its current mode (keys of
    /// [`crate::book::paths::FIGURE_KEYS`]); some appear only in some
    /// states (an unchoked nozzle has no throat).
    fn figure_keys(&self) -> &'static [&'static str];
    /// Names of other items the process refers to besides `from` and
    /// `to` (a second stream in or out, its shaft), written once with
    /// `names!`; the getters below and renames all read this one walk.
    fn visit_names<'a>(&'a self, _f: &mut dyn FnMut(NameOf, &'a str)) {}
    /// The same walk with exclusive access (renames).
    fn visit_names_mut(&mut self, _f: &mut dyn FnMut(NameOf, &mut String)) {}
    /// Flow enters the workbook here (no upstream station).
    fn is_entry(&self) -> bool {
        false
    }
    /// A second input stream (a mixer's secondary).
    fn second_input(&self) -> Option<&str> {
        name_of(self, NameOf::Input)
    }
    /// A second output stream (a split's bypass).
    fn second_output(&self) -> Option<&str> {
        name_of(self, NameOf::Output)
    }
    /// The shaft the machine is on.
    fn shaft(&self) -> Option<&str> {
        name_of(self, NameOf::Shaft)
    }
    /// Its work is set by its shaft's balance (it depends on the other
    /// machines on the shaft).
    fn takes_shaft_work(&self) -> bool {
        false
    }
    /// The flow leaves to the ambient here (nothing may take flow from the
    /// exit station; it counts as a nozzle in the summary).
    fn discharges(&self) -> bool {
        false
    }
    /// The kind fixes its exit station's static state itself (the station
    /// then takes no static given).
    fn sets_exit_statics(&self, _exit: &Station) -> bool {
        false
    }
    /// Givens kept in the file but not read in the current mode.
    fn unread_givens(&self) -> &'static [&'static str] {
        &[]
    }
    /// The given of this process behind a cell of its exit station's row
    /// in the grid (an entry's `tt` cell is its given total temperature).
    fn grid_given(&self, _station_key: &str) -> Option<&'static str> {
        None
    }
    /// What it reads besides inputs and givens.
    fn reads(&self) -> Reads {
        Reads::default()
    }
    /// The next mode, its givens started from the figures computed now
    /// (`now`) where they carry over; `None` for a kind with one mode.
    fn next_mode(&self, _now: Option<&ProcessResult>) -> Option<Kind> {
        None
    }
    /// Compute the exit station(s) and figures.
    fn run(
        &self,
        ctx: &crate::engine::compute::Ctx,
        io: &Io,
        tr: &mut crate::engine::explain::Tracer,
    ) -> Res<ProcessResult>;
}

/// The first name of a sort a kind refers to.
fn name_of<K: ProcessKind + ?Sized>(k: &K, of: NameOf) -> Option<&str> {
    let mut found = None;
    k.visit_names(&mut |o, n| {
        if o == of && found.is_none() {
            found = Some(n);
        }
    });
    found
}

/// A kind's walk over the names it refers to, written once for shared and
/// exclusive access: `names!(this, f => { ... f(NameOf::Input, field) ... })`.
macro_rules! names {
    ($this:ident, $f:ident => $body:expr) => {
        fn visit_names<'a>(&'a self, $f: &mut dyn FnMut(NameOf, &'a str)) {
            let $this = self;
            $body
        }

        fn visit_names_mut(&mut self, $f: &mut dyn FnMut(NameOf, &mut String)) {
            let $this = self;
            $body
        }
    };
}
pub(crate) use names;

/// Write a kind's walk over its givens once and get both the shared and
/// the exclusive walk: `givens!(this, f => match this { ... })`, the body
/// calling `f(key, quantity, given)` on fields bound by pattern.
macro_rules! givens {
    ($this:ident, $f:ident => $body:expr) => {
        fn visit_givens(&self, $f: &mut dyn FnMut(&'static str, Quantity, &Given)) {
            let $this = self;
            $body
        }

        fn visit_givens_mut(&mut self, $f: &mut dyn FnMut(&'static str, Quantity, &mut Given)) {
            let $this = self;
            $body
        }
    };
}
pub(crate) use givens;

/// The kinds, each with its `Kind` variant and module: `of`, `of_mut` and
/// the chooser list are generated from this one list.
macro_rules! registry {
    ($($(#[$attr:meta])* $variant:ident => $module:ident),* $(,)?) => {
        /// The description of a process's kind.
        pub fn of(k: &Kind) -> &dyn ProcessKind {
            match k {
                Kind::NormalShock => &normal_shock::NormalShock,
                $($(#[$attr])* Kind::$variant(x) => x,)*
            }
        }

        /// The description of a process's kind, for changing its givens
        /// and names.
        pub fn of_mut(k: &mut Kind) -> &mut dyn ProcessKind {
            match k {
                // A unit struct: boxing it allocates nothing.
                Kind::NormalShock => Box::leak(Box::new(normal_shock::NormalShock)),
                $($(#[$attr])* Kind::$variant(x) => x,)*
            }
        }

        /// What the kind chooser offers: a label and a fresh process of
        /// that kind with sensible starting givens.
        pub fn offered() -> Vec<(&'static str, Kind)> {
            let mut v = Vec::new();
            $($(#[$attr])* v.extend($module::fresh());)*
            v
        }
    };
}

registry! {
    Duct => duct,
    Combustor => combustor,
    Heating => heating,
    Compressor => compressor,
    Turbine => turbine,
    ObliqueShock => oblique_shock,
    Nozzle => nozzle,
    Entry => entry,
    Split => split,
    Mixer => mixer,
    Bleed => bleed,
    #[cfg(test)] Probe => probe,
}

/// A given started from a value computed now (SI, shown in `unit`), or
/// from `fallback` text when nothing is computed.
pub fn seed(now: Option<f64>, scale: f64, unit: &str, fallback: &str) -> Given {
    match now.filter(|v| v.is_finite()) {
        Some(v) => {
            // Six significant digits, trailing zeros dropped ("1", not "1.00000").
            let mut n = crate::report::sig(v / scale, 6);
            if n.contains('.') && !n.contains('e') {
                n = n.trim_end_matches('0').trim_end_matches('.').to_string();
            }
            Given::raw(&if unit.is_empty() {
                n
            } else {
                format!("{n} {unit}")
            })
        }
        None => Given::raw(fallback),
    }
}

/// A figure computed now, when there is one.
pub fn figure(now: Option<&ProcessResult>, key: &str) -> Option<f64> {
    now.and_then(|r| r.figure(key))
}

/// Names and imports every kind file uses.
mod prelude {
    pub(crate) use super::{Io, NameOf, ProcessKind, Reads, figure, givens, names, seed};
    pub(crate) use crate::book::{
        Basis, Bleed, BleedAmount, Burn, Combustor, Compression, Compressor, Duct, Entry, Exit,
        Expansion, Given, Heating, Kind, Mixer, Nozzle, Oblique, Shape, Split, StageBleed, Station,
        Turbine,
    };
    pub(crate) use crate::engine::StationValue;
    pub(crate) use crate::engine::compute::{
        Ctx, Figures, ProcessResult, Res, efficiency, fe, finish, gas, measured, need_statics,
        positive, ratio, stage_figures,
    };
    pub(crate) use crate::engine::explain::{Tracer, step};
    pub(crate) use crate::flow::combustion::{self, Burner};
    pub(crate) use crate::flow::shock::{self, Strength};
    pub(crate) use crate::flow::turbo;
    pub(crate) use crate::flow::{Branch, FlowError, fanno, isentropic, rayleigh};
    pub(crate) use crate::gas::{Composition, Fuel, Gas, Thermo};
    pub(crate) use crate::units::Quantity;
}

/// Every mode of a process's kind, the current one first; each other
/// mode's givens start from the figures computed now (`now`) where they
/// carry over (the chooser's list; see [`ProcessKind::next_mode`]).
pub fn modes(kind: &Kind, now: Option<&ProcessResult>) -> Vec<Kind> {
    let start = of(kind).mode_label();
    let mut v = vec![kind.clone()];
    while v.len() < 16 {
        let Some(next) = v.last().and_then(|k| of(k).next_mode(now)) else {
            break;
        };
        if of(&next).mode_label() == start {
            break;
        }
        v.push(next);
    }
    v
}

/// What a mode takes and what it derives, in one line for the chooser.
pub fn mode_summary(kind: &Kind) -> String {
    let k = of(kind);
    let mut takes: Vec<&str> = Vec::new();
    k.visit_givens(&mut |key, _, _| takes.push(key));
    let reads = k.reads();
    if reads.measured_tt {
        takes.push("exit Tt (measured)");
    }
    if reads.measured_pt {
        takes.push("exit pt (measured)");
    }
    let derives: Vec<&str> = k
        .figure_keys()
        .iter()
        .filter(|f| !takes.contains(f))
        .take(5)
        .map(|f| {
            crate::book::paths::FIGURE_KEYS
                .iter()
                .find(|(key, ..)| key == f)
                .map_or(*f, |(_, label, _)| *label)
        })
        .collect();
    format!(
        "you give: {}; it derives: {}",
        if takes.is_empty() {
            "nothing".to_string()
        } else {
            takes.join(", ")
        },
        if derives.is_empty() {
            "the exit state".to_string()
        } else {
            derives.join(", ")
        }
    )
}
