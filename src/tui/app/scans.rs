//! The scan browser (recorded scans applied one at a time) and the uncertainty column.

use super::*;

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
        self.scans = Some(ScanBrowser {
            path: path.to_path_buf(),
            header,
            rows,
            plan,
            at: 0,
            shown: None,
        });
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
        let row = sb.at as u64 + 1;
        let inputs = match &sb.rows[sb.at] {
            crate::reduce::ScanLine::Record(rec) => sb.plan.inputs(&sb.header, rec, row),
            crate::reduce::ScanLine::Bad(why) => Err(vec![format!("unreadable line ({why})")]),
        };
        let at = sb.at;
        let (msg, err) = match (inputs, self.engine.as_mut()) {
            (Ok(i), Some(e)) => match sb.plan.apply(e, &i) {
                Ok(()) => {
                    sb.shown = Some(at);
                    let probs = e.problems();
                    if probs.is_empty() {
                        (format!("scan {row} of {n}"), false)
                    } else {
                        (
                            format!(
                                "scan {row} of {n}: {}: {}",
                                probs[0].place, probs[0].message
                            ),
                            true,
                        )
                    }
                }
                Err(m) => (format!("scan {row}: {m}"), true),
            },
            (Err(p), _) => (
                format!("scan {row} of {n} not shown: {}", p.join("; ")),
                true,
            ),
            (Ok(_), None) => return,
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
