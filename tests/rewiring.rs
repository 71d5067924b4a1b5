//! Flow conservation under every single rewiring of the demo sheets.
//!
//! Each process's upstream station (`from`, and a mixer's second stream) is
//! pointed in turn at every other station. A rewiring must be refused (the
//! file does not load), or evaluate with a problem, or conserve mass: the
//! dry-air flow leaving the workbook at its terminal stations (those no
//! process takes flow from) equals the dry-air flow of its entries. Dry air
//! is w / (1 + far) at each station; conservation of mass across a control
//! volume around the whole workbook is the independent relation checked.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::book::{Kind, Workbook};
use stationwise::engine::{Engine, StationStatus};
use stationwise::format;
use std::path::PathBuf;

fn sheets() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/sheets"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "ron"))
        .collect();
    v.sort();
    v
}

/// Dry-air flow at the entries and at the terminal stations.
fn air_balance(book: &Workbook, e: &Engine) -> Option<(f64, f64)> {
    let mut consumed = std::collections::HashSet::new();
    for p in &book.processes {
        if let Some(f) = &p.from {
            consumed.insert(f.clone());
        }
        if let Kind::Mixer(m) = &p.kind {
            consumed.insert(m.secondary.clone());
        }
        if let Kind::Turbine(t) = &p.kind {
            consumed.extend(t.vane_cooling.iter().chain(&t.rotor_cooling).cloned());
        }
    }
    let air = |name: &str| -> Option<f64> {
        let i = e.station_index(name)?;
        match e.station_status(i) {
            StationStatus::Ok(v) => {
                let w = e.station_key(v, "w")?;
                let far = e.station_key(v, "far").unwrap_or(0.0);
                Some(w / (1.0 + far))
            }
            _ => None,
        }
    };
    let mut inflow = 0.0;
    for p in &book.processes {
        if matches!(p.kind, Kind::Entry(_)) {
            inflow += air(&p.to)?;
        }
    }
    let mut outflow = 0.0;
    for s in &book.stations {
        if !consumed.contains(&s.name) {
            outflow += air(&s.name)?;
        }
    }
    Some((inflow, outflow))
}

#[test]
fn every_rewiring_is_refused_flagged_or_conserves_mass() {
    let mut tried = 0;
    let mut refused = 0;
    let mut flagged = 0;
    for path in sheets() {
        let text = std::fs::read_to_string(&path).unwrap();
        let book = format::parse(&text).unwrap();
        // The sheet as shipped conserves mass (a check of the check).
        let e = Engine::new(book.clone()).unwrap();
        if e.problems().is_empty() {
            let (i, o) = air_balance(&book, &e).unwrap();
            assert!(
                (i - o).abs() <= 1e-9 * i,
                "{}: {i} in, {o} out",
                path.display()
            );
        }
        for (pi, p) in book.processes.iter().enumerate() {
            let mut slots = Vec::new();
            if p.from.is_some() {
                slots.push(false);
            }
            if matches!(p.kind, Kind::Mixer(_)) {
                slots.push(true);
            }
            for secondary in slots {
                for s in &book.stations {
                    let mut b = book.clone();
                    let q = &mut b.processes[pi];
                    let current = if secondary {
                        let Kind::Mixer(m) = &mut q.kind else {
                            unreachable!()
                        };
                        std::mem::replace(&mut m.secondary, s.name.clone())
                    } else {
                        q.from.replace(s.name.clone()).unwrap()
                    };
                    if current == s.name {
                        continue;
                    }
                    tried += 1;
                    let what = format!(
                        "{}: {}.{} -> {}",
                        path.file_name().unwrap().to_string_lossy(),
                        p.name,
                        if secondary { "secondary" } else { "from" },
                        s.name
                    );
                    // Through the file, as a user's edited sheet would be.
                    let Ok(b) = format::parse(&format::to_text(&b)) else {
                        refused += 1;
                        continue;
                    };
                    let e = Engine::new(b.clone()).unwrap();
                    if !e.problems().is_empty() {
                        flagged += 1;
                        continue;
                    }
                    let (i, o) = air_balance(&b, &e)
                        .unwrap_or_else(|| panic!("{what}: evaluates but a station has no value"));
                    assert!(
                        (i - o).abs() <= 1e-9 * i,
                        "{what}: evaluates with exit 0 but {i} kg/s of air enter and {o} kg/s leave"
                    );
                }
            }
        }
    }
    eprintln!("{tried} rewirings: {refused} refused, {flagged} flagged");
    assert!(tried > 150, "{tried}");
}

#[test]
fn the_turbofan_core_nozzle_on_station_2_is_refused_naming_the_station() {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/sheets/turbofan.ron"))
        .unwrap();
    let mut book = format::parse(&text).unwrap();
    let core = book
        .processes
        .iter_mut()
        .find(|p| {
            matches!(p.kind, Kind::Nozzle(_))
                && p.from.as_deref() != Some("13")
                && p.from.as_deref() != Some("16")
        })
        .unwrap();
    core.from = Some("2".into());
    let err = format::parse(&format::to_text(&book))
        .unwrap_err()
        .to_string();
    assert!(err.contains("station \"2\" feeds 2 processes"), "{err}");
}
