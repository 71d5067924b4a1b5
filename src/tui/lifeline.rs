//! Keeping unsaved work when the terminal goes away.
//!
//! A test-cell computer is reached over SSH, and the usual way a session
//! ends badly is a dropped link: the terminal closes, reads on it return
//! end-of-file or an I/O error, and a hang-up signal may or may not arrive
//! (it goes to the session leader, which need not be this program). The
//! terminal crate's reader loops on such a descriptor without returning,
//! so nothing that runs on the main thread can be relied on once the link
//! is gone. Three pieces make the outcome the same in every case:
//!
//! * [`Lifeline::wait`] sleeps in `poll(2)` on the terminal and on a
//!   self-pipe that SIGHUP, SIGTERM and SIGWINCH write to (`signal-hook`);
//!   it reports a hang-up, an error or an invalid descriptor on the
//!   terminal as [`Wake::Lost`] before anything reads from it, so the main
//!   loop never hands a dead descriptor to the reader.
//! * The main loop keeps a [`Lifeline::keep`] snapshot of the unsaved
//!   workbook text (taken after each batch of keys, only when it changed).
//! * A watchdog thread sleeps in `poll(2)` on the same events. When the
//!   terminal is lost or a hang-up or termination signal arrives and the
//!   main thread has not finished within [`GRACE`], it writes the snapshot
//!   to the recovery file itself and ends the process: whatever the main
//!   thread is stuck in, the program exits within a second and the work
//!   is on disk.

use std::io;
use std::os::fd::{AsRawFd, OwnedFd, RawFd};
use std::os::unix::net::UnixStream;
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};
use std::time::Duration;

/// How long the main thread has to finish by itself after a cut.
pub const GRACE: Duration = Duration::from_millis(600);

/// What woke [`Lifeline::wait`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Wake {
    /// The terminal has input to read.
    Input,
    /// A resize (or a spurious wake-up): redraw.
    Other,
    /// Nothing within the timeout.
    Timeout,
    /// The terminal hung up or failed: treat as a hang-up.
    Lost,
    /// A hang-up or termination signal (its number).
    Signal(i32),
}

/// The recovery snapshot: where it goes and the workbook text.
type Snapshot = Option<(PathBuf, String)>;

/// The terminal watch shared by the main loop and the watchdog.
pub struct Lifeline {
    tty: RawFd,
    _tty_owned: Option<OwnedFd>,
    pipe: UnixStream,
    signal: Arc<AtomicUsize>,
    done: Arc<AtomicBool>,
    snapshot: Arc<Mutex<Snapshot>>,
    last: Option<String>,
}

fn poll_fds(fds: &mut [libc::pollfd], timeout: Option<Duration>) -> io::Result<usize> {
    let ms = timeout.map_or(-1, |d| d.as_millis().min(i32::MAX as u128) as i32);
    loop {
        // SAFETY: `fds` is a valid, exclusively borrowed slice of pollfd
        // for the duration of the call; its length is passed with it.
        let r = unsafe { libc::poll(fds.as_mut_ptr(), fds.len() as libc::nfds_t, ms) };
        if r >= 0 {
            return Ok(r as usize);
        }
        let e = io::Error::last_os_error();
        if e.kind() != io::ErrorKind::Interrupted {
            return Err(e);
        }
    }
}

fn drain(pipe: &UnixStream) {
    use std::io::Read;
    let mut buf = [0u8; 64];
    let mut p = pipe;
    while let Ok(n) = p.read(&mut buf) {
        if n == 0 {
            break;
        }
    }
}

const LOST_BITS: libc::c_short = libc::POLLHUP | libc::POLLERR | libc::POLLNVAL;

impl Lifeline {
    /// Watch the terminal the interface reads from (standard input when it
    /// is a terminal, else `/dev/tty`, as the terminal crate chooses) and
    /// install the signal handlers and the watchdog.
    pub fn start() -> io::Result<Lifeline> {
        // SAFETY: isatty only inspects the descriptor.
        let (tty, owned) = if unsafe { libc::isatty(libc::STDIN_FILENO) } == 1 {
            (libc::STDIN_FILENO, None)
        } else {
            let f = std::fs::OpenOptions::new()
                .read(true)
                .write(true)
                .open("/dev/tty")?;
            let fd: OwnedFd = f.into();
            (fd.as_raw_fd(), Some(fd))
        };
        let (main_r, main_w) = UnixStream::pair()?;
        let (dog_r, dog_w) = UnixStream::pair()?;
        for s in [&main_r, &main_w, &dog_r, &dog_w] {
            s.set_nonblocking(true)?;
        }
        let signal = Arc::new(AtomicUsize::new(0));
        use signal_hook::consts::{SIGHUP, SIGTERM, SIGWINCH};
        for sig in [SIGHUP, SIGTERM] {
            signal_hook::flag::register_usize(sig, Arc::clone(&signal), sig as usize)?;
            signal_hook::low_level::pipe::register(sig, main_w.try_clone()?)?;
            signal_hook::low_level::pipe::register(sig, dog_w.try_clone()?)?;
        }
        signal_hook::low_level::pipe::register(SIGWINCH, main_w)?;
        drop(dog_w);
        let line = Lifeline {
            tty,
            _tty_owned: owned,
            pipe: main_r,
            signal,
            done: Arc::new(AtomicBool::new(false)),
            snapshot: Arc::new(Mutex::new(None)),
            last: None,
        };
        let (signal, done, snapshot) = (
            Arc::clone(&line.signal),
            Arc::clone(&line.done),
            Arc::clone(&line.snapshot),
        );
        std::thread::Builder::new()
            .name("terminal-watchdog".into())
            .spawn(move || watchdog(tty, dog_r, &signal, &done, &snapshot))?;
        Ok(line)
    }

    /// The signal received, if any.
    pub fn signal(&self) -> Option<i32> {
        match self.signal.load(Ordering::SeqCst) {
            0 => None,
            s => Some(s as i32),
        }
    }

    /// Sleep until terminal input, a signal, a resize or the timeout.
    pub fn wait(&self, timeout: Option<Duration>) -> Wake {
        if let Some(s) = self.signal() {
            return Wake::Signal(s);
        }
        let mut fds = [
            libc::pollfd {
                fd: self.tty,
                events: libc::POLLIN,
                revents: 0,
            },
            libc::pollfd {
                fd: self.pipe.as_raw_fd(),
                events: libc::POLLIN,
                revents: 0,
            },
        ];
        match poll_fds(&mut fds, timeout) {
            Err(_) => return Wake::Lost,
            Ok(0) => return Wake::Timeout,
            Ok(_) => {}
        }
        if fds[1].revents != 0 {
            drain(&self.pipe);
        }
        if let Some(s) = self.signal() {
            return Wake::Signal(s);
        }
        if fds[0].revents & LOST_BITS != 0 {
            return Wake::Lost;
        }
        if fds[0].revents & libc::POLLIN != 0 {
            return Wake::Input;
        }
        Wake::Other
    }

    /// Keep the text the recovery file would get (None: nothing unsaved).
    /// Cheap when unchanged.
    pub fn keep(&mut self, snap: Option<(PathBuf, String)>) {
        let text = snap.as_ref().map(|(_, t)| t.clone());
        if text == self.last {
            return;
        }
        self.last = text;
        if let Ok(mut s) = self.snapshot.lock() {
            *s = snap;
        }
    }

    /// The main thread is finishing by itself: the watchdog stands down.
    pub fn finish(&self) {
        self.done.store(true, Ordering::SeqCst);
    }
}

fn watchdog(
    tty: RawFd,
    pipe: UnixStream,
    signal: &AtomicUsize,
    done: &AtomicBool,
    snapshot: &Mutex<Snapshot>,
) {
    loop {
        let mut fds = [
            // No events asked: poll still reports a hang-up or an error.
            libc::pollfd {
                fd: tty,
                events: 0,
                revents: 0,
            },
            libc::pollfd {
                fd: pipe.as_raw_fd(),
                events: libc::POLLIN,
                revents: 0,
            },
        ];
        let lost = match poll_fds(&mut fds, None) {
            Err(_) => true,
            Ok(_) => fds[0].revents & LOST_BITS != 0,
        };
        drain(&pipe);
        if lost || signal.load(Ordering::SeqCst) != 0 {
            break;
        }
    }
    std::thread::sleep(GRACE);
    if done.load(Ordering::SeqCst) {
        return;
    }
    // The main thread is stuck (in a read on a dead terminal, most
    // likely): keep the work and end the process from here.
    let saved = snapshot
        .lock()
        .ok()
        .and_then(|s| s.clone())
        .and_then(|(p, text)| super::app::write_recovery_text(&p, &text).then_some(p));
    super::restore();
    use std::io::Write;
    let _ = match saved {
        Some(p) => writeln!(
            io::stderr(),
            "stationwise: terminal lost: unsaved changes written to {}",
            p.display()
        ),
        None => writeln!(io::stderr(), "stationwise: terminal lost: nothing unsaved"),
    };
    std::process::exit(1);
}
