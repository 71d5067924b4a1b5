//! How a derived value was obtained: the relation and the numbers put into it.
//!
//! Process code records steps through a [`Tracer`]. In a normal evaluation
//! the tracer is off and the closure that would build a step never runs, so
//! explanations cost nothing on the recompute path; `explain` re-runs one
//! process with the tracer on.

use crate::units::Quantity;

/// One step of an explanation.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// What was derived ("Tt3", "fuel-air ratio").
    pub what: String,
    /// Its value, SI.
    pub value: f64,
    /// Its quantity (for display units).
    pub quantity: Quantity,
    /// The relation used, in words and symbols.
    pub relation: String,
    /// Inputs: name, SI value, quantity.
    pub inputs: Vec<(String, f64, Quantity)>,
}

/// Records steps when on; does nothing when off.
pub struct Tracer<'a>(Option<&'a mut Vec<Step>>);

impl<'a> Tracer<'a> {
    /// A tracer that records nothing.
    pub fn off() -> Tracer<'static> {
        Tracer(None)
    }
    /// A tracer that records into `steps`.
    pub fn on(steps: &'a mut Vec<Step>) -> Tracer<'a> {
        Tracer(Some(steps))
    }
    /// Record a step (the closure runs only when tracing).
    #[inline]
    pub fn step(&mut self, f: impl FnOnce() -> Step) {
        if let Some(v) = self.0.as_deref_mut() {
            v.push(f());
        }
    }
}

/// Build a [`Step`] tersely: `step!(tr, "Tt3", value, Temperature, "relation", [("Tt2", x, Temperature)])`.
macro_rules! step {
    ($tr:expr, $what:expr, $value:expr, $q:ident, $rel:expr, [$(($n:expr, $v:expr, $qq:ident)),* $(,)?]) => {
        $tr.step(|| $crate::engine::explain::Step {
            what: $what.to_string(),
            value: $value,
            quantity: $crate::units::Quantity::$q,
            relation: $rel.to_string(),
            inputs: vec![$(($n.to_string(), $v, $crate::units::Quantity::$qq)),*],
        })
    };
}
pub(crate) use step;
