//! Any column of a relation as the input of a table: the Mach number that
//! gives a column value is recovered to 1e-10 for a perfect gas (against
//! the closed forms of the relations, written out here independently of the
//! library) and to 1e-8 for the thermally perfect gas (a round trip through
//! every column), and the Mach numbers of the Cantera reference states are
//! recovered from their pressure and temperature ratios.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::gas::{Composition, Gas, PerfectGas};
use stationwise::report::Cell;
use stationwise::table::{self, Pick, Relation, Rows, TableGas};

const G: f64 = 1.4;

fn perfect() -> TableGas {
    TableGas {
        gas: Gas::Perfect(PerfectGas::new(G, 287.05).unwrap()),
        tt: 288.15,
    }
}

fn thermal(tt: f64) -> TableGas {
    TableGas {
        gas: Gas::Thermal(Composition::dry_air().mixture()),
        tt,
    }
}

/// The Mach numbers (first column) of the rows given by `key = value`.
fn machs(rel: Relation, g: &TableGas, key: &str, value: f64, pick: Pick) -> Vec<f64> {
    let (t, failed) = table::build(
        rel,
        g,
        &Rows::Given {
            key: key.into(),
            values: vec![value],
            branch: pick,
        },
    )
    .unwrap();
    assert_eq!(failed, 0, "{key} = {value}: {:?}", t.rows);
    t.rows
        .iter()
        .map(|r| match r[0] {
            Cell::Num(m) => m,
            ref other => panic!("{other:?}"),
        })
        .collect()
}

fn one(rel: Relation, g: &TableGas, key: &str, value: f64, pick: Pick) -> f64 {
    let m = machs(rel, g, key, value, pick);
    assert_eq!(m.len(), 1, "{key} = {value}: roots {m:?}");
    m[0]
}

fn close(what: &str, got: f64, want: f64, tol: f64) {
    assert!(
        (got - want).abs() <= tol * want.abs().max(1.0),
        "{what}: {got} against {want} (tolerance {tol:e})"
    );
}

// Closed forms of the calorically perfect relations (standard textbook
// results, as tabulated in NACA Report 1135; written out here, not taken
// from the library).
fn p_pt(m: f64) -> f64 {
    (1.0 + 0.5 * (G - 1.0) * m * m).powf(-G / (G - 1.0))
}
fn area_ratio(m: f64) -> f64 {
    let e = (G + 1.0) / (2.0 * (G - 1.0));
    ((2.0 / (G + 1.0)) * (1.0 + 0.5 * (G - 1.0) * m * m)).powf(e) / m
}
fn prandtl_meyer_deg(m: f64) -> f64 {
    let k = ((G + 1.0) / (G - 1.0)).sqrt();
    let b = (m * m - 1.0).sqrt();
    (k * (b / k).atan() - b.atan()).to_degrees()
}
fn shock_pt_ratio(m: f64) -> f64 {
    let a = ((G + 1.0) * m * m / ((G - 1.0) * m * m + 2.0)).powf(G / (G - 1.0));
    let b = ((G + 1.0) / (2.0 * G * m * m - (G - 1.0))).powf(1.0 / (G - 1.0));
    a * b
}
fn fanno_4fl_d(m: f64) -> f64 {
    let m2 = m * m;
    (1.0 - m2) / (G * m2) + (G + 1.0) / (2.0 * G) * ((G + 1.0) * m2 / (2.0 + (G - 1.0) * m2)).ln()
}
fn rayleigh_tt(m: f64) -> f64 {
    let m2 = m * m;
    (G + 1.0) * m2 * (2.0 + (G - 1.0) * m2) / (1.0 + G * m2).powi(2)
}
/// Flow deflection of an oblique shock of wave angle `beta` at Mach `m`.
fn deflection(m: f64, beta: f64) -> f64 {
    let num = 2.0 / beta.tan() * (m * m * beta.sin().powi(2) - 1.0);
    let den = m * m * (G + (2.0 * beta).cos()) + 2.0;
    (num / den).atan()
}

#[test]
fn perfect_gas_mach_is_recovered_from_closed_forms_to_1e_10() {
    let g = perfect();
    let iso = Relation::Isentropic;
    for m in [0.05, 0.3, 0.8, 0.999, 1.2, 2.0, 3.5, 8.0] {
        close(
            "p/pt",
            one(iso, &g, "p_pt", p_pt(m), Pick::Unstated),
            m,
            1e-10,
        );
        let b = if m < 1.0 {
            Pick::Subsonic
        } else {
            Pick::Supersonic
        };
        close("A/A*", one(iso, &g, "a_astar", area_ratio(m), b), m, 1e-10);
        if m > 1.0 {
            let nu = prandtl_meyer_deg(m);
            close(
                "nu",
                one(iso, &g, "prandtl_meyer_deg", nu, Pick::Unstated),
                m,
                1e-10,
            );
            let mu = (1.0 / m).asin().to_degrees();
            close(
                "mu",
                one(iso, &g, "mach_angle_deg", mu, Pick::Unstated),
                m,
                1e-10,
            );
            let ns = Relation::NormalShock;
            close(
                "pt2/pt1",
                one(ns, &g, "pt2_pt1", shock_pt_ratio(m), Pick::Unstated),
                m,
                1e-10,
            );
            let p21 = 1.0 + 2.0 * G / (G + 1.0) * (m * m - 1.0);
            close("p2/p1", one(ns, &g, "p2_p1", p21, Pick::Unstated), m, 1e-10);
        }
        let fb = if m < 1.0 {
            Pick::Subsonic
        } else {
            Pick::Supersonic
        };
        if m < 1.0 || fanno_4fl_d(m) > 0.0 {
            close(
                "4fL*/D",
                one(
                    Relation::Fanno,
                    &g,
                    "friction_4flstar_d",
                    fanno_4fl_d(m),
                    fb,
                ),
                m,
                1e-10,
            );
        }
        close(
            "Tt/Tt*",
            one(Relation::Rayleigh, &g, "tt_ttstar", rayleigh_tt(m), fb),
            m,
            1e-10,
        );
    }
    // Oblique shock: the wave angle at a set deflection gives back M1.
    for (m, beta_deg) in [(2.0, 40.0), (3.0, 30.0), (5.0, 20.0)] {
        let theta: f64 = deflection(m, f64::to_radians(beta_deg));
        let rel = Relation::ObliqueShock(theta);
        close(
            "beta weak",
            one(rel, &g, "beta_weak_deg", beta_deg, Pick::Unstated),
            m,
            1e-10,
        );
    }
}

#[test]
fn two_roots_need_a_branch_and_both_prints_both() {
    // NACA 1135 Table I (from memory): A/A* = 1.6875 at M 2.0 and near M 0.372.
    let g = perfect();
    let (t, failed) = table::build(
        Relation::Isentropic,
        &g,
        &Rows::Given {
            key: "a_astar".into(),
            values: vec![1.6875],
            branch: Pick::Unstated,
        },
    )
    .unwrap();
    assert_eq!(failed, 1);
    let Cell::Text(note) = t.rows[0].last().unwrap() else {
        panic!("{:?}", t.rows[0])
    };
    assert!(note.contains("--branch"), "{note}");
    let both = machs(Relation::Isentropic, &g, "a_astar", 1.6875, Pick::Both);
    assert_eq!(both.len(), 2);
    close("subsonic", both[0], 0.372, 1e-3);
    close("supersonic", both[1], 2.0, 1e-4);
    // Rayleigh T/T* peaks below Mach 1 (at 1/sqrt(gamma)): two subsonic roots.
    let r = machs(Relation::Rayleigh, &g, "t_tstar", 1.02, Pick::Subsonic);
    assert_eq!(r.len(), 2, "{r:?}");
}

#[test]
fn thermally_perfect_round_trip_through_every_column_to_1e_8() {
    let g = thermal(1500.0);
    for rel in [
        Relation::Isentropic,
        Relation::NormalShock,
        Relation::Rayleigh,
        Relation::Fanno,
        Relation::ObliqueShock(10f64.to_radians()),
    ] {
        let keys = table::columns(rel);
        for m in [0.3, 0.9, 1.5, 2.5, 4.0] {
            let (t, _) = table::build(rel, &g, &Rows::Mach(vec![m])).unwrap();
            let row = &t.rows[0];
            for (i, (key, _)) in keys.iter().enumerate().skip(1) {
                if matches!(rel, Relation::ObliqueShock(_)) && *key == "deflection_deg" {
                    continue;
                }
                let Cell::Num(v) = row[i] else { continue };
                let roots = machs(rel, &g, key, v, Pick::Both);
                let best = roots
                    .iter()
                    .map(|r| (r - m).abs())
                    .fold(f64::INFINITY, f64::min);
                assert!(
                    best <= 1e-8 * m,
                    "{rel:?} {key} = {v} at M {m}: roots {roots:?}"
                );
            }
        }
    }
}

#[test]
fn cantera_states_give_back_their_mach_numbers() {
    // Cantera 3.2.0 (tests/data/cantera_isentropic.json, dry air at Tt 1500 K,
    // pt 101325 Pa): p/pt and T/Tt of each static state give back its Mach
    // number; the model agrees with Cantera's states to about 1e-7.
    let text = std::fs::read_to_string(format!(
        "{}/tests/data/cantera_isentropic.json",
        env!("CARGO_MANIFEST_DIR")
    ))
    .unwrap();
    let d: serde_json::Value = serde_json::from_str(&text).unwrap();
    let case = d["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["name"] == "dry_air" && c["tt"] == 1500.0)
        .unwrap();
    let (tt, pt) = (case["tt"].as_f64().unwrap(), case["pt"].as_f64().unwrap());
    let g = thermal(tt);
    let mut checked = 0;
    for p in case["points"].as_array().unwrap() {
        if p["out_of_range"].as_bool().unwrap() {
            continue;
        }
        let m = p["mach"].as_f64().unwrap();
        let from_p = one(
            Relation::Isentropic,
            &g,
            "p_pt",
            p["p"].as_f64().unwrap() / pt,
            Pick::Unstated,
        );
        close("M from p/pt", from_p, m, 1e-6);
        let from_t = one(
            Relation::Isentropic,
            &g,
            "t_tt",
            p["t"].as_f64().unwrap() / tt,
            Pick::Unstated,
        );
        close("M from T/Tt", from_t, m, 1e-6);
        checked += 1;
    }
    assert!(checked >= 4, "{checked}");
}

#[test]
fn thermal_oblique_shock_computes_at_every_mach_above_detachment() {
    // A thermally perfect oblique shock at 10 deg once failed at scattered
    // M1 (1.431, 1.444, ...): the wave-angle search met waves barely above
    // Mach 1 whose jump residual is below round-off. Every M1 on a fine
    // grid above detachment must compute, with the weak wave angle falling
    // as M1 rises (the theta-beta-M relation, any gas).
    let g = thermal(1500.0);
    let ms: Vec<f64> = (0..561).map(|i| 1.42 + 0.0005 * i as f64).collect();
    let (t, failed) = table::build(
        Relation::ObliqueShock(10f64.to_radians()),
        &g,
        &Rows::Mach(ms),
    )
    .unwrap();
    assert_eq!(failed, 0);
    let betas: Vec<f64> = t
        .rows
        .iter()
        .map(|r| match r[2] {
            Cell::Num(b) => b,
            ref o => panic!("{o:?}"),
        })
        .collect();
    assert!(betas.windows(2).all(|w| w[1] < w[0]));
}

#[test]
fn an_overflowed_value_is_a_row_problem_not_an_empty_cell() {
    // At gamma 1.0001 and Mach 50 the area ratio ((1 + (g-1)/2 M^2)^((g+1)/(2(g-1))))
    // is about 10^(2e4 * log10(1.125)) and overflows a double: the row says so.
    let g = TableGas {
        gas: Gas::Perfect(PerfectGas::new(1.0001, 287.05).unwrap()),
        tt: 288.15,
    };
    let (t, failed) = table::build(Relation::Isentropic, &g, &Rows::Mach(vec![0.5, 50.0])).unwrap();
    assert_eq!(failed, 1);
    let Cell::Text(note) = t.rows[1].last().unwrap() else {
        panic!("{:?}", t.rows[1])
    };
    assert!(note.contains("overflows"), "{note}");
    assert_eq!(
        *t.rows[0].last().unwrap(),
        Cell::Empty,
        "the first row computed"
    );
}
