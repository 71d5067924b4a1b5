//! The bad-input matrix: every given of every demo sheet set to a negative
//! number, zero, NaN, infinity, 1e300, nothing, garbage, a unit of another
//! quantity and a unit without a number. Each case must be refused (the old
//! value kept) or leave a problem; a case that evaluates cleanly must give
//! only finite results with absolute temperatures and pressures above zero
//! (the independent check: the ideal-gas state of a real flow). Checked in
//! the library for every case and through the binary for a sample.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use stationwise::book::paths::{STATION_KEYS, SUMMARY_KEYS};
use stationwise::engine::{Engine, StationStatus};
use stationwise::format;
use stationwise::units::Quantity;
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

fn cases(q: Quantity) -> Vec<String> {
    let wrong = match q {
        Quantity::Temperature | Quantity::TemperatureDifference => "5 kg/s",
        _ => "5 K",
    };
    let unit_only = match q {
        Quantity::Pressure => "kPa",
        Quantity::Temperature => "K",
        Quantity::MassFlow => "kg/s",
        _ => "m2",
    };
    [
        "-1", "-1e300", "0", "nan", "inf", "-inf", "1e300", "", "garbage", wrong, unit_only,
        "4.9e-324",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect()
}

/// Every value the engine reports is finite, and absolute temperatures,
/// pressures and densities are positive. Returns what is wrong.
fn nonsense(e: &Engine) -> Option<String> {
    for (i, s) in e.stations().iter().enumerate() {
        if let StationStatus::Ok(v) = e.station_status(i) {
            for (k, _, _) in STATION_KEYS {
                if let Some(x) = e.station_key(v, k) {
                    if !x.is_finite() {
                        return Some(format!("station {} {k} = {x}", s.name));
                    }
                    if matches!(k, "tt" | "pt" | "t" | "p" | "rho") && x <= 0.0 {
                        return Some(format!("station {} {k} = {x}", s.name));
                    }
                }
            }
        }
    }
    for (k, _, _) in SUMMARY_KEYS {
        if let Some(x) = e.summary().get(k)
            && !x.is_finite()
        {
            return Some(format!("summary {k} = {x}"));
        }
    }
    for p in &e.book().processes {
        if let Some(r) = e.process(&p.name) {
            for (k, x) in &r.figures {
                if !x.is_finite() {
                    return Some(format!("process {} {k} = {x}", p.name));
                }
            }
        }
    }
    None
}

#[test]
fn every_bad_given_is_refused_or_a_problem_never_nonsense() {
    let (mut refused, mut problems, mut clean, mut total) = (0, 0, 0, 0);
    for path in sheets() {
        let book = format::load(&path).unwrap();
        let base = Engine::new(book.clone()).unwrap();
        let base_text = format::to_text(base.book());
        for (gpath, q, _, _) in book.givens() {
            for text in cases(q) {
                total += 1;
                let what = format!(
                    "{}: {gpath} = {text:?}",
                    path.file_name().unwrap().to_string_lossy()
                );
                let mut e = base.clone();
                match e.set_given(&gpath, &text) {
                    Err(err) => {
                        refused += 1;
                        assert!(!err.to_string().is_empty(), "{what}");
                        assert_eq!(
                            format::to_text(e.book()),
                            base_text,
                            "{what}: old value kept"
                        );
                    }
                    Ok(()) if !e.problems().is_empty() => problems += 1,
                    Ok(()) => {
                        clean += 1;
                        if let Some(bad) = nonsense(&e) {
                            panic!("{what}: evaluates without a problem but {bad}");
                        }
                    }
                }
            }
        }
    }
    eprintln!("{total} cases: {refused} refused, {problems} problems, {clean} clean and sane");
    assert!(total > 1000, "{total}");
}

#[test]
fn absurd_givens_from_the_review_are_refused_through_the_binary() {
    let dir = std::env::temp_dir().join(format!("sw-bad-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let sheet =
        std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/sheets/turbojet.ron"))
            .unwrap();
    for (from, to) in [
        (
            "mechanical_efficiency: \"0.99\"",
            "mechanical_efficiency: \"-1\"",
        ),
        ("w: \"20 kg/s\"", "w: \"1e300 kg/s\""),
        ("w: \"20 kg/s\"", "w: \"4.9e-324 kg/s\""),
        ("efficiency: \"0.84\"", "efficiency: \"1.5\""),
    ] {
        assert!(sheet.contains(from), "{from}");
        let p = dir.join("bad.ron");
        std::fs::write(&p, sheet.replacen(from, to, 1)).unwrap();
        let o = std::process::Command::new(env!("CARGO_BIN_EXE_stationwise"))
            .arg("eval")
            .arg(&p)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(1), "{to}: {o:?}");
        assert!(
            String::from_utf8_lossy(&o.stderr).contains("must be"),
            "{to}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}
