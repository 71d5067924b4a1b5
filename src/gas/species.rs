//! Species, fuels and compositions: dry air, humid air and lean products.
//!
//! A composition is counted per kilogram of dry air: fuel-air ratio `far`
//! (kg fuel burnt per kg dry air) and water-air ratio `war` (kg vapour per kg
//! dry air). Products are those of complete lean combustion of a hydrocarbon
//! C H_n: carbon to CO2, hydrogen to H2O, the excess oxygen left over.
//!
//! Dry air: mole fractions N2 0.780840, O2 0.209476, Ar 0.009340,
//! CO2 0.000314 normalised to one (U.S. Standard Atmosphere 1976 major
//! constituents; the trace gases are neglected). Atomic masses C 12.011,
//! H 1.008, O 15.999, N 14.007 (IUPAC conventional values, the same as
//! Cantera's element weights).
//!
//! Products in chemical equilibrium are the complete products plus a
//! `shift` per kg of dry air (kmol of each species, summing to no change of
//! any element), computed by `gas::equilibrium` at the burner's exit and
//! frozen downstream.

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
const M_O: f64 = 15.999;
const M_N: f64 = 14.007;

/// The species the models know: the five of air and lean products, and
/// the seven minor species of products in chemical equilibrium.
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
    /// Carbon monoxide.
    CO,
    /// Hydrogen.
    H2,
    /// Hydroxyl.
    OH,
    /// Atomic oxygen.
    O,
    /// Atomic hydrogen.
    H,
    /// Nitric oxide.
    NO,
    /// Atomic nitrogen.
    N,
}

/// Number of species.
pub const SPECIES_COUNT: usize = 12;

/// Elements, in the order of [`Species::atoms`]: C, H, O, N, Ar.
pub const ELEMENTS: [&str; 5] = ["C", "H", "O", "N", "Ar"];

impl Species {
    /// Every species, in a fixed order (the order of a composition's moles).
    pub const ALL: [Species; SPECIES_COUNT] = [
        Species::N2,
        Species::O2,
        Species::Ar,
        Species::CO2,
        Species::H2O,
        Species::CO,
        Species::H2,
        Species::OH,
        Species::O,
        Species::H,
        Species::NO,
        Species::N,
    ];

    pub(crate) fn data(self) -> &'static SpeciesData {
        match self {
            Species::N2 => &nasa9_data::N2,
            Species::O2 => &nasa9_data::O2,
            Species::Ar => &nasa9_data::AR,
            Species::CO2 => &nasa9_data::CO2,
            Species::H2O => &nasa9_data::H2O,
            Species::CO => &nasa9_data::CO,
            Species::H2 => &nasa9_data::H2,
            Species::OH => &nasa9_data::OH,
            Species::O => &nasa9_data::O,
            Species::H => &nasa9_data::H,
            Species::NO => &nasa9_data::NO,
            Species::N => &nasa9_data::N,
        }
    }

    /// Atoms per molecule of C, H, O, N, Ar.
    pub fn atoms(self) -> [f64; 5] {
        match self {
            Species::N2 => [0.0, 0.0, 0.0, 2.0, 0.0],
            Species::O2 => [0.0, 0.0, 2.0, 0.0, 0.0],
            Species::Ar => [0.0, 0.0, 0.0, 0.0, 1.0],
            Species::CO2 => [1.0, 0.0, 2.0, 0.0, 0.0],
            Species::H2O => [0.0, 2.0, 1.0, 0.0, 0.0],
            Species::CO => [1.0, 0.0, 1.0, 0.0, 0.0],
            Species::H2 => [0.0, 2.0, 0.0, 0.0, 0.0],
            Species::OH => [0.0, 1.0, 1.0, 0.0, 0.0],
            Species::O => [0.0, 0.0, 1.0, 0.0, 0.0],
            Species::H => [0.0, 1.0, 0.0, 0.0, 0.0],
            Species::NO => [0.0, 0.0, 1.0, 1.0, 0.0],
            Species::N => [0.0, 0.0, 0.0, 1.0, 0.0],
        }
    }

    /// The species' name as chemists write it.
    pub fn name(self) -> &'static str {
        self.data().name
    }

    /// Molar mass, kg/kmol.
    pub fn molar_mass(self) -> f64 {
        self.data().molar_mass
    }

    /// Absolute molar enthalpy (formation included), J/kmol; the data's
    /// range checked.
    pub fn molar_h(self, t: f64) -> Result<f64, GasError> {
        let d = self.data();
        if !(t >= d.t_min && t <= d.t_max) {
            return Err(GasError::OutOfRange {
                t,
                min: d.t_min,
                max: d.t_max,
                model: "thermally perfect",
            });
        }
        let a = if t <= d.t_mid { &d.low } else { &d.high };
        Ok(R_UNIVERSAL * Polynomial::h_of(a, t, t.ln()))
    }

    /// Standard-state molar Gibbs energy over RT at `t` (at the reference
    /// pressure of the data, 1 bar): h/RT - s/R.
    pub(crate) fn g0_rt(self, t: f64) -> f64 {
        let d = self.data();
        let a = if t <= d.t_mid { &d.low } else { &d.high };
        let ln_t = t.ln();
        Polynomial::h_of(a, t, ln_t) / t - Polynomial::phi_of(a, t, ln_t)
    }

    /// A pure-species mixture.
    pub fn pure(self) -> Mixture {
        let mut b = MixtureBuilder::default();
        b.add_moles(self, 1.0 / self.molar_mass());
        b.build(self.data().name)
    }
}

pub(crate) fn index(s: Species) -> usize {
    s as usize
}

/// Accumulates kmol of each species; builds the mixture polynomial once.
#[derive(Debug, Clone, Default)]
pub struct MixtureBuilder {
    kmol: [f64; SPECIES_COUNT],
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

    /// Kmol of every species, in the order of [`Species::ALL`].
    pub fn all_moles(&self) -> [f64; SPECIES_COUNT] {
        self.kmol
    }

    /// Kmol of each element (C, H, O, N, Ar).
    pub fn elements(&self) -> [f64; 5] {
        let mut e = [0.0; 5];
        for s in Species::ALL {
            let n = self.kmol[index(s)];
            for (k, a) in s.atoms().iter().enumerate() {
                e[k] += n * a;
            }
        }
        e
    }

    /// Absolute enthalpy of these moles at `t`, J.
    pub fn enthalpy(&self, t: f64) -> Result<f64, GasError> {
        let mut h = 0.0;
        for s in Species::ALL {
            let n = self.kmol[index(s)];
            if n != 0.0 {
                h += n * s.molar_h(t)?;
            }
        }
        Ok(h)
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

/// A fuel C_c H_h O_o N_n, by its atoms per molecule (a hydrocarbon
/// C H_n is one carbon and n hydrogens; hydrogen H2, methane CH4 and the
/// alcohols are others). Burnt completely it gives CO2, H2O and N2 and
/// takes `c + h/4 - o/2` O2 per molecule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fuel {
    c: f64,
    h: f64,
    o: f64,
    n: f64,
}

impl Fuel {
    /// A kerosene-like fuel: H/C 1.92 (about C12H23; common practice for
    /// jet fuel, from memory).
    pub const KEROSENE: Fuel = Fuel {
        c: 1.0,
        h: 1.92,
        o: 0.0,
        n: 0.0,
    };

    /// Hydrogen, H2.
    pub const HYDROGEN: Fuel = Fuel {
        c: 0.0,
        h: 2.0,
        o: 0.0,
        n: 0.0,
    };

    /// Methane, CH4.
    pub const METHANE: Fuel = Fuel {
        c: 1.0,
        h: 4.0,
        o: 0.0,
        n: 0.0,
    };

    /// A hydrocarbon C H_n of a given H/C molar ratio (0 to 4, methane
    /// being 4).
    pub fn new(hc: f64) -> Result<Fuel, GasError> {
        if !(hc.is_finite() && (0.0..=4.0).contains(&hc)) {
            return Err(GasError::BadParameter {
                what: "fuel H/C ratio",
                value: hc,
                why: "a hydrocarbon C H_n has n between 0 and 4 (give hydrogen and other fuels by their atoms)",
            });
        }
        Ok(Fuel {
            c: 1.0,
            h: hc,
            o: 0.0,
            n: 0.0,
        })
    }

    /// A fuel by its atoms per molecule: none negative, some carbon or
    /// hydrogen, and needing oxygen to burn (`c + h/4 > o/2`).
    pub fn atoms(c: f64, h: f64, o: f64, n: f64) -> Result<Fuel, GasError> {
        for (what, v) in [
            ("fuel carbon atoms", c),
            ("fuel hydrogen atoms", h),
            ("fuel oxygen atoms", o),
            ("fuel nitrogen atoms", n),
        ] {
            if !(v.is_finite() && (0.0..=100.0).contains(&v)) {
                return Err(GasError::BadParameter {
                    what,
                    value: v,
                    why: "atoms per molecule lie between 0 and 100",
                });
            }
        }
        if c + h <= 0.0 {
            return Err(GasError::BadParameter {
                what: "fuel carbon and hydrogen atoms",
                value: c + h,
                why: "a fuel needs carbon or hydrogen to burn",
            });
        }
        let f = Fuel { c, h, o, n };
        if f.oxygen_demand() <= 1e-9 * (c + h) {
            return Err(GasError::BadParameter {
                what: "fuel oxygen atoms",
                value: o,
                why: "the molecule already holds the oxygen to burn itself (c + h/4 <= o/2)",
            });
        }
        Ok(f)
    }

    /// Atoms per molecule: C, H, O, N.
    pub fn atom_counts(&self) -> [f64; 4] {
        [self.c, self.h, self.o, self.n]
    }

    /// Hydrogen-to-carbon molar ratio (infinite for hydrogen).
    pub fn hc(&self) -> f64 {
        if self.c == 0.0 {
            f64::INFINITY
        } else {
            self.h / self.c
        }
    }

    /// Molar mass, kg/kmol.
    pub fn molar_mass(&self) -> f64 {
        self.c * M_C + self.h * M_H + self.o * M_O + self.n * M_N
    }

    /// kmol of O2 burning one kmol of fuel completely.
    pub fn oxygen_demand(&self) -> f64 {
        self.c + self.h / 4.0 - self.o / 2.0
    }

    /// Complete products per kmol of fuel burnt, in the order of
    /// [`Species::ALL`] (oxygen taken negative).
    pub(crate) fn products_per_kmol(&self) -> [f64; SPECIES_COUNT] {
        let mut d = [0.0; SPECIES_COUNT];
        d[index(Species::CO2)] = self.c;
        d[index(Species::H2O)] = self.h / 2.0;
        d[index(Species::N2)] = self.n / 2.0;
        d[index(Species::O2)] = -self.oxygen_demand();
        d
    }

    /// The species polynomial of this fuel where the data has one
    /// (hydrogen and methane, as gases), for its own entry temperature.
    pub(crate) fn species_data(&self) -> Option<&'static SpeciesData> {
        if *self == Fuel::HYDROGEN {
            Some(&nasa9_data::H2)
        } else if *self == Fuel::METHANE {
            Some(&nasa9_data::CH4)
        } else {
            None
        }
    }

    /// Sensible enthalpy of a gaseous fuel with species data, J/kg, from
    /// 298.15 K to `t`; `None` for a fuel without its own polynomial.
    pub fn own_sensible_h(&self, t: f64) -> Option<Result<f64, GasError>> {
        let d = self.species_data()?;
        let h = |t: f64| -> Result<f64, GasError> {
            if !(t >= d.t_min && t <= d.t_max) {
                return Err(GasError::OutOfRange {
                    t,
                    min: d.t_min,
                    max: d.t_max,
                    model: "fuel polynomial",
                });
            }
            let a = if t <= d.t_mid { &d.low } else { &d.high };
            Ok(R_UNIVERSAL * Polynomial::h_of(a, t, t.ln()) / d.molar_mass)
        };
        Some(h(t).and_then(|ht| Ok(ht - h(super::T_REFERENCE)?)))
    }

    /// The formula as written, e.g. "C1H1.92", "H2", "C2H6O".
    pub fn formula(&self) -> String {
        let mut out = String::new();
        for (sym, v) in [("C", self.c), ("H", self.h), ("O", self.o), ("N", self.n)] {
            if v > 0.0 {
                out.push_str(sym);
                out.push_str(&crate::report::sig(v, 6));
            }
        }
        out
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
    air[index(Species::O2)] * fuel.molar_mass() / fuel.oxygen_demand()
}

fn dry_air_kmol_per_kg() -> &'static [f64; SPECIES_COUNT] {
    // Computed once: every mixture and every burner trial starts from it.
    static N: std::sync::OnceLock<[f64; SPECIES_COUNT]> = std::sync::OnceLock::new();
    N.get_or_init(dry_air_kmol_per_kg_uncached)
}

fn dry_air_kmol_per_kg_uncached() -> [f64; SPECIES_COUNT] {
    let sum: f64 = X_DRY_AIR.iter().map(|(_, x)| x).sum();
    let m_air: f64 = X_DRY_AIR
        .iter()
        .map(|(s, x)| x / sum * s.molar_mass())
        .sum();
    let mut n = [0.0; SPECIES_COUNT];
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
    /// Kmol of each species per kg of dry air beyond the complete products
    /// (dissociation of products in equilibrium, or a stream that mixed
    /// the products of another fuel); zero for complete products. Conserves
    /// every element.
    pub shift: [f64; SPECIES_COUNT],
}

impl Composition {
    /// Dry air.
    pub fn dry_air() -> Composition {
        Composition {
            far: 0.0,
            war: 0.0,
            fuel: Fuel::KEROSENE,
            shift: [0.0; SPECIES_COUNT],
        }
    }

    /// Whether any species differs from the complete products.
    pub fn is_shifted(&self) -> bool {
        self.shift.iter().any(|x| *x != 0.0)
    }

    /// Two streams mixed by their dry-air flows: species moles per kg of
    /// dry air are linear, so the mix is exact whatever fuels each burnt
    /// (the first fuelled stream's fuel names the mix; what the other
    /// fuel's products differ by is carried in the shift).
    pub fn mix(a: &Composition, air_a: f64, b: &Composition, air_b: f64) -> Composition {
        let total = air_a + air_b;
        let (wa, wb) = (air_a / total, air_b / total);
        let far = a.far * wa + b.far * wb;
        let war = a.war * wa + b.war * wb;
        let fuel = if a.far > 0.0 || b.far == 0.0 {
            a.fuel
        } else {
            b.fuel
        };
        let (na, nb) = (a.builder().kmol, b.builder().kmol);
        let base = Composition {
            far,
            war,
            fuel,
            shift: [0.0; SPECIES_COUNT],
        }
        .builder()
        .kmol;
        let mut shift = [0.0; SPECIES_COUNT];
        for k in 0..SPECIES_COUNT {
            let d = na[k] * wa + nb[k] * wb - base[k];
            // Round-off of identical compositions is no shift.
            shift[k] = if d.abs() <= 1e-15 * (na[k].abs() + nb[k].abs()) {
                0.0
            } else {
                d
            };
        }
        Composition {
            far,
            war,
            fuel,
            shift,
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

    /// Lean products of burning `fuel` to a total fuel-air ratio `far` in
    /// this stream. Products of another fuel already in the stream are
    /// kept as they are (the difference goes in the shift).
    pub fn burnt(self, far: f64, fuel: Fuel) -> Result<Composition, GasError> {
        let mut c = Composition { far, fuel, ..self };
        if self.far > 0.0 && self.fuel != fuel {
            let (old, new) = (self.fuel.products_per_kmol(), fuel.products_per_kmol());
            let (na, nb) = (
                self.far / self.fuel.molar_mass(),
                self.far / fuel.molar_mass(),
            );
            for k in 0..SPECIES_COUNT {
                c.shift[k] += na * old[k] - nb * new[k];
            }
        }
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
        let mut kmol = *dry_air_kmol_per_kg();
        let nf = self.far / self.fuel.molar_mass();
        let per = self.fuel.products_per_kmol();
        for k in 0..SPECIES_COUNT {
            kmol[k] += nf * per[k] + self.shift[k];
        }
        kmol[index(Species::H2O)] += self.war / Species::H2O.molar_mass();
        MixtureBuilder { kmol }
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
        let mut dn = self.fuel.products_per_kmol();
        for d in &mut dn {
            *d /= mf;
        }
        // Each species' molar enthalpy at the reference temperature, once.
        static H_REF: std::sync::OnceLock<[f64; SPECIES_COUNT]> = std::sync::OnceLock::new();
        let h_ref = H_REF.get_or_init(|| {
            let t_ref = super::T_REFERENCE;
            let mut out = [0.0; SPECIES_COUNT];
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
        let dissociated = self.shift[index(Species::CO)..].iter().any(|x| *x != 0.0);
        let label = match (self.far > 0.0, self.war > 0.0, dissociated) {
            (false, false, _) => "dry air",
            (false, true, _) => "humid air",
            (true, _, false) => "combustion products",
            (true, _, true) => "combustion products (equilibrium at the burner)",
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
