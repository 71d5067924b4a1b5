//! Test-data reduction: recorded scans through a workbook, measurement
//! uncertainty, standard-day corrections.
//!
//! * A [`Plan`] compiles the workbook's channel map against a scan file's
//!   header: which columns feed which given, in which unit, averaged with
//!   which weights, made absolute with the barometer, with what systematic
//!   and random standard uncertainty. Missing columns, unknown units and a
//!   gauge channel without a barometer are found here, before any work.
//! * Each scan sets the mapped givens (SI) and recomputes incrementally; an
//!   unparseable cell is a problem of that scan only, located by row and
//!   column.
//! * Uncertainty follows the ASME PTC 19.1 approach: sensitivity
//!   coefficients by central differences through the engine, systematic and
//!   random parts root-sum-squared over independent channels, expanded to
//!   95 % with a coverage factor of 2 (large-sample, common practice), and
//!   each channel's share of the variance. A Monte Carlo option samples the
//!   channels (normal distributions) to check the linearised result.
//! * [`reduce`] streams a file in batches: constant memory whatever its
//!   length, both cores through rayon, output in input order.

use crate::book::{Channel, Workbook};
use crate::engine::Engine;
use crate::units::{self, Quantity, Unit};
use rayon::prelude::*;
use std::io::BufRead;

pub mod scans;
pub use scans::{ScanLine, ScanReader};

/// Errors that stop a reduction before it starts.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ReduceError {
    /// The workbook has no channel map.
    #[error(
        "the workbook has no channel map (`channels`): nothing tells which scan column feeds which given"
    )]
    NoChannels,
    /// Columns named by the channel map are not in the scan file.
    #[error("the scan file lacks column(s) {}: the channel map needs them (header has: {header})", .missing.join(", "))]
    MissingColumns {
        /// Missing column names.
        missing: Vec<String>,
        /// The header as read.
        header: String,
    },
    /// A channel that cannot be used.
    #[error("channel for {given}: {why}")]
    BadChannel {
        /// The given it feeds.
        given: String,
        /// What is wrong.
        why: String,
    },
    /// The scan file could not be read.
    #[error("scan file: {0}")]
    Read(String),
    /// A reported path that does not exist.
    #[error("report: {0}")]
    Report(String),
}

#[derive(Debug, Clone, Copy, PartialEq)]
enum Unc {
    Abs(f64),
    Rel(f64),
}

impl Unc {
    fn value(self, reading: f64) -> f64 {
        match self {
            Unc::Abs(u) => u,
            Unc::Rel(r) => r * reading.abs(),
        }
    }
}

#[derive(Debug, Clone)]
struct PlanChannel {
    given: String,
    label: String,
    /// What an engineer calls it: the given in words and its columns
    /// ("inlet tt (T1A+T1B)").
    name: String,
    cols: Vec<usize>,
    weights: Vec<f64>,
    unit: &'static Unit,
    systematic: Option<Unc>,
    random: Option<Unc>,
    /// The physical range of the given it feeds (hard part only): a probe
    /// reading outside it is left out of the average and flagged.
    bound: Option<crate::book::bounds::Bound>,
}

/// A compiled channel map.
#[derive(Debug, Clone)]
pub struct Plan {
    channels: Vec<PlanChannel>,
    baro: Option<PlanChannel>,
}

/// One scan's channel values: absolute SI value of each channel's given,
/// the reading itself (SI, before the barometer), and the barometer.
#[derive(Debug, Clone, PartialEq)]
pub struct Inputs {
    /// Absolute SI value per channel.
    pub values: Vec<f64>,
    /// Reading per channel (SI; gauge readings before the barometer).
    pub readings: Vec<f64>,
    /// Barometer, Pa (when mapped).
    pub baro: Option<f64>,
    /// Probes left out of their average, and why (each probe named).
    pub flags: Vec<String>,
}

fn parse_unc(
    text: &Option<String>,
    q: Quantity,
    what: &str,
    given: &str,
) -> Result<Option<Unc>, ReduceError> {
    let Some(t) = text else {
        return Ok(None);
    };
    let t = t.trim();
    if let Some(p) = t.strip_suffix('%') {
        let v: f64 = p.trim().parse().map_err(|_| ReduceError::BadChannel {
            given: given.into(),
            why: format!("{what} uncertainty \"{t}\" is not a number with %"),
        })?;
        if !(v.is_finite() && (0.0..=100.0).contains(&v)) {
            return Err(ReduceError::BadChannel {
                given: given.into(),
                why: format!("{what} uncertainty \"{t}\" must be from 0 to 100 %"),
            });
        }
        return Ok(Some(Unc::Rel(v / 100.0)));
    }
    // An uncertainty is a difference: temperatures take difference units,
    // gauge pressure units become plain pressure differences.
    let dq = match q {
        Quantity::Temperature => Quantity::TemperatureDifference,
        other => other,
    };
    let t2 = t.replace("psig", "psi").replace("barg", "bar");
    let v = units::parse(&t2, dq, &format!("{given} {what} uncertainty"))
        .map_err(|e| ReduceError::BadChannel {
            given: given.into(),
            why: e.to_string(),
        })?
        .si;
    if !(v.is_finite() && v >= 0.0) {
        return Err(ReduceError::BadChannel {
            given: given.into(),
            why: format!("{what} uncertainty must be zero or positive"),
        });
    }
    Ok(Some(Unc::Abs(v)))
}

fn plan_channel(
    c: &Channel,
    q: Quantity,
    header: Option<&[String]>,
    missing: &mut Vec<String>,
    has_baro: bool,
) -> Result<PlanChannel, ReduceError> {
    let given = if c.given.is_empty() {
        "barometer".to_string()
    } else {
        c.given.clone()
    };
    let unit = units::find_unit_for(&c.unit, q)
        .filter(|u| u.quantity == q)
        .ok_or_else(|| ReduceError::BadChannel {
            given: given.clone(),
            why: format!(
                "unit \"{}\" is not a {} unit (accepted: {})",
                c.unit,
                q,
                units::accepted(q)
            ),
        })?;
    if unit.gauge && c.given.is_empty() {
        return Err(ReduceError::BadChannel {
            given: given.clone(),
            why: format!(
                "the barometer reads the absolute pressure gauge readings are relative to: its unit cannot be {}; use an absolute one (kPa, psia, inHg, mbar)",
                unit.symbol
            ),
        });
    }
    if unit.gauge && !has_baro {
        return Err(ReduceError::BadChannel {
            given: given.clone(),
            why: format!(
                "{} is a gauge reading, and the channel map has no barometer to make it absolute",
                unit.symbol
            ),
        });
    }
    if c.columns.is_empty() {
        return Err(ReduceError::BadChannel {
            given,
            why: "no scan column named".into(),
        });
    }
    let mut cols = Vec::new();
    if let Some(header) = header {
        for name in &c.columns {
            match header.iter().position(|h| h.trim() == name.trim()) {
                Some(i) => cols.push(i),
                None => missing.push(name.clone()),
            }
        }
    }
    let weights = if c.weights.is_empty() {
        vec![1.0 / c.columns.len() as f64; c.columns.len()]
    } else {
        if c.weights.len() != c.columns.len()
            || c.weights.iter().any(|w| !(w.is_finite() && *w >= 0.0))
        {
            return Err(ReduceError::BadChannel {
                given,
                why: "weights must be one finite, non-negative number per column".into(),
            });
        }
        // Scaled by the largest first, so that weights near the top of the
        // floating-point range cannot overflow their sum.
        let max = c.weights.iter().copied().fold(0.0, f64::max);
        if max <= 0.0 {
            return Err(ReduceError::BadChannel {
                given,
                why: "weights are all zero".into(),
            });
        }
        let scaled: Vec<f64> = c.weights.iter().map(|w| w / max).collect();
        let sum: f64 = scaled.iter().sum();
        scaled.iter().map(|w| w / sum).collect()
    };
    let (scope, key) = match c.given.split('.').collect::<Vec<_>>().as_slice() {
        [] | [_] => ("ambient", "pressure"),
        [scope, .., key] => (*scope, *key),
    };
    let bound = crate::book::bounds::of(scope, key, q).filter(|b| b.hard);
    Ok(PlanChannel {
        label: if c.given.is_empty() {
            format!("barometer {}", c.columns.join("+"))
        } else {
            c.given.clone()
        },
        name: channel_name(&c.given, &c.columns),
        systematic: parse_unc(&c.systematic, q, "systematic", &given)?,
        random: parse_unc(&c.random, q, "random", &given)?,
        given,
        cols,
        weights,
        unit,
        bound,
    })
}

impl Plan {
    /// Compile the workbook's channel map against a scan header.
    pub fn new(book: &Workbook, header: &[String]) -> Result<Plan, ReduceError> {
        Plan::build(book, Some(header))
    }

    /// The channel map without a scan file: units and uncertainties only,
    /// for the uncertainty of the workbook's own givens.
    pub fn without_scans(book: &Workbook) -> Result<Plan, ReduceError> {
        Plan::build(book, None)
    }

    fn build(book: &Workbook, header: Option<&[String]>) -> Result<Plan, ReduceError> {
        let ch = book.channels.as_ref().ok_or(ReduceError::NoChannels)?;
        let givens = book.givens();
        let mut missing = Vec::new();
        let baro = match &ch.barometer {
            Some(b) => Some(plan_channel(
                b,
                Quantity::Pressure,
                header,
                &mut missing,
                false,
            )?),
            None => None,
        };
        let mut channels = Vec::new();
        for c in &ch.map {
            let q = givens
                .iter()
                .find(|(p, ..)| *p == c.given)
                .map(|(_, q, ..)| *q)
                .ok_or_else(|| ReduceError::BadChannel {
                    given: c.given.clone(),
                    why: "no such given in the workbook (see `stationwise eval` and the path syntax in `stationwise sweep --help`)".into(),
                })?;
            channels.push(plan_channel(c, q, header, &mut missing, baro.is_some())?);
        }
        if !missing.is_empty() {
            return Err(ReduceError::MissingColumns {
                missing,
                header: header.map_or(String::new(), |h| h.join(", ")),
            });
        }
        Ok(Plan { channels, baro })
    }

    /// The scan columns (indices into the header) that feed a given, and
    /// the unit they are read in; the barometer is `"barometer"`.
    pub fn columns_of(&self, given: &str) -> Option<(&[usize], &'static str)> {
        self.channels
            .iter()
            .chain(self.baro.iter())
            .find(|c| c.given == given)
            .map(|c| (c.cols.as_slice(), c.unit.symbol))
    }

    /// The givens fed, in channel order.
    pub fn givens(&self) -> Vec<&str> {
        self.channels.iter().map(|c| c.given.as_str()).collect()
    }

    /// Channel values of one scan; every bad cell is reported (row, column).
    /// A probe reading outside the physical range of its given (a negative
    /// absolute pressure, a temperature below absolute zero, a negative
    /// speed, an overflow) is left out and its probe flagged; the others
    /// are re-weighted. A channel with no probe left is a problem.
    pub fn inputs(
        &self,
        header: &[String],
        record: &csv::StringRecord,
        row: u64,
    ) -> Result<Inputs, Vec<String>> {
        let mut problems = Vec::new();
        let mut flags = Vec::new();
        let col = |i: usize| header.get(i).map_or("?", |s| s.as_str());
        // The mean of a channel's probes (SI, absolute) and its reading
        // (SI, before the barometer).
        let mut mean = |c: &PlanChannel, offset: f64| -> Option<(f64, f64)> {
            let (mut acc, mut wsum) = (0.0, 0.0);
            let mut bad = false;
            for (&i, &w) in c.cols.iter().zip(&c.weights) {
                let Some(cell) = record.get(i) else {
                    problems.push(format!(
                        "row {row}, column {}: missing (the row has {} of the header's {} fields)",
                        col(i),
                        record.len(),
                        header.len()
                    ));
                    return None;
                };
                let cell = cell.trim();
                let v = match cell.parse::<f64>() {
                    Ok(v) if v.is_finite() => v,
                    _ => {
                        problems.push(format!(
                            "row {row}, column {}: \"{cell}\" is not a number{}",
                            col(i),
                            if cell.matches('"').count() % 2 == 1 {
                                " (an unterminated quote)"
                            } else {
                                ""
                            }
                        ));
                        bad = true;
                        continue;
                    }
                };
                let abs = units::to_si(v, c.unit) + offset;
                if let Some(b) = &c.bound
                    && !b.holds(abs)
                {
                    flags.push(format!(
                        "row {row}, column {}: {cell} {} left out of {} ({})",
                        col(i),
                        c.unit.symbol,
                        c.label,
                        b.why
                    ));
                    continue;
                }
                acc += w * abs;
                wsum += w;
            }
            if bad {
                return None;
            }
            if wsum <= 0.0 {
                problems.push(format!(
                    "row {row}: no usable reading for {} (every probe was left out)",
                    c.label
                ));
                return None;
            }
            let abs = acc / wsum;
            Some((abs, abs - offset))
        };
        let baro = self.baro.as_ref().and_then(|b| mean(b, 0.0)).map(|m| m.0);
        let mut values = Vec::with_capacity(self.channels.len());
        let mut readings = Vec::with_capacity(self.channels.len());
        for c in &self.channels {
            let offset = if c.unit.gauge {
                baro.unwrap_or(0.0)
            } else {
                0.0
            };
            let (v, r) = mean(c, offset).unwrap_or((f64::NAN, f64::NAN));
            values.push(v);
            readings.push(r);
        }
        if self.baro.is_some() && baro.is_none() && problems.is_empty() {
            problems.push(format!("row {row}: no usable barometer reading"));
        }
        if !problems.is_empty() {
            return Err(problems);
        }
        Ok(Inputs {
            values,
            readings,
            baro,
            flags,
        })
    }

    /// The workbook's own given values as inputs (for `uncertainty FILE`).
    pub fn nominal(&self, engine: &Engine) -> Inputs {
        let givens = engine.book().givens();
        let values: Vec<f64> = self
            .channels
            .iter()
            .map(|c| {
                givens
                    .iter()
                    .find(|(p, ..)| *p == c.given)
                    .map_or(f64::NAN, |g| g.3)
            })
            .collect();
        let baro = engine.ambient().ok().map(|a| a.flow.p);
        let readings = self
            .channels
            .iter()
            .zip(&values)
            .map(|(c, v)| {
                if c.unit.gauge {
                    v - baro.unwrap_or(0.0)
                } else {
                    *v
                }
            })
            .collect();
        Inputs {
            values,
            readings,
            baro,
            flags: Vec::new(),
        }
    }

    /// Set the mapped givens and recompute.
    pub fn apply(&self, engine: &mut Engine, inputs: &Inputs) -> Result<(), String> {
        let values: Vec<(&str, f64)> = self
            .channels
            .iter()
            .zip(&inputs.values)
            .map(|(c, v)| (c.given.as_str(), *v))
            .collect();
        engine.set_si_many(&values).map_err(|e| e.to_string())
    }

    /// Uncertainty variables: (label, nominal, systematic u, random u, gauge
    /// channels it shifts, name in words). The barometer is a variable
    /// that shifts every gauge channel.
    fn variables(&self, inputs: &Inputs) -> Vec<Variable> {
        let mut v: Vec<Variable> = self
            .channels
            .iter()
            .enumerate()
            .map(|(i, c)| {
                let r = inputs.readings[i];
                (
                    c.label.clone(),
                    inputs.values[i],
                    c.systematic.map_or(0.0, |u| u.value(r)),
                    c.random.map_or(0.0, |u| u.value(r)),
                    vec![i],
                    c.name.clone(),
                )
            })
            .collect();
        if let (Some(b), Some(baro)) = (&self.baro, inputs.baro) {
            let gauges: Vec<usize> = self
                .channels
                .iter()
                .enumerate()
                .filter(|(_, c)| c.unit.gauge)
                .map(|(i, _)| i)
                .collect();
            v.push((
                b.label.clone(),
                baro,
                b.systematic.map_or(0.0, |u| u.value(baro)),
                b.random.map_or(0.0, |u| u.value(baro)),
                gauges,
                b.name.clone(),
            ));
        }
        v
    }
}

/// An uncertainty variable: (label, nominal, systematic u, random u, the
/// channels it shifts, name in words).
type Variable = (String, f64, f64, f64, Vec<usize>, String);

/// The given in words with its columns: "inlet tt (T1A+T1B)", "station 2
/// pt (P2A+P2B)", "barometer (BARO)".
fn channel_name(given: &str, columns: &[String]) -> String {
    let what = match given.split('.').collect::<Vec<_>>().as_slice() {
        [] | [""] => "barometer".to_string(),
        ["process", name, key] => format!("{name} {key}"),
        ["station", name, key] => format!("station {name} {key}"),
        ["shaft", name, key] => format!("shaft {name} {key}"),
        ["ambient", key] => format!("ambient {key}"),
        _ => given.to_string(),
    };
    format!("{what} ({})", columns.join("+"))
}

/// One input's part in a result's uncertainty.
#[derive(Debug, Clone, PartialEq)]
pub struct Part {
    /// The channel's key, as in [`Uncertainty::contributors`].
    pub path: String,
    /// Its name in words with its columns ("inlet tt (T1A+T1B)").
    pub name: String,
    /// Sensitivity of the result to the input, SI per SI (central
    /// difference through the engine).
    pub sensitivity: f64,
    /// The input's systematic and random standard uncertainties, SI.
    pub systematic: f64,
    /// See `systematic`.
    pub random: f64,
    /// Its share of the result's variance.
    pub share: f64,
}

/// Uncertainty of one result.
#[derive(Debug, Clone, PartialEq)]
pub struct Uncertainty {
    /// Expanded uncertainty at 95 % (coverage factor 2), SI.
    pub u95: f64,
    /// Systematic standard uncertainty of the result.
    pub systematic: f64,
    /// Random standard uncertainty of the result.
    pub random: f64,
    /// Channels and their share of the variance, largest first.
    pub contributors: Vec<(String, f64)>,
    /// Each input's sensitivity and standard uncertainties, in the order of
    /// `contributors`.
    pub parts: Vec<Part>,
}

impl Uncertainty {
    /// "station.2.tt 71 %"; empty when nothing contributes.
    pub fn top(&self) -> String {
        self.contributors
            .first()
            .filter(|(_, s)| *s > 0.0)
            .map_or(String::new(), |(l, s)| format!("{l} {:.0} %", s * 100.0))
    }
}

fn shift(
    engine: &mut Engine,
    plan: &Plan,
    inputs: &Inputs,
    var_channels: &[usize],
    delta: f64,
) -> Result<(), String> {
    let values: Vec<(&str, f64)> = var_channels
        .iter()
        .map(|&i| (plan.channels[i].given.as_str(), inputs.values[i] + delta))
        .collect();
    engine.set_si_many(&values).map_err(|e| e.to_string())
}

/// Linearised uncertainty of each reported value at this scan. The engine
/// must already hold the scan (see [`Plan::apply`]); it is left so.
pub fn linear(
    engine: &mut Engine,
    plan: &Plan,
    inputs: &Inputs,
    report: &[String],
) -> Vec<Option<Uncertainty>> {
    let vars = plan.variables(inputs);
    let base: Vec<Option<f64>> = report
        .iter()
        .map(|r| engine.value(r).ok().flatten())
        .collect();
    let mut theta: Vec<Vec<Option<f64>>> = Vec::with_capacity(vars.len());
    for (_, x, b, s, chans, _) in &vars {
        let u = (b * b + s * s).sqrt();
        if u == 0.0 {
            theta.push(vec![Some(0.0); report.len()]);
            continue;
        }
        // Central difference with a step of a tenth of the standard
        // uncertainty: small against the curvature the uncertainty samples,
        // large against round-off.
        let h = (0.1 * u).max(1e-9 * x.abs());
        let ok_p = shift(engine, plan, inputs, chans, h).is_ok();
        let plus: Vec<Option<f64>> = report
            .iter()
            .map(|r| engine.value(r).ok().flatten())
            .collect();
        let ok_m = shift(engine, plan, inputs, chans, -h).is_ok();
        let minus: Vec<Option<f64>> = report
            .iter()
            .map(|r| engine.value(r).ok().flatten())
            .collect();
        let _ = shift(engine, plan, inputs, chans, 0.0);
        theta.push(
            plus.iter()
                .zip(&minus)
                .map(|(p, m)| match (p, m, ok_p && ok_m) {
                    (Some(p), Some(m), true) => Some((p - m) / (2.0 * h)),
                    _ => None,
                })
                .collect(),
        );
    }
    (0..report.len())
        .map(|k| {
            base[k]?;
            let mut b2 = 0.0;
            let mut s2 = 0.0;
            let mut parts = Vec::new();
            for (j, (label, _, b, s, _, name)) in vars.iter().enumerate() {
                let t = theta[j][k]?;
                b2 += (t * b).powi(2);
                s2 += (t * s).powi(2);
                parts.push(Part {
                    path: label.clone(),
                    name: name.clone(),
                    sensitivity: t,
                    systematic: *b,
                    random: *s,
                    share: (t * b).powi(2) + (t * s).powi(2),
                });
            }
            let total = b2 + s2;
            for p in &mut parts {
                p.share = if total > 0.0 { p.share / total } else { 0.0 };
            }
            parts.sort_by(|a, b| b.share.total_cmp(&a.share));
            Some(Uncertainty {
                u95: 2.0 * total.sqrt(),
                systematic: b2.sqrt(),
                random: s2.sqrt(),
                contributors: parts.iter().map(|p| (p.path.clone(), p.share)).collect(),
                parts,
            })
        })
        .collect()
}

/// A small, seedable generator (SplitMix64) with normal deviates
/// (Box-Muller): enough for Monte Carlo checks, and reproducible.
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed.
    pub fn new(seed: u64) -> Rng {
        Rng(seed)
    }
    /// Next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in (0, 1).
    pub fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    /// Standard normal.
    pub fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

/// Monte Carlo spread of each reported value: `n` samples of every channel
/// (systematic and random parts drawn independently). Returns the 95 %
/// half-width, twice the sample standard deviation. The engine is left at
/// the nominal scan.
pub fn monte_carlo(
    engine: &mut Engine,
    plan: &Plan,
    inputs: &Inputs,
    report: &[String],
    n: usize,
    seed: u64,
) -> Vec<Option<f64>> {
    let vars = plan.variables(inputs);
    let mut rng = Rng::new(seed);
    let mut sum = vec![0.0; report.len()];
    let mut sum2 = vec![0.0; report.len()];
    let mut count = vec![0usize; report.len()];
    for _ in 0..n.max(2) {
        let mut values = inputs.values.clone();
        for (_, _, b, s, chans, _) in &vars {
            let d = b * rng.normal() + s * rng.normal();
            for &i in chans {
                values[i] += d;
            }
        }
        let sample = Inputs {
            values,
            ..inputs.clone()
        };
        if plan.apply(engine, &sample).is_err() {
            continue;
        }
        for (k, r) in report.iter().enumerate() {
            if let Ok(Some(v)) = engine.value(r) {
                sum[k] += v;
                sum2[k] += v * v;
                count[k] += 1;
            }
        }
    }
    let _ = plan.apply(engine, inputs);
    (0..report.len())
        .map(|k| {
            let c = count[k] as f64;
            if count[k] < 2 {
                return None;
            }
            let mean = sum[k] / c;
            let var = ((sum2[k] - c * mean * mean) / (c - 1.0)).max(0.0);
            Some(2.0 * var.sqrt())
        })
        .collect()
}

/// Reduction options.
#[derive(Debug, Clone, Copy, Default)]
pub struct Options {
    /// Add uncertainty columns.
    pub uncertainty: bool,
    /// Monte Carlo samples per scan (0: none).
    pub monte_carlo: usize,
    /// Scans per batch (memory bound).
    pub batch: usize,
}

/// One reduced scan.
#[derive(Debug, Clone, PartialEq)]
pub struct ScanResult {
    /// Data row number (1 = first row after the header).
    pub row: u64,
    /// Reported values (SI).
    pub values: Vec<Option<f64>>,
    /// Uncertainties (when asked).
    pub uncertainty: Vec<Option<Uncertainty>>,
    /// Monte Carlo 95 % half-widths (when asked).
    pub monte_carlo: Vec<Option<f64>>,
    /// Problems of this scan.
    pub problems: Vec<String>,
    /// Readings left out (with why); the scan is reduced without them.
    pub flags: Vec<String>,
}

impl ScanResult {
    fn empty(row: u64, n: usize) -> ScanResult {
        ScanResult {
            row,
            values: vec![None; n],
            uncertainty: Vec::new(),
            monte_carlo: Vec::new(),
            problems: Vec::new(),
            flags: Vec::new(),
        }
    }
}

/// Default report: every component figure and every summary figure that the
/// workbook computes.
pub fn default_report(engine: &Engine) -> Vec<String> {
    let mut v = Vec::new();
    for p in &engine.book().processes {
        if let Some(r) = engine.process(&p.name) {
            for (k, _) in &r.figures {
                v.push(format!("process.{}.{k}", p.name));
            }
        }
    }
    for (k, _, _) in crate::book::paths::SUMMARY_KEYS {
        if engine.summary().get(k).is_some() {
            v.push(format!("summary.{k}"));
        }
    }
    v
}

/// Reduce one scan on an engine (left holding the scan).
pub fn reduce_one(
    engine: &mut Engine,
    plan: &Plan,
    header: &[String],
    record: &csv::StringRecord,
    row: u64,
    report: &[String],
    opts: &Options,
) -> ScanResult {
    let mut out = ScanResult::empty(row, report.len());
    let inputs = match plan.inputs(header, record, row) {
        Ok(i) => i,
        Err(p) => {
            out.problems = p;
            return out;
        }
    };
    out.flags = inputs.flags.clone();
    if let Err(e) = plan.apply(engine, &inputs) {
        out.problems.push(format!("row {row}: {e}"));
        return out;
    }
    out.values = report
        .iter()
        .map(|r| engine.value(r).ok().flatten())
        .collect();
    out.problems = engine
        .problems()
        .into_iter()
        .map(|p| format!("row {row}: {}: {}", p.place, p.message))
        .collect();
    if opts.uncertainty {
        out.uncertainty = linear(engine, plan, &inputs, report);
    }
    if opts.monte_carlo > 0 {
        out.monte_carlo = monte_carlo(engine, plan, &inputs, report, opts.monte_carlo, row);
    }
    out
}

/// Stream a scan file through the workbook. `sink` receives results in
/// input order; `progress` receives the bytes read so far. Rows are read
/// in batches, each reduced in parallel, so memory does not grow with the
/// file.
pub fn reduce<R: BufRead + Send>(
    engine: &Engine,
    reader: &mut ScanReader<R>,
    report: &[String],
    opts: &Options,
    mut sink: impl FnMut(&ScanResult) -> std::io::Result<()>,
    progress: impl FnMut(u64),
) -> Result<(Plan, u64), ReduceError> {
    reduce_with(
        engine,
        reader,
        report,
        opts,
        |r| r.clone(),
        |r| sink(&r),
        progress,
    )
}

/// A batch of scan lines with their row numbers, and the bytes read, or
/// the error that stopped the reading.
type Batch = Result<(Vec<(u64, ScanLine)>, u64), ReduceError>;

/// [`reduce`] with a `render` step (formatting an output row, say) that
/// runs on the worker threads beside the reduction. A reader thread reads
/// the next batch while the current one is reduced; at most two batches
/// wait, so memory stays bounded.
pub fn reduce_with<R: BufRead + Send, T: Send>(
    engine: &Engine,
    reader: &mut ScanReader<R>,
    report: &[String],
    opts: &Options,
    render: impl Fn(&ScanResult) -> T + Sync,
    mut sink: impl FnMut(T) -> std::io::Result<()>,
    mut progress: impl FnMut(u64),
) -> Result<(Plan, u64), ReduceError> {
    let header: Vec<String> = reader.header().to_vec();
    let plan = Plan::new(engine.book(), &header)?;
    for r in report {
        engine
            .value(r)
            .map_err(|e| ReduceError::Report(e.to_string()))?;
    }
    let batch = opts.batch.max(64);
    let (tx, rx) = std::sync::mpsc::sync_channel::<Batch>(2);
    let mut rows = 0u64;
    let result = std::thread::scope(|scope| {
        scope.spawn(move || {
            let mut row = 0u64;
            loop {
                let mut buf = Vec::with_capacity(batch);
                let mut done = false;
                while buf.len() < batch {
                    match reader.next_line() {
                        Ok(Some(line)) => {
                            row += 1;
                            buf.push((row, line));
                        }
                        Ok(None) => {
                            done = true;
                            break;
                        }
                        Err(e) => {
                            let _ = tx.send(Err(e));
                            return;
                        }
                    }
                }
                let pos = reader.position();
                if !buf.is_empty() && tx.send(Ok((buf, pos))).is_err() {
                    return;
                }
                if done {
                    return;
                }
            }
        });
        for batch in rx {
            let (buf, pos) = batch?;
            rows += buf.len() as u64;
            let out: Vec<T> = buf
                .par_iter()
                .map_init(
                    || engine.clone(),
                    |eng, (row, line)| {
                        let r = match line {
                            ScanLine::Record(rec) => {
                                reduce_one(eng, &plan, &header, rec, *row, report, opts)
                            }
                            ScanLine::Repaired(rec, why) => {
                                let mut r =
                                    reduce_one(eng, &plan, &header, rec, *row, report, opts);
                                r.flags.insert(0, format!("row {row}, {why}"));
                                r
                            }
                            ScanLine::Bad(why) => {
                                let mut r = ScanResult::empty(*row, report.len());
                                r.problems = vec![format!("row {row}: unreadable line ({why})")];
                                r
                            }
                        };
                        render(&r)
                    },
                )
                .collect();
            for t in out {
                sink(t).map_err(|e| ReduceError::Read(format!("cannot write the output: {e}")))?;
            }
            progress(pos);
        }
        Ok(())
    });
    result.map(|()| (plan, rows))
}

/// Open a scan file: CSV, or tab-separated when the header line has a tab
/// (see [`scans`]).
pub fn open_scans(
    path: &std::path::Path,
) -> Result<ScanReader<std::io::BufReader<std::fs::File>>, ReduceError> {
    ScanReader::open(path)
}
