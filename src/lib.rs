//! stationwise: a workbook of compressible-flow stations.
//!
//! Module map (arrows point the only way dependencies go):
//!
//! * [`units`]: parsing and printing values with units; SI inside.
//! * [`roots`]: the bracketed root finders (safeguarded Newton, Brent,
//!   golden section, Simpson), each with its stop reason. Uses nothing.
//! * [`gas`]: gas models (calorically and thermally perfect, mixtures, fuels).
//!   Uses `roots` for its inversions.
//! * [`flow`]: flow relations (isentropic, shocks, Rayleigh, Fanno,
//!   compression and expansion, combustion) and their solvers. Uses `gas`.
//! * [`atmosphere`]: the standard atmosphere and standard-day corrections.
//! * [`book`]: the workbook model (givens as typed, stations, processes).
//! * [`kinds`]: one file per process kind: its givens, modes, ports and
//!   computation, behind one trait. Uses `book`, `flow`, `gas` and the
//!   engine's shared process helpers.
//! * [`engine`]: dependency graph, incremental recompute, problems, goals,
//!   explanations. Uses `book`, `flow`, `gas`, `atmosphere`.
//! * [`format`]: the RON workbook file (versioned, canonical, atomic saves).
//! * [`present`]: presentation shared by the front ends (values with units,
//!   station tables, explanation text).
//! * [`reduce`]: recorded scans through a workbook's channel map,
//!   measurement uncertainty (linearised and Monte Carlo).
//! * [`table`]: flow tables (rows of relation values) for the command line.
//! * [`report`]: tables of results and their text, CSV and JSON printers.
//!
//! * [`cli`] and [`tui`]: the two front ends (command line, terminal
//!   workbook) over the engine; nothing below them imports clap, ratatui
//!   or crossterm.
//!
//! `units`, `gas`, `flow`, `atmosphere`, `book` and `engine` know nothing of
//! files or terminals; front ends sit on top.
#![deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
#![cfg_attr(test, allow(clippy::unwrap_used, clippy::expect_used, clippy::panic))]
#![warn(missing_docs)]

pub mod atmosphere;
pub mod book;
pub mod cli;
pub mod engine;
pub mod flow;
pub mod format;
pub mod gas;
pub mod kinds;
pub mod present;
pub mod psychro;
pub mod range;
pub mod reduce;
pub mod report;
pub mod roots;
pub mod table;
pub mod templates;
pub mod tui;
pub mod units;
