//! Thermally perfect mixtures as one NASA 9-coefficient polynomial.
//!
//! Each species' coefficients (dimensionless, for cp/R) are scaled by its
//! mass fraction times its specific gas constant and summed, so the mixture
//! carries its own polynomial in J/(kg K) and every property is one
//! polynomial evaluation. Two ranges share the break temperature.

use super::{GasError, Thermo, ThermoPoint};

/// A mass-specific NASA 9-coefficient polynomial over two temperature ranges.
///
/// `cp = a1 T^-2 + a2 T^-1 + a3 + a4 T + a5 T^2 + a6 T^3 + a7 T^4` (J/(kg K));
/// `h = -a1/T + a2 ln T + a3 T + a4 T^2/2 + a5 T^3/3 + a6 T^4/4 + a7 T^5/5 + b1`;
/// `phi = -a1 T^-2/2 - a2/T + a3 ln T + a4 T + a5 T^2/2 + a6 T^3/3 + a7 T^4/4 + b2`.
#[derive(Debug, Clone, PartialEq)]
pub struct Polynomial {
    /// Lowest valid temperature, K.
    pub t_min: f64,
    /// Break between the two coefficient sets, K.
    pub t_mid: f64,
    /// Highest valid temperature, K.
    pub t_max: f64,
    /// Coefficients below `t_mid`: a1..a7, b1, b2 (mass specific).
    pub low: [f64; 9],
    /// Coefficients from `t_mid` up.
    pub high: [f64; 9],
}

impl Polynomial {
    /// A polynomial with constant `cp` over a range: the thermally perfect
    /// machinery then reproduces the calorically perfect closed forms.
    pub fn constant_cp(cp: f64, t_min: f64, t_max: f64) -> Polynomial {
        let c = [0.0, 0.0, cp, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0];
        Polynomial {
            t_min,
            t_mid: 0.5 * (t_min + t_max),
            t_max,
            low: c,
            high: c,
        }
    }

    #[inline]
    fn coeffs(&self, t: f64) -> Result<&[f64; 9], GasError> {
        if !(t >= self.t_min && t <= self.t_max) {
            return Err(GasError::OutOfRange {
                t,
                min: self.t_min,
                max: self.t_max,
                model: "thermally perfect",
            });
        }
        Ok(if t <= self.t_mid {
            &self.low
        } else {
            &self.high
        })
    }

    #[inline]
    fn cp_of(a: &[f64; 9], t: f64) -> f64 {
        let ti = 1.0 / t;
        a[0] * ti * ti + a[1] * ti + a[2] + t * (a[3] + t * (a[4] + t * (a[5] + t * a[6])))
    }
    #[inline]
    pub(crate) fn h_of(a: &[f64; 9], t: f64, ln_t: f64) -> f64 {
        -a[0] / t
            + a[1] * ln_t
            + t * (a[2] + t * (a[3] / 2.0 + t * (a[4] / 3.0 + t * (a[5] / 4.0 + t * a[6] / 5.0))))
            + a[7]
    }
    #[inline]
    pub(crate) fn phi_of(a: &[f64; 9], t: f64, ln_t: f64) -> f64 {
        let ti = 1.0 / t;
        -0.5 * a[0] * ti * ti - a[1] * ti
            + a[2] * ln_t
            + t * (a[3] + t * (a[4] / 2.0 + t * (a[5] / 3.0 + t * a[6] / 4.0)))
            + a[8]
    }

    /// Add `weight` times another set of coefficients (same ranges assumed
    /// by construction of the species data).
    pub(crate) fn add_scaled(&mut self, low: &[f64; 9], high: &[f64; 9], weight: f64) {
        for k in 0..9 {
            self.low[k] += weight * low[k];
            self.high[k] += weight * high[k];
        }
    }
}

/// A thermally perfect ideal-gas mixture of fixed composition.
#[derive(Debug, Clone, PartialEq)]
pub struct Mixture {
    // Shared: a mixture is handed out for every process of every
    // recompute, and a clone should not copy two coefficient tables.
    poly: std::sync::Arc<Polynomial>,
    r: f64,
    h_ref: f64,
    label: std::borrow::Cow<'static, str>,
}

impl Mixture {
    /// A mixture from a mass-specific polynomial and its gas constant.
    pub fn from_polynomial(
        poly: Polynomial,
        r: f64,
        label: impl Into<std::borrow::Cow<'static, str>>,
    ) -> Mixture {
        let h_ref = match poly.coeffs(super::T_REFERENCE) {
            Ok(a) => Polynomial::h_of(a, super::T_REFERENCE, super::T_REFERENCE.ln()),
            Err(_) => 0.0,
        };
        Mixture {
            poly: std::sync::Arc::new(poly),
            r,
            h_ref,
            label: label.into(),
        }
    }

    /// Dry air of the standard composition.
    pub fn dry_air() -> Mixture {
        super::Composition::dry_air().mixture()
    }

    /// Human name of the composition ("dry air", "products far 0.0200").
    pub fn label(&self) -> &str {
        &self.label
    }

    /// The mixture's polynomial.
    pub fn polynomial(&self) -> &Polynomial {
        &self.poly
    }

    /// Enthalpy at the reference temperature 298.15 K, J/kg.
    pub fn h_reference(&self) -> f64 {
        self.h_ref
    }
}

impl Thermo for Mixture {
    fn r(&self) -> f64 {
        self.r
    }
    fn range(&self) -> (f64, f64) {
        (self.poly.t_min, self.poly.t_max)
    }
    #[inline]
    fn cp(&self, t: f64) -> Result<f64, GasError> {
        Ok(Polynomial::cp_of(self.poly.coeffs(t)?, t))
    }
    #[inline]
    fn dcp(&self, t: f64) -> Result<f64, GasError> {
        let a = self.poly.coeffs(t)?;
        let ti = 1.0 / t;
        Ok(-2.0 * a[0] * ti * ti * ti - a[1] * ti * ti
            + a[3]
            + t * (2.0 * a[4] + t * (3.0 * a[5] + t * 4.0 * a[6])))
    }
    #[inline]
    fn h(&self, t: f64) -> Result<f64, GasError> {
        let a = self.poly.coeffs(t)?;
        // The logarithm only enters through a2, zero for 7-coefficient data.
        let ln_t = if a[1] == 0.0 { 0.0 } else { t.ln() };
        Ok(Polynomial::h_of(a, t, ln_t))
    }
    #[inline]
    fn phi(&self, t: f64) -> Result<f64, GasError> {
        Ok(Polynomial::phi_of(self.poly.coeffs(t)?, t, t.ln()))
    }
    #[inline]
    fn state(&self, t: f64) -> Result<ThermoPoint, GasError> {
        let a = self.poly.coeffs(t)?;
        let ln_t = t.ln();
        Ok(ThermoPoint {
            cp: Polynomial::cp_of(a, t),
            h: Polynomial::h_of(a, t, ln_t),
            phi: Polynomial::phi_of(a, t, ln_t),
        })
    }
}
