//! Sweeps stream their rows: memory does not grow with the number of
//! points, and a sweep whose points fail says so in its exit status.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
#![cfg(target_os = "linux")]

use std::process::{Command, Stdio};

fn sheet() -> String {
    concat!(env!("CARGO_MANIFEST_DIR"), "/sheets/turbojet.ron").to_string()
}

/// Peak resident memory (kB) of the largest child waited for so far.
fn children_peak_kb() -> i64 {
    let mut u = std::mem::MaybeUninit::<libc::rusage>::zeroed();
    // SAFETY: getrusage fills the struct it is given; RUSAGE_CHILDREN is valid.
    unsafe {
        libc::getrusage(libc::RUSAGE_CHILDREN, u.as_mut_ptr());
        u.assume_init().ru_maxrss
    }
}

fn sweep(steps: usize, format: &str) -> (i64, usize) {
    let out = Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(["sweep", &sheet(), "--vary"])
        .arg(format!("process.nozzle.cfg=0.95:0.99@{}", steps + 1))
        .args(["--report", "summary.thrust_net", "--format", format])
        .stdout(Stdio::piped())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let lines = out.stdout.iter().filter(|&&b| b == b'\n').count();
    (children_peak_kb(), lines)
}

#[test]
fn a_long_sweep_runs_in_the_memory_of_a_short_one() {
    // Each format in its own order: the peak over children only grows, so
    // the short run is measured first.
    let (small, n_small) = sweep(1_000, "csv");
    assert_eq!(n_small, 1_000 + 2, "header and one row per point");
    let (large, n_large) = sweep(300_000, "csv");
    assert_eq!(n_large, 300_000 + 2);
    let (large_json, n_json) = sweep(300_000, "json");
    assert_eq!(
        n_json,
        300_001 + 2,
        "opening and closing lines and one row per point"
    );
    // Held in memory, 300,001 rows of CSV would be about 15 MB more.
    assert!(large <= 2 * small, "peak {large} kB against {small} kB");
    assert!(
        large_json <= 2 * small,
        "peak {large_json} kB against {small} kB"
    );
}

#[test]
fn a_sweep_with_failed_points_exits_2_and_counts_them() {
    let out = Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args([
            "sweep",
            &sheet(),
            "--vary",
            "process.compressor.efficiency=0.9:1.1@5",
        ])
        .args(["--report", "summary.thrust_net", "--format", "csv"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2), "{out:?}");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("2 of 5 points had a problem"), "{err}");
    let text = String::from_utf8_lossy(&out.stdout);
    // The points above 1 carry their reason and no thrust.
    let last = text.lines().last().unwrap();
    assert!(last.starts_with("1.10000,,"), "{last}");
    assert!(last.contains("above 1"), "{last}");
}

#[test]
fn one_range_syntax_step_or_points_and_a_missed_step_is_refused() {
    let run = |range: &str| {
        Command::new(env!("CARGO_BIN_EXE_stationwise"))
            .args(["sweep", &sheet(), "--vary"])
            .arg(format!("process.compressor.pressure_ratio={range}"))
            .args(["--report", "summary.thrust_net", "--format", "csv"])
            .output()
            .unwrap()
    };
    let rows = |range: &str| {
        let out = run(range);
        assert_eq!(out.status.code(), Some(0), "{range}: {out:?}");
        String::from_utf8(out.stdout).unwrap().lines().count() - 1
    };
    // A step size, as `table --mach 0.5:3:0.5` reads it: 6 to 16 in steps of 1.
    assert_eq!(rows("6:16:1"), 11);
    // A count of points.
    assert_eq!(rows("6:16@3"), 3);
    // The old STEPS reading (1000 steps) is a step larger than the span:
    // refused, with the points form as the hint.
    let out = run("6:16:1000");
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("@1001"), "{err}");
    // Values and ranges mixed, as tables take them: 6, 8, 10, 12, 20.
    assert_eq!(rows("6,8:12:2,20"), 5);
    // A step that does not land on TO is refused, never rounded.
    let out = run("6:16:3");
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("whole steps"));
}
