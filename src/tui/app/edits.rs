//! Model edits: every change to the workbook goes through `commit` (one undoable step, the engine recompiled), and undo and redo replace the whole workbook.

use super::*;

impl App {
    /// Apply a typed value to a given: recompute at once, or refuse and keep the old one.
    pub fn apply_edit(&mut self, path: &str, text: &str) -> Result<(), String> {
        let Some(engine) = self.engine.as_mut() else {
            return Err("no workbook".into());
        };
        // A bare number under a shown unit is refused, not read in SI.
        // A gauge pressure is read from the workbook's barometer.
        if let Some((q, _)) = engine.book().given(path) {
            let baro = engine
                .book()
                .barometer()
                .filter(|_| path != crate::book::BAROMETER);
            crate::units::parse_stated_at(text, q, path, self.system, baro)
                .map_err(|e| e.to_string())?;
        }
        let before = engine.book().clone();
        engine.set_given(path, text).map_err(|e| e.to_string())?;
        self.undo.push(before);
        self.redo.clear();
        self.modified = true;
        let problems = self.engine.as_ref().map_or(0, |e| e.problems().len());
        if problems > 0 {
            self.error(format!(
                "{path} = {text}: recomputed; {problems} problem(s), see the marked stations"
            ));
        } else {
            self.info(format!("{path} = {text}: recomputed"));
        }
        Ok(())
    }

    /// Replace the workbook after a structural edit (kept undoable).
    pub fn commit(&mut self, book: Workbook, what: &str) {
        let Some(engine) = self.engine.as_mut() else {
            return;
        };
        let before = engine.book().clone();
        match engine.replace_book(book) {
            Ok(()) => {
                self.undo.push(before);
                self.redo.clear();
                self.modified = true;
                self.info(what.to_string());
                self.follow_book();
            }
            Err(e) => {
                let _ = engine.replace_book(before);
                self.error(format!("not done: {}", crate::present::join(&e)));
            }
        }
        self.row = self.row.min(self.n_stations().saturating_sub(1));
        self.panel = 0;
    }

    /// After the workbook was replaced (an edit, undo or redo): the scan
    /// browser's channel map is compiled again from the new workbook, so
    /// renamed givens stay fed; a sweep whose varied given is gone is put
    /// away rather than shown under a name that no longer exists.
    pub(super) fn follow_book(&mut self) {
        let Some(book) = self.engine.as_ref().map(|e| e.book()) else {
            return;
        };
        let mut closed = None;
        if let Some(sb) = &mut self.scans {
            match crate::reduce::Plan::new(book, &sb.header) {
                Ok(plan) => {
                    sb.plan = plan;
                    sb.mark();
                }
                Err(e) => closed = Some(e.to_string()),
            }
        }
        if self
            .sweep
            .as_ref()
            .is_some_and(|sw| book.given(&sw.vary).is_none())
        {
            self.sweep = None;
        }
        if let Some(e) = closed {
            self.scans = None;
            self.error(format!("scan browser closed: {e}"));
        } else if let Some(at) = self.scans.as_ref().map(|sb| sb.at) {
            // The new engine computes afresh: the scan on screen is applied
            // (or its values withheld) again.
            let status = self.status.clone();
            self.show_scan(at);
            if status.is_some() {
                self.status = status;
            }
        }
    }

    pub(super) fn undo(&mut self) {
        self.step_history(false);
    }

    pub(super) fn redo(&mut self) {
        self.step_history(true);
    }

    /// Undo (`forward` false) or redo: the workbook from one stack replaces
    /// the current one, which goes onto the other stack.
    fn step_history(&mut self, forward: bool) {
        let (from, done, none) = if forward {
            (&mut self.redo, "redone", "nothing to redo")
        } else {
            (&mut self.undo, "undone", "nothing to undo")
        };
        let Some(book) = from.pop() else {
            self.info(none);
            return;
        };
        if let Some(e) = self.engine.as_mut() {
            let cur = e.book().clone();
            if e.replace_book(book).is_ok() {
                if forward {
                    self.undo.push(cur);
                } else {
                    self.redo.push(cur);
                }
                // Back at the state last saved or opened: nothing to save.
                self.modified = self.saved_text.as_deref() != Some(&format::to_text(e.book()));
                self.info(done);
                self.follow_book();
            }
        }
        self.row = self.row.min(self.n_stations().saturating_sub(1));
        self.panel = self.panel.min(self.panel_rows().len().saturating_sub(1));
    }

    pub(super) fn station_name(&self, i: usize) -> Option<String> {
        self.book()?.stations.get(i).map(|s| s.name.clone())
    }

    pub(super) fn delete_station(&mut self) {
        let Some(b) = self.book().cloned() else {
            return;
        };
        let Some(name) = self.station_name(self.row) else {
            return;
        };
        let Some(pi) = b.processes.iter().position(|p| p.to == name) else {
            self.error(
                "this station is a split's second stream: delete or change the split instead",
            );
            return;
        };
        let p = &b.processes[pi];
        let readers = b
            .processes
            .iter()
            .filter(|q| q.from.as_deref() == Some(&name))
            .count();
        let Some(upstream) = p.from.clone() else {
            if readers > 0 {
                self.error("cannot delete the entry station while processes read it");
                return;
            }
            let mut nb = b.clone();
            nb.processes.remove(pi);
            nb.stations.retain(|s| s.name != name);
            self.commit(nb, &format!("deleted station {name}"));
            return;
        };
        let kind = crate::kinds::of(&p.kind);
        if kind.second_input().is_some() || kind.second_output().is_some() {
            self.error("delete the second stream's stations first, or change this process's kind");
            return;
        }
        let mut nb = b.clone();
        nb.processes.remove(pi);
        nb.stations.retain(|s| s.name != name);
        for q in &mut nb.processes {
            if q.from.as_deref() == Some(&name) {
                q.from = Some(upstream.clone());
            }
            crate::kinds::of_mut(&mut q.kind).visit_names_mut(&mut |of, s| {
                if of == crate::kinds::NameOf::Input && *s == name {
                    *s = upstream.clone();
                }
            });
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("deleted station {name} and the process into it"),
        );
    }

    pub(super) fn insert_station(&mut self, after: usize, name: &str) {
        let Some(b) = self.book().cloned() else {
            return;
        };
        let name = name.trim();
        if name.is_empty() || b.stations.iter().any(|s| s.name == name) {
            self.error(format!("station name \"{name}\" is empty or already used"));
            return;
        }
        let Some(sel) = b.stations.get(after).map(|s| s.name.clone()) else {
            return;
        };
        let mut nb = b.clone();
        for q in &mut nb.processes {
            if q.from.as_deref() == Some(&sel) {
                q.from = Some(name.to_string());
            }
            crate::kinds::of_mut(&mut q.kind).visit_names_mut(&mut |of, s| {
                if of == crate::kinds::NameOf::Input && *s == sel {
                    *s = name.to_string();
                }
            });
        }
        let mut pname = format!("duct {name}");
        while nb.processes.iter().any(|p| p.name == pname) {
            pname.push('\'');
        }
        let at = nb
            .processes
            .iter()
            .position(|p| p.to == sel)
            .map_or(nb.processes.len(), |i| i + 1);
        nb.processes.insert(
            at,
            Process {
                name: pname,
                from: Some(sel),
                to: name.to_string(),
                kind: Kind::Duct(Duct::Recovery {
                    recovery: Given::raw("1"),
                }),
                note: String::new(),
            },
        );
        nb.stations.insert(after + 1, Station::named(name));
        if nb.resolve().is_err() {
            self.error("internal: new station did not resolve");
            return;
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("inserted station {name} with a loss-free duct into it"),
        );
        self.row = (after + 1).min(self.n_stations().saturating_sub(1));
    }

    pub(super) fn rename(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        if self.focus == Focus::Panel && self.view == View::Grid {
            let pi = e.producer_of(self.row);
            self.popups.push(Popup::Text {
                title: "new name of the process".into(),
                input: Field::with(b.processes[pi].name.clone()),
                purpose: TextFor::RenameProcess(pi),
            });
        } else if let Some(s) = b.stations.get(self.row) {
            self.popups.push(Popup::Text {
                title: "new name of the station".into(),
                input: Field::with(s.name.clone()),
                purpose: TextFor::RenameStation(self.row),
            });
        }
    }

    pub(super) fn do_rename_station(&mut self, i: usize, new: &str) {
        let Some(old) = self
            .book()
            .and_then(|b| b.stations.get(i))
            .map(|s| s.name.clone())
        else {
            return;
        };
        self.rename_everywhere(crate::book::paths::Scope::Station, &old, new.trim());
    }

    pub(super) fn do_rename_process(&mut self, i: usize, new: &str) {
        let Some(old) = self
            .book()
            .and_then(|b| b.processes.get(i))
            .map(|p| p.name.clone())
        else {
            return;
        };
        self.rename_everywhere(crate::book::paths::Scope::Process, &old, new.trim());
    }

    /// Rename a station or process in one undoable step: the workbook
    /// updates its processes, goals, channel map and stored results; the
    /// sweep shown follows the new name too.
    pub(super) fn rename_everywhere(
        &mut self,
        scope: crate::book::paths::Scope,
        old: &str,
        new: &str,
    ) {
        use crate::book::paths::Scope;
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let (what, done) = match scope {
            Scope::Station => ("station", nb.rename_station(old, new)),
            Scope::Process => ("process", nb.rename_process(old, new)),
            _ => ("shaft", nb.rename_shaft(old, new)),
        };
        if let Err(e) = done {
            self.error(e.to_string());
            return;
        }
        if let Some(sw) = &mut self.sweep {
            for p in std::iter::once(&mut sw.vary).chain(sw.report.iter_mut()) {
                crate::book::edit::rename_in_path(p, scope, old, new);
            }
        }
        self.commit(nb, &format!("renamed {what} {old} to {new}"));
    }

    pub(super) fn choose_statics(&mut self) {
        let cur = self
            .book()
            .and_then(|b| b.stations.get(self.row))
            .map_or(0, |s| match s.statics {
                None => 0,
                Some(Statics::Mach(_)) => 1,
                Some(Statics::Pressure(_)) => 2,
                Some(Statics::Velocity(_)) => 3,
                Some(Statics::Area(_)) => 4,
            });
        self.popups.push(Popup::Choose {
            title: "what fixes this station's static state".into(),
            items: [
                "nothing here (totals only)",
                "Mach number",
                "static pressure",
                "velocity",
                "flow area (Mach on the station's branch)",
            ]
            .iter()
            .map(|s| s.to_string())
            .collect(),
            sel: cur,
            search: String::new(),
            purpose: ChooseFor::Statics,
        });
    }

    pub(super) fn set_statics(&mut self, choice: usize) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let v = e.station(&nb.stations[self.row].name).copied();
        let st = &mut nb.stations[self.row];
        let f = v.and_then(|v| v.flow);
        // New givens start from the values computed now, so the cycle
        // stays where it was until the user edits them.
        let next = match choice {
            1 => Some(Statics::Mach(Given::raw(&fmt_num(
                f.map_or(0.5, |f| f.mach),
            )))),
            2 => Some(Statics::Pressure(Given::raw(&format!(
                "{} kPa",
                fmt_num(f.map_or(100.0, |f| f.p / 1000.0))
            )))),
            3 => Some(Statics::Velocity(Given::raw(&format!(
                "{} m/s",
                fmt_num(f.map_or(100.0, |f| f.v))
            )))),
            4 => Some(Statics::Area(Given::raw(&format!(
                "{} m2",
                fmt_num(v.and_then(|v| v.area).unwrap_or(0.1))
            )))),
            _ => None,
        };
        st.statics = next;
        let what = match &st.statics {
            None => "static state not fixed at this station".to_string(),
            Some(s) => format!("static state fixed by {}", statics_name(s)),
        };
        if nb.resolve().is_ok() {
            self.commit(nb, &what);
        }
    }

    pub(super) fn toggle_branch(&mut self) {
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let st = &mut nb.stations[self.row];
        st.branch = match st.branch {
            Some(Branch::Supersonic) => None,
            _ => Some(Branch::Supersonic),
        };
        let what = if st.branch.is_some() {
            "supersonic branch"
        } else {
            "subsonic branch"
        };
        self.commit(nb, what);
    }

    /// The mode chooser: every mode of the selected process, each with
    /// what it takes and derives, the current one first.
    pub(super) fn choose_mode(&mut self) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let p = &e.book().processes[pi];
        let list = crate::kinds::modes(&p.kind, e.process(&p.name));
        if list.len() < 2 {
            self.info(format!(
                "a {} has one mode: {}",
                crate::kinds::of(&p.kind).name(),
                crate::kinds::mode_summary(&p.kind)
            ));
            return;
        }
        let items = list
            .iter()
            .enumerate()
            .map(|(i, k)| {
                let label = crate::kinds::of(k).mode_label();
                let now = if i == 0 { " (now)" } else { "" };
                let kept = if i > 0
                    && self
                        .mode_memory
                        .contains_key(&(p.name.clone(), label.clone()))
                {
                    " [your earlier values]"
                } else {
                    ""
                };
                format!("{label}{now}{kept}: {}", crate::kinds::mode_summary(k))
            })
            .collect();
        self.popups.push(Popup::Choose {
            title: format!(
                "mode of \"{}\" (the givens start from the values computed now)",
                p.name
            ),
            items,
            sel: 0,
            search: String::new(),
            purpose: ChooseFor::Mode(list),
        });
    }

    /// Switch the selected process to a mode: the one it leaves is kept
    /// (with its exit's measured values), and a mode left before comes
    /// back with the values it had.
    pub(super) fn set_mode(&mut self, kind: Kind) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let name = nb.processes[pi].name.clone();
        let to = nb.processes[pi].to.clone();
        let old_label = crate::kinds::of(&nb.processes[pi].kind).mode_label();
        let label = crate::kinds::of(&kind).mode_label();
        if label == old_label {
            self.info(format!("mode unchanged: {label}"));
            return;
        }
        let exit = nb.stations.iter().find(|s| s.name == to);
        let left: ModeMemory = (
            nb.processes[pi].kind.clone(),
            exit.and_then(|s| s.tt.clone()),
            exit.and_then(|s| s.pt.clone()),
        );
        let back = self
            .mode_memory
            .get(&(name.clone(), label.clone()))
            .cloned();
        match &back {
            Some((k, tt, pt)) => {
                nb.processes[pi].kind = k.clone();
                if let Some(st) = nb.stations.iter_mut().find(|s| s.name == to) {
                    st.tt = tt.clone();
                    st.pt = pt.clone();
                }
            }
            None => nb.processes[pi].kind = kind,
        }
        self.sync_measured(&mut nb, pi);
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.mode_memory.insert((name, old_label), left);
        let how = if back.is_some() {
            " (your earlier values)"
        } else {
            ""
        };
        self.commit(nb, &format!("mode: {label}{how}"));
        self.panel = 0;
    }

    /// Give the process's exit station the measured Tt and pt its new mode
    /// reads (starting from the values computed now), and drop the ones it
    /// no longer reads: the engine refuses a measured value that nothing
    /// reads, and the panel offers no other way to add or remove them.
    pub(super) fn sync_measured(&self, nb: &mut Workbook, pi: usize) {
        let Some(p) = nb.processes.get(pi) else {
            return;
        };
        let reads = crate::kinds::of(&p.kind).reads();
        let (uses_tt, uses_pt) = (reads.measured_tt, reads.measured_pt);
        let to = p.to.clone();
        // The exit's values now, or, where the exit is not computed (the
        // mode before failed), the upstream station's: a start from the
        // flow that arrives rather than from the ambient.
        let now = self.engine.as_ref().and_then(|e| {
            e.station(&to)
                .or_else(|| p.from.as_deref().and_then(|f| e.station(f)))
                .copied()
        });
        let Some(st) = nb.stations.iter_mut().find(|s| s.name == to) else {
            return;
        };
        if !uses_tt {
            st.tt = None;
        } else if st.tt.is_none() {
            let tt = now.map_or(288.15, |v| v.tt);
            st.tt = Some(Given::raw(&format!("{} K", crate::report::sig(tt, 6))));
        }
        if !uses_pt {
            st.pt = None;
        } else if st.pt.is_none() {
            let pt = now.map_or(101_325.0, |v| v.pt);
            st.pt = Some(Given::raw(&format!(
                "{} kPa",
                crate::report::sig(pt / 1000.0, 6)
            )));
        }
    }

    pub(super) fn set_kind(&mut self, idx: usize) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let Some((label, kind)) = crate::kinds::offered().into_iter().nth(idx) else {
            return;
        };
        let is_entry = crate::kinds::of(&kind).is_entry();
        let p = &mut nb.processes[pi];
        if is_entry != p.from.is_none() {
            self.error(if is_entry {
                "an entry takes no upstream station: pick it for the first station only"
            } else {
                "the first station needs an entry"
            });
            return;
        }
        // A split needs its new bypass station, a mixer its second stream.
        match &kind {
            Kind::Split(s) if s.bypass.is_empty() => {
                let row = self.row;
                let suggest = format!("{}b", nb.stations[row].name);
                self.popups.push(Popup::Text {
                    title: format!(
                        "name of the new bypass station (the split's second stream; Enter alone: {suggest})"
                    ),
                    input: Field::default(),
                    purpose: TextFor::SplitBypass(row),
                });
                return;
            }
            Kind::Bleed(b) if b.bled.is_empty() => {
                let row = self.row;
                let suggest = format!("{}bl", nb.stations[row].name);
                self.popups.push(Popup::Text {
                    title: format!(
                        "name of the new station for the bled air (a turbine's cooling air, or overboard when nothing takes it; Enter alone: {suggest})"
                    ),
                    input: Field::default(),
                    purpose: TextFor::BleedStation(row),
                });
                return;
            }
            Kind::Mixer(m) if m.secondary.is_empty() => {
                let row = self.row;
                let names = self.mixer_candidates(row);
                if names.is_empty() {
                    self.error(
                        "a mixer needs a second stream: a station no process reads (the end of a bypass) that is not downstream of this one",
                    );
                    return;
                }
                self.popups.push(Popup::Choose {
                    title: "the mixer's second stream (a station no process reads yet)".into(),
                    items: names.clone(),
                    sel: 0,
                    search: String::new(),
                    purpose: ChooseFor::MixerSecondary(row, names),
                });
                return;
            }
            _ => {}
        }
        p.kind = kind;
        self.sync_measured(&mut nb, pi);
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(nb, &format!("process is now: {label}"));
    }

    /// Make the process into station `row` a split whose bypass goes to a
    /// new station `name`, listed after `row`.
    pub(super) fn make_split(&mut self, row: usize, name: &str) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let name = if name.is_empty() {
            format!("{}b", nb.stations[row].name)
        } else {
            name.to_string()
        };
        if nb.stations.iter().any(|s| s.name == name) {
            self.error(format!("station name \"{name}\" is already used"));
            return;
        }
        let pi = e.producer_of(row);
        nb.processes[pi].kind = Kind::Split(crate::book::Split {
            bypass_ratio: Given::raw("1"),
            bypass: name.clone(),
        });
        self.sync_measured(&mut nb, pi);
        nb.stations.insert(row + 1, Station::named(&name));
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("process is now a split; its bypass goes to the new station {name}"),
        );
    }

    /// Make the process into station `row` a bleed of 5 % whose air goes
    /// to a new station `name`, listed after `row`.
    pub(super) fn make_bleed(&mut self, row: usize, name: &str) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let name = if name.is_empty() {
            format!("{}bl", nb.stations[row].name)
        } else {
            name.to_string()
        };
        if nb.stations.iter().any(|s| s.name == name) {
            self.error(format!("station name \"{name}\" is already used"));
            return;
        }
        let pi = e.producer_of(row);
        nb.processes[pi].kind = Kind::Bleed(crate::book::Bleed {
            amount: crate::book::BleedAmount::Fraction(Given::raw("0.05")),
            bled: name.clone(),
        });
        self.sync_measured(&mut nb, pi);
        nb.stations.insert(row + 1, Station::named(&name));
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        nb.results = None;
        self.commit(
            nb,
            &format!("process is now a bleed; its air goes to the new station {name}"),
        );
    }

    /// Stations a mixer into `row` can take its second stream from: read by
    /// no process, not `row` itself and not downstream of it.
    pub(super) fn mixer_candidates(&self, row: usize) -> Vec<String> {
        let Some(b) = self.book() else {
            return Vec::new();
        };
        let here = &b.stations[row].name;
        let read = |n: &str| {
            b.processes.iter().any(|p| {
                p.from.as_deref() == Some(n) || crate::kinds::of(&p.kind).second_input() == Some(n)
            })
        };
        // Downstream of `row`: follow the processes from it.
        let mut down = vec![here.clone()];
        let mut i = 0;
        while i < down.len() {
            let s = down[i].clone();
            for p in &b.processes {
                let reads_s = p.from.as_deref() == Some(s.as_str())
                    || crate::kinds::of(&p.kind).second_input() == Some(s.as_str());
                if reads_s && !down.contains(&p.to) {
                    down.push(p.to.clone());
                    if let Some(o) = crate::kinds::of(&p.kind).second_output()
                        && !down.iter().any(|d| d == o)
                    {
                        down.push(o.to_string());
                    }
                }
            }
            i += 1;
        }
        b.stations
            .iter()
            .map(|s| s.name.clone())
            .filter(|n| !read(n) && !down.contains(n))
            .collect()
    }

    /// Make the process into station `row` a mixer of its stream and `secondary`.
    pub(super) fn make_mixer(&mut self, row: usize, secondary: &str) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(row);
        nb.processes[pi].kind = Kind::Mixer(crate::book::Mixer {
            secondary: secondary.to_string(),
            max_mismatch: None,
        });
        self.sync_measured(&mut nb, pi);
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(
            nb,
            &format!("process is now a mixer of its stream and station {secondary}"),
        );
    }

    /// The shaft chooser for the machine into station `row`.
    pub(super) fn choose_shaft(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        let row = self.row;
        let mut names: Vec<String> = b.shafts.iter().map(|s| s.name.clone()).collect();
        let mut items: Vec<String> = names
            .iter()
            .map(|n| {
                let on: Vec<&str> = b
                    .processes
                    .iter()
                    .filter(|p| crate::kinds::of(&p.kind).shaft() == Some(n.as_str()))
                    .map(|p| p.name.as_str())
                    .collect();
                format!(
                    "shaft {n}{}",
                    if on.is_empty() {
                        String::new()
                    } else {
                        format!(" (with {})", on.join(", "))
                    }
                )
            })
            .collect();
        items.push("no shaft (a compressor driven from outside, a turbine given its ratio)".into());
        items.push("a new shaft...".into());
        names.push(String::new());
        names.push(String::new());
        self.popups.push(Popup::Choose {
            title: "shaft of this machine".into(),
            items,
            sel: 0,
            search: String::new(),
            purpose: ChooseFor::Shaft(row, names),
        });
    }

    /// Add or remove a shaft's optional value (offtake, speed) of the
    /// machine into the selected station.
    pub(super) fn toggle_shaft_value(&mut self, what: &str) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(self.row);
        let Some(name) = crate::kinds::of(&nb.processes[pi].kind)
            .shaft()
            .map(str::to_string)
        else {
            return;
        };
        let Some(sh) = nb.shafts.iter_mut().find(|s| s.name == name) else {
            return;
        };
        let (slot, fresh) = match what {
            "offtake" => (&mut sh.offtake, "0 kW"),
            _ => (&mut sh.speed, "10000 rpm"),
        };
        let msg = if slot.is_some() {
            *slot = None;
            format!("shaft {name}: {what} removed")
        } else {
            *slot = Some(Given::raw(fresh));
            format!("shaft {name}: {what} added ({fresh}; Enter on it edits)")
        };
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(nb, &msg);
    }

    /// Put the machine into station `row` on shaft `names[sel]` (the last
    /// two entries: none, and a new shaft).
    pub(super) fn pick_shaft(&mut self, row: usize, names: &[String], sel: usize) {
        let n = names.len();
        if sel + 1 == n {
            self.popups.push(Popup::Text {
                title: "name of the new shaft".into(),
                input: Field::default(),
                purpose: TextFor::NewShaft(row),
            });
            return;
        }
        let shaft = if sel + 2 == n {
            None
        } else {
            names.get(sel).cloned()
        };
        self.set_shaft(row, shaft, None);
    }

    /// A new shaft (mechanical efficiency 0.99) with the machine into `row` on it.
    pub(super) fn new_shaft(&mut self, row: usize, name: &str) {
        if name.is_empty() {
            self.error("a shaft needs a name");
            return;
        }
        if self
            .book()
            .is_some_and(|b| b.shafts.iter().any(|s| s.name == name))
        {
            self.error(format!("shaft name \"{name}\" is already used"));
            return;
        }
        self.set_shaft(row, Some(name.to_string()), Some(name.to_string()));
    }

    fn set_shaft(&mut self, row: usize, shaft: Option<String>, create: Option<String>) {
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let Some(mut nb) = self.book().cloned() else {
            return;
        };
        let pi = e.producer_of(row);
        if let Some(name) = &create {
            nb.shafts.push(crate::book::Shaft {
                name: name.clone(),
                mechanical_efficiency: Given::raw("0.99"),
                offtake: None,
                speed: None,
            });
        }
        let slot = match &mut nb.processes[pi].kind {
            Kind::Compressor(c) => &mut c.shaft,
            Kind::Turbine(t) => &mut t.shaft,
            _ => {
                self.error("only compressors and turbines sit on a shaft");
                return;
            }
        };
        *slot = shaft.clone();
        if let Err(es) = nb.resolve() {
            self.error(crate::present::join(&es));
            return;
        }
        self.commit(
            nb,
            &match shaft {
                Some(s) => format!("on shaft {s}"),
                None => "on no shaft".into(),
            },
        );
    }
}
