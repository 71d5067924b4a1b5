//! Humidity given as relative humidity, or as specific humidity checked
//! against saturation.
//!
//! Independent values (ASHRAE Handbook of Fundamentals, chapter 1, table of
//! saturated moist air; from memory): at 30 degC the saturation pressure
//! of water is 4246.7 Pa and saturated air at 101.325 kPa holds a humidity
//! ratio of 0.027329 kg/kg of dry air (this includes the enhancement
//! factor of real moist air, about 0.4 %, which the ideal-gas relation
//! leaves out). At 60 % relative humidity the vapour pressure is 0.6 x
//! 4246.7 Pa and the specific humidity q = 0.621945 e / (p - 0.378055 e).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;
use std::path::Path;

fn rig(humidity: &str) -> Result<Engine, String> {
    let t = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("sheets/compressor-rig.ron"),
    )
    .unwrap()
    .replace(
        "condition: Measured(\n            pressure: \"101 kPa\",\n            temperature: \"288 K\",\n        ),",
        &format!(
            "condition: Measured(\n            pressure: \"101325 Pa\",\n            temperature: \"30 degC\",\n        ),\n        {humidity}"
        ),
    );
    assert!(t.contains("30 degC"), "the demo's layout changed");
    let book = format::parse(&t).map_err(|e| e.to_string())?;
    Engine::new(book).map_err(|e| format!("{e:?}"))
}

fn q_of(e: &Engine) -> f64 {
    let war = e.ambient_air().unwrap().war;
    war / (1.0 + war)
}

#[test]
fn relative_humidity_gives_the_table_specific_humidity() {
    let e = rig("relative_humidity: \"60 %\",").unwrap();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let pv = 0.6 * 4246.7;
    let want = 0.621_945 * pv / (101_325.0 - 0.378_055 * pv);
    let got = q_of(&e);
    // The table value is recalled to five figures.
    assert!((got / want - 1.0).abs() < 5e-4, "{got} vs {want}");
    // Saturated: the table's humidity ratio within its enhancement factor.
    let sat = rig("relative_humidity: \"100 %\",").unwrap();
    let w = sat.ambient_air().unwrap().war;
    assert!((w / 0.027_329 - 1.0).abs() < 0.01, "{w}");
}

#[test]
fn above_saturation_or_a_percent_specific_humidity_is_refused_with_the_reason() {
    // 150 % relative humidity: refused when the file is read.
    let err = rig("relative_humidity: \"150 %\",").err().unwrap();
    assert!(
        err.contains("supersaturated") || err.contains("100 %"),
        "{err}"
    );
    // 0.05 kg/kg at 30 degC: above the 0.0266 kg/kg saturated air holds.
    let e = rig("humidity: \"0.05\",").unwrap();
    let p = e.problems();
    assert!(
        p.iter().any(|p| p.message.contains("above saturation")),
        "{p:?}"
    );
    // "15 %" in the specific humidity: a relative humidity in the wrong
    // place, refused, not read as 0.15 kg/kg.
    let e = rig("humidity: \"15 %\",").unwrap();
    let p = e.problems();
    assert!(
        p.iter().any(|p| p.message.contains("relative_humidity")),
        "{p:?}"
    );
    // Grams per kilogram read as such.
    let e = rig("humidity: \"12 g/kg\",").unwrap();
    assert!((q_of(&e) - 0.012).abs() < 1e-12);
}
