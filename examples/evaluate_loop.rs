//! Profiling aid: evaluate a workbook many times (every process reruns
//! through an altitude toggle), for `valgrind --tool=callgrind` or `perf`.
//!
//! Run: `cargo run --release --example evaluate_loop -- sheets/turbojet.ron 100000`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::hint::black_box;

fn main() {
    let mut args = std::env::args().skip(1);
    let path = args.next().unwrap_or_else(|| "sheets/turbojet.ron".into());
    let n: u64 = args.next().and_then(|s| s.parse().ok()).unwrap_or(100_000);
    let book = stationwise::format::load(std::path::Path::new(&path)).expect("load");
    let mut e = stationwise::engine::Engine::new(book).expect("compile");
    let base = e
        .book()
        .givens()
        .iter()
        .find(|g| g.0 == "ambient.altitude")
        .map(|g| g.3)
        .unwrap_or(0.0);
    let h = e.handle("ambient.altitude").expect("altitude given");
    let t0 = std::time::Instant::now();
    for i in 0..n {
        let alt = if i % 2 == 0 { base + 1.0 } else { base };
        e.set_by(&h, black_box(alt)).expect("set");
    }
    let dt = t0.elapsed();
    println!(
        "{path}: {n} full evaluations, {:.3} us each",
        dt.as_secs_f64() * 1e6 / n as f64
    );
}
