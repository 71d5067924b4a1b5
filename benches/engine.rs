//! Speed of the workbook engine: full evaluation, incremental recompute
//! after one edit, and sweep throughput.
//!
//! Sheets: the turbojet demo (thermally perfect), the same sheet with a
//! calorically perfect gas, and the turbofan demo when sheets/turbofan.ron is
//! present and loads.
//!
//! Run: `cargo bench --bench engine` (short: add
//! `-- --warm-up-time 1 --measurement-time 2`).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{BatchSize, Criterion, Throughput, criterion_group, criterion_main};
use stationwise::book::Workbook;
use stationwise::engine::{Engine, sweep};
use std::hint::black_box;
use std::path::Path;

/// A sheet to measure: name, book, a nozzle cv path, a compressor pressure
/// ratio path and the range swept.
struct Sheet {
    name: &'static str,
    book: Workbook,
    cv: &'static str,
    pressure_ratio: &'static str,
    sweep: (f64, f64),
}

fn read(rel: &str) -> Option<String> {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)).ok()
}

fn sheets() -> Vec<Sheet> {
    let turbojet = read("sheets/turbojet.ron").expect("sheets/turbojet.ron");
    let perfect = turbojet.replace(
        "gas: ThermallyPerfect,",
        "gas: CaloricallyPerfect(gamma: \"1.4\", r: \"287.05\"),",
    );
    assert_ne!(perfect, turbojet, "the turbojet sheet's gas line moved");
    let mut out = vec![
        Sheet {
            name: "turbojet_thermal",
            book: stationwise::format::parse(&turbojet).unwrap(),
            cv: "process.nozzle.cv",
            pressure_ratio: "process.compressor.pressure_ratio",
            sweep: (4.0, 30.0),
        },
        Sheet {
            name: "turbojet_perfect",
            book: stationwise::format::parse(&perfect).unwrap(),
            cv: "process.nozzle.cv",
            pressure_ratio: "process.compressor.pressure_ratio",
            sweep: (4.0, 30.0),
        },
    ];
    if let Some(text) = read("sheets/turbofan.ron") {
        match stationwise::format::parse(&text) {
            Ok(book) => out.push(Sheet {
                name: "turbofan_thermal",
                book,
                cv: "process.core nozzle.cv",
                pressure_ratio: "process.hp compressor.pressure_ratio",
                sweep: (10.0, 30.0),
            }),
            Err(e) => eprintln!("sheets/turbofan.ron not measured: {e}"),
        }
    }
    out
}

/// Alternate between two SI values so that every iteration is a real change.
struct Toggle(bool);

impl Toggle {
    fn next(&mut self, a: f64, b: f64) -> f64 {
        self.0 = !self.0;
        if self.0 { a } else { b }
    }
}

fn full_evaluation(c: &mut Criterion) {
    let mut group = c.benchmark_group("full_evaluation");
    for s in sheets() {
        // Compile and evaluate a parsed book (the clone of the book is made
        // outside the timed part).
        group.bench_function(format!("{}/engine_new", s.name), |b| {
            b.iter_batched(
                || s.book.clone(),
                |book| Engine::new(black_box(book)).unwrap(),
                BatchSize::SmallInput,
            )
        });
        // Every process reruns: a new altitude changes the free stream, and
        // everything is downstream of it.
        let mut e = Engine::new(s.book.clone()).unwrap();
        let n = e.evaluations();
        e.set_si("ambient.altitude", 1.0).unwrap();
        assert_eq!(
            e.evaluations() - n,
            s.book.processes.len() as u64,
            "{}: an altitude change must rerun every process",
            s.name
        );
        let base = e.book().givens();
        let alt = base
            .iter()
            .find(|g| g.0 == "ambient.altitude")
            .map(|g| g.3)
            .unwrap();
        let mut t = Toggle(false);
        // Through a handle, as sweeps and reductions set givens: no path
        // parsed per iteration.
        let h = e.handle("ambient.altitude").unwrap();
        group.bench_function(format!("{}/all_processes", s.name), |b| {
            b.iter(|| {
                e.set_by(&h, black_box(t.next(alt, alt + 1.0))).unwrap();
            })
        });
    }
    group.finish();
}

fn incremental(c: &mut Criterion) {
    let mut group = c.benchmark_group("incremental");
    for s in sheets() {
        let mut e = Engine::new(s.book.clone()).unwrap();
        let n = e.evaluations();
        e.set_si(s.cv, 0.985).unwrap();
        assert_eq!(e.evaluations() - n, 1, "{}: cv reruns one process", s.name);
        let mut t = Toggle(false);
        let h = e.handle(s.cv).unwrap();
        group.bench_function(format!("{}/nozzle_cv", s.name), |b| {
            b.iter(|| e.set_by(&h, black_box(t.next(0.98, 0.99))).unwrap())
        });
    }
    group.finish();
}

fn sweep_throughput(c: &mut Criterion) {
    const POINTS: usize = 100_000;
    let mut group = c.benchmark_group("sweep");
    group.sample_size(10);
    group.throughput(Throughput::Elements(POINTS as u64));
    let report = ["summary.thrust_net".to_string()];
    for s in sheets() {
        let e = Engine::new(s.book.clone()).unwrap();
        let values = sweep::linspace(s.sweep.0, s.sweep.1, POINTS - 1);
        assert_eq!(values.len(), POINTS);
        let rows = sweep::run(&e, s.pressure_ratio, &values, &report).unwrap();
        assert!(
            rows.iter().all(|(_, v)| v[0].is_some()),
            "{}: every sweep point must compute",
            s.name
        );
        group.bench_function(format!("{}/pressure_ratio_100k", s.name), |b| {
            b.iter(|| sweep::run(&e, s.pressure_ratio, black_box(&values), &report).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, full_evaluation, incremental, sweep_throughput);
criterion_main!(benches);
