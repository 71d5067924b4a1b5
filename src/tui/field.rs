//! A one-line input field: the text, a cursor, and whether the whole text
//! is selected. A field opened on a value starts selected, so typing
//! replaces the value rather than appending to it; an arrow key, Home or
//! End drops the selection and moves the cursor. Positions count
//! characters, not bytes, so a degree sign or a Greek letter never splits.

use crossterm::event::KeyCode;

/// A one-line input field.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Field {
    text: String,
    /// Cursor, in characters from the start.
    cursor: usize,
    /// The whole text is selected (typing replaces it).
    selected: bool,
}

impl Field {
    /// A field opened on a value: all of it selected, the cursor at its end.
    pub fn with(text: impl Into<String>) -> Field {
        let text = text.into();
        let selected = !text.is_empty();
        Field {
            cursor: text.chars().count(),
            text,
            selected,
        }
    }

    /// The text.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// Whether the whole text is selected.
    pub fn is_selected(&self) -> bool {
        self.selected
    }

    /// The cursor, in characters.
    pub fn cursor(&self) -> usize {
        self.cursor
    }

    fn byte(&self, at: usize) -> usize {
        self.text
            .char_indices()
            .nth(at)
            .map_or(self.text.len(), |(i, _)| i)
    }

    fn clear(&mut self) {
        self.text.clear();
        self.cursor = 0;
        self.selected = false;
    }

    /// Apply a key; whether the field used it. Characters are typed at the
    /// cursor (replacing a selection), Backspace and Delete remove one (or
    /// the selection), Left/Right/Home/End move (ctrl-a and ctrl-e as Home
    /// and End), ctrl-u clears.
    pub fn key(&mut self, code: KeyCode, ctrl: bool) -> bool {
        let n = self.text.chars().count();
        match code {
            KeyCode::Char('u') if ctrl => self.clear(),
            KeyCode::Char('a') if ctrl => {
                self.selected = false;
                self.cursor = 0;
            }
            KeyCode::Char('e') if ctrl => {
                self.selected = false;
                self.cursor = n;
            }
            KeyCode::Char(c) if !ctrl => {
                if self.selected {
                    self.clear();
                }
                let b = self.byte(self.cursor);
                self.text.insert(b, c);
                self.cursor += 1;
            }
            KeyCode::Backspace => {
                if self.selected {
                    self.clear();
                } else if self.cursor > 0 {
                    let b = self.byte(self.cursor - 1);
                    self.text.remove(b);
                    self.cursor -= 1;
                }
            }
            KeyCode::Delete => {
                if self.selected {
                    self.clear();
                } else if self.cursor < n {
                    let b = self.byte(self.cursor);
                    self.text.remove(b);
                }
            }
            KeyCode::Left => {
                // Off a selection, Left goes to its start.
                self.cursor = if self.selected {
                    0
                } else {
                    self.cursor.saturating_sub(1)
                };
                self.selected = false;
            }
            KeyCode::Right => {
                self.cursor = if self.selected {
                    n
                } else {
                    (self.cursor + 1).min(n)
                };
                self.selected = false;
            }
            KeyCode::Home => {
                self.selected = false;
                self.cursor = 0;
            }
            KeyCode::End => {
                self.selected = false;
                self.cursor = n;
            }
            _ => return false,
        }
        true
    }

    /// The text split at the cursor: before, the character under the
    /// cursor (a space at the end), after.
    pub fn parts(&self) -> (String, String, String) {
        let before: String = self.text.chars().take(self.cursor).collect();
        let at: String = self
            .text
            .chars()
            .nth(self.cursor)
            .map_or(" ".into(), |c| c.to_string());
        let after: String = self.text.chars().skip(self.cursor + 1).collect();
        (before, at, after)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn typed(f: &mut Field, s: &str) {
        for c in s.chars() {
            f.key(KeyCode::Char(c), false);
        }
    }

    #[test]
    fn typing_replaces_an_opened_value() {
        let mut f = Field::with("20 kg/s");
        typed(&mut f, "66 lbm/s");
        assert_eq!(f.text(), "66 lbm/s");
    }

    #[test]
    fn arrows_drop_the_selection_and_edit_in_place() {
        let mut f = Field::with("1450 K");
        f.key(KeyCode::End, false);
        f.key(KeyCode::Left, false);
        f.key(KeyCode::Left, false);
        f.key(KeyCode::Backspace, false);
        typed(&mut f, "5");
        assert_eq!(f.text(), "1455 K");
        f.key(KeyCode::Home, false);
        f.key(KeyCode::Delete, false);
        assert_eq!(f.text(), "455 K");
        f.key(KeyCode::Char('u'), true);
        assert_eq!(f.text(), "");
    }

    #[test]
    fn positions_count_characters() {
        let mut f = Field::with("59 \u{b0}F");
        f.key(KeyCode::Left, false);
        f.key(KeyCode::End, false);
        f.key(KeyCode::Left, false);
        f.key(KeyCode::Backspace, false);
        assert_eq!(f.text(), "59 F");
        assert_eq!(f.parts(), ("59 ".into(), "F".into(), "".into()));
    }

    #[test]
    fn backspace_on_a_selection_clears_it() {
        let mut f = Field::with("0.84");
        f.key(KeyCode::Backspace, false);
        assert_eq!(f.text(), "");
        assert!(!f.is_selected());
    }
}
