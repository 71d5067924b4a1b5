//! Goals from the keyboard: list, add, edit, switch off and on, delete.
//!
//! The list (`G`) shows each goal with what it reached (the varied value,
//! or why it could not be met, or "off"). A goal is edited in a form of
//! five rows: the given varied and the derived target are picked from
//! choosers (typed search, value now), the target value and the bracket
//! are typed in any unit of their quantity. Every change is one undoable
//! step through `commit`; a goal the workbook cannot take (an unknown
//! path, a bad value) is refused with the reason and the form stays open.

use super::*;
use crate::book::Goal;

/// The goal form's rows: label and whether the row holds a path picked
/// from a chooser.
pub const GOAL_ROWS: [(&str, bool); 5] = [
    ("vary", true),
    ("so that", true),
    ("equals", false),
    ("low", false),
    ("high", false),
];

impl App {
    /// Open the goal list.
    pub(super) fn open_goals(&mut self) {
        if self.book().is_none() {
            return;
        }
        self.popups.push(Popup::Goals { sel: 0 });
    }

    /// One line per goal for the list: number, on/off, what, and what it
    /// reached.
    pub fn goal_lines(&self) -> Vec<String> {
        let (Some(b), Some(e)) = (self.book(), self.engine.as_ref()) else {
            return Vec::new();
        };
        let out = e.goal_outcomes();
        b.goals
            .iter()
            .enumerate()
            .map(|(i, g)| {
                let state = if g.off {
                    "off: kept, not solved".to_string()
                } else {
                    match out.get(i) {
                        Some(o) => match (o.value, &o.problem) {
                            // A value with a problem is not met (the
                            // coupled solve stalled, a residual stayed).
                            (Some(_), Some(p)) | (None, Some(p)) => format!("NOT MET: {p}"),
                            (Some(v), None) => {
                                let q = b.given(&g.vary).map_or(Quantity::Ratio, |(q, _)| q);
                                format!(
                                    "met with {} (residual {}, {} evaluations)",
                                    crate::present::with_unit(v, q, self.system),
                                    o.residual.map_or("-".into(), |r| format!("{r:+.1e}")),
                                    o.iterations
                                )
                            }
                            (None, None) => "not solved (values withheld)".to_string(),
                        },
                        None => "not solved".to_string(),
                    }
                };
                format!(
                    "{} [{}] vary {} so that {} = {} ({} to {}): {state}",
                    i + 1,
                    if g.off { "off" } else { "on" },
                    g.vary,
                    g.target,
                    g.value.text(),
                    g.low.text(),
                    g.high.text()
                )
            })
            .collect()
    }

    /// A key in the goal list (the list is off the stack while it runs).
    pub(super) fn goals_key(&mut self, mut sel: usize, code: KeyCode) {
        let n = self.book().map_or(0, |b| b.goals.len());
        match code {
            KeyCode::Esc | KeyCode::Char('q') => {}
            KeyCode::Up | KeyCode::Char('k') => {
                sel = sel.saturating_sub(1);
                self.popups.push(Popup::Goals { sel });
            }
            KeyCode::Down | KeyCode::Char('j') => {
                sel = (sel + 1).min(n);
                self.popups.push(Popup::Goals { sel });
            }
            // The last row adds; `a` adds anywhere.
            KeyCode::Char('a') => {
                self.popups.push(Popup::Goals { sel });
                self.open_goal_form(None);
            }
            KeyCode::Enter => {
                self.popups.push(Popup::Goals { sel });
                self.open_goal_form((sel < n).then_some(sel));
            }
            KeyCode::Char(' ') | KeyCode::Char('o') if sel < n => {
                if let Some(mut nb) = self.book().cloned() {
                    let g = &mut nb.goals[sel];
                    g.off = !g.off;
                    let what = format!(
                        "goal {} switched {} (z undoes)",
                        sel + 1,
                        if g.off { "off" } else { "on" }
                    );
                    // The varied given goes back to its typed value (a
                    // scan shown is applied again after the commit).
                    if nb.resolve().is_ok() {
                        self.commit(nb, &what);
                    }
                }
                self.popups.push(Popup::Goals { sel });
            }
            // Undo and redo work here too (the messages say z undoes).
            KeyCode::Char('z') | KeyCode::Char('Z') => {
                if code == KeyCode::Char('z') {
                    self.undo()
                } else {
                    self.redo()
                }
                let n = self.book().map_or(0, |b| b.goals.len());
                self.popups.push(Popup::Goals { sel: sel.min(n) });
            }
            KeyCode::Char('x') | KeyCode::Delete if sel < n => {
                if let Some(mut nb) = self.book().cloned() {
                    nb.goals.remove(sel);
                    if nb.resolve().is_ok() {
                        self.commit(nb, &format!("goal {} deleted (z undoes)", sel + 1));
                    }
                }
                let n = self.book().map_or(0, |b| b.goals.len());
                self.popups.push(Popup::Goals { sel: sel.min(n) });
            }
            _ => self.popups.push(Popup::Goals { sel }),
        }
    }

    /// The form for goal `index` (None: a new goal).
    pub(super) fn open_goal_form(&mut self, index: Option<usize>) {
        let Some(b) = self.book() else {
            return;
        };
        let fields = match index.and_then(|i| b.goals.get(i)) {
            Some(g) => [
                g.vary.clone(),
                g.target.clone(),
                g.value.text().to_string(),
                g.low.text().to_string(),
                g.high.text().to_string(),
            ],
            None => Default::default(),
        };
        self.popups.push(Popup::GoalForm {
            index,
            fields,
            sel: 0,
        });
    }

    /// A key in the goal form (off the stack while it runs).
    pub(super) fn goal_form_key(
        &mut self,
        index: Option<usize>,
        mut fields: [String; 5],
        sel: usize,
        code: KeyCode,
        ctrl: bool,
    ) {
        let n = GOAL_ROWS.len();
        let path_row = GOAL_ROWS[sel].1;
        let back = |app: &mut App, fields, sel| {
            app.popups.push(Popup::GoalForm { index, fields, sel });
        };
        match code {
            KeyCode::Esc => {}
            KeyCode::Tab | KeyCode::Down => back(self, fields, (sel + 1) % n),
            KeyCode::BackTab | KeyCode::Up => back(self, fields, (sel + n - 1) % n),
            KeyCode::Enter if path_row => {
                back(self, fields, sel);
                self.open_goal_chooser(sel, String::new());
            }
            KeyCode::Char(c) if path_row && !ctrl => {
                back(self, fields, sel);
                self.open_goal_chooser(sel, c.to_string());
            }
            KeyCode::Enter => match self.apply_goal(index, &fields) {
                Ok(()) => {}
                Err(e) => {
                    self.error(e);
                    back(self, fields, sel);
                }
            },
            _ => {
                forms::type_into(&mut fields[sel], code, ctrl);
                back(self, fields, sel);
            }
        }
    }

    fn open_goal_chooser(&mut self, row: usize, search: String) {
        // The varied row lists givens, the target row derived values.
        let (items, paths) = self.address_items(row == 0);
        let title = if row == 0 {
            "given the goal varies (type to search)"
        } else {
            "derived value the goal holds (type to search)"
        };
        self.push_chooser(title, items, ChooseFor::GoalPath(row, paths), search);
    }

    /// A path picked for row `row` of the goal form under the chooser: the
    /// bracket follows a varied given (half to twice its value, inside its
    /// range), the value a target (its value now), in their display units.
    pub(super) fn goal_path_chosen(&mut self, row: usize, path: Option<String>) {
        let Some(path) = path else {
            return;
        };
        let Some(e) = self.engine.as_ref() else {
            return;
        };
        let addr = e.addresses().into_iter().find(|a| a.path == path);
        let texts = addr.and_then(|a| {
            let v = a.value?;
            if row == 0 {
                let (lo, hi) = self.range_text(&path, v, a.quantity, 0.5, 2.0);
                Some(vec![lo, hi])
            } else {
                Some(vec![self.shown_text(v, a.quantity)])
            }
        });
        let Some(Popup::GoalForm { fields, sel, .. }) = self.popups.last_mut() else {
            return;
        };
        fields[row] = path;
        match (row, texts) {
            (0, Some(t)) => {
                fields[3] = t[0].clone();
                fields[4] = t[1].clone();
            }
            (1, Some(t)) => fields[2] = t[0].clone(),
            _ => {}
        }
        *sel = (row + 1).min(GOAL_ROWS.len() - 1);
    }

    /// Add or replace the goal from the form's texts: one undoable step.
    fn apply_goal(&mut self, index: Option<usize>, fields: &[String; 5]) -> Result<(), String> {
        let mut nb = self.book().cloned().ok_or("no workbook")?;
        for (i, (label, _)) in GOAL_ROWS.iter().enumerate() {
            if fields[i].trim().is_empty() {
                return Err(format!("goal: {label} is empty"));
            }
        }
        let off = index.and_then(|i| nb.goals.get(i)).is_some_and(|g| g.off);
        let (vary, target) = (fields[0].trim(), fields[1].trim());
        // Two goals may not vary one given (each would undo the other).
        if let Some(k) = nb
            .goals
            .iter()
            .enumerate()
            .position(|(i, g)| Some(i) != index && !g.off && g.vary == vary)
        {
            return Err(format!(
                "goal {} varies {vary} already: vary another given, or switch that goal off",
                k + 1
            ));
        }
        // Values as typed in the terminal: a bare number where the display
        // unit is not the SI one is refused (20 under kN is not 20 N).
        let e = self.engine.as_ref().ok_or("no workbook")?;
        let q_target = e
            .addresses()
            .into_iter()
            .find(|a| a.path == target)
            .map(|a| a.quantity);
        let q_vary = nb.given(vary).map(|(q, _)| q);
        let baro = nb.barometer();
        for (i, q) in [(2, q_target), (3, q_vary), (4, q_vary)] {
            if let Some(q) = q {
                units::parse_stated_at(&fields[i], q, GOAL_ROWS[i].0, self.system, baro)
                    .map_err(|e| format!("goal not taken: {e}"))?;
            }
        }
        let goal = Goal {
            vary: vary.to_string(),
            target: target.to_string(),
            value: Given::raw(fields[2].trim()),
            low: Given::raw(fields[3].trim()),
            high: Given::raw(fields[4].trim()),
            off,
        };
        let what = match index {
            Some(i) if i < nb.goals.len() => {
                nb.goals[i] = goal;
                format!("goal {} changed (z undoes)", i + 1)
            }
            _ => {
                nb.goals.push(goal);
                format!("goal {} added (z undoes)", nb.goals.len())
            }
        };
        if let Err(es) = nb.resolve() {
            return Err(format!("goal not taken: {}", crate::present::join(&es)));
        }
        // The engine refuses a goal naming nothing, with the keys there.
        if let Err(es) = Engine::new(nb.clone()) {
            return Err(format!("goal not taken: {}", crate::present::join(&es)));
        }
        self.commit(nb, &what);
        Ok(())
    }
}
