//! What the forms (sweep, goal, channel) share: values as typed text in
//! their display unit, choosers of addresses opened over a form with the
//! search typed so far, and typing into a text row.

use super::*;

impl App {
    /// A value as text in the unit it is shown in ("8.0000", "12.000 kg/s").
    pub(super) fn shown_text(&self, si: f64, q: Quantity) -> String {
        let u = crate::present::unit_of(q, self.system);
        let sym = if matches!(q, Quantity::Ratio | Quantity::Mach) {
            ""
        } else {
            u.symbol
        };
        format!("{} {sym}", fmt_num(units::from_si(si, u)))
            .trim()
            .to_string()
    }

    /// `low` to `high` times a given's value `v` (in either order for a
    /// negative one) as texts in its display unit, kept inside the given's
    /// physical range (a coefficient of 1 never goes above 1).
    pub(super) fn range_text(
        &self,
        path: &str,
        v: f64,
        q: Quantity,
        low: f64,
        high: f64,
    ) -> (String, String) {
        let (mut lo, mut hi) = (low * v, high * v);
        if hi < lo {
            std::mem::swap(&mut lo, &mut hi);
        }
        let parts: Vec<&str> = path.split('.').collect();
        let (scope, key) = (parts[0], parts.last().copied().unwrap_or(""));
        if let Some(b) = crate::book::bounds::of(scope, key, q) {
            lo = lo.max(b.low);
            hi = hi.min(b.high);
        }
        (self.shown_text(lo, q), self.shown_text(hi, q))
    }

    /// Every address that is a given (`givens`) or a derived value, as
    /// chooser items ("path = value now  (what it is)") and their paths.
    pub(super) fn address_items(&self, givens: bool) -> (Vec<String>, Vec<String>) {
        let Some(e) = self.engine.as_ref() else {
            return (Vec::new(), Vec::new());
        };
        let mut items = Vec::new();
        let mut paths = Vec::new();
        for a in e.addresses() {
            if a.given != givens {
                continue;
            }
            let now = a.value.map_or("-".to_string(), |v| {
                crate::present::with_unit(v, a.quantity, self.system)
            });
            items.push(if a.label.is_empty() {
                format!("{} = {now}", a.path)
            } else {
                format!("{} = {now}  ({})", a.path, a.label)
            });
            paths.push(a.path);
        }
        (items, paths)
    }

    /// A chooser over the form under it, with `search` typed already and
    /// the first item it matches selected.
    pub(super) fn push_chooser(
        &mut self,
        title: &str,
        items: Vec<String>,
        purpose: ChooseFor,
        search: String,
    ) {
        let mut p = Popup::choose(title, items, purpose);
        if let Popup::Choose {
            search: s,
            items,
            sel,
            ..
        } = &mut p
        {
            *s = search;
            if let Some(&first) = choose_listed(items, s).first() {
                *sel = first;
            }
        }
        self.popups.push(p);
    }
}

/// Typing into a form's text row: Backspace, ctrl-u (clear) and
/// characters. False for any other key.
pub(super) fn type_into(field: &mut String, code: KeyCode, ctrl: bool) -> bool {
    match code {
        KeyCode::Backspace => {
            field.pop();
        }
        KeyCode::Char('u') if ctrl => field.clear(),
        KeyCode::Char(c) if !ctrl => field.push(c),
        _ => return false,
    }
    true
}
