//! The scan browser (recorded scans applied one at a time) and the uncertainty column.

use super::*;

impl ScanBrowser {
    /// Mark every scan through the channel map (again after the map changed).
    pub fn mark(&mut self) {
        self.marks = (0..self.rows.len())
            .map(|i| match self.status(i) {
                Ok(inp) if inp.flags.is_empty() => ScanMark::Ok,
                Ok(inp) => ScanMark::Flagged(inp.flags[0].clone(), inp.flags.len()),
                Err(p) => ScanMark::Unusable(p.join("; ")),
            })
            .collect();
    }

    /// The scans the list shows: all, or only those flagged or unusable.
    pub fn listed(&self, flagged: bool) -> Vec<usize> {
        (0..self.rows.len())
            .filter(|&i| !flagged || self.marks.get(i).is_some_and(|m| *m != ScanMark::Ok))
            .collect()
    }

    /// The channel values of scan `at`, or every reason it cannot be used.
    pub fn status(&self, at: usize) -> Result<crate::reduce::Inputs, Vec<String>> {
        match self.rows.get(at) {
            Some(crate::reduce::ScanLine::Record(rec)) => {
                self.plan.inputs(&self.header, rec, at as u64 + 1)
            }
            Some(crate::reduce::ScanLine::Repaired(rec, why)) => {
                let mut i = self.plan.inputs(&self.header, rec, at as u64 + 1)?;
                i.flags.insert(0, format!("row {}, {why}", at + 1));
                Ok(i)
            }
            Some(crate::reduce::ScanLine::Bad(why)) => {
                Err(vec![format!("unreadable line ({why})")])
            }
            None => Err(vec!["no such scan".into()]),
        }
    }

    /// The key columns of the scan file (id, time, point) by their header
    /// names, for the title and the scan list.
    pub fn key_columns(&self) -> Vec<usize> {
        let fed: Vec<usize> = self
            .plan
            .givens()
            .iter()
            .chain(std::iter::once(&"barometer"))
            .filter_map(|g| self.plan.columns_of(g))
            .flat_map(|(c, _)| c.iter().copied())
            .collect();
        self.header
            .iter()
            .enumerate()
            .filter(|(i, h)| {
                let h = h.trim().to_ascii_lowercase();
                !fed.contains(i)
                    && ["id", "scan", "time", "date", "point", "label", "reading"]
                        .iter()
                        .any(|k| {
                            h == *k
                                || h.starts_with(&format!("{k}_"))
                                || h.ends_with(&format!("_{k}"))
                        })
            })
            .map(|(i, _)| i)
            .collect()
    }

    /// One cell of scan `at` (trimmed), if the line could be split.
    pub fn cell(&self, at: usize, col: usize) -> Option<&str> {
        self.rows.get(at)?.record()?.get(col).map(str::trim)
    }
}

/// Where the value in use of a given comes from.
#[derive(Debug, Clone, PartialEq)]
pub enum Origin {
    /// The file's text (typed by the user).
    Typed,
    /// A recorded scan: its label and each feeding column's raw cell.
    Scan(String, Vec<(String, String)>, &'static str),
    /// Not shown, and why (the selected scan is not applied, so neither
    /// its values nor a goal solved on them are on screen).
    Withheld(String),
    /// Set by goal number k (1-based).
    Goal(usize),
    /// Set by a program (a sweep point or an uncertainty trial).
    Varied,
}

impl App {
    /// Where the value of the given at `path` comes from.
    pub fn origin(&self, path: &str) -> Origin {
        let Some(b) = self.book() else {
            return Origin::Typed;
        };
        if let Some(sb) = &self.scans
            && let Some((cols, unit)) = sb.plan.columns_of(path)
        {
            return match sb.shown {
                Some(s) if s == sb.at => Origin::Scan(
                    scan_label(sb, s),
                    cols.iter()
                        .map(|&c| {
                            (
                                sb.header.get(c).map_or("?", |h| h.trim()).to_string(),
                                sb.cell(s, c).unwrap_or("").to_string(),
                            )
                        })
                        .collect(),
                    unit,
                ),
                _ => Origin::Withheld(format!("{} not applied", scan_label(sb, sb.at))),
            };
        }
        let varied = b.given(path).is_some_and(|(_, g)| g.is_varied());
        if let Some(k) = b.goals.iter().position(|g| g.vary == path && !g.off) {
            if self.engine.as_ref().is_some_and(|e| e.withheld().is_some()) {
                return Origin::Withheld(format!("goal {} not solved: values withheld", k + 1));
            }
            return Origin::Goal(k + 1);
        }
        if varied {
            Origin::Varied
        } else {
            Origin::Typed
        }
    }
}

/// "scan 3 (id 103, time 10:02:07)": the position and the key columns.
pub fn scan_label(sb: &ScanBrowser, at: usize) -> String {
    let keys: Vec<String> = sb
        .key_columns()
        .into_iter()
        .filter_map(|c| Some(format!("{} {}", sb.header[c].trim(), sb.cell(at, c)?)))
        .collect();
    if keys.is_empty() {
        format!("scan {}", at + 1)
    } else {
        format!("scan {} ({})", at + 1, keys.join(", "))
    }
}

impl App {
    /// Load a scan file for browsing and show its first scan.
    pub fn load_scans(&mut self, path: &Path) -> Result<(), String> {
        let book = self.book().ok_or("no workbook")?.clone();
        let mut rdr = crate::reduce::open_scans(path).map_err(|e| e.to_string())?;
        let header: Vec<String> = rdr.header().to_vec();
        let plan = crate::reduce::Plan::new(&book, &header).map_err(|e| e.to_string())?;
        let mut rows = Vec::new();
        while rows.len() < MAX_BROWSE {
            match rdr.next_line().map_err(|e| e.to_string())? {
                Some(line) => rows.push(line),
                None => break,
            }
        }
        if rows.is_empty() {
            return Err(format!("{}: no scans after the header", path.display()));
        }
        let mut sb = ScanBrowser {
            path: path.to_path_buf(),
            header,
            rows,
            plan,
            at: 0,
            shown: None,
            marks: Vec::new(),
        };
        sb.mark();
        self.scans = Some(sb);
        self.step_scan(0);
        Ok(())
    }

    pub(super) fn step_scan(&mut self, d: isize) {
        let Some(sb) = self.scans.as_mut() else {
            self.info("no scans loaded: b loads a scan file");
            return;
        };
        let n = sb.rows.len();
        sb.at = (sb.at as isize + d).clamp(0, n as isize - 1) as usize;
        let at = sb.at;
        self.show_scan(at);
    }

    /// Jump to a scan by index.
    pub(super) fn goto_scan(&mut self, at: usize) {
        if let Some(sb) = self.scans.as_mut() {
            sb.at = at.min(sb.rows.len().saturating_sub(1));
            let at = sb.at;
            self.show_scan(at);
        }
    }

    /// Apply scan `at` to the workbook, or, when it cannot be applied,
    /// withhold every value (the channel-fed givens go back to the file's
    /// values) so that nothing on screen belongs to another scan.
    pub(super) fn show_scan(&mut self, at: usize) {
        let Some(sb) = self.scans.as_mut() else {
            return;
        };
        let Some(e) = self.engine.as_mut() else {
            return;
        };
        let n = sb.rows.len();
        let label = scan_label(sb, at);
        let applied = match sb.status(at) {
            Ok(i) => {
                e.withhold(None);
                sb.plan.apply(e, &i).map(|()| i.flags)
            }
            Err(p) => Err(p.join("; ")),
        };
        let (msg, err) = match applied {
            Ok(flags) => {
                sb.shown = Some(at);
                let probs = e.problems();
                if let Some(p) = probs.first() {
                    (format!("{label}: {}: {}", p.place, p.message), true)
                } else if let Some(f) = flags.first() {
                    (
                        format!(
                            "{label}: {f}{}",
                            if flags.len() > 1 {
                                format!(" (and {} more flags)", flags.len() - 1)
                            } else {
                                String::new()
                            }
                        ),
                        true,
                    )
                } else {
                    (format!("{label} of {n}"), false)
                }
            }
            Err(why) => {
                sb.shown = None;
                let reason = format!("{label} cannot be applied: {why}");
                e.withhold(Some(reason.clone()));
                // Every value a scan or a goal set goes back to the file's.
                let varied: Vec<(String, String)> = e
                    .book()
                    .givens()
                    .into_iter()
                    .filter(|(p, ..)| e.book().given(p).is_some_and(|(_, g)| g.is_varied()))
                    .map(|(p, _, t, _)| (p, t))
                    .collect();
                for (path, text) in varied {
                    let _ = e.set_given(&path, &text);
                }
                (format!("{reason}; every value is withheld"), true)
            }
        };
        self.status = Some((msg, err));
    }

    /// Linearised uncertainties of the grid's values and the selected
    /// process's figures, when the workbook's channel map carries
    /// uncertainties (computed on a copy of the engine, once per workbook
    /// state, selected row and column set).
    pub fn uncertainties(&self) -> Option<UncertaintyMap> {
        let e = self.engine.as_ref()?;
        let mut cache = self.derived.uncertainty.borrow_mut();
        if let Some((b, row, cols, u)) = cache.as_ref()
            && b == e.book()
            && *row == self.row
            && *cols == self.columns
        {
            return u.clone();
        }
        let u = self.compute_uncertainties();
        *cache = Some((e.book().clone(), self.row, self.columns, u.clone()));
        u
    }

    /// The explanation of a station's values, once per workbook state,
    /// station and unit system.
    pub fn explanation(&self, station: &str) -> Result<Vec<String>, String> {
        let Some(e) = self.engine.as_ref() else {
            return Err("no workbook".into());
        };
        let mut cache = self.derived.walk.borrow_mut();
        if let Some((b, name, system, lines)) = cache.as_ref()
            && b == e.book()
            && name == station
            && *system == self.system
        {
            return lines.clone();
        }
        let lines = crate::present::explanation(e, station, self.system);
        *cache = Some((
            e.book().clone(),
            station.to_string(),
            self.system,
            lines.clone(),
        ));
        lines
    }

    fn compute_uncertainties(&self) -> Option<UncertaintyMap> {
        let e = self.engine.as_ref()?;
        let ch = e.book().channels.as_ref()?;
        if !ch
            .map
            .iter()
            .any(|c| c.systematic.is_some() || c.random.is_some())
        {
            return None;
        }
        let plan = crate::reduce::Plan::without_scans(e.book()).ok()?;
        let mut report = Vec::new();
        for s in e.stations() {
            for k in self.columns.keys() {
                report.push(format!("station.{}.{k}", s.name));
            }
        }
        let p =
            &e.book().processes[e.producer_of(self.row.min(e.stations().len().saturating_sub(1)))];
        if let Some(r) = e.process(&p.name) {
            for (k, _) in &r.figures {
                report.push(format!("process.{}.{k}", p.name));
            }
        }
        let mut eng = e.clone();
        let inputs = plan.nominal(e);
        let unc = crate::reduce::linear(&mut eng, &plan, &inputs, &report);
        Some(
            report
                .into_iter()
                .zip(unc)
                .filter_map(|(r, u)| u.map(|u| (r, u)))
                .collect(),
        )
    }
}
