//! The channel map from the keyboard: which scan columns feed which given,
//! in what unit, with what weights and uncertainties; the barometer.
//!
//! The list (set-up `g`, the "channel map" row) shows every channel; a
//! channel is edited in a form: the given it feeds is picked from a
//! chooser, the rest is typed (columns and weights comma separated;
//! uncertainties in a unit or as "%" of the reading, empty for none). A
//! map the reduction cannot use (an unknown unit, weights that do not
//! match the columns, an uncertainty that does not parse, a path naming
//! nothing) is refused with the reason and the form stays open. Every
//! change is one undoable step.

use super::*;
use crate::book::{Channel, Channels};

/// The channel form's rows: label and whether the row is picked from a
/// chooser.
pub const CHANNEL_ROWS: [(&str, bool); 6] = [
    ("feeds", true),
    ("columns", false),
    ("unit", false),
    ("weights", false),
    ("systematic u", false),
    ("random u", false),
];

/// Which channel a form edits.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ChannelAt {
    /// The barometer.
    Barometer,
    /// A channel of the map (None: a new one).
    Map(Option<usize>),
}

impl App {
    /// The list's lines: the barometer first, then each channel.
    pub fn channel_lines(&self) -> Vec<(ChannelAt, String)> {
        let Some(ch) = self.book().and_then(|b| b.channels.as_ref()) else {
            return Vec::new();
        };
        let line = |c: &Channel, what: &str| {
            let mut s = format!("{what} <- {} [{}]", c.columns.join(", "), c.unit);
            if !c.weights.is_empty() {
                let w: Vec<String> = c.weights.iter().map(|w| format!("{w}")).collect();
                s.push_str(&format!(" weights {}", w.join(", ")));
            }
            if let Some(u) = &c.systematic {
                s.push_str(&format!("; systematic {u}"));
            }
            if let Some(u) = &c.random {
                s.push_str(&format!("; random {u}"));
            }
            s
        };
        let mut out = Vec::new();
        if let Some(b) = &ch.barometer {
            out.push((ChannelAt::Barometer, line(b, "barometer")));
        }
        for (i, c) in ch.map.iter().enumerate() {
            out.push((ChannelAt::Map(Some(i)), line(c, &c.given)));
        }
        out
    }

    /// The rows after the channels: add a channel, and add the barometer
    /// when there is none.
    pub fn channel_adds(&self) -> Vec<(ChannelAt, &'static str)> {
        let has_baro = self
            .book()
            .and_then(|b| b.channels.as_ref())
            .is_some_and(|c| c.barometer.is_some());
        let mut v = vec![(ChannelAt::Map(None), "+ add a channel")];
        if !has_baro {
            v.push((
                ChannelAt::Barometer,
                "+ add the barometer (makes psig readings absolute)",
            ));
        }
        v
    }

    /// A key in the channel list (off the stack while it runs).
    pub(super) fn channels_key(&mut self, mut sel: usize, code: KeyCode) {
        let lines = self.channel_lines();
        let adds = self.channel_adds();
        let n = lines.len() + adds.len();
        let at = |i: usize| {
            lines
                .get(i)
                .map(|(a, _)| *a)
                .or_else(|| adds.get(i - lines.len()).map(|(a, _)| *a))
        };
        match code {
            KeyCode::Esc | KeyCode::Char('q') => {}
            KeyCode::Up | KeyCode::Char('k') => {
                self.popups.push(Popup::Channels {
                    sel: sel.saturating_sub(1),
                });
            }
            KeyCode::Down | KeyCode::Char('j') => {
                sel = (sel + 1).min(n.saturating_sub(1));
                self.popups.push(Popup::Channels { sel });
            }
            KeyCode::Char('a') => {
                self.popups.push(Popup::Channels { sel });
                self.open_channel_form(ChannelAt::Map(None));
            }
            KeyCode::Enter => {
                self.popups.push(Popup::Channels { sel });
                if let Some(a) = at(sel) {
                    self.open_channel_form(a);
                }
            }
            // Undo and redo work here too (the messages say z undoes).
            KeyCode::Char('z') | KeyCode::Char('Z') => {
                if code == KeyCode::Char('z') {
                    self.undo()
                } else {
                    self.redo()
                }
                let n = self.channel_lines().len() + self.channel_adds().len();
                self.popups.push(Popup::Channels {
                    sel: sel.min(n.saturating_sub(1)),
                });
            }
            KeyCode::Char('x') | KeyCode::Delete if sel < lines.len() => {
                if let Some(mut nb) = self.book().cloned()
                    && let Some(ch) = nb.channels.as_mut()
                {
                    let what = match lines[sel].0 {
                        ChannelAt::Barometer => {
                            ch.barometer = None;
                            "barometer channel deleted (z undoes)".to_string()
                        }
                        ChannelAt::Map(Some(i)) => {
                            let c = ch.map.remove(i);
                            format!("channel for {} deleted (z undoes)", c.given)
                        }
                        ChannelAt::Map(None) => String::new(),
                    };
                    if ch.map.is_empty() && ch.barometer.is_none() {
                        nb.channels = None;
                    }
                    match self.check_map(nb) {
                        Ok(nb) => self.commit(nb, &what),
                        Err(e) => self.error(e),
                    }
                }
                let n = self.channel_lines().len() + self.channel_adds().len();
                self.popups.push(Popup::Channels {
                    sel: sel.min(n.saturating_sub(1)),
                });
            }
            _ => self.popups.push(Popup::Channels { sel }),
        }
    }

    fn open_channel_form(&mut self, at: ChannelAt) {
        let Some(b) = self.book() else {
            return;
        };
        let ch = b.channels.as_ref();
        let c = match at {
            ChannelAt::Barometer => ch.and_then(|c| c.barometer.as_ref()),
            ChannelAt::Map(Some(i)) => ch.and_then(|c| c.map.get(i)),
            ChannelAt::Map(None) => None,
        };
        let fields = match c {
            Some(c) => [
                c.given.clone(),
                c.columns.join(", "),
                c.unit.clone(),
                c.weights
                    .iter()
                    .map(|w| format!("{w}"))
                    .collect::<Vec<_>>()
                    .join(", "),
                c.systematic.clone().unwrap_or_default(),
                c.random.clone().unwrap_or_default(),
            ],
            None if at == ChannelAt::Barometer => [
                String::new(),
                "BARO".into(),
                "kPa".into(),
                String::new(),
                String::new(),
                String::new(),
            ],
            None => Default::default(),
        };
        // The barometer feeds no given: its first row is skipped.
        let sel = usize::from(at == ChannelAt::Barometer);
        self.popups.push(Popup::ChannelForm { at, fields, sel });
    }

    /// A key in the channel form (off the stack while it runs).
    pub(super) fn channel_form_key(
        &mut self,
        at: ChannelAt,
        mut fields: [String; 6],
        sel: usize,
        code: KeyCode,
        ctrl: bool,
    ) {
        let n = CHANNEL_ROWS.len();
        let first = usize::from(at == ChannelAt::Barometer);
        let path_row = CHANNEL_ROWS[sel].1 && at != ChannelAt::Barometer;
        let back = |app: &mut App, fields, sel| {
            app.popups.push(Popup::ChannelForm { at, fields, sel });
        };
        match code {
            KeyCode::Esc => {}
            KeyCode::Tab | KeyCode::Down => {
                let s = if sel + 1 >= n { first } else { sel + 1 };
                back(self, fields, s)
            }
            KeyCode::BackTab | KeyCode::Up => {
                let s = if sel <= first { n - 1 } else { sel - 1 };
                back(self, fields, s)
            }
            KeyCode::Enter | KeyCode::Char(_) if path_row && !ctrl => {
                let search = match code {
                    KeyCode::Char(c) => c.to_string(),
                    _ => String::new(),
                };
                back(self, fields, sel);
                self.open_channel_chooser(search);
            }
            KeyCode::Enter => {
                if let Err(e) = self.apply_channel(at, &fields) {
                    self.error(e);
                    back(self, fields, sel);
                }
            }
            _ => {
                forms::type_into(&mut fields[sel], code, ctrl);
                back(self, fields, sel);
            }
        }
    }

    fn open_channel_chooser(&mut self, search: String) {
        // (The ambient pressure is fed by the barometer row, not here.)
        let Some(b) = self.book() else {
            return;
        };
        let mut paths = Vec::new();
        let mut items = Vec::new();
        for (p, q, t, _) in b.givens() {
            if p == crate::book::BAROMETER {
                continue;
            }
            let u = crate::present::unit_of(q, self.system).symbol;
            items.push(if u.is_empty() {
                format!("{p} = {t}")
            } else {
                format!("{p} = {t}  (shown in {u})")
            });
            paths.push(p);
        }
        self.push_chooser(
            "given the channel feeds (type to search)",
            items,
            ChooseFor::ChannelGiven(paths),
            search,
        );
    }

    /// A given picked for the channel form under the chooser; an empty
    /// unit starts as the unit the given is shown in.
    pub(super) fn channel_given_chosen(&mut self, path: Option<String>) {
        let Some(path) = path else {
            return;
        };
        let unit = self
            .book()
            .and_then(|b| b.given(&path))
            .map(|(q, _)| crate::present::unit_of(q, self.system).symbol.to_string());
        let Some(Popup::ChannelForm { fields, sel, .. }) = self.popups.last_mut() else {
            return;
        };
        fields[0] = path;
        if fields[2].trim().is_empty()
            && let Some(u) = unit
        {
            fields[2] = u;
        }
        *sel = 1;
    }

    /// The workbook with the map checked as the reduction reads it.
    fn check_map(&self, mut nb: Workbook) -> Result<Workbook, String> {
        nb.resolve()
            .map_err(|es| format!("not taken: {}", crate::present::join(&es)))?;
        Engine::new(nb.clone())
            .map_err(|es| format!("not taken: {}", crate::present::join(&es)))?;
        if nb.channels.is_some() {
            crate::reduce::Plan::without_scans(&nb).map_err(|e| format!("not taken: {e}"))?;
        }
        Ok(nb)
    }

    fn apply_channel(&mut self, at: ChannelAt, f: &[String; 6]) -> Result<(), String> {
        let mut nb = self.book().cloned().ok_or("no workbook")?;
        let list = |s: &str| -> Vec<String> {
            s.split(',')
                .map(|x| x.trim().to_string())
                .filter(|x| !x.is_empty())
                .collect()
        };
        let columns = list(&f[1]);
        if columns.is_empty() {
            return Err("channel: at least one column".into());
        }
        if f[2].trim().is_empty() {
            return Err("channel: the unit the column is recorded in".into());
        }
        let weights = list(&f[3])
            .iter()
            .map(|w| {
                w.parse::<f64>()
                    .map_err(|_| format!("channel weights: \"{w}\" is not a number"))
            })
            .collect::<Result<Vec<f64>, String>>()?;
        let opt = |s: &str| Some(s.trim().to_string()).filter(|s| !s.is_empty());
        // An uncertainty says its unit or %: a bare 5 on a degC channel
        // would be read in kelvin.
        for (i, what) in [(4, "systematic"), (5, "random")] {
            let t = f[i].trim();
            if !t.is_empty() && t.parse::<f64>().is_ok() {
                return Err(format!(
                    "channel {what} uncertainty \"{t}\": say its unit (\"{t} {}\") or % of the reading",
                    f[2].trim()
                ));
            }
        }
        let given = if at == ChannelAt::Barometer {
            String::new()
        } else {
            let g = f[0].trim().to_string();
            if g.is_empty() {
                return Err("channel: the given it feeds (Enter on the row picks one)".into());
            }
            g
        };
        let c = Channel {
            given,
            columns,
            weights,
            unit: f[2].trim().to_string(),
            systematic: opt(&f[4]),
            random: opt(&f[5]),
        };
        let ch = nb.channels.get_or_insert_with(|| Channels {
            barometer: None,
            map: Vec::new(),
        });
        let what = match at {
            ChannelAt::Barometer => {
                ch.barometer = Some(c);
                "barometer channel set (z undoes)".to_string()
            }
            ChannelAt::Map(Some(i)) if i < ch.map.len() => {
                let w = format!("channel for {} changed (z undoes)", c.given);
                ch.map[i] = c;
                w
            }
            ChannelAt::Map(_) => {
                let w = format!("channel for {} added (z undoes)", c.given);
                ch.map.push(c);
                w
            }
        };
        let nb = self.check_map(nb)?;
        self.commit(nb, &what);
        Ok(())
    }
}
