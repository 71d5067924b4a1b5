//! The `stationwise` binary: parse, dispatch, exit code (see `stationwise --help`).

fn main() -> std::process::ExitCode {
    stationwise::cli::run()
}
