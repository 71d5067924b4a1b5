//! The standard atmosphere (ISO 2533, identical to the U.S. Standard
//! Atmosphere 1976 up to 86 km geometric) and the standard-day corrections
//! test engineers use: theta, delta, corrected flow and corrected speed.
//!
//! # Model
//!
//! The atmosphere is a stack of layers in *geopotential* altitude. Each
//! layer has a linear molecular-scale temperature, and its pressure follows
//! from hydrostatic balance of a perfect gas:
//!
//! - isothermal layer: `p = pb exp(-g0 (H - Hb) / (R Tb))`
//! - gradient layer: `p = pb (Tb / T)^(g0 / (R L))`
//!
//! Only the sea-level values (288.15 K, 101325 Pa), the layer base
//! altitudes and the lapse rates are data. Every base temperature and base
//! pressure is derived from these on first use, so the layers join without a
//! step by construction.
//!
//! Geometric altitude `z` and geopotential altitude `H` are related through
//! the standard's effective Earth radius `r0 = 6356766 m`:
//! `H = r0 z / (r0 + z)`.
//!
//! # Invariants
//!
//! - Valid from -5 km to 86 km *geometric* (-5003.94 m to 84852.05 m
//!   geopotential). Outside that range a call returns an error, not an
//!   extrapolated value.
//! - Above 80 km geometric the standard's kinetic temperature is the
//!   molecular-scale temperature times the molecular-weight ratio M/M0,
//!   which falls to 0.999579 at 86 km. [`AtmosphereState::temperature_k`]
//!   is the kinetic temperature. Pressure, density and the speed of sound
//!   come from the molecular-scale temperature, as the standard has it, and
//!   so match its tables. Below 80 km the two temperatures are the same.
//! - A temperature offset (hot or cold day, "ISA +15 K") follows the
//!   *pressure-altitude* convention: temperature shifts by the offset and
//!   pressure stays the standard pressure at that altitude. Density and the
//!   speed of sound follow from the shifted temperature.
//! - All inputs and outputs are SI: m, K, Pa, kg/m3, m/s, kg/s, rad/s.
//!   Nothing here panics on any input.

use std::fmt;
use std::sync::LazyLock;

use thiserror::Error;

/// Sea-level standard temperature, K (defining value).
pub const SEA_LEVEL_TEMPERATURE_K: f64 = 288.15;
/// Sea-level standard pressure, Pa (defining value).
pub const SEA_LEVEL_PRESSURE_PA: f64 = 101_325.0;
/// Standard acceleration of gravity, m/s2 (defining value).
pub const G0: f64 = 9.806_65;
/// Universal gas constant as the 1976 standard and ISO 2533 give it,
/// J/(kmol K). It differs slightly from today's CODATA value (8314.462).
/// The standard's tables were computed with this one.
pub const R_STAR: f64 = 8314.32;
/// Molar mass of sea-level air, kg/kmol, as ISO 2533 gives it (from
/// memory). The 1976 U.S. standard rounds it to 28.9644, which would give
/// R = 287.0531 J/kg/K, 7e-7 relative away and well inside table rounding.
pub const MOLAR_MASS_AIR: f64 = 28.964_42;
/// Specific gas constant of air, J/kg/K: `R_STAR / MOLAR_MASS_AIR` as
/// ISO 2533 prints it (from memory).
pub const R_AIR: f64 = 287.052_87;
/// Ratio of specific heats of air used by the standard for the speed of
/// sound.
pub const GAMMA: f64 = 1.4;
/// Sea-level standard density, kg/m3: `p0 / (R T0)`, 1.2250.
pub const SEA_LEVEL_DENSITY: f64 = SEA_LEVEL_PRESSURE_PA / (R_AIR * SEA_LEVEL_TEMPERATURE_K);
/// The standard's effective Earth radius for the geopotential relation, m.
pub const EARTH_RADIUS_M: f64 = 6_356_766.0;
/// Lowest geometric altitude the standard covers, m.
pub const MIN_GEOMETRIC_M: f64 = -5000.0;
/// Highest geometric altitude this model covers, m (the top of the
/// standard's lower atmosphere).
pub const MAX_GEOMETRIC_M: f64 = 86_000.0;

/// Layer bases, geopotential m, and the lapse rate above each, K/m. These,
/// with the sea-level values, are the standard's defining data.
const LAYER_DEFINITION: [(f64, f64); 7] = [
    (0.0, -6.5e-3),
    (11_000.0, 0.0),
    (20_000.0, 1.0e-3),
    (32_000.0, 2.8e-3),
    (47_000.0, 0.0),
    (51_000.0, -2.8e-3),
    (71_000.0, -2.0e-3),
];

/// Molecular-weight ratio M/M0 of the 1976 standard, every 0.5 km of
/// geometric altitude from 80 km to 86 km (from memory). An error of a few
/// units in the sixth decimal would move the kinetic temperature by under
/// 0.001 K.
const MOLECULAR_WEIGHT_RATIO: [f64; 13] = [
    1.000_000, 0.999_996, 0.999_988, 0.999_969, 0.999_938, 0.999_904, 0.999_864, 0.999_822,
    0.999_778, 0.999_731, 0.999_681, 0.999_629, 0.999_579,
];
const RATIO_START_M: f64 = 80_000.0;
const RATIO_STEP_M: f64 = 500.0;

/// Which altitude a number is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum AltitudeKind {
    /// Geopotential altitude H: the height in a uniform g0 field with the
    /// same potential energy. The standard's layers are defined in it.
    Geopotential,
    /// Geometric altitude z: height above mean sea level, as on a map.
    Geometric,
}

impl fmt::Display for AltitudeKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            AltitudeKind::Geopotential => "geopotential",
            AltitudeKind::Geometric => "geometric",
        })
    }
}

/// The standard atmosphere at one altitude, possibly with a temperature
/// offset.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AtmosphereState {
    /// Geopotential altitude, m.
    pub geopotential_m: f64,
    /// Geometric altitude, m.
    pub geometric_m: f64,
    /// Static (kinetic) temperature including the offset, K.
    pub temperature_k: f64,
    /// Static pressure, Pa. The offset does not change it.
    pub pressure_pa: f64,
    /// Density, kg/m3.
    pub density_kg_m3: f64,
    /// Speed of sound, m/s.
    pub sound_speed_m_s: f64,
    /// The temperature offset applied, K.
    pub offset_k: f64,
}

/// Why a standard-atmosphere value could not be given.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum AtmosphereError {
    /// The altitude is outside -5 km to 86 km geometric.
    #[error(
        "altitude {} m {kind} is outside the standard atmosphere, which covers \
         {} m to {} m {kind}",
        show(*.altitude_m), show(*.min_m), show(*.max_m)
    )]
    OutOfRange {
        /// The altitude asked for, m.
        altitude_m: f64,
        /// Lowest altitude of this kind, m.
        min_m: f64,
        /// Highest altitude of this kind, m.
        max_m: f64,
        /// The kind of altitude asked for.
        kind: AltitudeKind,
    },
    /// An input was NaN or infinite.
    #[error("{what} is not a finite number ({value})")]
    NotFinite {
        /// Which input: "altitude", "temperature offset" or "pressure".
        what: &'static str,
        /// The value given.
        value: f64,
    },
    /// The offset takes the temperature to or below absolute zero.
    #[error(
        "a temperature offset of {} K takes the standard temperature of {} K \
         to {} K, which is not above absolute zero",
        show(*.offset_k), show(*.standard_k), show(*.temperature_k)
    )]
    BelowAbsoluteZero {
        /// The offset given, K.
        offset_k: f64,
        /// The standard temperature at the altitude, K.
        standard_k: f64,
        /// Standard temperature plus offset, K.
        temperature_k: f64,
    },
    /// The pressure is not one the standard atmosphere reaches between
    /// -5 km and 86 km.
    #[error(
        "pressure {} Pa is outside the standard atmosphere, which covers \
         {} Pa (86 km) to {} Pa (-5 km)",
        show(*.pressure_pa), show(*.min_pa), show(*.max_pa)
    )]
    PressureOutOfRange {
        /// The pressure given, Pa.
        pressure_pa: f64,
        /// Pressure at 86 km geometric, Pa.
        min_pa: f64,
        /// Pressure at -5 km geometric, Pa.
        max_pa: f64,
    },
}

/// A number for a message: six significant digits, no trailing zeros.
fn show(value: f64) -> String {
    if !value.is_finite() || value == 0.0 {
        return format!("{value}");
    }
    let magnitude = value.abs().log10().floor();
    if !(-4.0..9.0).contains(&magnitude) {
        return format!("{value:.5e}");
    }
    let decimals = (5.0 - magnitude).max(0.0) as usize;
    let text = format!("{value:.decimals$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

/// One layer, with its base temperature and pressure already derived.
#[derive(Debug, Clone, Copy)]
struct Layer {
    base_m: f64,
    lapse_k_per_m: f64,
    base_t_k: f64,
    base_p_pa: f64,
}

impl Layer {
    /// Molecular-scale temperature at geopotential `h`, K.
    fn temperature(&self, h: f64) -> f64 {
        self.base_t_k + self.lapse_k_per_m * (h - self.base_m)
    }

    /// Pressure at geopotential `h`, Pa, from hydrostatic balance.
    fn pressure(&self, h: f64) -> f64 {
        if self.lapse_k_per_m == 0.0 {
            self.base_p_pa * (-G0 * (h - self.base_m) / (R_AIR * self.base_t_k)).exp()
        } else {
            let exponent = G0 / (R_AIR * self.lapse_k_per_m);
            self.base_p_pa * (self.base_t_k / self.temperature(h)).powf(exponent)
        }
    }

    /// Geopotential altitude at which this layer's pressure is `p`, m.
    fn altitude_at(&self, p: f64) -> f64 {
        if self.lapse_k_per_m == 0.0 {
            self.base_m - R_AIR * self.base_t_k / G0 * (p / self.base_p_pa).ln()
        } else {
            let t = self.base_t_k * (p / self.base_p_pa).powf(-R_AIR * self.lapse_k_per_m / G0);
            self.base_m + (t - self.base_t_k) / self.lapse_k_per_m
        }
    }
}

static LAYERS: LazyLock<[Layer; 7]> = LazyLock::new(|| {
    let mut layers = [Layer {
        base_m: 0.0,
        lapse_k_per_m: LAYER_DEFINITION[0].1,
        base_t_k: SEA_LEVEL_TEMPERATURE_K,
        base_p_pa: SEA_LEVEL_PRESSURE_PA,
    }; 7];
    for i in 1..layers.len() {
        let below = layers[i - 1];
        let (base_m, lapse_k_per_m) = LAYER_DEFINITION[i];
        layers[i] = Layer {
            base_m,
            lapse_k_per_m,
            base_t_k: below.temperature(base_m),
            base_p_pa: below.pressure(base_m),
        };
    }
    layers
});

/// The layer holding geopotential `h`; below sea level, the first layer.
fn layer_at(h: f64) -> &'static Layer {
    let layers: &'static [Layer; 7] = &LAYERS;
    let index = layers.iter().rposition(|l| l.base_m <= h).unwrap_or(0);
    &layers[index]
}

/// M/M0 at geometric `z`: 1 up to 80 km, then interpolated in the
/// standard's table.
fn molecular_weight_ratio(z: f64) -> f64 {
    if z <= RATIO_START_M {
        return 1.0;
    }
    let last = MOLECULAR_WEIGHT_RATIO.len() - 1;
    let position = ((z - RATIO_START_M) / RATIO_STEP_M).clamp(0.0, last as f64);
    let i = (position.floor() as usize).min(last - 1);
    let fraction = position - i as f64;
    MOLECULAR_WEIGHT_RATIO[i]
        + fraction * (MOLECULAR_WEIGHT_RATIO[i + 1] - MOLECULAR_WEIGHT_RATIO[i])
}

/// Geopotential altitude of geometric altitude `z`: `r0 z / (r0 + z)`, m.
pub fn geometric_to_geopotential(z: f64) -> f64 {
    EARTH_RADIUS_M * z / (EARTH_RADIUS_M + z)
}

/// Geometric altitude of geopotential altitude `h`: `r0 h / (r0 - h)`, m.
pub fn geopotential_to_geometric(h: f64) -> f64 {
    EARTH_RADIUS_M * h / (EARTH_RADIUS_M - h)
}

/// The valid altitude range for a kind of altitude, m: -5 km to 86 km
/// geometric, or the same two heights in geopotential altitude.
pub fn altitude_range(kind: AltitudeKind) -> (f64, f64) {
    match kind {
        AltitudeKind::Geometric => (MIN_GEOMETRIC_M, MAX_GEOMETRIC_M),
        AltitudeKind::Geopotential => (
            geometric_to_geopotential(MIN_GEOMETRIC_M),
            geometric_to_geopotential(MAX_GEOMETRIC_M),
        ),
    }
}

/// The standard atmosphere at `altitude_m` of the given kind, with the
/// temperature shifted by `offset_k` (0 for a standard day).
pub fn standard(
    altitude_m: f64,
    kind: AltitudeKind,
    offset_k: f64,
) -> Result<AtmosphereState, AtmosphereError> {
    if !altitude_m.is_finite() {
        return Err(AtmosphereError::NotFinite {
            what: "altitude",
            value: altitude_m,
        });
    }
    if !offset_k.is_finite() {
        return Err(AtmosphereError::NotFinite {
            what: "temperature offset",
            value: offset_k,
        });
    }
    let (min_m, max_m) = altitude_range(kind);
    if !(min_m..=max_m).contains(&altitude_m) {
        return Err(AtmosphereError::OutOfRange {
            altitude_m,
            min_m,
            max_m,
            kind,
        });
    }
    let (h, z) = match kind {
        AltitudeKind::Geopotential => (altitude_m, geopotential_to_geometric(altitude_m)),
        AltitudeKind::Geometric => (geometric_to_geopotential(altitude_m), altitude_m),
    };
    let layer = layer_at(h);
    let molecular_t = layer.temperature(h);
    let kinetic_t = molecular_t * molecular_weight_ratio(z);
    let temperature_k = kinetic_t + offset_k;
    let gas_t = molecular_t + offset_k;
    if temperature_k <= 0.0 || gas_t <= 0.0 {
        return Err(AtmosphereError::BelowAbsoluteZero {
            offset_k,
            standard_k: kinetic_t,
            temperature_k,
        });
    }
    let pressure_pa = layer.pressure(h);
    Ok(AtmosphereState {
        geopotential_m: h,
        geometric_m: z,
        temperature_k,
        pressure_pa,
        density_kg_m3: pressure_pa / (R_AIR * gas_t),
        sound_speed_m_s: (GAMMA * R_AIR * gas_t).sqrt(),
        offset_k,
    })
}

/// The pressure altitude of a static pressure: the geopotential altitude,
/// m, at which the standard atmosphere has that pressure.
pub fn pressure_altitude(pressure_pa: f64) -> Result<f64, AtmosphereError> {
    if !pressure_pa.is_finite() {
        return Err(AtmosphereError::NotFinite {
            what: "pressure",
            value: pressure_pa,
        });
    }
    let (h_min, h_max) = altitude_range(AltitudeKind::Geopotential);
    let max_pa = layer_at(h_min).pressure(h_min);
    let min_pa = layer_at(h_max).pressure(h_max);
    if !(min_pa..=max_pa).contains(&pressure_pa) {
        return Err(AtmosphereError::PressureOutOfRange {
            pressure_pa,
            min_pa,
            max_pa,
        });
    }
    let layers: &'static [Layer; 7] = &LAYERS;
    // Pressure falls with altitude: the layer is the highest whose base
    // pressure is at least p.
    let index = layers
        .iter()
        .rposition(|l| l.base_p_pa >= pressure_pa)
        .unwrap_or(0);
    Ok(layers[index].altitude_at(pressure_pa))
}

/// Temperature ratio to the sea-level standard: `tt / 288.15`.
/// Dynamic viscosity of air by Sutherland's law with the U.S. Standard
/// Atmosphere 1976 constants (beta 1.458e-6 kg/(m s K^0.5), S 110.4 K),
/// Pa s: 1.7894e-5 at 288.15 K.
pub fn air_viscosity(t_k: f64) -> f64 {
    1.458e-6 * t_k.powf(1.5) / (t_k + 110.4)
}

/// Temperature ratio to the standard sea-level value.
pub fn theta(tt_k: f64) -> f64 {
    tt_k / SEA_LEVEL_TEMPERATURE_K
}

/// Pressure ratio to the sea-level standard: `pt / 101325`.
pub fn delta(pt_pa: f64) -> f64 {
    pt_pa / SEA_LEVEL_PRESSURE_PA
}

/// Mass flow corrected to sea-level standard inlet conditions,
/// `w sqrt(theta) / delta`, kg/s. Callers pass validated, positive
/// temperature and pressure; otherwise the result is not finite.
pub fn corrected_flow(w_kg_s: f64, tt_k: f64, pt_pa: f64) -> f64 {
    corrected_flow_to(
        w_kg_s,
        tt_k,
        pt_pa,
        (SEA_LEVEL_TEMPERATURE_K, SEA_LEVEL_PRESSURE_PA),
    )
}

/// Mass flow corrected to a reference total temperature and pressure
/// `(t_ref, p_ref)`: `w sqrt(Tt/t_ref) / (pt/p_ref)`, kg/s. The one formula
/// of corrected flow: grid, figures and explanations all call it.
pub fn corrected_flow_to(w_kg_s: f64, tt_k: f64, pt_pa: f64, reference: (f64, f64)) -> f64 {
    w_kg_s * (tt_k / reference.0).sqrt() / (pt_pa / reference.1)
}

/// Shaft speed corrected to sea-level standard inlet temperature,
/// `n / sqrt(theta)`, in the unit of `n` (rad/s inside stationwise).
pub fn corrected_speed(n_rad_s: f64, tt_k: f64) -> f64 {
    n_rad_s / theta(tt_k).sqrt()
}

#[cfg(test)]
#[allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    use AltitudeKind::{Geometric, Geopotential};

    /// Assert `value` matches a printed table entry to within one unit of
    /// its last printed digit (`unit`), allowing for the table's rounding.
    fn table(value: f64, printed: f64, unit: f64, what: &str) {
        assert!(
            (value - printed).abs() <= unit,
            "{what}: computed {value}, table {printed} (+/- {unit})"
        );
    }

    #[test]
    fn defining_constants_agree() {
        // R = R* / M: 8314.32 / 28.96442 = 287.05287 (ISO 2533, from memory),
        // to the last printed digit.
        table(R_STAR / MOLAR_MASS_AIR, R_AIR, 1e-5, "R");
        // Sea-level density 1.2250 kg/m3 (1976 standard table, from memory).
        table(SEA_LEVEL_DENSITY, 1.2250, 1e-4, "rho0");
    }

    #[test]
    fn derived_layer_bases_match_the_standard() {
        // Base temperatures of the standard's layers, K (from memory): they
        // must come out of the lapse rates alone.
        let expected = [288.15, 216.65, 216.65, 228.65, 270.65, 270.65, 214.65];
        for (layer, t) in LAYERS.iter().zip(expected) {
            assert_relative_eq!(layer.base_t_k, t, max_relative = 1e-12);
        }
    }

    /// Rows of the U.S. Standard Atmosphere 1976 table by geopotential
    /// altitude (from memory): H m, T K, p Pa (unit of last digit),
    /// density kg/m3 (unit of last digit; 0 = not checked).
    const GEOPOTENTIAL_ROWS: [(f64, f64, f64, f64, f64, f64); 7] = [
        (0.0, 288.15, 101_325.0, 1.0, 1.2250, 1e-4),
        (11_000.0, 216.65, 22_632.0, 1.0, 0.363_92, 1e-5),
        (20_000.0, 216.65, 5474.9, 0.1, 0.088_03, 1e-5),
        (32_000.0, 228.65, 868.02, 0.01, 0.0, 0.0),
        (47_000.0, 270.65, 110.91, 0.01, 0.0, 0.0),
        (51_000.0, 270.65, 66.939, 0.001, 0.0, 0.0),
        (71_000.0, 214.65, 3.9564, 1e-4, 0.0, 0.0),
    ];

    #[test]
    fn geopotential_table_rows() {
        for (h, t, p, p_unit, rho, rho_unit) in GEOPOTENTIAL_ROWS {
            let s = standard(h, Geopotential, 0.0).unwrap();
            table(s.temperature_k, t, 0.01, &format!("T at {h}"));
            table(s.pressure_pa, p, p_unit, &format!("p at {h}"));
            if rho_unit > 0.0 {
                table(s.density_kg_m3, rho, rho_unit, &format!("rho at {h}"));
            }
        }
    }

    #[test]
    fn sound_speed_table_values() {
        // 340.29 m/s at sea level, 295.07 m/s at 11 km geopotential
        // (1976 standard table, from memory).
        table(
            standard(0.0, Geopotential, 0.0).unwrap().sound_speed_m_s,
            340.29,
            0.01,
            "a0",
        );
        table(
            standard(11_000.0, Geopotential, 0.0)
                .unwrap()
                .sound_speed_m_s,
            295.07,
            0.01,
            "a 11 km",
        );
    }

    #[test]
    fn geometric_table_rows() {
        // 1976 standard table by geometric altitude (from memory).
        let s = standard(11_000.0, Geometric, 0.0).unwrap();
        table(s.temperature_k, 216.77, 0.01, "T 11 km geometric");
        table(s.pressure_pa, 22_700.0, 1.0, "p 11 km geometric"); // 2.2700E+04
        table(s.density_kg_m3, 0.364_80, 1e-5, "rho 11 km geometric");

        let s = standard(80_000.0, Geometric, 0.0).unwrap();
        table(s.temperature_k, 198.64, 0.01, "T 80 km");
        table(s.pressure_pa, 1.0524, 1e-4, "p 80 km");
        table(s.density_kg_m3, 1.8458e-5, 1e-9, "rho 80 km");

        // At 86 km the kinetic temperature is below the molecular-scale
        // 186.946 K by the factor M/M0 = 0.999579.
        let s = standard(86_000.0, Geometric, 0.0).unwrap();
        table(s.temperature_k, 186.87, 0.01, "T 86 km");
        table(s.pressure_pa, 0.37338, 1e-5, "p 86 km");
        table(s.density_kg_m3, 6.958e-6, 1e-9, "rho 86 km");

        let s = standard(-5000.0, Geometric, 0.0).unwrap();
        table(s.temperature_k, 320.68, 0.01, "T -5 km");
        table(s.pressure_pa, 177_760.0, 10.0, "p -5 km"); // 1.7776E+05
        table(s.density_kg_m3, 1.9311, 1e-4, "rho -5 km");
    }

    #[test]
    fn geopotential_of_geometric() {
        // The standard's top: 86 km geometric is 84.852 km geopotential
        // (from memory, printed to the metre).
        assert!((geometric_to_geopotential(86_000.0) - 84_852.0).abs() < 0.5);
        // r0 z / (r0 + z) with r0 = 6356766 m: 11 km -> 10980.998 m.
        assert_relative_eq!(
            geometric_to_geopotential(11_000.0),
            10_980.998,
            max_relative = 1e-7
        );
        assert_eq!(geometric_to_geopotential(0.0), 0.0);
        assert!(geometric_to_geopotential(-5000.0) < -5000.0);
    }

    #[test]
    fn range_is_enforced() {
        assert!(standard(-5000.0, Geometric, 0.0).is_ok());
        assert!(standard(86_000.0, Geometric, 0.0).is_ok());
        assert!(standard(84_852.0, Geopotential, 0.0).is_ok());
        let e = standard(86_000.5, Geometric, 0.0).unwrap_err();
        assert_eq!(
            e,
            AtmosphereError::OutOfRange {
                altitude_m: 86_000.5,
                min_m: -5000.0,
                max_m: 86_000.0,
                kind: Geometric
            }
        );
        assert_eq!(
            e.to_string(),
            "altitude 86000.5 m geometric is outside the standard atmosphere, which \
             covers -5000 m to 86000 m geometric"
        );
        let e = standard(-5004.0, Geopotential, 0.0).unwrap_err();
        assert!(
            e.to_string().contains("-5003.94 m to 84852 m geopotential"),
            "{e}"
        );
        assert!(matches!(
            standard(85_000.0, Geopotential, 0.0),
            Err(AtmosphereError::OutOfRange { .. })
        ));
        for bad in [f64::NAN, f64::INFINITY] {
            assert!(matches!(
                standard(bad, Geometric, 0.0),
                Err(AtmosphereError::NotFinite {
                    what: "altitude",
                    ..
                })
            ));
            assert!(matches!(
                standard(0.0, Geometric, bad),
                Err(AtmosphereError::NotFinite {
                    what: "temperature offset",
                    ..
                })
            ));
        }
    }

    #[test]
    fn hot_day_keeps_pressure() {
        // ISA +15 K at sea level: 303.15 K, 101325 Pa,
        // rho = 101325 / (287.05287 x 303.15) = 1.16439 kg/m3,
        // a = sqrt(1.4 x 287.05287 x 303.15) = 349.039 m/s (hand computed).
        let s = standard(0.0, Geometric, 15.0).unwrap();
        assert_relative_eq!(s.temperature_k, 303.15, max_relative = 1e-12);
        assert_eq!(s.pressure_pa, 101_325.0);
        assert_relative_eq!(s.density_kg_m3, 1.164_39, max_relative = 1e-5);
        assert_relative_eq!(s.sound_speed_m_s, 349.039, max_relative = 1e-5);
        assert_eq!(s.offset_k, 15.0);
        let cold = standard(10_000.0, Geometric, -30.0).unwrap();
        let std_day = standard(10_000.0, Geometric, 0.0).unwrap();
        assert_eq!(cold.pressure_pa, std_day.pressure_pa);
        assert_relative_eq!(cold.temperature_k, std_day.temperature_k - 30.0);
        assert!(cold.density_kg_m3 > std_day.density_kg_m3);
    }

    #[test]
    fn offset_below_absolute_zero() {
        let e = standard(11_000.0, Geopotential, -300.0).unwrap_err();
        assert!(
            matches!(e, AtmosphereError::BelowAbsoluteZero { .. }),
            "{e:?}"
        );
        assert_eq!(
            e.to_string(),
            "a temperature offset of -300 K takes the standard temperature of \
             216.65 K to -83.35 K, which is not above absolute zero"
        );
    }

    #[test]
    fn pressure_altitude_known_points() {
        assert_eq!(pressure_altitude(101_325.0).unwrap(), 0.0);
        // 500 hPa is at 18289 ft, 5574 m, in the standard (from memory).
        let h = pressure_altitude(50_000.0).unwrap();
        assert!((h - 5574.4).abs() < 0.5, "{h}");
        // The 11 km base, from the table's 22632 Pa (rounded to 1 Pa, so
        // within about 0.2 m).
        let h = pressure_altitude(22_632.0).unwrap();
        assert!((h - 11_000.0).abs() < 0.5, "{h}");
        // Below sea level.
        assert!(pressure_altitude(105_000.0).unwrap() < 0.0);
    }

    #[test]
    fn pressure_altitude_refuses_what_the_standard_never_reaches() {
        for p in [0.0, -1.0, 0.1, 200_000.0] {
            let e = pressure_altitude(p).unwrap_err();
            assert!(
                matches!(e, AtmosphereError::PressureOutOfRange { .. }),
                "{p}: {e:?}"
            );
        }
        assert_eq!(
            pressure_altitude(0.0).unwrap_err().to_string(),
            "pressure 0 Pa is outside the standard atmosphere, which covers \
             0.373377 Pa (86 km) to 177762 Pa (-5 km)"
        );
        assert!(matches!(
            pressure_altitude(f64::NAN),
            Err(AtmosphereError::NotFinite {
                what: "pressure",
                ..
            })
        ));
    }

    #[test]
    fn layers_join_without_a_step() {
        for layer in LAYERS.iter().skip(1) {
            let h = layer.base_m;
            let below = standard(h - 1e-6, Geopotential, 0.0).unwrap();
            let above = standard(h + 1e-6, Geopotential, 0.0).unwrap();
            assert_relative_eq!(
                below.temperature_k,
                above.temperature_k,
                max_relative = 1e-9
            );
            assert_relative_eq!(below.pressure_pa, above.pressure_pa, max_relative = 1e-9);
        }
    }

    #[test]
    fn standard_day_corrections() {
        // At sea-level standard conditions corrections change nothing.
        assert_eq!(theta(288.15), 1.0);
        assert_eq!(delta(101_325.0), 1.0);
        assert_eq!(corrected_flow(100.0, 288.15, 101_325.0), 100.0);
        // 50 kg/s at 400 K, 200 kPa: 50 sqrt(400/288.15) / (200000/101325)
        // = 29.8454 kg/s; 1000 rad/s at 400 K: 848.749 rad/s (hand computed).
        assert_relative_eq!(
            corrected_flow(50.0, 400.0, 200_000.0),
            29.8454,
            max_relative = 1e-5
        );
        assert_relative_eq!(corrected_speed(1000.0, 400.0), 848.749, max_relative = 1e-6);
    }

    proptest! {
        #[test]
        fn pressure_altitude_inverts_standard(
            fraction in 0.0f64..=1.0,
        ) {
            let (lo, hi) = altitude_range(Geopotential);
            let h = lo + fraction * (hi - lo);
            let s = standard(h, Geopotential, 0.0).unwrap();
            let back = pressure_altitude(s.pressure_pa).unwrap();
            prop_assert!((back - h).abs() < 1e-5, "{h} -> {} Pa -> {back}", s.pressure_pa);
        }

        #[test]
        fn geometric_and_geopotential_invert(z in -5000.0f64..=86_000.0) {
            let h = geometric_to_geopotential(z);
            let back = geopotential_to_geometric(h);
            prop_assert!((back - z).abs() <= 1e-9 * z.abs().max(1.0));
            prop_assert!(h <= z + 1e-9);
        }

        #[test]
        fn pressure_falls_with_altitude(z in -5000.0f64..85_999.0, dz in 0.5f64..1000.0) {
            let z2 = (z + dz).min(MAX_GEOMETRIC_M);
            let low = standard(z, Geometric, 0.0).unwrap();
            let high = standard(z2, Geometric, 0.0).unwrap();
            prop_assert!(high.pressure_pa < low.pressure_pa);
            prop_assert!(high.density_kg_m3 < low.density_kg_m3);
        }
    }
}
