//! `completions` and `manual`: shell completion scripts and man pages,
//! generated from the same clap definitions the commands parse with, so
//! they never drift from `--help`.

use super::{Cli, Failure};
use clap::CommandFactory;
use std::io::Write;
use std::path::PathBuf;

/// Print a completion script for a shell to standard output.
///
/// bash: `stationwise completions bash > ~/.local/share/bash-completion/completions/stationwise`;
/// zsh: `stationwise completions zsh > ~/.zfunc/_stationwise` (with `~/.zfunc` on `fpath`);
/// fish: `stationwise completions fish > ~/.config/fish/completions/stationwise.fish`.
#[derive(Debug, clap::Args)]
#[command(verbatim_doc_comment)]
pub(super) struct CompletionArgs {
    /// The shell.
    shell: clap_complete::Shell,
}

/// Write man pages (`stationwise.1` and one `stationwise-COMMAND.1` per
/// command) into a directory, for example `~/.local/share/man/man1`.
#[derive(Debug, clap::Args)]
pub(super) struct ManualArgs {
    /// An existing directory to write the pages into.
    dir: PathBuf,
}

pub(super) fn completions(a: CompletionArgs) -> Result<u8, Failure> {
    let mut cmd = Cli::command();
    let mut out = std::io::stdout().lock();
    clap_complete::generate(a.shell, &mut cmd, "stationwise", &mut out);
    out.flush()
        .map_err(|e| Failure::bad(format!("cannot write the output: {e}")))?;
    Ok(0)
}

pub(super) fn manual(a: ManualArgs) -> Result<u8, Failure> {
    if !a.dir.is_dir() {
        return Err(Failure::bad(format!(
            "{}: not a directory (create it first, for example mkdir -p {})",
            a.dir.display(),
            a.dir.display()
        )));
    }
    let mut cmd = Cli::command();
    // Built, each command carries its display name ("stationwise-table").
    cmd.build();
    let mut pages = vec![cmd.clone()];
    pages.extend(
        cmd.get_subcommands()
            .filter(|c| c.get_name() != "help")
            .cloned(),
    );
    let mut written = Vec::new();
    for page in pages {
        let man = clap_mangen::Man::new(page);
        let name = man.get_filename();
        let mut text = Vec::new();
        man.render(&mut text)
            .map_err(|e| Failure::bad(format!("{name}: cannot render the page: {e}")))?;
        let path = a.dir.join(&name);
        // Through the atomic writer: a page replaced in place keeps its
        // mode, and a failed run leaves the old one.
        let mut f =
            crate::format::AtomicFile::create(&path, Default::default()).map_err(Failure::bad)?;
        f.write_all(&text)
            .map_err(|e| Failure::bad(format!("{}: {e}", path.display())))?;
        f.commit().map_err(Failure::bad)?;
        written.push(path);
    }
    println!(
        "wrote {} pages to {} (man finds them when that folder is a man1 folder under a manual path, as ~/.local/share/man/man1 is)",
        written.len(),
        a.dir.display()
    );
    Ok(0)
}
