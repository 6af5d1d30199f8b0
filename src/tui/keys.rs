//! Keys to messages: what each key press means in the current mode, and the
//! key scripts used by screenshots and tests.

use super::app::{App, FINE_STEP, Message, Mode, Target};
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyEventKind, KeyModifiers};

impl App {
    /// Maps a key press to a message for the current mode.
    pub fn message_for(&self, key: KeyEvent) -> Option<Message> {
        if key.kind != KeyEventKind::Press {
            return None;
        }
        let ctrl = key.modifiers.contains(KeyModifiers::CONTROL);
        if ctrl && key.code == KeyCode::Char('c') {
            return Some(Message::ForceQuit);
        }
        match &self.mode {
            Mode::Edit { .. } | Mode::Find { .. } => match key.code {
                KeyCode::Enter => Some(Message::Apply),
                KeyCode::Esc => Some(Message::Cancel),
                KeyCode::Backspace => Some(Message::Erase),
                KeyCode::Char(c) if !ctrl => Some(Message::Type(c)),
                _ => None,
            },
            Mode::Help => match key.code {
                KeyCode::Char('q') => Some(Message::Quit),
                _ => Some(Message::ToggleHelp),
            },
            Mode::ConfirmOverwrite => match key.code {
                KeyCode::Char('y') | KeyCode::Char('Y') => Some(Message::Overwrite(true)),
                // A space (as between words of a key script) answers nothing.
                KeyCode::Char(' ') => None,
                _ => Some(Message::Overwrite(false)),
            },
            Mode::Normal | Mode::ConfirmQuit => self.normal_message(key, ctrl),
        }
    }

    fn normal_message(&self, key: KeyEvent, ctrl: bool) -> Option<Message> {
        Some(match key.code {
            KeyCode::Char('r') if ctrl => Message::Redo,
            _ if ctrl => return None,
            KeyCode::Char('q') => Message::Quit,
            KeyCode::Char('?') => Message::ToggleHelp,
            KeyCode::Tab => Message::Focus(1),
            KeyCode::BackTab => Message::Focus(-1),
            KeyCode::Up | KeyCode::Char('k') => Message::Move(-1),
            KeyCode::Down | KeyCode::Char('j') => Message::Move(1),
            KeyCode::PageUp => Message::Move(-10),
            KeyCode::PageDown => Message::Move(10),
            KeyCode::Enter => Message::StartEdit(Target::Conc(self.comp_sel)),
            KeyCode::Char('+') | KeyCode::Char('=') => Message::Scale(FINE_STEP),
            KeyCode::Char('-') => Message::Scale(1.0 / FINE_STEP),
            KeyCode::Char('>') => Message::Scale(10.0),
            KeyCode::Char('<') => Message::Scale(0.1),
            KeyCode::Char('/') => Message::StartFind,
            KeyCode::Char('t') => Message::StartEdit(Target::Temperature),
            KeyCode::Char('p') => Message::StartEdit(Target::Ph),
            KeyCode::Char('i') => Message::StartEdit(Target::IonicStrength),
            KeyCode::Char('r') => Message::ToggleReverse,
            KeyCode::Char('w') => Message::Walk,
            KeyCode::Char('o') => Message::LoadOptimum,
            KeyCode::Char('[') => Message::Sample(-1),
            KeyCode::Char(']') => Message::Sample(1),
            KeyCode::Char('u') => Message::Undo,
            KeyCode::Char('s') => Message::Save,
            KeyCode::Esc => Message::Cancel,
            #[cfg(feature = "test-panic")]
            KeyCode::F(12) => Message::Panic,
            _ => return None,
        })
    }

    /// Handles one key; returns true when the screen must be redrawn.
    pub fn handle_key(&mut self, key: KeyEvent) -> bool {
        match self.message_for(key) {
            Some(m) => {
                self.update(m);
                true
            }
            None => false,
        }
    }
}

/// Parses a key script for screenshots and tests: names such as `Tab`,
/// `S-Tab`, `Up`, `Down`, `Enter`, `Esc`, `Backspace`, `Space`, `C-r`, `F5`;
/// any other word is typed character by character, with a space between
/// consecutive words (so `Enter 2.5 mM Enter` types "2.5 mM").
pub fn parse_keys(script: &str) -> Result<Vec<KeyEvent>, String> {
    let mut out = Vec::new();
    let mut last_was_text = false;
    for word in script.split_whitespace() {
        let named = match word {
            "Tab" => Some(KeyCode::Tab),
            "S-Tab" | "BackTab" => Some(KeyCode::BackTab),
            "Up" => Some(KeyCode::Up),
            "Down" => Some(KeyCode::Down),
            "Left" => Some(KeyCode::Left),
            "Right" => Some(KeyCode::Right),
            "Enter" => Some(KeyCode::Enter),
            "Esc" => Some(KeyCode::Esc),
            "Backspace" | "BS" => Some(KeyCode::Backspace),
            "Space" => Some(KeyCode::Char(' ')),
            "PageUp" => Some(KeyCode::PageUp),
            "PageDown" => Some(KeyCode::PageDown),
            w if w.len() >= 2
                && w.starts_with('F')
                && w[1..].chars().all(|c| c.is_ascii_digit()) =>
            {
                w[1..].parse().ok().map(KeyCode::F)
            }
            _ => None,
        };
        if let Some(code) = named {
            out.push(KeyEvent::new(code, KeyModifiers::NONE));
            last_was_text = false;
            continue;
        }
        if let Some(rest) = word.strip_prefix("C-") {
            let mut cs = rest.chars();
            match (cs.next(), cs.next()) {
                (Some(c), None) => {
                    out.push(KeyEvent::new(KeyCode::Char(c), KeyModifiers::CONTROL));
                    last_was_text = false;
                    continue;
                }
                _ => return Err(format!("'{word}': write C- and one letter, e.g. C-r")),
            }
        }
        if last_was_text {
            out.push(KeyEvent::new(KeyCode::Char(' '), KeyModifiers::NONE));
        }
        for c in word.chars() {
            out.push(KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE));
        }
        last_was_text = true;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_script_types_words_with_spaces_between() {
        let keys = parse_keys("Tab Enter 2.5 mM Enter C-r").unwrap();
        let text: String = keys
            .iter()
            .filter_map(|k| match k.code {
                KeyCode::Char(c) if k.modifiers.is_empty() => Some(c),
                _ => None,
            })
            .collect();
        assert_eq!(text, "2.5 mM");
        assert_eq!(keys[0].code, KeyCode::Tab);
        assert_eq!(keys.last().unwrap().modifiers, KeyModifiers::CONTROL);
        assert!(parse_keys("C-rr").is_err());
    }
}
