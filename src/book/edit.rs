//! Edits that must reach every reference at once: renaming a station, a
//! process or a shaft updates the processes that name it, the goals, the
//! channel map and the stored results in one step, so a rename never
//! leaves a goal or a channel pointing at a name that no longer exists.

use super::paths::{Path, Scope};
use super::{BookError, Workbook};
use crate::kinds::NameOf;

/// Rewrite `path` in place when it names `old` in `scope`.
pub fn rename_in_path(path: &mut String, scope: Scope, old: &str, new: &str) {
    if let Ok(p) = Path::parse(path)
        && p.scope == scope
        && p.name == old
    {
        let prefix = match scope {
            Scope::Station => "station",
            Scope::Process => "process",
            Scope::Shaft => "shaft",
            Scope::Ambient | Scope::Gas | Scope::Summary => return,
        };
        *path = format!("{prefix}.{new}.{}", p.key);
    }
}

impl Workbook {
    /// Every path the workbook stores (goals, channels), for rewriting.
    fn stored_paths_mut(&mut self) -> Vec<&mut String> {
        let mut v = Vec::new();
        for g in &mut self.goals {
            v.push(&mut g.vary);
            v.push(&mut g.target);
        }
        if let Some(c) = &mut self.channels {
            v.extend(
                c.map
                    .iter_mut()
                    .map(|ch| &mut ch.given)
                    .filter(|g| !g.is_empty()),
            );
        }
        v
    }

    fn check_new_name(what: &'static str, new: &str, taken: bool) -> Result<(), BookError> {
        if new.trim().is_empty() || new != new.trim() {
            return Err(BookError::Rule(format!(
                "a {what} name must not be empty or start or end with a space (\"{new}\")"
            )));
        }
        if taken {
            return Err(BookError::Duplicate {
                what: match what {
                    "station" => "stations",
                    "process" => "processes",
                    _ => "shafts",
                },
                name: new.to_string(),
            });
        }
        Ok(())
    }

    /// Rename station `old` to `new` everywhere it is named.
    pub fn rename_station(&mut self, old: &str, new: &str) -> Result<(), BookError> {
        let Some(i) = self.stations.iter().position(|s| s.name == old) else {
            return Err(BookError::Unknown {
                whose: "the rename".into(),
                what: "station",
                name: old.to_string(),
            });
        };
        let taken = new != old && self.stations.iter().any(|s| s.name == new);
        Self::check_new_name("station", new, taken)?;
        self.stations[i].name = new.to_string();
        let fix = |s: &mut String| {
            if s == old {
                *s = new.to_string();
            }
        };
        for p in &mut self.processes {
            fix(&mut p.to);
            if let Some(f) = &mut p.from {
                fix(f);
            }
            crate::kinds::of_mut(&mut p.kind).visit_names_mut(&mut |of, s| {
                if of != NameOf::Shaft {
                    fix(s);
                }
            });
        }
        if let Some(st) = self.corrections.as_mut().and_then(|c| c.station.as_mut()) {
            fix(st);
        }
        for s in self.stored_paths_mut() {
            rename_in_path(s, Scope::Station, old, new);
        }
        if let Some(rows) = &mut self.results {
            rows.iter_mut().for_each(|r| fix(&mut r.row));
        }
        self.comments.rename("stations", old, new);
        self.comments.rename("results", old, new);
        Ok(())
    }

    /// Rename process `old` to `new` everywhere it is named.
    pub fn rename_process(&mut self, old: &str, new: &str) -> Result<(), BookError> {
        let Some(i) = self.processes.iter().position(|p| p.name == old) else {
            return Err(BookError::Unknown {
                whose: "the rename".into(),
                what: "process",
                name: old.to_string(),
            });
        };
        let taken = new != old && self.processes.iter().any(|p| p.name == new);
        Self::check_new_name("process", new, taken)?;
        self.processes[i].name = new.to_string();
        for s in self.stored_paths_mut() {
            rename_in_path(s, Scope::Process, old, new);
        }
        self.comments.rename("processes", old, new);
        Ok(())
    }

    /// Rename shaft `old` to `new` everywhere it is named.
    pub fn rename_shaft(&mut self, old: &str, new: &str) -> Result<(), BookError> {
        let Some(i) = self.shafts.iter().position(|s| s.name == old) else {
            return Err(BookError::Unknown {
                whose: "the rename".into(),
                what: "shaft",
                name: old.to_string(),
            });
        };
        let taken = new != old && self.shafts.iter().any(|s| s.name == new);
        Self::check_new_name("shaft", new, taken)?;
        self.shafts[i].name = new.to_string();
        self.comments.rename("shafts", old, new);
        for p in &mut self.processes {
            crate::kinds::of_mut(&mut p.kind).visit_names_mut(&mut |of, s| {
                if of == NameOf::Shaft && s == old {
                    *s = new.to_string();
                }
            });
        }
        for s in self.stored_paths_mut() {
            rename_in_path(s, Scope::Shaft, old, new);
        }
        Ok(())
    }
}
