//! `check`, `fmt` and `new`: workbook files as text.

use super::Failure;
use super::common::{self, join};
use crate::format;
use std::path::PathBuf;

/// Parse, evaluate and compare stored results; exit 2 on any problem, 1 on
/// an unreadable file. Suitable for a pre-commit hook or CI.
#[derive(Debug, clap::Args)]
pub(super) struct CheckArgs {
    /// Workbook files.
    #[arg(required = true)]
    files: Vec<PathBuf>,
}

pub(super) fn check(a: CheckArgs) -> Result<u8, Failure> {
    // An unreadable file (1) outranks problems (2): it was not checked at all.
    let (mut unreadable, mut problems_found) = (false, false);
    for f in &a.files {
        match common::open(f) {
            Err(e) => {
                eprintln!("{}: cannot load: {}", f.display(), e.message);
                unreadable = true;
            }
            Ok((book, engine)) => {
                let problems = engine.problems();
                let stale = format::stale_results(&book, &engine);
                // Everything `reduce` and the goals would refuse, found now.
                let mut setup = Vec::new();
                if book.channels.is_some()
                    && let Err(e) = crate::reduce::Plan::without_scans(&book)
                {
                    setup.push(format!("channel map: {e}"));
                }
                for (i, g) in book.goals.iter().enumerate() {
                    if let Err(e) = engine.value(&g.target) {
                        setup.push(format!("goal {}: target: {e}", i + 1));
                    }
                }
                for m in &setup {
                    println!("{}: {m}", f.display());
                }
                problems_found |= !setup.is_empty();
                if problems.is_empty() && stale.is_empty() && setup.is_empty() {
                    println!("{}: ok", f.display());
                } else {
                    for p in problems {
                        println!("{}: problem: {}: {}", f.display(), p.place, p.message);
                    }
                    for s in stale {
                        println!("{}: stored result out of date: {s}", f.display());
                    }
                    problems_found = true;
                }
            }
        }
    }
    Ok(if unreadable {
        1
    } else if problems_found {
        2
    } else {
        0
    })
}

/// Rewrite workbooks in canonical form (what a save writes).
#[derive(Debug, clap::Args)]
pub(super) struct FmtArgs {
    /// Workbook files.
    #[arg(required = true)]
    files: Vec<PathBuf>,
    /// Only report files that are not in canonical form (exit 2 if any).
    #[arg(long)]
    check: bool,
}

pub(super) fn fmt(a: FmtArgs) -> Result<u8, Failure> {
    let mut code = 0u8;
    for f in &a.files {
        let text = match std::fs::read_to_string(f) {
            Ok(t) => t,
            Err(e) => {
                eprintln!("{}: cannot read: {e}", f.display());
                code = 1;
                continue;
            }
        };
        let book = match format::parse(&text) {
            Ok(b) => b,
            Err(e) => {
                eprintln!("{}: {e}", f.display());
                code = 1;
                continue;
            }
        };
        let canon = format::to_text(&book);
        if canon == text {
            continue;
        }
        if a.check {
            println!(
                "{}: not in canonical form (run stationwise fmt)",
                f.display()
            );
            code = code.max(2);
        } else if let Err(e) = format::write_atomic_with(f, canon.as_bytes(), || Ok(())) {
            eprintln!("{e}");
            code = 1;
        } else {
            println!("{}: rewritten", f.display());
        }
    }
    Ok(code)
}

/// Start a workbook from a demo template.
#[derive(Debug, clap::Args)]
pub(super) struct NewArgs {
    /// Template name (see --list).
    #[arg(long, required_unless_present = "list")]
    template: Option<String>,
    /// The new workbook file.
    #[arg(required_unless_present = "list")]
    file: Option<PathBuf>,
    /// Overwrite an existing file.
    #[arg(long)]
    force: bool,
    /// List the templates.
    #[arg(long)]
    list: bool,
}

pub(super) fn new(a: NewArgs) -> Result<u8, Failure> {
    if a.list {
        for (n, d, _) in crate::templates::TEMPLATES {
            println!("{n:<16} {d}");
        }
        return Ok(0);
    }
    let (Some(name), Some(file)) = (a.template, a.file) else {
        return Err(Failure::bad("give --template NAME and a FILE"));
    };
    let text = crate::templates::get(&name).ok_or_else(|| {
        Failure::bad(format!(
            "no template \"{name}\"; templates: {}",
            crate::templates::names()
        ))
    })?;
    if file.exists() && !a.force {
        return Err(Failure::bad(format!(
            "{} exists; use --force to overwrite it",
            file.display()
        )));
    }
    let book = format::parse(text).map_err(|e| Failure::bad(format!("template {name}: {e}")))?;
    format::save_with(&file, &book, format::WriteOptions { force: a.force })
        .map_err(Failure::bad)?;
    println!("{}: new workbook from template {name}", file.display());
    let _ = join::<String>(&[]);
    Ok(0)
}
