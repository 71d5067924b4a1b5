//! Moist air: the saturation pressure of water and the specific humidity
//! of air at a relative humidity.
//!
//! Saturation pressure by the Hyland-Wexler equations (over liquid water
//! from 273.15 K, over ice below), as given in the ASHRAE Handbook of
//! Fundamentals, chapter 1 (coefficients from memory), valid from 173.15 K
//! to 473.15 K; outside that range it is an error, not an extrapolation.
//! Specific humidity q = eps e / (p - (1 - eps) e), eps = 18.015268 /
//! 28.966 = 0.621945 (ratio of the molar masses of water and dry air).

/// Ratio of the molar masses of water and dry air.
pub const EPSILON: f64 = 0.621_945;

/// Saturation pressure of water vapour (Pa) at `t` (K): over liquid water
/// at and above 273.15 K, over ice below; an error outside 173.15 K to
/// 473.15 K.
pub fn saturation_pressure(t: f64) -> Result<f64, String> {
    if !(173.15..=473.15).contains(&t) {
        return Err(format!(
            "{t:.2} K is outside the range of the saturation-pressure equations (173.15 K to 473.15 K)"
        ));
    }
    let ln = if t >= 273.15 {
        -5.800_220_6e3 / t + 1.391_499_3 - 4.864_023_9e-2 * t + 4.176_476_8e-5 * t * t
            - 1.445_209_3e-8 * t.powi(3)
            + 6.545_967_3 * t.ln()
    } else {
        -5.674_535_9e3 / t + 6.392_524_7 - 9.677_843e-3 * t
            + 6.221_570_1e-7 * t * t
            + 2.074_782_5e-9 * t.powi(3)
            - 9.484_024e-13 * t.powi(4)
            + 4.163_501_9 * t.ln()
    };
    Ok(ln.exp())
}

/// Specific humidity (kg vapour per kg moist air) of air at pressure `p`
/// (Pa) holding vapour at partial pressure `e` (Pa).
pub fn specific_humidity(e: f64, p: f64) -> f64 {
    EPSILON * e / (p - (1.0 - EPSILON) * e)
}

/// Specific humidity at relative humidity `rh` (0 to 1), temperature `t`
/// (K) and pressure `p` (Pa); an error above saturation or where the
/// vapour would reach the total pressure.
pub fn from_relative(rh: f64, t: f64, p: f64) -> Result<f64, String> {
    if !(0.0..=1.0).contains(&rh) {
        return Err(format!(
            "relative humidity {:.1} % is outside 0 to 100 % (above 100 % the air is supersaturated)",
            rh * 100.0
        ));
    }
    let e = rh * saturation_pressure(t)?;
    if e >= p {
        return Err(format!(
            "the vapour pressure {e:.0} Pa reaches the air's pressure {p:.0} Pa: water boils"
        ));
    }
    Ok(specific_humidity(e, p))
}

/// The saturated specific humidity at `t`, `p` (for the check of a
/// given specific humidity).
pub fn saturated(t: f64, p: f64) -> Result<f64, String> {
    let e = saturation_pressure(t)?;
    if e >= p {
        return Ok(1.0);
    }
    Ok(specific_humidity(e, p))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn saturation_pressure_against_table_values() {
        // ASHRAE Handbook of Fundamentals, chapter 1, table of saturated
        // air (from memory): 0.01 degC 611.65 Pa (the triple point), 20 degC
        // 2339.3 Pa, 30 degC 4246.7 Pa, 100 degC 101418 Pa (above 1 atm by
        // the 99.97 degC boiling point), -20 degC over ice 103.26 Pa.
        for (t, p) in [
            (273.16, 611.65),
            (293.15, 2339.3),
            (303.15, 4246.7),
            (373.15, 101_418.0),
            (253.15, 103.26),
        ] {
            let got = saturation_pressure(t).unwrap();
            // The table values are recalled to four or five figures.
            assert!((got / p - 1.0).abs() < 5e-4, "{t} K: {got} vs {p}");
        }
        assert!(saturation_pressure(150.0).is_err());
    }
}
