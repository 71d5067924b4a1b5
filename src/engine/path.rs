//! Process paths on the Tt-s plane, for the chart.
//!
//! Between two computed stations the path is drawn through states whose
//! entropy and log total pressure both vary linearly along the process:
//!
//! - with the same gas at both ends that is the polytropic path (constant
//!   polytropic efficiency: `dphi = (R / eta_p) d ln pt`) of a compressor
//!   or turbine between its true end states;
//! - at constant total pressure it is the isobar, heat addition along its
//!   pressure line (the composition is blended from the inlet's to the
//!   exit's as the fuel burns);
//! - at constant Tt (an adiabatic duct, a shock) it is the horizontal line
//!   of the energy equation.
//!
//! Each point's Tt comes from the gas model: `phi(Tt) = s + phi(T_ref) +
//! R ln(pt / p_ref)` inverted for the blended composition. The end points
//! are the stations' own values.

use super::{Engine, StationValue};
use crate::atmosphere::SEA_LEVEL_PRESSURE_PA;
use crate::gas::{Composition, T_REFERENCE, Thermo, invert_phi};

impl Engine {
    /// Entropy (J/(kg K), from 298.15 K and 101.325 kPa) of a station's
    /// total state, as the grid's `s` column.
    pub fn entropy_of(&self, v: &StationValue) -> Option<f64> {
        self.station_key(v, "s")
    }

    /// `n + 1` points (s, Tt) from station `a` to station `b` along the
    /// process path (see the module notes); `None` where the gas model
    /// cannot place a point (a temperature outside its range).
    pub fn ts_path(&self, a: &StationValue, b: &StationValue, n: usize) -> Vec<Option<(f64, f64)>> {
        let n = n.max(1);
        let (Some(sa), Some(sb)) = (self.entropy_of(a), self.entropy_of(b)) else {
            return vec![None; n + 1];
        };
        let Ok(model) = self.model.as_ref() else {
            return vec![None; n + 1];
        };
        let (la, lb) = (a.pt.ln(), b.pt.ln());
        (0..=n)
            .map(|i| {
                let t = i as f64 / n as f64;
                if i == 0 {
                    return Some((sa, a.tt));
                }
                if i == n {
                    return Some((sb, b.tt));
                }
                let comp = Composition::mix(&b.comp, t, &a.comp, 1.0 - t);
                let g = model.gas(&comp).ok()?;
                let s = sa + t * (sb - sa);
                let pt = (la + t * (lb - la)).exp();
                let target =
                    s + g.phi(T_REFERENCE).ok()? + g.r() * (pt / SEA_LEVEL_PRESSURE_PA).ln();
                let guess = a.tt + t * (b.tt - a.tt);
                let tt = invert_phi(&g, target, guess).ok()?;
                Some((s, tt))
            })
            .collect()
    }

    /// An isobar of the ambient air: (s, T) at `n + 1` temperatures from
    /// `t0` to `t1` at pressure `p`.
    pub fn isobar(&self, p: f64, t0: f64, t1: f64, n: usize) -> Vec<Option<(f64, f64)>> {
        let n = n.max(1);
        let Ok(model) = self.model.as_ref() else {
            return vec![None; n + 1];
        };
        let comp = self
            .ambient
            .as_ref()
            .map_or(Composition::dry_air(), |a| a.air);
        let Ok(g) = model.gas(&comp) else {
            return vec![None; n + 1];
        };
        (0..=n)
            .map(|i| {
                let t = t0 + (t1 - t0) * i as f64 / n as f64;
                let s = g.phi(t).ok()?
                    - g.phi(T_REFERENCE).ok()?
                    - g.r() * (p / SEA_LEVEL_PRESSURE_PA).ln();
                Some((s, t))
            })
            .collect()
    }
}
