//! The sweep set-up form and running a sweep for the chart and table.

use super::*;

impl App {
    pub(super) fn open_sweep_form(&mut self) {
        let Some(b) = self.book() else {
            return;
        };
        // Changing a sweep starts from the one shown.
        if let Some(sw) = &self.sweep
            && let Some((_, q, ..)) = b.givens().into_iter().find(|(p, ..)| *p == sw.vary)
        {
            let u = crate::present::unit_of(q, self.system);
            let sym = if matches!(q, Quantity::Ratio | Quantity::Mach) {
                ""
            } else {
                u.symbol
            };
            let end = |x: f64| {
                format!("{} {sym}", fmt_num(units::from_si(x, u)))
                    .trim()
                    .to_string()
            };
            let (from, to) = match (sw.rows.first(), sw.rows.last()) {
                (Some(a), Some(z)) => (end(a.0), end(z.0)),
                _ => (String::new(), String::new()),
            };
            self.popups.push(Popup::SweepForm {
                fields: [
                    sw.vary.clone(),
                    from,
                    to,
                    sw.rows.len().saturating_sub(1).max(1).to_string(),
                    sw.report.join(", "),
                ],
                sel: 0,
            });
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
        let cur = givens.iter().find(|(p, ..)| *p == pick);
        let (from, to) = cur.map_or((String::new(), String::new()), |(_, q, _, si)| {
            let u = crate::present::unit_of(*q, self.system);
            let v = units::from_si(*si, u);
            let sym = if matches!(q, Quantity::Ratio | Quantity::Mach) {
                ""
            } else {
                u.symbol
            };
            (
                format!("{} {sym}", fmt_num(v * 0.8)).trim().to_string(),
                format!("{} {sym}", fmt_num(v * 1.2)).trim().to_string(),
            )
        });
        let report = if self
            .engine
            .as_ref()
            .is_some_and(|e| e.summary().thrust_net.is_some())
        {
            "summary.thrust_net, summary.tsfc".to_string()
        } else {
            let last = b.stations.last().map_or(String::new(), |s| s.name.clone());
            format!("station.{last}.tt, station.{last}.pt")
        };
        self.popups.push(Popup::SweepForm {
            fields: [pick, from, to, "20".into(), report],
            sel: 0,
        });
    }

    pub(super) fn run_sweep(&mut self, fields: &[String; 5]) -> Result<(), String> {
        let e = self.engine.as_ref().ok_or("no workbook")?;
        let vary = fields[0].trim().to_string();
        let (_, q, ..) = e
            .book()
            .givens()
            .into_iter()
            .find(|(p, ..)| *p == vary)
            .ok_or(format!("no given at \"{vary}\""))?;
        let baro = e
            .book()
            .barometer()
            .filter(|_| vary != crate::book::BAROMETER);
        let from = units::parse_stated_at(&fields[1], q, "from", self.system, baro)
            .map_err(|e| e.to_string())?
            .si;
        let to = units::parse_stated_at(&fields[2], q, "to", self.system, baro)
            .map_err(|e| e.to_string())?
            .si;
        let steps: usize = fields[3]
            .trim()
            .parse()
            .map_err(|_| "steps: a whole number".to_string())?;
        if !(1..=2000).contains(&steps) {
            return Err("steps: 1 to 2000 in the terminal (use the sweep command for more)".into());
        }
        let report: Vec<String> = fields[4]
            .split(',')
            .map(|s| s.trim().to_string())
            .filter(|s| !s.is_empty())
            .collect();
        if report.is_empty() {
            return Err("report: at least one derived value path".into());
        }
        let rows = sweep::run(e, &vary, &sweep::linspace(from, to, steps), &report)
            .map_err(|e| e.to_string())?;
        self.sweep = Some(SweepData { vary, report, rows });
        Ok(())
    }
}
