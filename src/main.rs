//! The `stationwise` binary: parse, dispatch, exit code (see `stationwise --help`).

fn main() -> std::process::ExitCode {
    // Die quietly when a reader such as `head` closes the pipe, as
    // command-line tools are expected to, instead of panicking in print.
    #[cfg(unix)]
    // SAFETY: setting a signal disposition to its default before any
    // threads exist has no memory-safety preconditions.
    unsafe {
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
    stationwise::cli::run()
}
