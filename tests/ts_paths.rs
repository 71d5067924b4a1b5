//! Process paths on the Tt-s chart against the perfect-gas closed forms.
//!
//! For a calorically perfect gas (cp = gamma R / (gamma - 1)):
//! - a polytropic compression with polytropic efficiency eta_p follows
//!   Tt ~ pt^((gamma - 1) / (gamma eta_p)), so along it
//!   s - s_in = cp (1 - eta_p) ln(Tt / Tt_in);
//! - heat addition at constant pt follows the isobar
//!   s - s_in = cp ln(Tt / Tt_in);
//! - an adiabatic duct or nozzle keeps Tt (the energy equation).
//!
//! (Textbook perfect-gas relations: ds = cp dT/T - R dp/p; from memory.)
//! The workbook is written here: a calorically perfect gas without a
//! separate products gas, so the combustor's isobar is of one gas.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::engine::{Engine, StationStatus};
use stationwise::format;

const G: f64 = 1.4;
const R: f64 = 287.05;
const ETA_P: f64 = 0.9;

fn sheet() -> String {
    format!(
        r#"#![enable(implicit_some)]
(
    format: 1,
    title: "paths test: perfect-gas turbojet",
    ambient: (
        condition: Measured(pressure: "101325 Pa", temperature: "288.15 K"),
        flight: Mach("0"),
    ),
    gas: CaloricallyPerfect(gamma: "{G}", r: "{R}"),
    stations: [(name: "0"), (name: "2"), (name: "3"), (name: "4"), (name: "5"), (name: "9")],
    processes: [
        (name: "freestream", to: "0", kind: Entry(Freestream(w: "20 kg/s"))),
        (name: "intake", from: "0", to: "2", kind: Duct(Recovery(recovery: "0.98"))),
        (name: "compressor", from: "2", to: "3", kind: Compressor((
            mode: Design(pressure_ratio: "10", efficiency: "{ETA_P}", basis: Polytropic),
            shaft: "spool",
        ))),
        (name: "combustor", from: "3", to: "4", kind: Combustor((
            mode: ExitTemperature("1400 K"),
            pressure_loss: "0",
            efficiency: "1",
            lhv: "43 MJ/kg",
            hc: "2",
        ))),
        (name: "turbine", from: "4", to: "5", kind: Turbine((
            mode: ShaftWork(efficiency: "0.9", basis: Polytropic),
            shaft: "spool",
        ))),
        (name: "nozzle", from: "5", to: "9", kind: Nozzle((
            shape: Convergent, exit: Matched, cfg: "1", cd: "1",
        ))),
    ],
    shafts: [(name: "spool", mechanical_efficiency: "1")],
)
"#
    )
}

fn path(e: &Engine, a: &str, b: &str) -> Vec<(f64, f64)> {
    let at = |n: &str| {
        let i = e.stations().iter().position(|s| s.name == n).unwrap();
        match e.station_status(i) {
            StationStatus::Ok(v) => v,
            other => panic!("station {n}: {other:?}"),
        }
    };
    let p = e.ts_path(at(a), at(b), 20);
    assert_eq!(p.len(), 21);
    p.into_iter().map(|x| x.unwrap()).collect()
}

#[test]
fn each_process_follows_its_perfect_gas_path() {
    let e = Engine::new(format::parse(&sheet()).unwrap()).unwrap();
    let cp = G * R / (G - 1.0);
    // Compression: polytropic.
    let c = path(&e, "2", "3");
    let (s0, t0) = c[0];
    for &(s, t) in &c[1..] {
        let want = cp * (1.0 - ETA_P) * (t / t0).ln();
        assert!(
            (s - s0 - want).abs() < 1e-9 * cp,
            "compressor: s-s2 {} vs {want}",
            s - s0
        );
    }
    assert!(c[20].1 > c[0].1 * 1.9, "the compressor heats the air");
    // Heat addition at constant pt: the isobar.
    let h = path(&e, "3", "4");
    let (s0, t0) = h[0];
    for &(s, t) in &h[1..] {
        let want = cp * (t / t0).ln();
        assert!(
            (s - s0 - want).abs() < 1e-9 * cp,
            "combustor: s-s3 {} vs {want}",
            s - s0
        );
    }
    assert!((h[20].1 - 1400.0).abs() < 1e-9);
    // Adiabatic duct and nozzle: Tt constant, entropy rising.
    for (a, b) in [("0", "2"), ("5", "9")] {
        let d = path(&e, a, b);
        for &(_, t) in &d {
            assert!(
                (t - d[0].1).abs() < 1e-9 * t,
                "{a}-{b}: Tt {t} vs {}",
                d[0].1
            );
        }
        assert!(d[20].0 >= d[0].0, "{a}-{b}: entropy falls");
    }
    // Isobars of air: s(T) - s(T0) = cp ln(T / T0) at constant p.
    let iso: Vec<(f64, f64)> = e
        .isobar(200e3, 300.0, 1500.0, 12)
        .into_iter()
        .map(|x| x.unwrap())
        .collect();
    for &(s, t) in &iso {
        let want = cp * (t / iso[0].1).ln();
        assert!((s - iso[0].0 - want).abs() < 1e-9 * cp);
    }
    // The isobar through station 3 passes through it.
    let (s3, t3) = path(&e, "3", "4")[0];
    let i3 = e.stations().iter().position(|s| s.name == "3").unwrap();
    let StationStatus::Ok(v3) = e.station_status(i3) else {
        panic!()
    };
    let through = e.isobar(v3.pt, t3, t3 + 1.0, 1)[0].unwrap();
    assert!((through.0 - s3).abs() < 1e-9 * cp, "{through:?} vs {s3}");
}
