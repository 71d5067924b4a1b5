//! `stationwise explain`: the relations and numbers behind a station.

use super::common;
use super::{Failure, Units};
use std::path::PathBuf;

/// Print every step that derived the station's values.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// The station name, or `summary` for the summary figures.
    station: String,
    /// Display units.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    if a.station == "summary" && engine.station_index("summary").is_none() {
        for l in crate::present::summary_explanation(&engine, a.units.into()) {
            println!("{l}");
        }
        return Ok(if engine.problems().is_empty() { 0 } else { 2 });
    }
    if engine.station_index(&a.station).is_none() {
        let names: Vec<&str> = engine.stations().iter().map(|s| s.name.as_str()).collect();
        return Err(Failure::bad(format!(
            "no station named \"{}\" in {}; its stations are {} (or `summary`)",
            a.station,
            a.file.display(),
            names.join(", ")
        )));
    }
    let ls =
        crate::present::explanation(&engine, &a.station, a.units.into()).map_err(|e| Failure {
            message: format!("station {}: {e}", a.station),
            code: 2,
        })?;
    for l in ls {
        println!("{l}");
    }
    Ok(0)
}
