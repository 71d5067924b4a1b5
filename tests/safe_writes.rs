//! Files the program writes never destroy what the user has: outputs never
//! land on inputs, saves keep links, modes and hard links, a kill leaves no
//! debris after the next save. Each check is against the file system itself
//! (bytes, inode numbers, mode bits), not against the program's own word.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
#![cfg(unix)]

use stationwise::format::{self, WriteError, WriteOptions};
use std::os::unix::fs::{MetadataExt, PermissionsExt};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn scratch(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("sw-safe-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&std::ffi::OsStr]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(args)
        .output()
        .unwrap()
}

fn book() -> stationwise::book::Workbook {
    format::load(&root().join("sheets/turbojet.ron")).unwrap()
}

fn mode(p: &Path) -> u32 {
    std::fs::metadata(p).unwrap().permissions().mode() & 0o7777
}

#[test]
fn reduce_out_onto_an_input_is_refused_and_inputs_are_untouched() {
    let d = scratch("reduce");
    let sheet = d.join("rig.ron");
    let scans = d.join("scans.csv");
    std::fs::copy(root().join("sheets/compressor-speedline.ron"), &sheet).unwrap();
    std::fs::copy(root().join("sheets/compressor-speedline-scans.csv"), &scans).unwrap();
    std::fs::hard_link(&scans, d.join("scans-link.csv")).unwrap();
    std::fs::hard_link(&sheet, d.join("rig-link.ron")).unwrap();
    let sheet0 = std::fs::read(&sheet).unwrap();
    let scans0 = std::fs::read(&scans).unwrap();
    for out in [
        "scans.csv",
        "rig.ron",
        "scans-link.csv",
        "rig-link.ron",
        "./scans.csv",
    ] {
        let o = run(&[
            "reduce".as_ref(),
            sheet.as_os_str(),
            "--scans".as_ref(),
            scans.as_os_str(),
            "--out".as_ref(),
            d.join(out).as_os_str(),
        ]);
        assert_eq!(o.status.code(), Some(1), "--out {out}: {o:?}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains("same file as the input"), "--out {out}: {err}");
        assert_eq!(std::fs::read(&sheet).unwrap(), sheet0, "--out {out}");
        assert_eq!(std::fs::read(&scans).unwrap(), scans0, "--out {out}");
    }
    // A separate output is written whole, and nothing temporary is left.
    let out = d.join("reduced.csv");
    let o = run(&[
        "reduce".as_ref(),
        sheet.as_os_str(),
        "--scans".as_ref(),
        scans.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
    ]);
    assert!(
        o.status.code() == Some(0) || o.status.code() == Some(2),
        "{o:?}"
    );
    let rows = std::fs::read_to_string(&out).unwrap().lines().count();
    let scans_rows = String::from_utf8_lossy(&scans0).lines().count();
    assert_eq!(rows, scans_rows, "one output row per scan plus the header");
    let debris: Vec<_> = std::fs::read_dir(&d)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().ends_with(".swtmp"))
        .collect();
    assert!(debris.is_empty(), "{debris:?}");
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn a_save_through_a_symlink_updates_the_target_and_keeps_the_link() {
    let d = scratch("link");
    let target = d.join("real.ron");
    let link = d.join("link.ron");
    std::fs::write(&target, "old").unwrap();
    std::os::unix::fs::symlink("real.ron", &link).unwrap();
    format::save(&link, &book()).unwrap();
    assert!(
        std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink()
    );
    assert_eq!(
        std::fs::read_to_string(&target).unwrap(),
        format::to_text(&book())
    );
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn a_save_keeps_the_mode_bits() {
    let d = scratch("mode");
    for m in [0o600, 0o640, 0o644, 0o660] {
        let p = d.join(format!("m{m:o}.ron"));
        std::fs::write(&p, "old").unwrap();
        std::fs::set_permissions(&p, std::fs::Permissions::from_mode(m)).unwrap();
        format::save(&p, &book()).unwrap();
        assert_eq!(mode(&p), m, "mode {m:o}");
    }
    // Read-only: refused unless forced; a forced save keeps it read-only.
    let p = d.join("ro.ron");
    std::fs::write(&p, "old").unwrap();
    std::fs::set_permissions(&p, std::fs::Permissions::from_mode(0o444)).unwrap();
    let e = format::save(&p, &book()).unwrap_err();
    assert!(matches!(e, WriteError::ReadOnly { mode: 0o444, .. }), "{e}");
    assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
    format::save_with(&p, &book(), WriteOptions { force: true }).unwrap();
    assert_eq!(mode(&p), 0o444);
    assert_eq!(
        std::fs::read_to_string(&p).unwrap(),
        format::to_text(&book())
    );
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn a_hard_linked_file_is_refused_unless_forced() {
    let d = scratch("hard");
    let a = d.join("a.ron");
    let b = d.join("b.ron");
    std::fs::write(&a, "old").unwrap();
    std::fs::hard_link(&a, &b).unwrap();
    let e = format::save(&a, &book()).unwrap_err();
    assert!(matches!(e, WriteError::HardLinked { links: 2, .. }), "{e}");
    assert_eq!(
        std::fs::metadata(&a).unwrap().ino(),
        std::fs::metadata(&b).unwrap().ino()
    );
    format::save_with(&a, &book(), WriteOptions { force: true }).unwrap();
    assert_eq!(std::fs::read_to_string(&b).unwrap(), "old");
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn a_killed_save_leaves_no_temporary_file_after_the_next_save() {
    let d = scratch("kill");
    let p = d.join("book.ron");
    std::fs::write(&p, "old").unwrap();
    // A child process (this test binary, re-run as the writer below)
    // starts a save and is killed with SIGKILL before it renames.
    let mut child = Command::new(std::env::current_exe().unwrap())
        .args(["--exact", "killed_writer_child", "--nocapture"])
        .env("SW_KILLED_WRITER", &p)
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let start = std::time::Instant::now();
    let tmp_seen = loop {
        let n = temporaries(&d).len();
        if n > 0 || start.elapsed().as_secs() > 20 {
            break n;
        }
        std::thread::sleep(std::time::Duration::from_millis(20));
    };
    child.kill().unwrap();
    let _ = child.wait();
    assert_eq!(tmp_seen, 1, "the killed writer had its temporary file");
    assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
    format::save(&p, &book()).unwrap();
    assert!(temporaries(&d).is_empty(), "{:?}", temporaries(&d));
    // A stale temporary file of a dead writer (a process id above the
    // kernel's pid_max, so no such process runs) is removed by the next save too.
    std::fs::write(d.join(".book.ron.999999999.abc123.swtmp"), "half").unwrap();
    format::save(&p, &book()).unwrap();
    assert!(temporaries(&d).is_empty(), "{:?}", temporaries(&d));
    let _ = std::fs::remove_dir_all(&d);
}

fn temporaries(d: &Path) -> Vec<String> {
    std::fs::read_dir(d)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().to_string())
        .filter(|n| n.ends_with(".swtmp"))
        .collect()
}

/// The writer that the kill test kills: runs only when re-executed by it.
#[test]
fn killed_writer_child() {
    let Some(p) = std::env::var_os("SW_KILLED_WRITER") else {
        return;
    };
    let _ = format::write_atomic_with(Path::new(&p), b"new", || {
        std::thread::sleep(std::time::Duration::from_secs(60));
        Ok(())
    });
}

#[test]
fn two_writers_never_share_a_temporary_name() {
    let d = scratch("two");
    let p = d.join("book.ron");
    let a = format::AtomicFile::create(&p, WriteOptions::default()).unwrap();
    let b = format::AtomicFile::create(&p, WriteOptions::default()).unwrap();
    let names: Vec<_> = std::fs::read_dir(&d)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.file_name())
        .collect();
    assert_eq!(names.len(), 2, "{names:?}");
    drop(a);
    b.commit().unwrap();
    assert!(p.exists());
    let _ = std::fs::remove_dir_all(&d);
}
