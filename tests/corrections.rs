//! Corrected figures: the reference station, the theta exponent and the
//! heating-value referral, against their definitions written out here
//! (theta = Tt / 288.15 K, delta = pt / 101325 Pa at the reference station;
//! sea-level standard values of ISO 2533).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::Engine;
use stationwise::format;

fn turbojet(extra: &str) -> Result<Engine, String> {
    let path = format!("{}/sheets/turbojet.ron", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(path).unwrap();
    let text = text.replacen(
        "    gas: ThermallyPerfect,",
        &format!("    gas: ThermallyPerfect,\n{extra}"),
        1,
    );
    let book = format::parse(&text).map_err(|e| e.to_string())?;
    Engine::new(book).map_err(|e| format!("{e:?}"))
}

fn v(e: &Engine, p: &str) -> f64 {
    e.value(p).unwrap().unwrap()
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

#[test]
fn by_default_the_engine_face_is_the_reference() {
    let e = turbojet("").unwrap();
    let (tt2, pt2) = (v(&e, "station.2.tt"), v(&e, "station.2.pt"));
    let (theta, delta) = (tt2 / 288.15, pt2 / 101325.0);
    let s = e.summary();
    let net = s.get("thrust_net").unwrap();
    let wf = s.get("fuel").unwrap();
    assert!(rel(s.get("thrust_corrected").unwrap(), net / delta) < 1e-12);
    assert!(
        rel(
            s.get("fuel_corrected").unwrap(),
            wf / (delta * theta.sqrt())
        ) < 1e-12
    );
    let egt = v(&e, "station.5.tt") / theta;
    assert!(rel(s.get("egt_corrected").unwrap(), egt) < 1e-12);
}

#[test]
fn a_stated_station_exponent_and_heating_value_are_used() {
    let e = turbojet(
        "    corrections: (station: \"0\", theta_exponent: \"0.62\", lhv: \"42.8 MJ/kg\"),",
    )
    .unwrap();
    let (tt0, pt0) = (v(&e, "station.0.tt"), v(&e, "station.0.pt"));
    let (theta, delta) = (tt0 / 288.15, pt0 / 101325.0);
    let s = e.summary();
    let wf = s.get("fuel").unwrap();
    // The demo burns a 43.1 MJ/kg fuel: referred to 42.8 MJ/kg it is worth
    // 43.1/42.8 of its flow.
    let want = wf * (43.1 / 42.8) / (delta * theta.powf(0.62));
    assert!(rel(s.get("fuel_corrected").unwrap(), want) < 1e-12);
    assert!(
        rel(
            s.get("thrust_corrected").unwrap(),
            s.get("thrust_net").unwrap() / delta
        ) < 1e-12
    );
    // The settings are givens: a sweep or a goal can move them.
    assert!(e.value("ambient.reference_theta_exponent").is_ok());
}

#[test]
fn an_unknown_reference_station_is_refused() {
    let err = turbojet("    corrections: (station: \"2x\"),").unwrap_err();
    assert!(err.contains("2x"), "{err}");
}

#[test]
fn rig_sheets_get_no_propulsion_figures() {
    let path = format!("{}/sheets/compressor-rig.ron", env!("CARGO_MANIFEST_DIR"));
    let e = Engine::new(format::load(std::path::Path::new(&path)).unwrap()).unwrap();
    let s = e.summary();
    for k in [
        "thrust_net",
        "thrust_corrected",
        "fuel_corrected",
        "egt_corrected",
        "tsfc",
    ] {
        assert!(s.get(k).is_none(), "{k}");
    }
}
