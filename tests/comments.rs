//! Users' comments survive every write: `fmt`, `eval --store-results` and
//! (in tests/e2e/run.sh) an edit and save in the terminal. The sheet is
//! tests/data/commented_turbojet.ron: the turbojet demo in canonical layout
//! with comments before and after stations, inside a process, in a list's
//! end and at both ends of the file. Since the layout is canonical, a
//! rewrite must give back the same bytes; where results are added, every
//! comment line must still stand next to the line it stood next to.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::Command;

fn sheet() -> String {
    std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/data/commented_turbojet.ron"),
    )
    .unwrap()
}

fn scratch(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("sw-comments-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d.join("commented.ron")
}

fn bin(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_stationwise"))
        .args(args)
        .output()
        .unwrap()
}

/// Each comment line with the next non-comment line after it (its anchor).
fn comment_places(text: &str) -> Vec<(String, String)> {
    let lines: Vec<&str> = text.lines().collect();
    let mut out = Vec::new();
    for (i, l) in lines.iter().enumerate() {
        if l.contains("//") && !l.trim_start().starts_with("// stationwise workbook")
            || l.contains("/*")
        {
            let next = lines[i + 1..]
                .iter()
                .find(|n| !n.trim_start().starts_with("//") && !n.contains("*/"))
                .map_or(String::new(), |s| s.to_string());
            out.push((l.to_string(), next));
        }
    }
    out
}

#[test]
fn the_sheet_has_comments_of_every_kind() {
    let t = sheet();
    let places = comment_places(&t);
    assert_eq!(places.len(), 10, "{places:?}");
    assert!(t.contains("name: \"3\",  // compressor delivery"));
    assert!(t.contains("/* The compressor"));
    // Before and after a field, before a process, after a list item.
    assert!(t.contains("pressure_ratio: \"10\",  // design point"));
    assert!(t.contains("// isentropic efficiency, total to total\n"));
    assert!(t.contains("// Fuel goes in here.\n        (\n            name: \"combustor\""));
    assert!(t.contains("),  // the last process"));
    assert!(t.trim_end().ends_with("// last line of the file"));
}

#[test]
fn fmt_keeps_every_comment_in_place() {
    let f = scratch("fmt");
    std::fs::write(&f, sheet()).unwrap();
    let out = bin(&["fmt", f.to_str().unwrap()]);
    assert!(out.status.success(), "{out:?}");
    assert_eq!(std::fs::read_to_string(&f).unwrap(), sheet());
    let out = bin(&["fmt", "--check", f.to_str().unwrap()]);
    assert!(out.status.success(), "fmt --check after fmt: {out:?}");
}

#[test]
fn store_results_keeps_every_comment_in_place() {
    let f = scratch("store");
    std::fs::write(&f, sheet()).unwrap();
    let out = bin(&["eval", f.to_str().unwrap(), "--store-results"]);
    assert!(out.status.success(), "{out:?}");
    let after = std::fs::read_to_string(&f).unwrap();
    assert_ne!(after, sheet(), "results were to be added");
    assert_eq!(comment_places(&after), comment_places(&sheet()));
    // A second save is byte-identical (comments are not doubled).
    let out = bin(&["eval", f.to_str().unwrap(), "--store-results"]);
    assert!(out.status.success(), "{out:?}");
    assert_eq!(std::fs::read_to_string(&f).unwrap(), after);
}

#[test]
fn a_renamed_station_keeps_its_comment() {
    let mut book = stationwise::format::parse(&sheet()).unwrap();
    book.rename_station("3", "30").unwrap();
    let text = stationwise::format::to_text(&book);
    assert!(
        text.contains("name: \"30\",  // compressor delivery"),
        "{text}"
    );
    assert_eq!(comment_places(&text).len(), 10);
}

#[test]
fn diff_ignores_a_comment_only_change() {
    let a = scratch("diff-a");
    let b = a.with_file_name("other.ron");
    std::fs::write(&a, sheet()).unwrap();
    std::fs::write(&b, sheet().replace("compressor delivery", "HP delivery")).unwrap();
    let out = bin(&["diff", a.to_str().unwrap(), b.to_str().unwrap()]);
    assert!(out.status.success(), "{out:?}");
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(!text.contains("HP delivery"), "{text}");
    let out = bin(&[
        "diff",
        "--comments",
        a.to_str().unwrap(),
        b.to_str().unwrap(),
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("HP delivery"), "{text}");
}
