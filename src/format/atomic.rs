//! Writing files so that nothing a user has is lost or changed behind their back.
//!
//! Every file the program writes (workbook saves, `fmt`, `reduce --out`,
//! recovery files, settings) goes through [`AtomicFile`]:
//!
//! * The bytes go to a uniquely named temporary file in the target's own
//!   folder (`tempfile`), are synced, and the temporary file is renamed over
//!   the target, so a crash leaves the old file or the new one, never half.
//! * A symbolic link is followed: the file it points to is updated and the
//!   link itself stays a link.
//! * The file keeps its permission bits and, where the system allows it,
//!   its owner and group. A new file gets the usual 0666 less the umask.
//! * A read-only file (no write bit for anyone) or a file with more than
//!   one hard link is refused unless the caller forces the write: renaming
//!   over a hard link would split it, and a read-only file says "do not
//!   touch" (a forced write keeps it read-only).
//! * A temporary file left by a killed process (its process id no longer
//!   running) is removed by the next write of the same file.
//!
//! [`same_file`] compares two paths by device and inode, so that an output
//! is never written onto one of the run's inputs, whatever name it is given.

use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};

/// Why a file could not be written.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum WriteError {
    /// A system error while writing.
    #[error("cannot write {path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The system error.
        source: io::Error,
    },
    /// The file has other hard links that a rename would split.
    #[error(
        "{path} has {links} hard links; saving would split them (save with force to write a separate copy here)"
    )]
    HardLinked {
        /// The file.
        path: PathBuf,
        /// Its link count.
        links: u64,
    },
    /// The file is read-only.
    #[error("{path} is read-only (mode {mode:04o}); save with force to overwrite it")]
    ReadOnly {
        /// The file.
        path: PathBuf,
        /// Its permission bits.
        mode: u32,
    },
    /// The output is one of the run's inputs.
    #[error("{output} is the same file as the input {input}; choose another output")]
    IsInput {
        /// The output named.
        output: PathBuf,
        /// The input it would overwrite.
        input: PathBuf,
    },
    /// The target exists and is not a regular file.
    #[error("{path} is not a regular file")]
    NotRegular {
        /// The file.
        path: PathBuf,
    },
}

/// Options of a write.
#[derive(Debug, Clone, Copy, Default)]
pub struct WriteOptions {
    /// Write even over a read-only or hard-linked file.
    pub force: bool,
}

/// The file a write lands in: symbolic links followed (up to 40, as the
/// kernel does), relative link targets taken from the link's folder.
pub fn resolve(path: &Path) -> io::Result<PathBuf> {
    let mut p = path.to_path_buf();
    for _ in 0..40 {
        match fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let t = fs::read_link(&p)?;
                p = if t.is_absolute() {
                    t
                } else {
                    p.parent().map_or(t.clone(), |d| d.join(&t))
                };
            }
            Ok(_) => return Ok(p),
            Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(p),
            Err(e) => return Err(e),
        }
    }
    Err(io::Error::other(format!(
        "{}: too many levels of symbolic links",
        path.display()
    )))
}

/// Whether two paths name the same file (same device and inode). A path
/// that does not exist is the same as nothing.
pub fn same_file(a: &Path, b: &Path) -> bool {
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        match (fs::metadata(a), fs::metadata(b)) {
            (Ok(x), Ok(y)) => x.dev() == y.dev() && x.ino() == y.ino(),
            _ => false,
        }
    }
    #[cfg(not(unix))]
    {
        match (fs::canonicalize(a), fs::canonicalize(b)) {
            (Ok(x), Ok(y)) => x == y,
            _ => false,
        }
    }
}

/// Refuse an output that is one of the inputs.
pub fn refuse_inputs(output: &Path, inputs: &[&Path]) -> Result<(), WriteError> {
    for i in inputs {
        if same_file(output, i) {
            return Err(WriteError::IsInput {
                output: output.to_path_buf(),
                input: i.to_path_buf(),
            });
        }
    }
    Ok(())
}

const TMP_SUFFIX: &str = ".swtmp";

fn tmp_prefix(name: &str) -> String {
    format!(".{name}.{}.", std::process::id())
}

/// Remove temporary files of `name` in `dir` whose writer is gone.
fn clean_stale(dir: &Path, name: &str) {
    let Ok(rd) = fs::read_dir(dir) else { return };
    let head = format!(".{name}.");
    for e in rd.flatten() {
        let f = e.file_name();
        let Some(f) = f.to_str() else { continue };
        let Some(rest) = f.strip_prefix(&head) else {
            continue;
        };
        if !rest.ends_with(TMP_SUFFIX) {
            continue;
        }
        let Some(pid) = rest.split('.').next().and_then(|p| p.parse::<u32>().ok()) else {
            continue;
        };
        if pid != std::process::id() && !process_alive(pid) {
            let _ = fs::remove_file(e.path());
        }
    }
}

fn process_alive(pid: u32) -> bool {
    #[cfg(target_os = "linux")]
    {
        Path::new(&format!("/proc/{pid}")).exists()
    }
    #[cfg(not(target_os = "linux"))]
    {
        let _ = pid;
        true
    }
}

/// A file being written: bytes go to a temporary file beside the target;
/// [`AtomicFile::commit`] puts it in place. Dropped without a commit, the
/// temporary file is removed and the target is untouched.
pub struct AtomicFile {
    target: PathBuf,
    tmp: tempfile::NamedTempFile,
}

impl std::fmt::Debug for AtomicFile {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("AtomicFile")
            .field("target", &self.target)
            .finish()
    }
}

impl AtomicFile {
    /// Start writing `path` (after the checks in the module header).
    pub fn create(path: &Path, opts: WriteOptions) -> Result<AtomicFile, WriteError> {
        let io_err = |source| WriteError::Io {
            path: path.to_path_buf(),
            source,
        };
        let target = resolve(path).map_err(io_err)?;
        let existing = match fs::metadata(&target) {
            Ok(m) => Some(m),
            Err(e) if e.kind() == io::ErrorKind::NotFound => None,
            Err(e) => return Err(io_err(e)),
        };
        if let Some(m) = &existing {
            if !m.is_file() {
                return Err(WriteError::NotRegular { path: target });
            }
            #[cfg(unix)]
            {
                use std::os::unix::fs::{MetadataExt, PermissionsExt};
                let mode = m.permissions().mode() & 0o7777;
                if !opts.force && mode & 0o222 == 0 {
                    return Err(WriteError::ReadOnly { path: target, mode });
                }
                if !opts.force && m.nlink() > 1 {
                    return Err(WriteError::HardLinked {
                        path: target,
                        links: m.nlink(),
                    });
                }
            }
        }
        let dir = match target.parent() {
            Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
            _ => PathBuf::from("."),
        };
        let name = target
            .file_name()
            .map(|n| n.to_string_lossy().to_string())
            .unwrap_or_else(|| "file".into());
        clean_stale(&dir, &name);
        let prefix = tmp_prefix(&name);
        let mut b = tempfile::Builder::new();
        b.prefix(&prefix).suffix(TMP_SUFFIX);
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            // Created with the umask applied, as any new file; an existing
            // file's own bits are set below, after creation.
            b.permissions(fs::Permissions::from_mode(0o666));
        }
        let tmp = b.tempfile_in(&dir).map_err(io_err)?;
        #[cfg(unix)]
        if let Some(m) = &existing {
            use std::os::unix::fs::{MetadataExt, PermissionsExt};
            let f = tmp.as_file();
            // Owner first: changing the owner may clear set-id bits.
            let _ = std::os::unix::fs::fchown(f, Some(m.uid()), Some(m.gid()));
            f.set_permissions(fs::Permissions::from_mode(m.permissions().mode() & 0o7777))
                .map_err(io_err)?;
        }
        Ok(AtomicFile { target, tmp })
    }

    /// The file that [`AtomicFile::commit`] will replace.
    pub fn target(&self) -> &Path {
        &self.target
    }

    /// Sync and rename into place. `before_rename` runs between the sync
    /// and the rename (tests use it to simulate a crash).
    pub fn commit_with(
        mut self,
        before_rename: impl FnOnce() -> io::Result<()>,
    ) -> Result<(), WriteError> {
        let target = self.target.clone();
        let io_err = |source| WriteError::Io {
            path: target.clone(),
            source,
        };
        self.tmp.flush().map_err(io_err)?;
        self.tmp.as_file().sync_all().map_err(io_err)?;
        before_rename().map_err(io_err)?;
        self.tmp
            .persist(&self.target)
            .map_err(|e| io_err(e.error))?;
        if let Some(d) = self.target.parent() {
            let d = if d.as_os_str().is_empty() {
                Path::new(".")
            } else {
                d
            };
            if let Ok(d) = fs::File::open(d) {
                let _ = d.sync_all();
            }
        }
        Ok(())
    }

    /// Sync and rename into place.
    pub fn commit(self) -> Result<(), WriteError> {
        self.commit_with(|| Ok(()))
    }
}

impl Write for AtomicFile {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        self.tmp.write(buf)
    }
    fn flush(&mut self) -> io::Result<()> {
        self.tmp.flush()
    }
}

/// Write bytes to `path` atomically (see the module header).
pub fn write(path: &Path, bytes: &[u8], opts: WriteOptions) -> Result<(), WriteError> {
    let mut f = AtomicFile::create(path, opts)?;
    f.write_all(bytes).map_err(|source| WriteError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    f.commit()
}
