//! Completions and man pages come from the clap definitions: each shell's
//! script names every command and option, bash accepts the script's syntax
//! (`bash -n`), and `manual` writes a page per command carrying the caution.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::process::Command;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
}

#[test]
fn completion_scripts_name_the_commands_and_bash_accepts_them() {
    for shell in ["bash", "zsh", "fish"] {
        let out = bin().args(["completions", shell]).output().unwrap();
        assert_eq!(out.status.code(), Some(0), "{shell}: {out:?}");
        let text = String::from_utf8(out.stdout).unwrap();
        for word in ["sweep", "reduce", "precision", "given", "completions"] {
            assert!(text.contains(word), "{shell} script lacks {word}");
        }
        if shell == "bash" {
            let dir = std::env::temp_dir().join(format!("sw-compl-{}", std::process::id()));
            std::fs::create_dir_all(&dir).unwrap();
            let f = dir.join("stationwise.bash");
            std::fs::write(&f, &text).unwrap();
            let check = Command::new("bash").arg("-n").arg(&f).output().unwrap();
            assert!(check.status.success(), "bash -n: {check:?}");
            let _ = std::fs::remove_dir_all(&dir);
        }
    }
    let out = bin().args(["completions", "nosuchshell"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
}

#[test]
fn manual_writes_a_page_per_command_with_the_caution() {
    let dir = std::env::temp_dir().join(format!("sw-man-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = bin().arg("manual").arg(&dir).output().unwrap();
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let main = std::fs::read_to_string(dir.join("stationwise.1")).unwrap();
    assert!(main.starts_with(".ie") || main.contains(".TH"), "roff page");
    assert!(main.contains("engineering estimates"), "the caution");
    let table = std::fs::read_to_string(dir.join("stationwise-table.1")).unwrap();
    assert!(table.contains("given"), "the table page lists --given");
    for c in ["eval", "sweep", "reduce", "diff", "atmosphere"] {
        assert!(dir.join(format!("stationwise-{c}.1")).is_file(), "{c}");
    }
    // A directory that does not exist is refused, nothing created.
    let missing = dir.join("nope");
    let out = bin().arg("manual").arg(&missing).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(!missing.exists());
    let _ = std::fs::remove_dir_all(&dir);
}
