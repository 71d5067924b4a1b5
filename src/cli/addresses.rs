//! `stationwise addresses`: every path a workbook offers, so a user
//! writing `--report`, `--vary`, goals or channel maps need not guess.

use super::common;
use super::{Failure, OutFormat, Units};
use crate::report::{Cell, Column, Table};
use std::path::PathBuf;

/// List every address with its kind (given or derived), unit and value.
#[derive(Debug, clap::Args)]
pub(super) struct Args {
    /// The workbook file.
    file: PathBuf,
    /// Output format (JSON values are SI; the `unit` field names the SI unit).
    #[arg(long, value_enum, default_value_t = OutFormat::Text)]
    format: OutFormat,
    /// Display units for text and CSV.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    units: Units,
    /// Only the givens (what `sweep --vary`, goals and channels can name).
    #[arg(long)]
    givens: bool,
}

pub(super) fn run(a: Args) -> Result<u8, Failure> {
    let (_, engine) = common::open(&a.file)?;
    let json = a.format == OutFormat::Json;
    let system = a.units.into();
    let mut t = Table::new(vec![
        Column::new("path", "path", ""),
        Column::new("kind", "kind", ""),
        Column::new("value", "value", ""),
        Column::new("unit", "unit", ""),
        Column::new("what", "what", ""),
    ]);
    for ad in engine.addresses() {
        if a.givens && !ad.given {
            continue;
        }
        // JSON carries plain SI and names the SI unit; text and CSV the
        // display units.
        let (value, unit) = if json {
            (ad.value, ad.quantity.si_symbol().to_string())
        } else {
            (
                ad.value
                    .map(|v| crate::present::shown(v, ad.quantity, system)),
                crate::present::unit_label(ad.quantity, system),
            )
        };
        t.rows.push(vec![
            Cell::from(ad.path),
            Cell::from(if ad.given { "given" } else { "derived" }),
            Cell::from(value),
            Cell::from(unit),
            Cell::from(ad.label),
        ]);
    }
    super::print_table(&t, a.format)?;
    Ok(0)
}
