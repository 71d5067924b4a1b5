//! The workbook engine end to end: cycle physics against closed forms and an
//! independent reference, incremental recompute, bad inputs and goals,
//! thermal choking through the binary, the file round trip and `diff`.
//!
//! Every expected value is either a closed form derived by hand beside the
//! check, a value from tests/data/cantera_turbojet.json (Cantera 3.2.0; its
//! "source" field says how each number was computed), or a relation between
//! two engine results that must hold whatever the numbers are (incremental
//! equals full evaluation, a refused edit keeps the old text). No expected
//! value is copied from this program's own output.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use proptest::prelude::*;
use serde_json::Value;
use stationwise::book::Workbook;
use stationwise::engine::{Engine, StationStatus};
use stationwise::format::{self, LoadError};
use std::path::{Path, PathBuf};
use std::process::Command;

// ---------------------------------------------------------------------------
// Helpers

fn manifest(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn turbojet_text() -> String {
    std::fs::read_to_string(manifest("sheets/turbojet.ron")).unwrap()
}

fn turbojet() -> Engine {
    Engine::new(format::load(&manifest("sheets/turbojet.ron")).unwrap()).unwrap()
}

fn engine_of(text: &str) -> Engine {
    let book = format::parse(text).unwrap_or_else(|e| panic!("workbook does not parse: {e}"));
    Engine::new(book).unwrap()
}

fn value(e: &Engine, path: &str) -> f64 {
    e.value(path)
        .unwrap_or_else(|err| panic!("{path}: {err}"))
        .unwrap_or_else(|| panic!("{path} is not computed; problems: {:?}", e.problems()))
}

fn rel_err(ours: f64, want: f64) -> f64 {
    (ours - want).abs() / want.abs()
}

fn assert_rel(what: &str, ours: f64, want: f64, tol: f64) {
    let err = rel_err(ours, want);
    assert!(
        err <= tol,
        "{what}: ours {ours:.12e}, expected {want:.12e}, relative error {err:.3e} > {tol:e}"
    );
}

/// A fresh, unique scratch folder under the system temp dir.
fn scratch(tag: &str) -> PathBuf {
    use std::sync::atomic::{AtomicUsize, Ordering};
    static N: AtomicUsize = AtomicUsize::new(0);
    let dir = std::env::temp_dir().join(format!(
        "stationwise-engine-test-{}-{tag}-{}",
        std::process::id(),
        N.fetch_add(1, Ordering::SeqCst)
    ));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
}

// ---------------------------------------------------------------------------
// 1. Ideal turbojet, calorically perfect, against the closed-form cycle.

const G: f64 = 1.4;
const R: f64 = 287.05;
const T0: f64 = 223.15;
const P0: f64 = 26_500.0;
const M0: f64 = 0.8;
const PI_C: f64 = 12.0;
const TT4: f64 = 1600.0;
const LHV: f64 = 43.0e6;
const T_REF: f64 = 298.15;

fn ideal_turbojet_text(pi_c: f64) -> String {
    format!(
        r#"#![enable(implicit_some)]
(
    format: 1,
    title: "ideal turbojet, calorically perfect",
    ambient: (
        condition: Measured(pressure: "{P0} Pa", temperature: "{T0} K"),
        flight: Mach("{M0}"),
    ),
    gas: CaloricallyPerfect(gamma: "{G}", r: "{R}"),
    stations: [(name: "0"), (name: "2"), (name: "3"), (name: "4"), (name: "5"), (name: "9")],
    processes: [
        (name: "freestream", to: "0", kind: Entry(Freestream(w: "50 kg/s"))),
        (name: "intake", from: "0", to: "2", kind: Duct(Recovery(recovery: "1"))),
        (name: "compressor", from: "2", to: "3", kind: Compressor((
            mode: Design(pressure_ratio: "{pi_c}", efficiency: "1", basis: Isentropic),
            shaft: "spool",
        ))),
        (name: "combustor", from: "3", to: "4", kind: Combustor((
            mode: ExitTemperature("{TT4} K"),
            pressure_loss: "0",
            efficiency: "1",
            lhv: "43 MJ/kg",
            hc: "2",
        ))),
        (name: "turbine", from: "4", to: "5", kind: Turbine((
            mode: ShaftWork(efficiency: "1", basis: Isentropic),
            shaft: "spool",
        ))),
        (name: "nozzle", from: "5", to: "9", kind: Nozzle((
            shape: ConvergentDivergent, exit: Matched, cfg: "1", cd: "1",
        ))),
    ],
    shafts: [(name: "spool", mechanical_efficiency: "1")],
)
"#
    )
}

/// Specific thrust (N s per kg air) and TSFC (kg/(N s)) of the ideal
/// turbojet, derived by hand with the engine's stated conventions.
///
/// Temperature ratios: tau_r = Tt0/T0 = 1 + (g-1)/2 M0^2 and
/// pi_r = pt0/p0 = tau_r^(g/(g-1)) (isentropic stagnation of the free
/// stream); ideal intake pt2 = pt0; ideal compressor tau_c = pi_c^((g-1)/g),
/// so Tt3 = T0 tau_r tau_c; tau_lambda = Tt4/T0.
///
/// Combustor with sensible enthalpy from Tref = 298.15 K, fuel at Tref and
/// the fuel mass carried: (1+f) cp (Tt4 - Tref) = cp (Tt3 - Tref) + f LHV,
/// hence f = cp (Tt4 - Tt3) / (LHV - cp (Tt4 - Tref)).
///
/// Shaft with eta_m = 1 and the turbine passing (1+f) per kg air:
/// (1+f) cp (Tt4 - Tt5) = cp (Tt3 - Tt2), so
/// tau_t = Tt5/Tt4 = 1 - tau_r (tau_c - 1) / ((1+f) tau_lambda).
/// Ideal turbine: pt5/pt4 = tau_t^(g/(g-1)); lossless burner pt4 = pt3.
///
/// Nozzle expanding fully to p0: V9^2 = 2 cp Tt5 (1 - (p0/pt5)^((g-1)/g)).
/// Here pt5/p0 = pi_r pi_c tau_t^(g/(g-1)), so (p0/pt5)^((g-1)/g) =
/// 1/(tau_r tau_c tau_t) and V9^2 = 2 cp T0 (tau_lambda tau_t -
/// tau_lambda/(tau_r tau_c)). With V0 = M0 sqrt(g R T0) and no pressure
/// thrust (p9 = p0), per kg air F/W = (1+f) V9 - V0 and TSFC = f/(F/W).
fn ideal_closed_form(pi_c: f64) -> (f64, f64) {
    let cp = G * R / (G - 1.0);
    let tau_r = 1.0 + 0.5 * (G - 1.0) * M0 * M0;
    let tau_c = pi_c.powf((G - 1.0) / G);
    let tau_lambda = TT4 / T0;
    let tt3 = T0 * tau_r * tau_c;
    let f = cp * (TT4 - tt3) / (LHV - cp * (TT4 - T_REF));
    let tau_t = 1.0 - tau_r * (tau_c - 1.0) / ((1.0 + f) * tau_lambda);
    let v9 = (2.0 * cp * T0 * (tau_lambda * tau_t - tau_lambda / (tau_r * tau_c))).sqrt();
    let v0 = M0 * (G * R * T0).sqrt();
    let fs = (1.0 + f) * v9 - v0;
    (fs, f / fs)
}

#[test]
fn ideal_turbojet_matches_closed_form_cycle() {
    for pi_c in [PI_C, 4.0, 25.0] {
        let e = engine_of(&ideal_turbojet_text(pi_c));
        assert!(e.problems().is_empty(), "{:?}", e.problems());
        let (fs, tsfc) = ideal_closed_form(pi_c);
        let s = e.summary();
        assert_rel(
            &format!("specific thrust, pi_c {pi_c}"),
            s.specific_thrust.unwrap(),
            fs,
            1e-9,
        );
        assert_rel(&format!("TSFC, pi_c {pi_c}"), s.tsfc.unwrap(), tsfc, 1e-9);
        // Independent relation: the matched ideal nozzle leaves at p0.
        assert_rel("p9 = p0", value(&e, "station.9.p"), P0, 1e-9);
        // Net thrust is specific thrust times the 50 kg/s of dry air.
        assert_rel("net thrust = W F/W", s.thrust_net.unwrap(), 50.0 * fs, 1e-9);
    }
}

// ---------------------------------------------------------------------------
// 2. The turbojet sheet (thermally perfect) against Cantera 3.2.0.

fn cantera() -> Value {
    let text = std::fs::read_to_string(manifest("tests/data/cantera_turbojet.json")).unwrap();
    serde_json::from_str(&text).unwrap()
}

fn num(v: &Value, key: &str) -> f64 {
    v[key]
        .as_f64()
        .unwrap_or_else(|| panic!("missing number {key:?} in the reference"))
}

/// The sheet and the reference share only the species polynomial
/// coefficients (the same nasa_gas.yaml data); mixture building, the cycle
/// equations and the root finders are separate. The reference bisects to
/// adjacent doubles, and our solvers converge to about 1e-12, so the two
/// agree far better than the 0.1 % an engineer would accept (within 3e-14
/// relative on every value when this test was written): 1e-6 relative is
/// asserted, leaving room for solver tolerances and evaluation order.
#[test]
fn turbojet_sheet_matches_cantera_reference() {
    let c = cantera();
    let e = turbojet();
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    let tol = 1e-6;
    // The sheet's inputs are the reference's inputs.
    let inp = &c["inputs"];
    assert_eq!(num(inp, "compressor_pr"), 10.0);
    assert_eq!(num(inp, "tt4"), 1450.0);
    for st in c["stations"].as_array().unwrap() {
        let name = st["station"].as_str().unwrap();
        for key in ["tt", "pt"] {
            assert_rel(
                &format!("station {name} {key}"),
                value(&e, &format!("station.{name}.{key}")),
                num(st, key),
                tol,
            );
        }
        let far = value(&e, &format!("station.{name}.far"));
        let want = num(st, "far");
        if want == 0.0 {
            assert_eq!(far, 0.0, "station {name} far");
        } else {
            assert_rel(&format!("station {name} far"), far, want, tol);
        }
    }
    let r = &c["results"];
    let checks: [(&str, &str); 14] = [
        ("process.compressor.tt_ideal", "tt3s"),
        ("process.compressor.work", "wc"),
        ("process.combustor.far_added", "far"),
        ("process.combustor.fuel_flow", "w_fuel"),
        ("process.turbine.work", "turbine_work_per_kg_gas"),
        ("process.turbine.tt_ideal", "tt5s"),
        ("station.9.t", "t9"),
        ("station.9.p", "p9"),
        ("station.9.rho", "rho9"),
        ("station.9.v", "v9"),
        ("station.9.area", "a9"),
        ("station.9.w", "w9"),
        ("summary.thrust_gross", "gross_thrust"),
        ("summary.tsfc", "tsfc"),
    ];
    for (path, key) in checks {
        assert_rel(path, value(&e, path), num(r, key), tol);
    }
    assert_rel(
        "summary.thrust_net",
        value(&e, "summary.thrust_net"),
        num(r, "net_thrust"),
        tol,
    );
    assert_rel(
        "summary.specific_thrust",
        value(&e, "summary.specific_thrust"),
        num(r, "specific_thrust"),
        tol,
    );
    assert_eq!(
        value(&e, "process.nozzle.choked"),
        if r["choked"].as_bool().unwrap() {
            1.0
        } else {
            0.0
        }
    );
    assert_rel(
        "nozzle pressure ratio",
        value(&e, "process.nozzle.npr"),
        num(r, "nozzle_pt_over_p0"),
        tol,
    );
}

// ---------------------------------------------------------------------------
// 3. Incremental recompute.

/// Counts are read off the sheet's graph: freestream -> intake ->
/// compressor -> combustor -> turbine -> nozzle, with the shaft-work turbine
/// also depending on the compressor on its shaft.
#[test]
fn incremental_recompute_counts() {
    let mut e = turbojet();
    // Building evaluates each of the 6 processes exactly once.
    assert_eq!(e.evaluations(), 6);

    // The nozzle's cv is read by the nozzle only, and nothing is downstream.
    let n = e.evaluations();
    e.set_given("process.nozzle.cfg", "0.98").unwrap();
    assert_eq!(e.evaluations() - n, 1, "nozzle cfg");

    // Compressor, then combustor (its input), turbine (input and shaft) and
    // nozzle: 4. Free stream and intake are upstream and stay.
    let n = e.evaluations();
    let tt2 = value(&e, "station.2.tt");
    e.set_given("process.compressor.pressure_ratio", "11")
        .unwrap();
    assert_eq!(e.evaluations() - n, 4, "compressor pressure ratio");
    assert_eq!(value(&e, "station.2.tt"), tt2);

    // The same value again: the compressor reruns, produces the same result,
    // and backdating stops there.
    let n = e.evaluations();
    e.set_given("process.compressor.pressure_ratio", "11")
        .unwrap();
    assert_eq!(e.evaluations() - n, 1, "unchanged pressure ratio");

    // Shaft mechanical efficiency: read by the machines on the shaft
    // (compressor, turbine); the compressor's result does not depend on it
    // so it backdates; the turbine changes and the nozzle follows: 3.
    let n = e.evaluations();
    e.set_given("shaft.spool.mechanical_efficiency", "0.98")
        .unwrap();
    assert_eq!(e.evaluations() - n, 3, "shaft mechanical efficiency");

    // The ambient block is read by the free stream and the nozzle. A new
    // altitude changes the free stream, so everything downstream reruns as
    // well: all 6, each once.
    let n = e.evaluations();
    e.set_given("ambient.altitude", "1000 m").unwrap();
    assert_eq!(e.evaluations() - n, 6, "altitude");

    // The same altitude again: free stream and nozzle are both marked and
    // rerun; the free stream's result is unchanged, so nothing between them
    // does.
    let n = e.evaluations();
    e.set_given("ambient.altitude", "1000 m").unwrap();
    assert_eq!(e.evaluations() - n, 2, "unchanged altitude");

    // A refused edit evaluates nothing.
    let n = e.evaluations();
    assert!(
        e.set_given("process.compressor.pressure_ratio", "x")
            .is_err()
    );
    assert_eq!(e.evaluations(), n);
}

/// Every station and the summary of `e` equal those of a fresh engine built
/// from the same (edited) book.
fn assert_same_as_full(e: &Engine) -> Result<(), TestCaseError> {
    let fresh = Engine::new(e.book().clone()).unwrap();
    for (i, s) in e.stations().iter().enumerate() {
        let a = e.station_status(i);
        let b = fresh.station_status(i);
        prop_assert_eq!(a, b, "station {}", s.name);
        if let (StationStatus::Ok(_), StationStatus::Ok(_)) = (a, b) {
            for key in ["tt", "pt", "t", "p", "v", "mach", "area", "far", "w"] {
                let path = format!("station.{}.{key}", s.name);
                prop_assert_eq!(
                    e.value(&path).unwrap().map(f64::to_bits),
                    fresh.value(&path).unwrap().map(f64::to_bits),
                    "{}",
                    path
                );
            }
        }
    }
    prop_assert_eq!(e.summary(), fresh.summary());
    prop_assert_eq!(e.problems(), fresh.problems());
    Ok(())
}

fn edit() -> impl Strategy<Value = (&'static str, String)> {
    prop_oneof![
        (2.0f64..30.0).prop_map(|x| ("process.compressor.pressure_ratio", format!("{x:.4}"))),
        (0.75f64..0.95).prop_map(|x| ("process.compressor.efficiency", format!("{x:.4}"))),
        (1200.0f64..1700.0).prop_map(|x| ("process.combustor.exit_tt", format!("{x:.2} K"))),
        (0.9f64..1.0).prop_map(|x| ("process.intake.recovery", format!("{x:.4}"))),
        (0.95f64..1.0).prop_map(|x| ("process.nozzle.cfg", format!("{x:.4}"))),
        (5.0f64..40.0).prop_map(|x| ("process.freestream.w", format!("{x:.3} kg/s"))),
        (0.0f64..8000.0).prop_map(|x| ("ambient.altitude", format!("{x:.1} m"))),
        (0.95f64..1.0).prop_map(|x| ("shaft.spool.mechanical_efficiency", format!("{x:.4}"))),
        (0.8f64..0.95).prop_map(|x| ("process.turbine.efficiency", format!("{x:.4}"))),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn incremental_equals_full(edits in prop::collection::vec(edit(), 1..5)) {
        let mut e = turbojet();
        for (path, text) in &edits {
            e.set_given(path, text).unwrap();
            assert_same_as_full(&e)?;
        }
    }
}

// ---------------------------------------------------------------------------
// 4. Bad inputs and goals.

enum Expect {
    /// `set_given` returns Err whose message contains this text.
    Refused(&'static str),
    /// Accepted; a problem on this process; these stations still compute.
    Problem(&'static str, &'static [&'static str]),
}

#[test]
fn bad_inputs_are_refused_or_become_problems_in_place() {
    use Expect::{Problem, Refused};
    let all = ["0", "2", "3", "4", "5", "9"];
    let table: &[(&str, &str, Expect)] = &[
        (
            "process.compressor.pressure_ratio",
            "-3",
            Refused("must be"),
        ),
        ("process.compressor.pressure_ratio", "0", Refused("must be")),
        (
            "process.compressor.pressure_ratio",
            "nan",
            Refused("not a finite number"),
        ),
        (
            "process.compressor.pressure_ratio",
            "1e9",
            Refused("must be"),
        ),
        // A ratio accepts a bare number or %: 12 % is 0.12, below 1.
        (
            "process.compressor.pressure_ratio",
            "12 %",
            Refused("must be"),
        ),
        // A ratio takes no temperature unit.
        ("process.compressor.pressure_ratio", "10 K", Refused("K")),
        ("process.compressor.pressure_ratio", "", Refused("no value")),
        ("process.compressor.efficiency", "1.5", Refused("must be")),
        ("process.compressor.efficiency", "0", Refused("must be")),
        ("process.intake.recovery", "1.2", Refused("must be")),
        ("process.intake.recovery", "-0.5", Refused("must be")),
        ("process.combustor.lhv", "0", Refused("must be")),
        ("process.combustor.lhv", "-43 MJ/kg", Refused("must be")),
        (
            "process.combustor.exit_tt",
            "50 K",
            Problem("combustor", &["0", "2", "3"]),
        ),
        ("process.combustor.exit_tt", "0 K", Refused("must be")),
        (
            "process.combustor.pressure_loss",
            "80 %",
            Problem("combustor", &["0", "2", "3"]),
        ),
        (
            "process.combustor.efficiency",
            "nan",
            Refused("not a finite number"),
        ),
        ("process.freestream.w", "-20 kg/s", Refused("must be")),
        ("process.freestream.w", "0 kg/s", Refused("must be")),
        ("process.freestream.w", "20 K", Refused("K")),
        ("process.turbine.efficiency", "1.5", Refused("must be")),
        // The turbine reads the shaft's mechanical efficiency for its work.
        ("shaft.spool.mechanical_efficiency", "0", Refused("must be")),
        ("process.nozzle.cfg", "0", Refused("must be")),
        ("process.nozzle.cd", "2", Refused("must be")),
        ("process.nosuch.w", "20 kg/s", Refused("process.nosuch.w")),
        ("station.3.tt", "600 K", Refused("station.3.tt")),
    ];
    let base = turbojet();
    let base_text = format::to_text(base.book());
    for (path, text, expect) in table {
        let mut e = base.clone();
        let r = e.set_given(path, text);
        let case = format!("{path} = {text:?}");
        match expect {
            Refused(needle) => {
                let err = r.expect_err(&case).to_string();
                assert!(
                    err.contains(needle),
                    "{case}: message {err:?} lacks {needle:?}"
                );
                assert_eq!(format::to_text(e.book()), base_text, "{case}: text changed");
                assert!(e.problems().is_empty(), "{case}: {:?}", e.problems());
            }
            Problem(process, upstream) => {
                r.unwrap_or_else(|err| panic!("{case}: refused ({err}), expected a problem"));
                let problems = e.problems();
                assert_eq!(problems.len(), 1, "{case}: {problems:?}");
                let p = &problems[0];
                assert!(
                    p.place.contains(&format!("\"{process}\"")),
                    "{case}: problem at {:?}, expected {process}",
                    p.place
                );
                assert!(!p.message.is_empty(), "{case}");
                for (i, s) in e.stations().iter().enumerate() {
                    let ok = matches!(e.station_status(i), StationStatus::Ok(_));
                    let want = upstream.contains(&s.name.as_str());
                    assert_eq!(ok, want, "{case}: station {} computed = {ok}", s.name);
                    if want {
                        // Upstream values are those of the untouched sheet.
                        assert_eq!(
                            value(&e, &format!("station.{}.pt", s.name)),
                            value(&base, &format!("station.{}.pt", s.name)),
                            "{case}"
                        );
                    }
                }
                assert!(e.summary().thrust_net.is_none(), "{case}");
                // Putting the old text back recovers the sheet.
                let old = base
                    .book()
                    .givens()
                    .into_iter()
                    .find(|(gp, ..)| gp == path)
                    .unwrap()
                    .2;
                e.set_given(path, &old).unwrap();
                assert!(e.problems().is_empty(), "{case}: {:?}", e.problems());
                for s in all {
                    let key = format!("station.{s}.tt");
                    assert_eq!(value(&e, &key), value(&base, &key), "{case}: {key}");
                }
            }
        }
    }
}

/// A bad ambient block cannot be placed on one process: every process that
/// needs it reports it, prefixed "ambient:", and stating the limit; nothing
/// computes; putting the old value back recovers.
#[test]
fn bad_ambient_is_a_problem_that_names_the_ambient() {
    let base = turbojet();
    // Standard atmosphere tops out at 84852 m geopotential (from memory), so
    // 200 km lies outside it; a flight Mach number of 25 is beyond any stand.
    for (path, text, needle) in [
        ("ambient.altitude", "200 km", "standard atmosphere"),
        ("ambient.flight_mach", "25", "flight Mach number"),
    ] {
        let mut e = base.clone();
        e.set_given(path, text).unwrap();
        // Reported once, at its source, not once per process that reads it.
        let problems = e.problems();
        assert_eq!(problems.len(), 1, "{path}: {problems:?}");
        assert_eq!(problems[0].place, "ambient", "{problems:?}");
        assert!(problems[0].message.contains(needle), "{path}: {problems:?}");
        for i in 0..e.stations().len() {
            assert!(
                !matches!(e.station_status(i), StationStatus::Ok(_)),
                "{path}"
            );
        }
        let old = base
            .book()
            .givens()
            .into_iter()
            .find(|g| g.0 == path)
            .unwrap()
            .2;
        e.set_given(path, &old).unwrap();
        assert!(e.problems().is_empty(), "{path}: {:?}", e.problems());
        assert_eq!(e.summary(), base.summary(), "{path}");
    }
}

fn with_goal(value: &str) -> String {
    let text = turbojet_text();
    let goal = format!(
        "    goals: [(vary: \"process.freestream.w\", target: \"summary.thrust_net\", value: \"{value}\", low: \"1 kg/s\", high: \"100 kg/s\")],\n)\n"
    );
    let end = text.trim_end().strip_suffix(')').unwrap();
    format!("{end}{goal}")
}

#[test]
fn goal_without_solution_is_a_problem() {
    let e = engine_of(&with_goal("1e9 N"));
    let problems = e.problems();
    assert_eq!(problems.len(), 1, "{problems:?}");
    assert_eq!(problems[0].place, "goal 1");
    // The place names the goal; the message does not repeat it.
    assert!(!problems[0].message.starts_with("goal 1"), "{problems:?}");
    assert!(
        problems[0].message.contains("cannot reach 1e9 N"),
        "{problems:?}"
    );
    assert!(
        problems[0].message.contains("summary.thrust_net"),
        "{problems:?}"
    );
    assert_eq!(e.goal_outcomes()[0].value, None);
}

/// When a goal has no solution the varied given keeps the value the user
/// typed (20 kg/s), so the stations and the summary are those of the sheet
/// as written: the net thrust is the Cantera reference's at 20 kg/s, not the
/// one at the solver's last trial (the 100 kg/s high bound).
#[test]
fn failed_goal_restores_the_varied_given() {
    let e = engine_of(&with_goal("1e9 N"));
    assert_eq!(e.problems().len(), 1);
    assert_eq!(value(&e, "station.0.w"), 20.0);
    let f20 = num(&cantera()["results"], "net_thrust");
    assert_rel("net thrust", value(&e, "summary.thrust_net"), f20, 1e-6);
}

#[test]
fn goal_with_solution_converges() {
    let e = engine_of(&with_goal("15 kN"));
    assert!(e.problems().is_empty(), "{:?}", e.problems());
    assert_rel(
        "net thrust",
        value(&e, "summary.thrust_net"),
        15_000.0,
        1e-6,
    );
    // The solved flow is the one now at station 0, and lies in the bracket.
    let w = e.goal_outcomes()[0].value.unwrap();
    assert_eq!(value(&e, "station.0.w"), w);
    assert!((1.0..=100.0).contains(&w));
    // At sea-level static the net thrust is proportional to the air flow
    // (every specific quantity is independent of W), so the solved flow is
    // 20 kg/s x 15000 N / F(20 kg/s), with F(20 kg/s) the Cantera reference.
    let f20 = num(&cantera()["results"], "net_thrust");
    assert_rel("solved air flow", w, 20.0 * 15_000.0 / f20, 1e-6);
}

// ---------------------------------------------------------------------------
// 5. Thermal choking through the binary.

const RAYLEIGH_M1: f64 = 0.3;
const RAYLEIGH_TT1: f64 = 300.0;

fn rayleigh_text(heat: &str) -> String {
    format!(
        r#"#![enable(implicit_some)]
(
    format: 1,
    title: "heated duct beyond choking",
    ambient: (
        condition: Standard(altitude: "0 m", offset: "0 K"),
        flight: Mach("0"),
    ),
    gas: CaloricallyPerfect(gamma: "1.4", r: "287.05"),
    stations: [
        (name: "1", statics: Mach("{RAYLEIGH_M1}")),
        (name: "2"),
        (name: "3"),
    ],
    processes: [
        (name: "supply", to: "1", kind: Entry(Plenum(tt: "{RAYLEIGH_TT1} K", pt: "200 kPa", w: "2 kg/s"))),
        (name: "burner", from: "1", to: "2", kind: Heating(Heat("{heat}"))),
        (name: "tailpipe", from: "2", to: "3", kind: Duct(Recovery(recovery: "0.98"))),
    ],
)
"#
    )
}

/// Largest heat on a Rayleigh line from M1 for a calorically perfect gas:
/// the exit reaches Mach 1, Tt* = Tt1 / (Tt/Tt*)(M1), so
/// q_max = cp (Tt* - Tt1) = cp Tt1 (1/(Tt/Tt*)(M1) - 1), with (derived from
/// constant mass flux and impulse with the perfect-gas state, as in any
/// gas-dynamics text) Tt/Tt* = 2 (g+1) M^2 (1 + (g-1)/2 M^2) / (1 + g M^2)^2.
fn rayleigh_max_heat() -> f64 {
    let (g, r, m) = (1.4, 287.05, RAYLEIGH_M1);
    let cp = g * r / (g - 1.0);
    let m2 = m * m;
    let ratio = 2.0 * (g + 1.0) * m2 * (1.0 + 0.5 * (g - 1.0) * m2) / (1.0 + g * m2).powi(2);
    cp * RAYLEIGH_TT1 * (1.0 / ratio - 1.0)
}

#[test]
fn thermal_choking_is_reported_by_eval() {
    let dir = scratch("rayleigh");
    let file = dir.join("heated.ron");
    std::fs::write(&file, rayleigh_text("3 MJ/kg")).unwrap();
    let q_max = rayleigh_max_heat();
    assert!(q_max < 3.0e6, "the case must be beyond choking");

    // Text output.
    let out = bin().arg("eval").arg(&file).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "{out:?}");
    let text = String::from_utf8(out.stdout).unwrap();
    let line = text
        .lines()
        .find(|l| l.contains("thermal choking"))
        .unwrap_or_else(|| panic!("no thermal choking line in:\n{text}"));
    assert!(line.contains("\"burner\""), "{line}");
    let after = line.split("at most ").nth(1).unwrap();
    let shown: f64 = after.split_whitespace().next().unwrap().parse().unwrap();
    assert!(after.split_whitespace().nth(1) == Some("J/kg"), "{line}");
    assert_rel("maximum heat (text)", shown, q_max, 1e-6);

    // JSON output: the problem, and stations upstream computed.
    let out = bin()
        .args(["eval", "--format", "json"])
        .arg(&file)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let problems = v["problems"].as_array().unwrap();
    assert_eq!(problems.len(), 1, "{problems:?}");
    assert!(problems[0]["where"].as_str().unwrap().contains("burner"));
    let msg = problems[0]["message"].as_str().unwrap();
    let shown: f64 = msg
        .split("at most ")
        .nth(1)
        .and_then(|s| s.split_whitespace().next())
        .unwrap()
        .parse()
        .unwrap();
    assert_rel("maximum heat (JSON)", shown, q_max, 1e-6);
    let stations = v["stations"].as_array().unwrap();
    let tt = |name: &str| {
        stations
            .iter()
            .find(|s| s["name"] == name)
            .unwrap_or_else(|| panic!("station {name}"))["tt_k"]
            .clone()
    };
    assert_eq!(tt("1").as_f64(), Some(RAYLEIGH_TT1));
    assert!(tt("2").is_null());
    assert!(tt("3").is_null());
    assert!(v["summary"]["thrust_net_n"].is_null());

    // Just below the maximum the duct computes and exits near Mach 1.
    std::fs::write(&file, rayleigh_text(&format!("{} J/kg", q_max * 0.999))).unwrap();
    let out = bin()
        .args(["eval", "--format", "json"])
        .arg(&file)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let s2 = v["stations"]
        .as_array()
        .unwrap()
        .iter()
        .find(|s| s["name"] == "2")
        .unwrap()
        .clone();
    let m2 = s2["mach"].as_f64().unwrap();
    assert!(m2 > 0.9 && m2 < 1.0, "exit Mach {m2}");
    // Energy: Tt2 = Tt1 + q/cp.
    let cp = 1.4 * 287.05 / 0.4;
    assert_rel(
        "Tt2",
        s2["tt_k"].as_f64().unwrap(),
        RAYLEIGH_TT1 + q_max * 0.999 / cp,
        1e-9,
    );
    let _ = std::fs::remove_dir_all(&dir);
}

// ---------------------------------------------------------------------------
// 6. File round trip.

#[test]
fn canonical_text_is_a_fixed_point() {
    let text = turbojet_text();
    let book = format::parse(&text).unwrap();
    assert_eq!(format::to_text(&book), text);
}

#[test]
fn one_edit_changes_one_line() {
    let text = turbojet_text();
    let mut e = Engine::new(format::parse(&text).unwrap()).unwrap();
    e.set_given("process.combustor.exit_tt", "1500 K").unwrap();
    let new = format::to_text(e.book());
    let a: Vec<&str> = text.lines().collect();
    let b: Vec<&str> = new.lines().collect();
    assert_eq!(a.len(), b.len());
    let changed: Vec<(usize, &str, &str)> = a
        .iter()
        .zip(&b)
        .enumerate()
        .filter(|(_, (x, y))| x != y)
        .map(|(i, (x, y))| (i, *x, *y))
        .collect();
    assert_eq!(changed.len(), 1, "{changed:?}");
    assert_eq!(changed[0].1.trim(), "mode: ExitTemperature(\"1450 K\"),");
    assert_eq!(changed[0].2.trim(), "mode: ExitTemperature(\"1500 K\"),");
}

#[test]
fn newer_format_is_refused() {
    let text = turbojet_text().replace("format: 1,", "format: 99,");
    let err = format::parse(&text).unwrap_err();
    assert!(matches!(err, LoadError::Version { found: 99 }), "{err:?}");
    assert!(err.to_string().contains("99"), "{err}");
}

#[test]
fn unknown_field_is_refused_with_line_and_column() {
    let text = turbojet_text().replace(
        "            recovery: \"0.99\",",
        "            recovery: \"0.99\",\n            swirl: \"3\",",
    );
    assert_ne!(text, turbojet_text());
    let want_line = text.lines().position(|l| l.contains("swirl")).unwrap() + 1;
    let err = format::parse(&text).unwrap_err();
    let msg = err.to_string();
    assert!(msg.contains("line"), "{msg}");
    assert!(msg.contains("swirl"), "{msg}");
    match err {
        LoadError::Syntax { line, col, .. } => {
            assert_eq!(line, want_line, "{msg}");
            assert!(col > 1, "{msg}");
        }
        other => panic!("expected a syntax error, got {other:?}"),
    }
}

#[test]
fn killed_save_keeps_the_old_file() {
    let dir = scratch("save");
    let path = dir.join("book.ron");
    let old = turbojet_text();
    std::fs::write(&path, &old).unwrap();
    let r = format::write_atomic_with(&path, b"new contents", || {
        Err(std::io::Error::other("simulated crash"))
    });
    let err = r.unwrap_err();
    assert!(err.to_string().contains("simulated crash"));
    assert_eq!(std::fs::read(&path).unwrap(), old.as_bytes());
    let left: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|d| d.unwrap().file_name())
        .collect();
    assert_eq!(left, vec![std::ffi::OsString::from("book.ron")]);

    // And a save that is not interrupted replaces the file.
    let book: Workbook = format::parse(&old).unwrap();
    format::save(&path, &book).unwrap();
    assert_eq!(std::fs::read_to_string(&path).unwrap(), old);
    let _ = std::fs::remove_dir_all(&dir);
}

// ---------------------------------------------------------------------------
// 7. `stationwise diff`.

#[test]
fn diff_names_the_given_and_the_moved_values() {
    let dir = scratch("diff");
    let a = dir.join("a.ron");
    let b = dir.join("b.ron");
    let text = turbojet_text();
    let edited = text.replace("pressure_ratio: \"10\",", "pressure_ratio: \"12\",");
    assert_ne!(edited, text);
    std::fs::write(&a, &text).unwrap();
    std::fs::write(&b, &edited).unwrap();
    let out = bin()
        .args(["diff", "--all"])
        .arg(&a)
        .arg(&b)
        .output()
        .unwrap();
    // Exit 2: differences found.
    assert_eq!(out.status.code(), Some(2), "{out:?}");
    let text = String::from_utf8(out.stdout).unwrap();
    let given = text
        .lines()
        .find(|l| {
            l.trim_start()
                .starts_with("process.compressor.pressure_ratio:")
        })
        .unwrap_or_else(|| panic!("given not named:\n{text}"));
    assert!(given.contains("10 -> 12"), "{given}");
    for moved in ["station.3.tt", "station.3.pt", "summary.thrust_net"] {
        assert!(
            text.lines()
                .any(|l| l.trim_start().starts_with(&format!("{moved}:"))),
            "{moved} not among the moved values:\n{text}"
        );
    }
    // Upstream of the compressor nothing moved.
    assert!(!text.contains("station.2.tt:"), "{text}");

    // JSON: the same facts, and identical files give no differences.
    let out = bin()
        .args(["diff", "--format", "json"])
        .arg(&a)
        .arg(&b)
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let givens = v["givens"].as_array().unwrap();
    assert_eq!(givens.len(), 1, "{givens:?}");
    assert_eq!(givens[0]["path"], "process.compressor.pressure_ratio");
    let out = bin().arg("diff").arg(&a).arg(&a).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_goal_on_a_target_that_jumps_is_a_problem_with_the_stop_reason_not_a_met_goal() {
    // The nozzle's choked flag is 0 below a compressor pressure ratio of
    // about 2.9 and 1 above it (the flag and the nozzle pressure ratio are
    // read off a sweep of this demo): no pressure ratio gives 0.5. Before,
    // the root finder closed its bracket on the jump and reported the goal
    // met, with a choked flag of 0 or 1 on screen.
    let text = turbojet_text().replacen(
        "    shafts:",
        "    goals: [(vary: \"process.compressor.pressure_ratio\", target: \"process.nozzle.choked\", value: \"0.5\", low: \"1.5\", high: \"5\")],\n    shafts:",
        1,
    );
    let e = engine_of(&text);
    let outcome = &e.goal_outcomes()[0];
    assert_eq!(outcome.value, None);
    let problems = e.problems();
    let p = problems.iter().find(|p| p.place == "goal 1").unwrap();
    assert!(
        p.message
            .starts_with("no convergence: process.nozzle.choked jumps across 0.5")
            && p.message.contains("process.compressor.pressure_ratio"),
        "{}",
        p.message
    );
    // The varied given is left where the user put it (10 in the demo).
    assert_eq!(value(&e, "process.compressor.pressure_ratio"), 10.0);
}

#[test]
fn rayleigh_heating_of_a_stream_at_rest_is_a_problem_in_words_not_nan() {
    // The static stand's free stream is at Mach 0: a constant-area heating
    // line has no steady solution there. Before, the message quoted a
    // temperature of NaN K.
    let text = turbojet_text().replacen(
        "kind: Duct(Recovery(\n                recovery: \"0.99\",\n            )),",
        "kind: Heating(Heat(\"100 kJ/kg\")),",
        1,
    );
    assert_ne!(text, turbojet_text(), "the edit did not apply");
    let e = engine_of(&text);
    let p = e.problems();
    let heat = p
        .iter()
        .find(|p| p.place == "Rayleigh heating \"intake\"")
        .unwrap();
    assert!(
        heat.message.contains("needs a moving inlet stream") && heat.message.contains("Mach 0"),
        "{}",
        heat.message
    );
    assert!(p.iter().all(|p| !p.message.contains("NaN")), "{p:?}");
}

#[test]
fn every_given_of_every_demo_is_reached_through_its_handle() {
    // A handle keeps the part of the workbook and the place within it; it
    // must reach the very given its path names (the workbook's own value,
    // read through `givens()`), and a set through it must equal a set by path.
    for name in [
        "turbojet",
        "turbofan",
        "ramjet",
        "tunnel",
        "combustor-rig",
        "compressor-rig",
        "compressor-speedline",
    ] {
        let text =
            std::fs::read_to_string(format!("{}/sheets/{name}.ron", env!("CARGO_MANIFEST_DIR")))
                .unwrap();
        let mut e = engine_of(&text);
        let givens = e.book().givens();
        assert!(givens.len() > 5, "{name}");
        for (path, _, _, si) in &givens {
            let h = e
                .handle(path)
                .unwrap_or_else(|err| panic!("{name} {path}: {err}"));
            assert_eq!(e.given_by(&h), Some(*si), "{name} {path}");
        }
        // A changed value through a handle lands where the path says (a
        // value its bounds refuse is left out; most givens take 0.1 % more).
        let mut landed = 0;
        for (path, _, _, si) in &givens {
            let h = e.handle(path).unwrap();
            let v = if *si == 0.0 { 1e-3 } else { si * 1.001 };
            if e.set_by(&h, v).is_ok() {
                let now = e.book().givens();
                let got = now.iter().find(|g| &g.0 == path).unwrap().3;
                assert_eq!(got, v, "{name} {path}");
                landed += 1;
            }
        }
        assert!(
            landed * 2 > givens.len(),
            "{name}: {landed} of {}",
            givens.len()
        );
    }
}
