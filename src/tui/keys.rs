//! Keys to messages: what each key press means in the current mode, and the
//! key scripts used by screenshots and tests.

use super::app::{App, Message};
use super::keymap;
use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyEventKind, KeyModifiers};

impl App {
    /// Maps a key press to a message for the current mode, through the key
    /// table (`keymap::BINDINGS`).
    pub fn message_for(&self, key: KeyEvent) -> Option<Message> {
        if key.kind != KeyEventKind::Press {
            return None;
        }
        let ctrl = key.modifiers.contains(KeyModifiers::CONTROL);
        #[cfg(feature = "test-panic")]
        if key.code == KeyCode::F(12) && self.mode == super::app::Mode::Normal {
            return Some(Message::Panic);
        }
        let b = keymap::binding_for(keymap::where_now(&self.mode), key.code, ctrl)?;
        (b.message)(self, key.code)
    }

    /// Handles one key; returns true when the screen must be redrawn.
    pub fn handle_key(&mut self, key: KeyEvent) -> bool {
        match self.message_for(key) {
            Some(m) => {
                self.update(m);
                self.ask_shown_range();
                true
            }
            None => false,
        }
    }
}

/// Key names a script may use (besides `C-x` and `F1`…`F12`).
pub const KEY_NAMES: [&str; 14] = [
    "Tab",
    "S-Tab",
    "BackTab",
    "Up",
    "Down",
    "Left",
    "Right",
    "Enter",
    "Esc",
    "Backspace",
    "BS",
    "Space",
    "PageUp",
    "PageDown",
];

fn named_key(word: &str) -> Option<KeyCode> {
    Some(match word {
        "Tab" => KeyCode::Tab,
        "S-Tab" | "BackTab" => KeyCode::BackTab,
        "Up" => KeyCode::Up,
        "Down" => KeyCode::Down,
        "Left" => KeyCode::Left,
        "Right" => KeyCode::Right,
        "Enter" => KeyCode::Enter,
        "Esc" => KeyCode::Esc,
        "Backspace" | "BS" => KeyCode::Backspace,
        "Space" => KeyCode::Char(' '),
        "PageUp" => KeyCode::PageUp,
        "PageDown" => KeyCode::PageDown,
        w if w.len() >= 2 && w.starts_with('F') && w[1..].chars().all(|c| c.is_ascii_digit()) => {
            KeyCode::F(w[1..].parse().ok().filter(|n| (1..=12).contains(n))?)
        }
        _ => return None,
    })
}

/// Why a key script was refused.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum KeyError {
    /// A `'` without its closing one (the whole script).
    #[error("unclosed quote in '{0}': text to type goes between two ' marks")]
    UnclosedQuote(String),
    /// `C-` followed by other than one character (the word).
    #[error("'{0}': write C- and one letter, e.g. C-r")]
    Control(String),
    /// A word that is no key name, no single character and not quoted.
    #[error(
        "unknown key '{0}': use one character, C-x, F1 to F12 or one of {names}; put text to type in quotes ('2.5 mM')",
        names = KEY_NAMES.join(" ")
    )]
    Unknown(String),
}

/// Splits a script into words; text in single quotes is one word, kept
/// with its quotes so that it is typed.
fn words(script: &str) -> Result<Vec<String>, KeyError> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    for c in script.chars() {
        match c {
            '\'' => {
                cur.push(c);
                quoted = !quoted;
            }
            c if c.is_whitespace() && !quoted => {
                if !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                }
            }
            c => cur.push(c),
        }
    }
    if quoted {
        return Err(KeyError::UnclosedQuote(script.to_string()));
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    Ok(out)
}

/// Parses a key script for screenshots and tests. Each word is one key: a
/// name (`Tab`, `S-Tab`, `Up`, `Down`, `Enter`, `Esc`, `Backspace`, `Space`,
/// `PageUp`, `F5`, …), `C-` and a letter for Ctrl, or a single character.
/// Text of more than one character is typed only when quoted:
/// `Enter '2.5 mM' Enter`. Any other word is refused, with the names listed.
pub fn parse_keys(script: &str) -> Result<Vec<KeyEvent>, KeyError> {
    let mut out = Vec::new();
    let key = |code| KeyEvent::new(code, KeyModifiers::NONE);
    for word in words(script)? {
        if let Some(code) = named_key(&word) {
            out.push(key(code));
        } else if let Some(text) = word.strip_prefix('\'').and_then(|w| w.strip_suffix('\'')) {
            out.extend(text.chars().map(|c| key(KeyCode::Char(c))));
        } else if let Some(rest) = word.strip_prefix("C-") {
            let mut cs = rest.chars();
            match (cs.next(), cs.next()) {
                (Some(c), None) => out.push(KeyEvent::new(KeyCode::Char(c), KeyModifiers::CONTROL)),
                _ => return Err(KeyError::Control(word)),
            }
        } else if word.chars().count() == 1 && !word.contains('\'') {
            out.extend(word.chars().map(|c| key(KeyCode::Char(c))));
        } else {
            return Err(KeyError::Unknown(word));
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_script_types_words_with_spaces_between() {
        let keys = parse_keys("Tab Enter '2.5 mM' Enter C-r").unwrap();
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

    #[test]
    fn an_unknown_key_name_is_refused_with_the_valid_ones() {
        let e = parse_keys("Tab Frobnicate").unwrap_err().to_string();
        assert!(e.contains("unknown key 'Frobnicate'"), "{e}");
        assert!(
            e.contains("Tab") && e.contains("PageDown") && e.contains("quotes"),
            "{e}"
        );
        assert!(
            parse_keys("Enter 2.5 Enter").is_err(),
            "unquoted text is refused"
        );
        assert!(
            parse_keys("Enter '2.5")
                .unwrap_err()
                .to_string()
                .contains("unclosed quote")
        );
        assert!(parse_keys("F13").is_err());
        // Single characters are keys, quoted text is typed with its spaces.
        let k = parse_keys("/ 'a b' F5 Space").unwrap();
        let codes: Vec<KeyCode> = k.iter().map(|k| k.code).collect();
        assert_eq!(
            codes,
            [
                KeyCode::Char('/'),
                KeyCode::Char('a'),
                KeyCode::Char(' '),
                KeyCode::Char('b'),
                KeyCode::F(5),
                KeyCode::Char(' ')
            ]
        );
    }
}
