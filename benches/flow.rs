//! Speed of the core flow relations, for the calorically perfect gas (closed
//! forms) and the thermally perfect one (NASA polynomial mixture, solvers).
//!
//! Run: `cargo bench --bench flow` (short: add
//! `-- --warm-up-time 1 --measurement-time 2`).
#![allow(clippy::unwrap_used, clippy::expect_used)]

use criterion::{Criterion, criterion_group, criterion_main};
use stationwise::flow::{Branch, isentropic, shock};
use stationwise::gas::{Composition, Fuel, Gas, PerfectGas};
use std::hint::black_box;

const TT: f64 = 1200.0;
const PT: f64 = 5.0e5;

fn gases() -> [(&'static str, Gas); 2] {
    [
        ("perfect", Gas::Perfect(PerfectGas::AIR)),
        ("thermal", Gas::Thermal(Composition::dry_air().mixture())),
    ]
}

fn static_from_total(c: &mut Criterion) {
    let mut group = c.benchmark_group("from_mach");
    for (name, gas) in gases() {
        for m in [0.6, 2.0] {
            group.bench_function(format!("{name}/M{m}"), |b| {
                b.iter(|| isentropic::from_mach(black_box(&gas), black_box(TT), PT, black_box(m)))
            });
        }
    }
    group.finish();
}

fn normal_shock(c: &mut Criterion) {
    let mut group = c.benchmark_group("normal_shock");
    for (name, gas) in gases() {
        let up = isentropic::from_mach(&gas, TT, PT, 2.0).unwrap();
        group.bench_function(format!("{name}/M2"), |b| {
            b.iter(|| shock::normal(black_box(&gas), black_box(&up)))
        });
    }
    group.finish();
}

fn from_flow_subsonic(c: &mut Criterion) {
    let mut group = c.benchmark_group("from_flow_subsonic");
    for (name, gas) in gases() {
        let s = isentropic::from_mach(&gas, TT, PT, 0.6).unwrap();
        let (w, area) = (s.flux() * 0.1, 0.1);
        group.bench_function(format!("{name}/M0.6"), |b| {
            b.iter(|| {
                isentropic::from_flow(
                    black_box(&gas),
                    black_box(TT),
                    PT,
                    black_box(w),
                    area,
                    Branch::Subsonic,
                )
            })
        });
    }
    group.finish();
}

fn products_mixture(c: &mut Criterion) {
    let comp = Composition::dry_air().burnt(0.02, Fuel::KEROSENE).unwrap();
    c.bench_function("composition_mixture/products_far_0.02", |b| {
        b.iter(|| black_box(&comp).mixture())
    });
}

criterion_group!(
    benches,
    static_from_total,
    normal_shock,
    from_flow_subsonic,
    products_mixture
);
criterion_main!(benches);
