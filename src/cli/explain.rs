//! `stationwise explain`: the relations and numbers behind a station.

use super::common::{self, with_unit};
use super::{Failure, Units};
use crate::book::paths::STATION_KEYS;
use crate::units::UnitSystem;
use std::path::PathBuf;

/// Print every step that derived the station's values.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// The station name.
    station: String,
    /// Display units.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
}

/// The explanation as text lines.
pub fn lines(engine: &crate::engine::Engine, station: &str, system: UnitSystem) -> Result<Vec<String>, String> {
    let steps = engine.explain(station)?;
    let idx = engine.station_index(station).ok_or_else(|| format!("no station named \"{station}\""))?;
    let p = &engine.book().processes[engine.producer_of(idx)];
    let mut out = vec![format!(
        "station {station}: from {} \"{}\"{}",
        crate::engine::compute::kind_name(&p.kind),
        p.name,
        p.from.as_ref().map_or(String::new(), |f| format!(" (upstream station {f})"))
    )];
    for s in steps {
        out.push(format!("  {} = {}", s.what, with_unit(s.value, s.quantity, system)));
        out.push(format!("      {}", s.relation));
        if !s.inputs.is_empty() {
            let ins: Vec<String> = s
                .inputs
                .iter()
                .map(|(n, v, q)| format!("{n} = {}", with_unit(*v, *q, system)))
                .collect();
            out.push(format!("      with {}", ins.join(", ")));
        }
    }
    if let Some(v) = engine.station(station) {
        out.push("  values:".into());
        for (k, label, q) in STATION_KEYS {
            if let Some(x) = engine.station_key(v, k) {
                out.push(format!("    {label:<14} {}", with_unit(x, q, system)));
            }
        }
    }
    Ok(out)
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    let ls = lines(&engine, &a.station, a.units.into()).map_err(|e| Failure {
        message: format!("station {}: {e}", a.station),
        code: 2,
    })?;
    for l in ls {
        println!("{l}");
    }
    Ok(0)
}
