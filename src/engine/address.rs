//! Reading any value by its path, refusing paths that name nothing (with
//! the keys that place does have), and listing every address a workbook
//! offers.
//!
//! A place's keys come from one table each: station, summary, shaft and
//! ambient keys from `book::paths`, a process's figures from its kind
//! ([`crate::kinds::ProcessKind::figure_keys`]), and the givens from the
//! workbook's own walk. A process, shaft or ambient path may name a given
//! as well as a derived value: reading it gives the SI value in use.

use super::Engine;
use crate::book::paths::{self, AddressError, Scope, derived_keys};
use crate::book::{BookError, Path};
use crate::units::Quantity;

/// One address of a workbook, as `stationwise addresses` lists it.
#[derive(Debug, Clone, PartialEq)]
pub struct Address {
    /// The path ("process.compressor.pressure_ratio").
    pub path: String,
    /// A given (can be varied, fed by a channel) or a derived value.
    pub given: bool,
    /// Its quantity (for units).
    pub quantity: Quantity,
    /// What it is, in words.
    pub label: &'static str,
    /// Its current SI value (None where not computed).
    pub value: Option<f64>,
}

/// The label of a derived key of a scope.
fn label_of(scope: Scope, key: &str) -> &'static str {
    derived_keys(scope)
        .iter()
        .find(|(k, ..)| *k == key)
        .map_or("", |(_, l, _)| l)
}

fn quantity_of(scope: Scope, key: &str) -> Quantity {
    derived_keys(scope)
        .iter()
        .find(|(k, ..)| *k == key)
        .map_or(Quantity::Ratio, |(_, _, q)| *q)
}

impl Engine {
    /// The givens of one place that its current mode reads: key,
    /// quantity, SI value, in file order. (A combustor in the measured mode
    /// keeps its efficiency given in the file but derives the efficiency;
    /// the path then names the derived value only.)
    fn place_givens(&self, scope: Scope, name: &str) -> Vec<(String, Quantity, f64)> {
        let unread: &[&str] = match scope {
            Scope::Process => self.graph.process_index.get(name).map_or(&[], |&i| {
                crate::kinds::of(&self.book.processes[i].kind).unread_givens()
            }),
            _ => &[],
        };
        let mut v = Vec::new();
        self.book.visit_givens_ref(&mut |f| {
            if f.scope == scope.word() && f.name == name && !unread.contains(&f.key) {
                v.push((f.key.to_string(), f.quantity, f.given.si()));
            }
        });
        v
    }

    /// The derived keys a place offers (a process's depend on its kind and mode).
    fn place_derived(&self, scope: Scope, name: &str) -> Vec<&'static str> {
        match scope {
            Scope::Process => self
                .graph
                .process_index
                .get(name)
                .map(|&i| {
                    crate::kinds::of(&self.book.processes[i].kind)
                        .figure_keys()
                        .to_vec()
                })
                .unwrap_or_default(),
            s => derived_keys(s).iter().map(|(k, ..)| *k).collect(),
        }
    }

    /// Whether a place offers a derived key, without building the list
    /// (`value` runs per sweep point and report column).
    fn has_derived(&self, scope: Scope, name: &str, key: &str) -> bool {
        match scope {
            Scope::Process => self.graph.process_index.get(name).is_some_and(|&i| {
                crate::kinds::of(&self.book.processes[i].kind)
                    .figure_keys()
                    .contains(&key)
            }),
            s => derived_keys(s).iter().any(|(k, ..)| *k == key),
        }
    }

    /// The place of a path exists (or a NoPlace error listing those there are).
    fn place_exists(&self, path: &str, p: &Path) -> Result<(), AddressError> {
        let (index, what) = match p.scope {
            Scope::Station => (&self.graph.station_index, "station"),
            Scope::Process => (&self.graph.process_index, "process"),
            Scope::Shaft => (&self.graph.shaft_index, "shaft"),
            _ => return Ok(()),
        };
        if index.contains_key(&p.name) {
            return Ok(());
        }
        // The names there are, in file order, only for the message.
        let have = match p.scope {
            Scope::Station => self.book.stations.iter().map(|s| s.name.clone()).collect(),
            Scope::Process => self.book.processes.iter().map(|s| s.name.clone()).collect(),
            _ => self.book.shafts.iter().map(|s| s.name.clone()).collect(),
        };
        Err(AddressError::NoPlace {
            path: path.to_string(),
            what,
            name: p.name.clone(),
            have,
        })
    }

    fn place_words(&self, p: &Path) -> String {
        match p.scope {
            Scope::Process => match self.graph.process_index.get(&p.name) {
                Some(&i) => format!(
                    "process \"{}\" ({})",
                    p.name,
                    crate::kinds::of(&self.book.processes[i].kind).mode_label()
                ),
                None => format!("process \"{}\"", p.name),
            },
            s if s.named() => format!("{} \"{}\"", s.word(), p.name),
            s => format!("the {} block", s.word()),
        }
    }

    fn no_key(&self, path: &str, p: &Path, givens_only: bool) -> AddressError {
        let mut have: Vec<String> = self
            .place_givens(p.scope, &p.name)
            .into_iter()
            .map(|(k, ..)| k)
            .collect();
        if !givens_only {
            for k in self.place_derived(p.scope, &p.name) {
                if !have.iter().any(|h| h == k) {
                    have.push(k.to_string());
                }
            }
        }
        AddressError::NoKey {
            path: path.to_string(),
            place: self.place_words(p),
            what: if givens_only { "given" } else { "value" },
            key: p.key.clone(),
            have,
        }
    }

    /// A derived value or given by path; `Ok(None)` when it names a real
    /// value that is not computed here (a failed process, an unchoked
    /// nozzle's throat). A path that names nothing is an error listing the
    /// keys of that place.
    pub fn value(&self, path: &str) -> Result<Option<f64>, AddressError> {
        let p = Path::parse(path)?;
        self.place_exists(path, &p)?;
        if self.has_derived(p.scope, &p.name, &p.key) {
            // A key both given and reported reads the report; where the
            // process could not be computed there is no value (a goal must
            // not meet its target on a given the process did not reach).
            return Ok(self.derived(&p));
        }
        self.place_givens(p.scope, &p.name)
            .into_iter()
            .find(|(k, ..)| *k == p.key)
            .map(|(_, _, si)| Some(si))
            .ok_or_else(|| self.no_key(path, &p, false))
    }

    /// A derived value of a path whose place and key exist.
    fn derived(&self, p: &Path) -> Option<f64> {
        match p.scope {
            Scope::Station => self
                .station(&p.name)
                .and_then(|v| self.station_key(v, &p.key)),
            Scope::Process => self.process(&p.name).and_then(|r| r.figure(&p.key)),
            Scope::Summary => self.summary.get(&p.key),
            Scope::Shaft => self.shaft(&p.name).map(|b| match p.key.as_str() {
                "compressor_power" => b.compressor_power,
                "turbine_power" => b.turbine_power,
                _ => b.imbalance,
            }),
            Scope::Ambient => {
                let a = self.ambient.as_ref().ok()?;
                Some(match p.key.as_str() {
                    "t" => a.flow.t,
                    "p" => a.flow.p,
                    "v" => a.flow.v,
                    "mach" => a.flow.mach,
                    "tt" => a.flow.tt,
                    _ => a.flow.pt,
                })
            }
            Scope::Gas => None,
        }
    }

    /// Check that a path names a given (what goals vary, sweeps step and
    /// channels feed); the error lists the givens of that place.
    pub fn given_address(&self, path: &str) -> Result<Quantity, AddressError> {
        let p = Path::parse(path)?;
        self.place_exists(path, &p)?;
        if let Some((_, q, _)) = self
            .place_givens(p.scope, &p.name)
            .into_iter()
            .find(|(k, ..)| *k == p.key)
        {
            return Ok(q);
        }
        let mut e = self.no_key(path, &p, true);
        if self
            .place_derived(p.scope, &p.name)
            .contains(&p.key.as_str())
            && let AddressError::NoKey { have, .. } = &e
        {
            e = AddressError::Misplaced {
                path: path.to_string(),
                why: format!(
                    "is computed, not given here; the givens of {} are {}",
                    self.place_words(&p),
                    if have.is_empty() {
                        "none".to_string()
                    } else {
                        have.join(", ")
                    }
                ),
            };
        }
        Err(e)
    }

    /// The references a workbook stores (goals, channel map) name real
    /// places and keys: checked when the workbook is compiled, so a bad
    /// one stops the load instead of giving a blank column later.
    pub(super) fn check_references(&self) -> Vec<BookError> {
        let mut errors = Vec::new();
        let mut push = |whose: String, r: Result<(), AddressError>| {
            if let Err(error) = r {
                errors.push(BookError::Address {
                    whose,
                    error: Box::new(error),
                });
            }
        };
        for (i, g) in self.book.goals.iter().enumerate() {
            push(
                format!("goal {} vary", i + 1),
                self.given_address(&g.vary).map(|_| ()),
            );
            push(
                format!("goal {} target", i + 1),
                self.value(&g.target).map(|_| ()),
            );
        }
        if let Some(c) = &self.book.channels {
            for (i, ch) in c.map.iter().enumerate() {
                push(
                    format!("channel {} ({})", i + 1, ch.columns.join(", ")),
                    self.given_address(&ch.given).map(|_| ()),
                );
                // Two channels feeding one given: the later would silently
                // overwrite the earlier in every scan.
                if let Some(j) = c.map[..i].iter().position(|o| o.given == ch.given) {
                    push(
                        format!("channel {} ({})", i + 1, ch.columns.join(", ")),
                        Err(AddressError::Misplaced {
                            path: ch.given.clone(),
                            why: format!(
                                "is fed by channel {} already; one given takes one channel (list every probe of a rake in that channel's columns)",
                                j + 1
                            ),
                        }),
                    );
                }
            }
        }
        errors
    }

    /// Every address of the workbook with its quantity and current value:
    /// the ambient block, the gas settings, each station, process and
    /// shaft, then the summary.
    pub fn addresses(&self) -> Vec<Address> {
        let mut out = Vec::new();
        let mut place = |scope: Scope, name: &str| {
            let prefix = if scope.named() {
                format!("{}.{name}.", scope.word())
            } else {
                format!("{}.", scope.word())
            };
            let givens = self.place_givens(scope, name);
            let derived = self.place_derived(scope, name);
            for (k, q, si) in &givens {
                // A key both given and reported (an entry's w, a nozzle's
                // given exit area) shows the reported value, as `value`
                // reads it; where the process failed, the value given.
                let both = derived.contains(&k.as_str());
                let value = if both {
                    self.derived(&Path {
                        scope,
                        name: name.to_string(),
                        key: k.clone(),
                    })
                    .or(Some(*si))
                } else {
                    Some(*si)
                };
                // A label from the derived table only where the key means
                // the same there (a compressor's "efficiency" given is not
                // the combustion efficiency figure of that table).
                out.push(Address {
                    path: format!("{prefix}{k}"),
                    given: true,
                    quantity: *q,
                    label: if both { label_of(scope, k) } else { "" },
                    value,
                });
            }
            for k in derived {
                // A station's given Mach number is also its derived one:
                // listed once, as the given.
                if givens.iter().any(|(g, ..)| g == k) {
                    continue;
                }
                let p = Path {
                    scope,
                    name: name.to_string(),
                    key: k.to_string(),
                };
                out.push(Address {
                    path: format!("{prefix}{k}"),
                    given: false,
                    quantity: quantity_of(scope, k),
                    label: label_of(scope, k),
                    value: self.derived(&p),
                });
            }
        };
        place(Scope::Ambient, "");
        place(Scope::Gas, "");
        for s in &self.book.stations {
            place(Scope::Station, &s.name);
        }
        for p in &self.book.processes {
            place(Scope::Process, &p.name);
        }
        for s in &self.book.shafts {
            place(Scope::Shaft, &s.name);
        }
        place(Scope::Summary, "");
        out
    }
}

/// The quantity of a path's value in this workbook (a given's own, or the
/// derived key's), for units at the edges.
pub fn quantity(engine: &Engine, path: &str) -> Option<Quantity> {
    engine
        .given_address(path)
        .ok()
        .or_else(|| paths::quantity_of_derived(path))
}

/// A given resolved once (its place in the workbook's walk and what a change
/// of it makes dirty): setting it costs no path parsing or name lookup.
/// Made by [`Engine::handle`]; valid until the workbook's structure changes.
#[derive(Debug, Clone, PartialEq)]
pub struct GivenHandle {
    /// The part of the workbook holding the given, and its place among
    /// that part's givens: a set walks that part only.
    part: crate::book::Part,
    ordinal: usize,
    touch: Touch,
    path: String,
}

impl GivenHandle {
    /// The path the handle was made from.
    pub fn path(&self) -> &str {
        &self.path
    }
}

/// What a change of a given makes dirty.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Touch {
    /// The gas model: everything, with the model and ambient rebuilt.
    Gas,
    /// The reference conditions of corrected values: everything.
    All,
    /// The ambient block: processes that read it, ambient rebuilt.
    Ambient,
    /// One process.
    Process(usize),
    /// The processes on one shaft.
    Shaft(usize),
    /// Nothing computed reads it.
    Nothing,
}

/// A value resolved once for repeated reading (a sweep's report columns).
#[derive(Debug, Clone, PartialEq)]
pub struct Reader {
    how: Read,
}

#[derive(Debug, Clone, PartialEq)]
enum Read {
    Station(usize, String),
    Process(usize, &'static str),
    Other(Path),
    Given(GivenHandle),
}

impl Engine {
    /// Resolve a given's path once for [`Engine::set_by`].
    pub fn handle(&self, path: &str) -> Result<GivenHandle, BookError> {
        let unknown = || BookError::Unknown {
            whose: "the change".into(),
            what: "given",
            name: path.to_string(),
        };
        use crate::book::Part;
        let mut part = None;
        self.book.visit_givens_ref(&mut |f| {
            if part.is_none() && f.is(path) {
                part = Some(match f.scope {
                    "station" => self
                        .graph
                        .station_index
                        .get(f.name)
                        .map(|&i| Part::Station(i)),
                    "process" => self
                        .graph
                        .process_index
                        .get(f.name)
                        .map(|&i| Part::Process(i)),
                    "shaft" => self.graph.shaft_index.get(f.name).map(|&i| Part::Shaft(i)),
                    _ => Some(Part::Ambient),
                });
            }
        });
        let part = part.flatten().ok_or_else(unknown)?;
        let mut ordinal = None;
        let mut n = 0;
        self.book.visit_givens_ref_in(part, &mut |f| {
            if ordinal.is_none() && f.is(path) {
                ordinal = Some(n);
            }
            n += 1;
        });
        let ordinal = ordinal.ok_or_else(unknown)?;
        let p = Path::parse(path).map_err(|_| unknown())?;
        let touch = match p.scope {
            Scope::Gas => Touch::Gas,
            Scope::Ambient if p.key.starts_with("reference") => Touch::All,
            Scope::Ambient => Touch::Ambient,
            Scope::Station => self
                .graph
                .station_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&s| Touch::Process(self.graph.producer[s])),
            Scope::Process => self
                .graph
                .process_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&i| Touch::Process(i)),
            Scope::Shaft => self
                .graph
                .shaft_index
                .get(&p.name)
                .map_or(Touch::Nothing, |&k| Touch::Shaft(k)),
            Scope::Summary => Touch::Nothing,
        };
        Ok(GivenHandle {
            part,
            ordinal,
            touch,
            path: path.to_string(),
        })
    }

    /// Set a given through its handle and recompute what depends on it
    /// (as [`Engine::set_si`]; a value out of the field's bounds is refused
    /// and the old one kept).
    pub fn set_by(&mut self, h: &GivenHandle, si: f64) -> Result<(), BookError> {
        let mut found = None;
        let mut n = 0;
        self.book.visit_givens_in(h.part, &mut |f| {
            if n == h.ordinal {
                let r = f.check_si(si);
                if r.is_ok() {
                    f.given.set_si(si);
                }
                found = Some(r);
            }
            n += 1;
        });
        match found {
            Some(r) => r?,
            None => {
                return Err(BookError::Unknown {
                    whose: "the change".into(),
                    what: "given",
                    name: h.path.clone(),
                });
            }
        }
        self.touch_resolved(h.touch);
        self.recompute();
        Ok(())
    }

    /// The SI value in use of a given, through its handle.
    pub fn given_by(&self, h: &GivenHandle) -> Option<f64> {
        let mut out = None;
        let mut n = 0;
        self.book.visit_givens_ref_in(h.part, &mut |f| {
            if n == h.ordinal {
                out = Some(f.given.si());
            }
            n += 1;
        });
        out
    }

    /// Resolve a path once for [`Engine::read`] (refused as
    /// [`Engine::value`] refuses it).
    pub fn reader(&self, path: &str) -> Result<Reader, AddressError> {
        self.value(path)?;
        let p = Path::parse(path)?;
        let how = if self.has_derived(p.scope, &p.name, &p.key) {
            match p.scope {
                Scope::Station => match self.graph.station_index.get(&p.name) {
                    Some(&s) => Read::Station(s, p.key.clone()),
                    None => Read::Other(p),
                },
                Scope::Process => {
                    let i = self.graph.process_index.get(&p.name).copied();
                    let key = i.and_then(|i| {
                        crate::kinds::of(&self.book.processes[i].kind)
                            .figure_keys()
                            .iter()
                            .find(|k| **k == p.key)
                            .copied()
                    });
                    match (i, key) {
                        (Some(i), Some(k)) => Read::Process(i, k),
                        _ => Read::Other(p),
                    }
                }
                _ => Read::Other(p),
            }
        } else {
            match self.handle(path) {
                Ok(h) => Read::Given(h),
                Err(_) => Read::Other(p),
            }
        };
        Ok(Reader { how })
    }

    /// Read a resolved value (None where not computed).
    pub fn read(&self, r: &Reader) -> Option<f64> {
        match &r.how {
            Read::Station(s, key) => match self.station_status(*s) {
                super::StationStatus::Ok(v) => self.station_key(v, key),
                _ => None,
            },
            Read::Process(i, key) => match self.nodes.get(*i) {
                Some(Some(super::NodeOut::Done(res))) => res.figure(key),
                _ => None,
            },
            Read::Other(p) => self.derived(p),
            Read::Given(h) => self.given_by(h),
        }
    }
}
