//! The sweep set-up form and running a sweep (or a carpet of two) for the
//! chart and table.
//!
//! The varied givens and the reported values are picked from choosers
//! (typed search over every given, or every derived value, with its value
//! now); picking a given sets from and to around its value in the unit it
//! is shown in. Typing on a path row opens its chooser with that search.

use super::*;

/// The form's rows: label, and whether it holds a path picked from a
/// chooser (the rest are typed).
pub const ROWS: [(&str, bool); 9] = [
    ("vary", true),
    ("from", false),
    ("to", false),
    ("intervals", false),
    ("then vary (carpet)", true),
    ("  from", false),
    ("  to", false),
    ("  intervals", false),
    ("report", true),
];

/// Rows of the form.
const VARY: usize = 0;
const SECOND: usize = 4;
const REPORT: usize = 8;

impl App {
    /// From and to around a given's value now (80 % to 120 %), kept
    /// inside the given's range (a coefficient of 1 sweeps 0.8 to 1).
    fn around(&self, path: &str) -> (String, String) {
        let Some((q, g)) = self.book().and_then(|b| b.given(path)) else {
            return (String::new(), String::new());
        };
        self.range_text(path, g.si(), q, 0.8, 1.2)
    }

    pub(super) fn open_sweep_form(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        // Changing a sweep starts from the one shown.
        if let Some(sw) = &self.sweep
            && let Some((q, _)) = b.given(&sw.vary)
        {
            let n1 = sw.rows.len() / sw.second.as_ref().map_or(1, |(_, v)| v.len().max(1));
            let (from, to) = match (sw.rows.first(), sw.rows.get(n1.saturating_sub(1))) {
                (Some(a), Some(z)) => (self.shown_text(a.0, q), self.shown_text(z.0, q)),
                _ => (String::new(), String::new()),
            };
            let mut fields: [String; 9] = Default::default();
            fields[VARY] = sw.vary.clone();
            fields[1] = from;
            fields[2] = to;
            fields[3] = n1.saturating_sub(1).max(1).to_string();
            if let Some((p, xs)) = &sw.second
                && let Some((q2, _)) = b.given(p)
            {
                fields[SECOND] = p.clone();
                fields[5] = xs
                    .first()
                    .map_or(String::new(), |x| self.shown_text(*x, q2));
                fields[6] = xs.last().map_or(String::new(), |x| self.shown_text(*x, q2));
                fields[7] = xs.len().saturating_sub(1).max(1).to_string();
            }
            fields[REPORT] = sw.report.join(", ");
            self.popups.push(Popup::SweepForm { fields, sel: 0 });
            return;
        }
        let givens = b.givens();
        let pick = match self.panel_rows().get(self.panel) {
            Some(PanelRow::Given(p)) if self.focus == Focus::Panel => Some(p.clone()),
            _ => None,
        }
        .or_else(|| {
            givens
                .iter()
                .find(|(p, ..)| p.starts_with("process."))
                .map(|(p, ..)| p.clone())
        })
        .unwrap_or_default();
        let report = if self
            .engine
            .as_ref()
            .is_some_and(|e| e.summary().thrust_net.is_some())
        {
            "summary.thrust_net, summary.tsfc".to_string()
        } else {
            // A rig: its components' first figures (pressure ratio and
            // efficiency, combustion efficiency), else the last station.
            let figures: Vec<String> = self
                .engine
                .as_ref()
                .map(|e| {
                    crate::present::summary_lines(e)
                        .into_iter()
                        .map(|l| l.path)
                        .filter(|p| !p.is_empty())
                        .take(2)
                        .collect()
                })
                .unwrap_or_default();
            if figures.is_empty() {
                let last = b.stations.last().map_or(String::new(), |s| s.name.clone());
                format!("station.{last}.tt, station.{last}.pt")
            } else {
                figures.join(", ")
            }
        };
        let (from, to) = self.around(&pick);
        let mut fields: [String; 9] = Default::default();
        fields[VARY] = pick;
        fields[1] = from;
        fields[2] = to;
        fields[3] = "20".into();
        fields[7] = "4".into();
        fields[REPORT] = report;
        self.popups.push(Popup::SweepForm { fields, sel: 0 });
    }

    /// A key in the sweep form (the form is off the stack while it runs).
    pub(super) fn sweep_form_key(
        &mut self,
        mut fields: [String; 9],
        mut sel: usize,
        code: KeyCode,
        ctrl: bool,
    ) {
        let n = ROWS.len();
        let path_row = ROWS[sel].1;
        match code {
            KeyCode::Esc => {
                if self.sweep.is_none() {
                    self.view = View::Grid;
                }
            }
            KeyCode::Tab | KeyCode::Down => {
                sel = (sel + 1) % n;
                self.popups.push(Popup::SweepForm { fields, sel });
            }
            KeyCode::BackTab | KeyCode::Up => {
                sel = (sel + n - 1) % n;
                self.popups.push(Popup::SweepForm { fields, sel });
            }
            // On a path row Enter (or typing) picks from the chooser.
            KeyCode::Enter if path_row => {
                self.popups.push(Popup::SweepForm { fields, sel });
                self.open_sweep_chooser(sel, String::new());
            }
            KeyCode::Char(c) if path_row && !ctrl => {
                self.popups.push(Popup::SweepForm { fields, sel });
                self.open_sweep_chooser(sel, c.to_string());
            }
            // Backspace or Delete on a path row: the second variable goes,
            // the last reported value goes.
            KeyCode::Backspace | KeyCode::Delete if path_row => {
                match sel {
                    SECOND => fields[SECOND].clear(),
                    REPORT => {
                        let mut l: Vec<&str> = fields[REPORT].split(',').map(str::trim).collect();
                        l.pop();
                        fields[REPORT] = l.join(", ");
                    }
                    _ => self.info("the varied given is needed: Enter picks another"),
                }
                self.popups.push(Popup::SweepForm { fields, sel });
            }
            KeyCode::Enter => {
                if let Err(e) = self.run_sweep(&fields) {
                    self.error(e);
                    self.popups.push(Popup::SweepForm { fields, sel });
                } else if let Some(n) = self.sweep_note.clone() {
                    self.error(format!("sweep done; {n}"));
                } else {
                    self.info("sweep done; Enter in this view changes it");
                }
            }
            _ => {
                forms::type_into(&mut fields[sel], code, ctrl);
                self.popups.push(Popup::SweepForm { fields, sel });
            }
        }
    }

    /// The chooser for a path row of the form, over the form: givens (with
    /// their value now) for the varied rows, derived values for the report.
    fn open_sweep_chooser(&mut self, row: usize, search: String) {
        let (mut items, mut paths) = self.address_items(row != REPORT);
        if row == SECOND {
            paths.insert(0, String::new());
            items.insert(0, "none (one variable)".to_string());
        }
        let title = match row {
            REPORT => "add a reported value (type to search)",
            SECOND => "second given to vary: one line per value (type to search)",
            _ => "given to vary (type to search)",
        };
        self.push_chooser(title, items, ChooseFor::SweepPath(row, paths), search);
    }

    /// A path picked for row `row` of the form under the chooser.
    pub(super) fn sweep_path_chosen(&mut self, row: usize, path: Option<String>) {
        let Some(path) = path else {
            return;
        };
        let around = if path.is_empty() || row == REPORT {
            None
        } else {
            Some(self.around(&path))
        };
        let Some(Popup::SweepForm { fields, sel }) = self.popups.last_mut() else {
            return;
        };
        match row {
            REPORT => {
                let mut l: Vec<String> = fields[REPORT]
                    .split(',')
                    .map(|s| s.trim().to_string())
                    .filter(|s| !s.is_empty())
                    .collect();
                if !l.contains(&path) {
                    l.push(path);
                }
                fields[REPORT] = l.join(", ");
            }
            r => {
                // From and to follow the path: its unit and its value now.
                fields[r] = path;
                if let Some((from, to)) = around {
                    fields[r + 1] = from;
                    fields[r + 2] = to;
                    if fields[r + 3].trim().is_empty() {
                        fields[r + 3] = if r == VARY { "20" } else { "4" }.into();
                    }
                } else {
                    for f in &mut fields[r + 1..r + 3] {
                        f.clear();
                    }
                }
                *sel = r + 1;
            }
        }
    }

    /// Read one variable's rows of the form: path, its values (SI).
    fn sweep_variable(&self, fields: &[String], at: usize) -> Result<(String, Vec<f64>), String> {
        let e = self.engine.as_ref().ok_or("no workbook")?;
        let vary = fields[at].trim().to_string();
        let (q, _) = e.book().given(&vary).ok_or(format!(
            "no given at \"{vary}\": Enter on the row picks one"
        ))?;
        let baro = e
            .book()
            .barometer()
            .filter(|_| vary != crate::book::BAROMETER);
        let label = ROWS[at].0.trim();
        let from = units::parse_stated_at(
            &fields[at + 1],
            q,
            &format!("{label} from"),
            self.system,
            baro,
        )
        .map_err(|e| e.to_string())?
        .si;
        let to = units::parse_stated_at(
            &fields[at + 2],
            q,
            &format!("{label} to"),
            self.system,
            baro,
        )
        .map_err(|e| e.to_string())?
        .si;
        let steps: usize = fields[at + 3]
            .trim()
            .parse()
            .map_err(|_| format!("{label} intervals: a whole number (points = intervals + 1)"))?;
        if !(1..=2000).contains(&steps) {
            return Err(format!(
                "{label} intervals: 1 to 2000 in the terminal (use the sweep command for more)"
            ));
        }
        Ok((vary, sweep::linspace(from, to, steps)))
    }

    pub(super) fn run_sweep(&mut self, fields: &[String; 9]) -> Result<(), String> {
        let (vary, xs) = self.sweep_variable(fields, VARY)?;
        let second = if fields[SECOND].trim().is_empty() {
            None
        } else {
            let s = self.sweep_variable(fields, SECOND)?;
            if s.0 == vary {
                return Err("the second variable is the first one: pick another".into());
            }
            if xs.len() * s.1.len() > 20_000 {
                return Err("a carpet of more than 20000 points: fewer steps".into());
            }
            Some(s)
        };
        let report: Vec<String> = fields[REPORT]
            .split(',')
            .map(|s| s.trim().to_string())
            .filter(|s| !s.is_empty())
            .collect();
        if report.is_empty() {
            return Err("report: at least one derived value (Enter on the row adds one)".into());
        }
        let e = self.engine.as_ref().ok_or("no workbook")?;
        let checked = match &second {
            None => sweep::run_checked(e, &vary, &xs, &report).map_err(|e| e.to_string())?,
            Some((p2, x2s)) => {
                // One line of the carpet per value of the second given, on
                // a copy of the engine.
                let mut rows = Vec::with_capacity(xs.len() * x2s.len());
                for &x2 in x2s {
                    let mut e2 = e.clone();
                    e2.set_si(p2, x2).map_err(|e| e.to_string())?;
                    rows.extend(
                        sweep::run_checked(&e2, &vary, &xs, &report).map_err(|e| e.to_string())?,
                    );
                }
                rows
            }
        };
        // Failed points are counted, with the first reason.
        let failed: Vec<&Option<String>> = checked
            .iter()
            .filter(|(r, _)| r.1.iter().any(Option::is_none))
            .map(|(_, why)| why)
            .collect();
        let note = failed.first().map(|why| {
            format!(
                "{} of {} points could not be computed (!! in the table, x on the chart's axis); the first: {}",
                failed.len(),
                checked.len(),
                why.as_deref().unwrap_or("a reported value is not defined there")
            )
        });
        let rows = checked.into_iter().map(|(r, _)| r).collect();
        self.sweep = Some(SweepData {
            vary,
            report,
            rows,
            second,
        });
        self.sweep_col = 0;
        self.sweep_note = note;
        Ok(())
    }
}
