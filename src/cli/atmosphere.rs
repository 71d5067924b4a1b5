//! `stationwise atmosphere`: the standard atmosphere at a list of altitudes.

use super::{Failure, OutFormat, Units, print_table};
use crate::atmosphere::{self, AltitudeKind};
use crate::report::{Cell, Column, Table};
use crate::units::{self, Quantity, UnitSystem};

/// Altitudes are geopotential unless --geometric (Earth radius 6356766 m, as the standard uses).
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// Altitudes, in metres (feet with --units us): values and ranges, comma
    /// separated (FROM:TO:STEP a step that must land on TO, FROM:TO@N N points).
    #[arg(long, allow_hyphen_values = true)]
    altitude: String,
    /// Hot- or cold-day temperature offset from standard ("15 K", "27 degF"; a bare number is K, or degF with --units us).
    #[arg(long, default_value = "0 K", allow_hyphen_values = true)]
    offset: String,
    /// Altitudes are geometric (height above sea level) instead of geopotential.
    #[arg(long)]
    geometric: bool,
    /// Unit set for input altitudes and output values.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
    /// Output format.
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let system: UnitSystem = a.units.into();
    let alts = crate::table::parse_list(&a.altitude)
        .map_err(|e| Failure::bad(format!("--altitude: {e}")))?;
    // A bare offset follows the unit set, as bare altitudes do.
    let offset_text = if system == UnitSystem::Us && a.offset.trim().parse::<f64>().is_ok() {
        format!("{} degF", a.offset.trim())
    } else {
        a.offset.clone()
    };
    let offset = units::parse(&offset_text, Quantity::TemperatureDifference, "--offset")
        .map_err(Failure::bad)?
        .si;
    if let Some(b) = crate::book::bounds::of("ambient", "offset", Quantity::TemperatureDifference)
        && !b.holds(offset)
    {
        return Err(Failure::bad(format!(
            "--offset {}: must be {} ({})",
            a.offset.trim(),
            b.describe(Quantity::TemperatureDifference),
            b.why
        )));
    }
    let kind = if a.geometric {
        AltitudeKind::Geometric
    } else {
        AltitudeKind::Geopotential
    };
    // JSON: plain SI under fixed keys that name the SI unit, whatever
    // --units; text and CSV: display units, the unit in the header.
    let json = a.format == OutFormat::Json;
    let shown_system = if json { UnitSystem::Si } else { system };
    let qs = [
        ("altitude", "altitude_m", Quantity::Length),
        ("temperature", "temperature_k", Quantity::Temperature),
        ("pressure", "pressure_pa", Quantity::Pressure),
        ("density", "density_kg_m3", Quantity::Density),
        ("sound_speed", "sound_speed_m_s", Quantity::Velocity),
    ];
    let unit_of = |sys: UnitSystem, q: Quantity| match (sys, q) {
        (UnitSystem::Si, Quantity::Length) => units::find_unit("m"),
        (UnitSystem::Si, Quantity::Pressure) => units::find_unit("Pa"),
        (UnitSystem::Us, Quantity::Length) => units::find_unit("ft"),
        _ => Some(units::display_unit(q, sys)),
    };
    let mut cols = Vec::new();
    let mut unit_list = Vec::new();
    for (name, si_key, q) in qs {
        let u = unit_of(shown_system, q)
            .ok_or_else(|| Failure::bad("internal: unit table incomplete"))?;
        let key = if json { si_key } else { name };
        cols.push(Column::new(key, name, u.symbol));
        unit_list.push(u);
    }
    // Bare altitudes are read in the chosen unit set's length unit.
    let input_unit = unit_of(system, Quantity::Length)
        .ok_or_else(|| Failure::bad("internal: unit table incomplete"))?;
    let mut t = Table::new(cols);
    for h in alts {
        let h_si = units::to_si(h, input_unit);
        let s = atmosphere::standard(h_si, kind, offset).map_err(Failure::bad)?;
        let vals = [
            h_si,
            s.temperature_k,
            s.pressure_pa,
            s.density_kg_m3,
            s.sound_speed_m_s,
        ];
        t.rows.push(
            vals.iter()
                .zip(&unit_list)
                .map(|(v, u)| Cell::from(units::from_si(*v, u)))
                .collect(),
        );
    }
    print_table(&t, a.format)?;
    Ok(0)
}
