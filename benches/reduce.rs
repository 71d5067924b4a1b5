//! Throughput of test-data reduction: the compressor speed-line demo sheet
//! on 100_000 scans held in memory (the 300 demo rows repeated, SCAN
//! renumbered), every default figure reported, output discarded; and, with
//! the linearised uncertainty (central differences, two extra evaluations
//! per channel), on 10_000 scans.
//!
//! Criterion reports scans per second ("elem/s"); after each group the
//! bench prints the rate of the median of three more passes and the time
//! a million scans would take at that rate.
//!
//! Run: `cargo bench --bench reduce`.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use stationwise::engine::Engine;
use stationwise::format;
use stationwise::reduce::{self, Options};
use std::hint::black_box;
use std::path::Path;
use std::time::Instant;

fn demo_engine() -> Engine {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let book = format::load(&root.join("sheets/compressor-speedline.ron")).unwrap();
    Engine::new(book).unwrap()
}

/// The demo scan file with its data rows repeated to `n` rows, SCAN
/// renumbered 1..=n.
fn scans(n: usize) -> String {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(root.join("sheets/compressor-speedline-scans.csv")).unwrap();
    let mut lines = text.lines();
    let header = lines.next().unwrap();
    let rows: Vec<&str> = lines
        .filter(|l| !l.trim().is_empty())
        .map(|l| l.split_once(',').unwrap().1)
        .collect();
    let mut out = String::with_capacity(header.len() + n * (rows[0].len() + 8));
    out.push_str(header);
    out.push('\n');
    for i in 0..n {
        out.push_str(&(i + 1).to_string());
        out.push(',');
        out.push_str(rows[i % rows.len()]);
        out.push('\n');
    }
    out
}

/// Reduce the text; the number of scans reduced without a problem.
fn run(engine: &Engine, text: &str, report: &[String], opts: &Options) -> u64 {
    let mut reader = reduce::ScanReader::from_text(text).unwrap();
    let mut good = 0u64;
    reduce::reduce(
        engine,
        &mut reader,
        report,
        opts,
        |s| {
            if s.problems.is_empty() {
                good += 1;
            }
            black_box(&s.values);
            Ok(())
        },
        |_| {},
    )
    .unwrap();
    good
}

fn bench(c: &mut Criterion, name: &str, n: usize, opts: Options) {
    let engine = demo_engine();
    let report = reduce::default_report(&engine);
    let text = scans(n);
    // Every scan must reduce (checked once, outside the measurement).
    assert_eq!(run(&engine, &text, &report, &opts), n as u64);
    let mut group = c.benchmark_group("reduce");
    group.sample_size(10);
    group.throughput(Throughput::Elements(n as u64));
    group.bench_function(name, |b| {
        b.iter(|| run(&engine, black_box(&text), &report, &opts))
    });
    group.finish();
    // The extrapolation to a million scans, from the median of three
    // passes (criterion's own estimate is the line above).
    let mut times: Vec<f64> = (0..3)
        .map(|_| {
            let t = Instant::now();
            black_box(run(&engine, &text, &report, &opts));
            t.elapsed().as_secs_f64()
        })
        .collect();
    times.sort_by(f64::total_cmp);
    let rate = n as f64 / times[1];
    println!(
        "{name}: median of 3 passes {:.3} s = {rate:.0} scans/s; 1_000_000 scans: about {:.1} s",
        times[1],
        1e6 / rate
    );
}

fn throughput(c: &mut Criterion) {
    bench(
        c,
        "speedline_100k_scans",
        100_000,
        Options {
            batch: 4096,
            ..Options::default()
        },
    );
}

fn throughput_uncertainty(c: &mut Criterion) {
    bench(
        c,
        "speedline_10k_scans_uncertainty",
        10_000,
        Options {
            uncertainty: true,
            batch: 4096,
            ..Options::default()
        },
    );
}

criterion_group!(benches, throughput, throughput_uncertainty);
criterion_main!(benches);
