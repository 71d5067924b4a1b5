//! Species, fuels and compositions: dry air, humid air and lean products.
//!
//! A composition is counted per kilogram of dry air: fuel-air ratio `far`
//! (kg fuel burnt per kg dry air) and water-air ratio `war` (kg vapour per kg
//! dry air). Products are those of complete lean combustion of a hydrocarbon
//! C H_n: carbon to CO2, hydrogen to H2O, the excess oxygen left over.
//!
//! Dry air: mole fractions N2 0.780840, O2 0.209476, Ar 0.009340,
//! CO2 0.000314 normalised to one (U.S. Standard Atmosphere 1976 major
//! constituents; the trace gases are neglected). Atomic masses C 12.011 and
//! H 1.008 (IUPAC conventional values).

use super::nasa9_data::{self, SpeciesData};
use super::{GasError, Mixture, Polynomial, R_UNIVERSAL};

const X_DRY_AIR: [(Species, f64); 4] = [
    (Species::N2, 0.780840),
    (Species::O2, 0.209476),
    (Species::Ar, 0.009340),
    (Species::CO2, 0.000314),
];
const M_C: f64 = 12.011;
const M_H: f64 = 1.008;

/// The species the models know.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Species {
    /// Nitrogen.
    N2,
    /// Oxygen.
    O2,
    /// Argon.
    Ar,
    /// Carbon dioxide.
    CO2,
    /// Water vapour.
    H2O,
}

impl Species {
    /// Every species, in a fixed order.
    pub const ALL: [Species; 5] = [
        Species::N2,
        Species::O2,
        Species::Ar,
        Species::CO2,
        Species::H2O,
    ];

    pub(crate) fn data(self) -> &'static SpeciesData {
        match self {
            Species::N2 => &nasa9_data::N2,
            Species::O2 => &nasa9_data::O2,
            Species::Ar => &nasa9_data::AR,
            Species::CO2 => &nasa9_data::CO2,
            Species::H2O => &nasa9_data::H2O,
        }
    }

    /// Molar mass, kg/kmol.
    pub fn molar_mass(self) -> f64 {
        self.data().molar_mass
    }

    /// A pure-species mixture.
    pub fn pure(self) -> Mixture {
        let mut b = MixtureBuilder::default();
        b.add_moles(self, 1.0 / self.molar_mass());
        b.build(self.data().name)
    }
}

fn index(s: Species) -> usize {
    match s {
        Species::N2 => 0,
        Species::O2 => 1,
        Species::Ar => 2,
        Species::CO2 => 3,
        Species::H2O => 4,
    }
}

/// Accumulates kmol of each species; builds the mixture polynomial once.
#[derive(Debug, Clone, Default)]
pub struct MixtureBuilder {
    kmol: [f64; 5],
}

impl MixtureBuilder {
    /// Add `kmol` of a species.
    pub fn add_moles(&mut self, s: Species, kmol: f64) -> &mut Self {
        self.kmol[index(s)] += kmol;
        self
    }

    /// Total mass, kg.
    pub fn mass(&self) -> f64 {
        Species::ALL
            .iter()
            .map(|&s| self.kmol[index(s)] * s.molar_mass())
            .sum()
    }

    /// Kmol of one species.
    pub fn moles(&self, s: Species) -> f64 {
        self.kmol[index(s)]
    }

    /// The mixture: mass-specific polynomial and gas constant.
    pub fn build(&self, label: impl Into<std::borrow::Cow<'static, str>>) -> Mixture {
        let mass = self.mass();
        let d0 = Species::N2.data();
        let mut poly = Polynomial {
            t_min: d0.t_min,
            t_mid: d0.t_mid,
            t_max: d0.t_max,
            low: [0.0; 9],
            high: [0.0; 9],
        };
        let mut kmol_total = 0.0;
        for s in Species::ALL {
            let n = self.kmol[index(s)];
            if n == 0.0 {
                continue;
            }
            let d = s.data();
            poly.t_min = poly.t_min.max(d.t_min);
            poly.t_max = poly.t_max.min(d.t_max);
            poly.add_scaled(&d.low, &d.high, n / mass * R_UNIVERSAL);
            kmol_total += n;
        }
        Mixture::from_polynomial(poly, R_UNIVERSAL * kmol_total / mass, label)
    }
}

/// A hydrocarbon fuel C H_n, described by its hydrogen-to-carbon molar ratio.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fuel {
    hc: f64,
}

impl Fuel {
    /// A kerosene-like fuel: H/C 1.92 (about C12H23; common practice for
    /// jet fuel, from memory).
    pub const KEROSENE: Fuel = Fuel { hc: 1.92 };

    /// A fuel of a given H/C molar ratio (0 to 4, methane being 4).
    pub fn new(hc: f64) -> Result<Fuel, GasError> {
        if !(hc.is_finite() && (0.0..=4.0).contains(&hc)) {
            return Err(GasError::BadParameter {
                what: "fuel H/C ratio",
                value: hc,
                why: "a hydrocarbon C H_n has n between 0 and 4",
            });
        }
        Ok(Fuel { hc })
    }

    /// Hydrogen-to-carbon molar ratio.
    pub fn hc(&self) -> f64 {
        self.hc
    }

    /// Molar mass of C H_n, kg/kmol.
    pub fn molar_mass(&self) -> f64 {
        M_C + self.hc * M_H
    }
}

impl Default for Fuel {
    fn default() -> Self {
        Fuel::KEROSENE
    }
}

/// Stoichiometric fuel-air ratio of a fuel with dry air.
pub fn stoichiometric_far(fuel: Fuel) -> f64 {
    let air = dry_air_kmol_per_kg();
    air[index(Species::O2)] * fuel.molar_mass() / (1.0 + fuel.hc / 4.0)
}

fn dry_air_kmol_per_kg() -> [f64; 5] {
    // Computed once: every mixture and every burner trial starts from it.
    static N: std::sync::OnceLock<[f64; 5]> = std::sync::OnceLock::new();
    *N.get_or_init(dry_air_kmol_per_kg_uncached)
}

fn dry_air_kmol_per_kg_uncached() -> [f64; 5] {
    let sum: f64 = X_DRY_AIR.iter().map(|(_, x)| x).sum();
    let m_air: f64 = X_DRY_AIR
        .iter()
        .map(|(s, x)| x / sum * s.molar_mass())
        .sum();
    let mut n = [0.0; 5];
    for (s, x) in X_DRY_AIR {
        n[index(s)] = x / sum / m_air;
    }
    n
}

/// A gas composition per kilogram of dry air.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Composition {
    /// Fuel-air ratio: kg of fuel burnt per kg of dry air.
    pub far: f64,
    /// Water-air ratio: kg of vapour per kg of dry air.
    pub war: f64,
    /// The fuel burnt.
    pub fuel: Fuel,
}

impl Composition {
    /// Dry air.
    pub fn dry_air() -> Composition {
        Composition {
            far: 0.0,
            war: 0.0,
            fuel: Fuel::KEROSENE,
        }
    }

    /// Humid air from a specific humidity (kg vapour per kg moist air).
    pub fn humid_air(specific_humidity: f64) -> Result<Composition, GasError> {
        if !(specific_humidity.is_finite() && (0.0..0.2).contains(&specific_humidity)) {
            return Err(GasError::BadParameter {
                what: "specific humidity",
                value: specific_humidity,
                why: "it must lie between 0 and 0.2 kg vapour per kg moist air",
            });
        }
        Ok(Composition {
            war: specific_humidity / (1.0 - specific_humidity),
            ..Composition::dry_air()
        })
    }

    /// Lean products of burning `fuel` at `far` in this air.
    pub fn burnt(self, far: f64, fuel: Fuel) -> Result<Composition, GasError> {
        let c = Composition { far, fuel, ..self };
        c.check()?;
        Ok(c)
    }

    /// Refuse negative, non-finite or rich fuel-air ratios.
    pub fn check(&self) -> Result<(), GasError> {
        if !(self.far.is_finite() && self.far >= 0.0) {
            return Err(GasError::BadParameter {
                what: "fuel-air ratio",
                value: self.far,
                why: "it must be zero or positive",
            });
        }
        let st = stoichiometric_far(self.fuel);
        if self.far > st {
            return Err(GasError::RichMixture {
                far: self.far,
                stoich: st,
            });
        }
        Ok(())
    }

    /// Mass of mixture per kg of dry air.
    pub fn mass_per_kg_air(&self) -> f64 {
        1.0 + self.far + self.war
    }

    /// Species kmol per kg of dry air.
    pub fn builder(&self) -> MixtureBuilder {
        let n = dry_air_kmol_per_kg();
        let mut b = MixtureBuilder { kmol: n };
        let nf = self.far / self.fuel.molar_mass();
        b.add_moles(Species::CO2, nf)
            .add_moles(Species::H2O, nf * self.fuel.hc / 2.0)
            .add_moles(Species::O2, -nf * (1.0 + self.fuel.hc / 4.0))
            .add_moles(Species::H2O, self.war / Species::H2O.molar_mass());
        b
    }

    /// Sensible enthalpy of the thermally perfect mixture per kg of dry
    /// air at `t`, J/kg, and its rate with the fuel-air ratio (the mixture
    /// is linear in the fuel burnt, so `base + dfar * per_far` is exact for
    /// another ratio of the same fuel): summed over the species' own
    /// polynomials, without building a mixture. Equals
    /// `mass_per_kg_air() * mixture().h(t) - h(T_REFERENCE)` to rounding.
    pub fn sensible_h_per_kg_air(&self, t: f64) -> Result<(f64, f64), GasError> {
        let n = self.builder();
        let mf = self.fuel.molar_mass();
        let mut dn = [0.0; 5];
        dn[index(Species::CO2)] = 1.0 / mf;
        dn[index(Species::H2O)] = self.fuel.hc / 2.0 / mf;
        dn[index(Species::O2)] = -(1.0 + self.fuel.hc / 4.0) / mf;
        // Each species' molar enthalpy at the reference temperature, once.
        static H_REF: std::sync::OnceLock<[f64; 5]> = std::sync::OnceLock::new();
        let h_ref = H_REF.get_or_init(|| {
            let t_ref = super::T_REFERENCE;
            let mut out = [0.0; 5];
            for s in Species::ALL {
                let d = s.data();
                let a = if t_ref <= d.t_mid { &d.low } else { &d.high };
                out[index(s)] = Polynomial::h_of(a, t_ref, t_ref.ln());
            }
            out
        });
        let ln_t = t.ln();
        let (mut base, mut per_far) = (0.0, 0.0);
        for s in Species::ALL {
            let (ni, di) = (n.kmol[index(s)], dn[index(s)]);
            if ni == 0.0 && di == 0.0 {
                continue;
            }
            let d = s.data();
            if !(t >= d.t_min && t <= d.t_max) {
                return Err(GasError::OutOfRange {
                    t,
                    min: d.t_min,
                    max: d.t_max,
                    model: "thermally perfect",
                });
            }
            let a = if t <= d.t_mid { &d.low } else { &d.high };
            let h = R_UNIVERSAL * (Polynomial::h_of(a, t, ln_t) - h_ref[index(s)]);
            base += ni * h;
            per_far += di * h;
        }
        Ok((base, per_far))
    }

    /// The thermally perfect mixture of this composition. Call [`check`]
    /// first for user input; a rich ratio here gives negative oxygen.
    ///
    /// [`check`]: Composition::check
    pub fn mixture(&self) -> Mixture {
        let label = match (self.far > 0.0, self.war > 0.0) {
            (false, false) => "dry air",
            (false, true) => "humid air",
            (true, _) => "combustion products",
        };
        self.builder().build(label)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::Thermo;
    use approx::assert_relative_eq;

    #[test]
    fn sensible_enthalpy_per_kg_air_is_the_mixtures_and_linear_in_far() {
        // Independent relation: the same sum through a built mixture.
        let c = Composition::dry_air().burnt(0.012, Fuel::KEROSENE).unwrap();
        for t in [250.0, 800.0, 1450.0, 2100.0] {
            let (base, per) = c.sensible_h_per_kg_air(t).unwrap();
            let m = c.mixture();
            let want = c.mass_per_kg_air() * (m.h(t).unwrap() - m.h_reference());
            assert_relative_eq!(base, want, max_relative = 1e-12);
            let c2 = Composition::dry_air().burnt(0.03, Fuel::KEROSENE).unwrap();
            let m2 = c2.mixture();
            let want2 = c2.mass_per_kg_air() * (m2.h(t).unwrap() - m2.h_reference());
            assert_relative_eq!(base + 0.018 * per, want2, max_relative = 1e-12);
        }
        assert!(c.sensible_h_per_kg_air(100.0).is_err());
    }

    #[test]
    fn dry_air_gas_constant_matches_standard_atmosphere() {
        // U.S. Standard Atmosphere 1976: M0 = 28.9644 kg/kmol for the full
        // composition; our four-species air gives 28.965 (trace gases
        // neglected), so R within 0.01 % of 287.05 J/(kg K).
        let air = Mixture::dry_air();
        assert_relative_eq!(air.r(), 287.05, max_relative = 1e-4);
    }

    #[test]
    fn dry_air_cp_at_300_k_matches_tables() {
        // cp of dry air at 300 K: 1.005 kJ/(kg K) (Incropera air table /
        // JANAF-based; from memory), gamma 1.400.
        let air = Mixture::dry_air();
        assert_relative_eq!(air.cp(300.0).unwrap(), 1005.0, max_relative = 2e-3);
        assert_relative_eq!(air.gamma(300.0).unwrap(), 1.400, max_relative = 1e-3);
        // At 1000 K: cp 1.142 kJ/(kg K) (same table, from memory).
        assert_relative_eq!(air.cp(1000.0).unwrap(), 1142.0, max_relative = 3e-3);
    }

    #[test]
    fn kerosene_stoichiometric_far() {
        // CH1.92 with air: about 0.0682 (common practice: jet fuel
        // stoichiometric fuel-air ratio 0.068, from memory).
        let f = stoichiometric_far(Fuel::KEROSENE);
        assert!((0.067..0.069).contains(&f), "{f}");
        // Methane: 0.0580 (from memory: stoichiometric air-fuel 17.2).
        let m = stoichiometric_far(Fuel::new(4.0).unwrap());
        assert_relative_eq!(m, 1.0 / 17.2, max_relative = 5e-3);
    }

    #[test]
    fn rich_mixture_is_an_error() {
        let st = stoichiometric_far(Fuel::KEROSENE);
        let r = Composition::dry_air().burnt(st * 1.01, Fuel::KEROSENE);
        assert!(matches!(r, Err(GasError::RichMixture { .. })));
        assert!(Composition::dry_air().burnt(-0.01, Fuel::KEROSENE).is_err());
    }

    #[test]
    fn products_conserve_mass_and_oxygen_runs_out_at_stoichiometric() {
        let fuel = Fuel::KEROSENE;
        let st = stoichiometric_far(fuel);
        let c = Composition::dry_air().burnt(st, fuel).unwrap();
        let b = c.builder();
        assert!(b.moles(Species::O2).abs() < 1e-12);
        assert_relative_eq!(b.mass(), 1.0 + st, max_relative = 1e-12);
    }
}
