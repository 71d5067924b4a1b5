//! Opening and saving workbooks, the start screen and the recovery snapshot.

use super::*;

impl App {
    /// Show the start screen (recent files and templates).
    pub fn start_screen(&mut self) {
        let mut items = Vec::new();
        let mut labels = Vec::new();
        // Starting a named new file: only the demos make sense.
        let new_file = self.path.as_ref().is_some_and(|p| !p.exists());
        // Unsaved work of a cut session that had no file of its own yet
        // comes first: the new file named on the command line, or the
        // untitled workbook.
        let mut targets = vec![None];
        if new_file {
            targets.insert(0, self.path.clone());
        }
        for target in targets {
            if let Some(rp) = recovery_path(target.as_deref())
                && rp.is_file()
            {
                labels.push(match &target {
                    Some(t) => format!(
                        "recover unsaved work for {} (interrupted session)",
                        t.display()
                    ),
                    None => "recover the untitled workbook (interrupted session)".into(),
                });
                items.push(StartItem::Recovery(rp, target));
            }
        }
        for f in settings::recent()
            .into_iter()
            .filter(|f| f.exists() && !new_file)
        {
            labels.push(format!("open   {}", f.display()));
            items.push(StartItem::File(f));
        }
        for (n, d, _) in crate::templates::TEMPLATES {
            labels.push(format!("new    {n}: {d}"));
            items.push(StartItem::Template(n));
        }
        self.popups.push(Popup::Choose {
            title: "stationwise: open a recent workbook or start from a demo".into(),
            items: labels,
            sel: 0,
            search: String::new(),
            purpose: ChooseFor::Start(items),
        });
    }

    /// Open a workbook file (offers its recovery file when one exists).
    pub fn open(&mut self, path: &Path) -> Result<(), String> {
        let book = format::load(path).map_err(|e| format!("{}: {e}", path.display()))?;
        let engine = Engine::new(book).map_err(|e| crate::present::join(&e))?;
        self.saved_text = Some(format::to_text(engine.book()));
        self.engine = Some(engine);
        self.path = Some(path.to_path_buf());
        self.disk = stamp(path);
        self.modified = false;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        self.panel = 0;
        self.sweep = None;
        settings::remember(path);
        self.info(format!("opened {}", path.display()));
        if let Some(rp) = recovery_path(Some(path))
            && rp.exists()
        {
            self.popups.push(Popup::Confirm {
                    text: format!(
                        "A recovery file from an interrupted session exists ({}). Load it? y loads it (then save to keep it), n deletes it.",
                        rp.display()
                    ),
                    then: Pending::LoadRecovery(rp),
                });
        }
        Ok(())
    }

    /// Start from a template (untitled until saved).
    pub fn open_template(&mut self, name: &str) -> Result<(), String> {
        let text = crate::templates::get(name).ok_or("no such template")?;
        let book = format::parse(text).map_err(|e| e.to_string())?;
        self.engine = Some(Engine::new(book).map_err(|e| crate::present::join(&e))?);
        // Keep a path the user named for a new file; otherwise untitled.
        if self.path.as_ref().is_some_and(|p| p.exists()) {
            self.path = None;
        }
        self.disk = None;
        self.modified = true;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        let target = self
            .path
            .as_ref()
            .map_or("save with ctrl-s".to_string(), |p| {
                format!("ctrl-s saves it as {}", p.display())
            });
        self.info(format!("new workbook from the {name} template ({target})"));
        Ok(())
    }

    /// Load the recovery file of a new or untitled workbook as unsaved
    /// changes (the recovery file is removed once loaded).
    pub fn open_recovered(&mut self, rp: &Path, target: Option<PathBuf>) -> Result<(), String> {
        let text = std::fs::read_to_string(rp).map_err(|e| format!("{}: {e}", rp.display()))?;
        let book = format::parse(&text).map_err(|e| format!("{}: {e}", rp.display()))?;
        self.engine = Some(Engine::new(book).map_err(|e| crate::present::join(&e))?);
        self.path = target;
        self.disk = None;
        self.modified = true;
        self.undo.clear();
        self.redo.clear();
        self.row = 0;
        let _ = std::fs::remove_file(rp);
        self.info("recovered the interrupted session's changes (save to keep them)");
        Ok(())
    }

    pub(super) fn ask_open(&mut self) {
        self.popups.push(Popup::Text {
            title: "open workbook (file path)".into(),
            input: Field::default(),
            purpose: TextFor::Open,
        });
    }

    /// Save (asks first when the file changed on disk since it was read).
    pub fn save(&mut self, force: bool) {
        let Some(path) = self.path.clone() else {
            self.run(Command::SaveAs);
            return;
        };
        if !force && self.disk.is_some() && stamp(&path) != self.disk {
            self.popups.push(Popup::Confirm {
                text: format!(
                    "{} changed on disk since it was opened. Save over it? (y/n)",
                    path.display()
                ),
                then: Pending::SaveOver,
            });
            return;
        }
        self.save_to(&path, format::WriteOptions::default());
    }

    pub(super) fn save_to(&mut self, path: &Path, opts: format::WriteOptions) {
        let Some(engine) = self.engine.as_ref() else {
            return;
        };
        let mut book = engine.book().clone();
        format::refresh_results(&mut book, engine);
        match format::save_with(path, &book, opts) {
            Ok(()) => {
                self.path = Some(path.to_path_buf());
                self.disk = stamp(path);
                self.modified = false;
                self.saved_text = Some(format::to_text(&book));
                settings::remember(path);
                if let Some(rp) = recovery_path(Some(path)) {
                    let _ = std::fs::remove_file(rp);
                }
                self.info(format!("saved {}", path.display()));
            }
            Err(
                e @ (format::WriteError::ReadOnly { .. } | format::WriteError::HardLinked { .. }),
            ) => {
                let text = match &e {
                    format::WriteError::ReadOnly { .. } => format!(
                        "{} is read-only. Save anyway, keeping it read-only? (y/n)",
                        path.display()
                    ),
                    _ => format!("{e}. Save anyway, as a separate copy under this name? (y/n)"),
                };
                self.popups.push(Popup::Confirm {
                    text,
                    then: Pending::SaveForced(path.to_path_buf()),
                });
            }
            Err(e) => self.error(format!("cannot save: {e}")),
        }
    }

    /// Where the recovery file would go and what it would hold, when there
    /// are unsaved changes.
    pub fn recovery_snapshot(&self) -> Option<(PathBuf, String)> {
        if !self.modified {
            return None;
        }
        let book = self.book()?;
        Some((recovery_path(self.path.as_deref())?, format::to_text(book)))
    }

    /// Write the recovery file (on a dropped session). Returns its path.
    pub fn write_recovery(&self) -> Option<PathBuf> {
        let (rp, text) = self.recovery_snapshot()?;
        write_recovery_text(&rp, &text).then_some(rp)
    }
}
