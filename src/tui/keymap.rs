//! The one key table: every key the explorer knows, the message it sends,
//! where it applies, its line in the `?` overlay and its word in the hint
//! line. Key handling (`App::message_for`), the overlay and the hint line are
//! all made from `BINDINGS`, so they cannot disagree.

use super::app::{App, FINE_STEP, Message, Mode, Pane, Target};
use ratatui::crossterm::event::KeyCode;

/// Where a binding applies.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Where {
    /// In every mode.
    Always,
    /// Browsing (also while the quit question waits: any key answers it).
    Browse,
    /// On an edit or find line.
    Line,
    /// With the key overlay open.
    Help,
    /// While the overwrite question waits.
    Overwrite,
}

/// Which keys a binding takes.
#[derive(Debug, Clone, Copy)]
pub enum Keys {
    /// These keys, without Ctrl.
    Plain(&'static [KeyCode]),
    /// This letter with Ctrl.
    Ctrl(char),
    /// Any character without Ctrl.
    AnyChar,
    /// Any key at all.
    Any,
}

/// One row of the key table.
pub struct Binding {
    /// Where it applies.
    pub when: Where,
    /// The keys.
    pub keys: Keys,
    /// The keys as the overlay shows them ("" keeps the row out of it).
    pub label: &'static str,
    /// What it does, for the overlay.
    pub help: &'static str,
    /// Its word in the hint line, if it has one.
    pub hint: Option<&'static str>,
    /// The message for a key press (None: the key does nothing here).
    pub message: fn(&App, KeyCode) -> Option<Message>,
}

const fn plain(
    when: Where,
    keys: &'static [KeyCode],
    label: &'static str,
    help: &'static str,
    hint: Option<&'static str>,
    message: fn(&App, KeyCode) -> Option<Message>,
) -> Binding {
    Binding {
        when,
        keys: Keys::Plain(keys),
        label,
        help,
        hint,
        message,
    }
}

use KeyCode::{BackTab, Backspace, Char, Down, Enter, Esc, PageDown, PageUp, Tab, Up};
use Where::{Always, Browse, Help, Line, Overwrite};

/// Enter while browsing: the concentration pane's compound, or with a step
/// focused the step's first substrate.
fn enter(app: &App, _: KeyCode) -> Option<Message> {
    let c = match (app.focus, app.step_compounds().first()) {
        (Pane::Compounds, _) | (_, None) => app.comp_sel,
        (_, Some(&c)) => c,
    };
    Some(Message::StartEdit(Target::Conc(c)))
}

/// The key table, in the order of the `?` overlay (the first row that takes
/// a key in the current mode wins).
pub const BINDINGS: &[Binding] = &[
    Binding {
        when: Always,
        keys: Keys::Ctrl('c'),
        // Shown on the `q` row.
        label: "",
        help: "",
        hint: None,
        message: |_, _| Some(Message::ForceQuit),
    },
    plain(
        Browse,
        &[Char('q')],
        "q / Ctrl-c",
        "quit (a second q confirms unsaved edits) / at once",
        None,
        |_, _| Some(Message::Quit),
    ),
    plain(
        Browse,
        &[Char('?')],
        "?",
        "this help (any key closes it)",
        Some("? keys"),
        |_, _| Some(Message::ToggleHelp),
    ),
    plain(
        Browse,
        &[Tab, BackTab],
        "Tab / Shift-Tab",
        "next / previous pane",
        Some("Tab pane"),
        |_, k| Some(Message::Focus(if k == Tab { 1 } else { -1 })),
    ),
    plain(
        Browse,
        &[Up, Down, Char('k'), Char('j'), PageUp, PageDown],
        "Up/Down, k/j",
        "move in the pane (PageUp/PageDown: 10 rows)",
        Some("j/k move"),
        |_, k| {
            Some(Message::Move(match k {
                Up | Char('k') => -1,
                Down | Char('j') => 1,
                PageUp => -10,
                _ => 10,
            }))
        },
    ),
    plain(
        Browse,
        &[Enter],
        "Enter",
        "edit the selected compound (on a step: its first substrate)",
        Some("Enter edit"),
        enter,
    ),
    plain(
        Line,
        &[Up, Down],
        "  Up/Down",
        "on a step's edit line: the step's other compounds",
        None,
        |app, k| {
            (!app.edit_choices.is_empty() && matches!(app.mode, Mode::Edit { .. }))
                .then_some(Message::Cycle(if k == Up { -1 } else { 1 }))
        },
    ),
    plain(
        Line,
        &[Enter, Esc],
        "  Enter / Esc",
        "apply / cancel the typed value",
        None,
        |_, k| {
            Some(if k == Enter {
                Message::Apply
            } else {
                Message::Cancel
            })
        },
    ),
    plain(Line, &[Backspace], "", "", None, |_, _| {
        Some(Message::Erase)
    }),
    Binding {
        when: Line,
        keys: Keys::AnyChar,
        label: "",
        help: "",
        hint: None,
        message: |_, k| match k {
            Char(c) => Some(Message::Type(c)),
            _ => None,
        },
    },
    plain(
        Browse,
        &[Char('+'), Char('='), Char('-')],
        "+ / -",
        "selected concentration up / down by 10^0.1",
        Some("+/- ×10^0.1"),
        |_, k| {
            Some(Message::Scale(if k == Char('-') {
                1.0 / FINE_STEP
            } else {
                FINE_STEP
            }))
        },
    ),
    plain(
        Browse,
        &[Char('>'), Char('<')],
        "> / <",
        "selected concentration up / down by 10",
        Some("</> ×10"),
        |_, k| Some(Message::Scale(if k == Char('>') { 10.0 } else { 0.1 })),
    ),
    plain(
        Browse,
        &[Char('/')],
        "/",
        "find a step or compound by name",
        Some("/ find"),
        |_, _| Some(Message::StartFind),
    ),
    plain(
        Browse,
        &[Char('t'), Char('p'), Char('i')],
        "t / p / i",
        "edit temperature / pH / ionic strength",
        None,
        |_, k| {
            Some(Message::StartEdit(match k {
                Char('t') => Target::Temperature,
                Char('p') => Target::Ph,
                _ => Target::IonicStrength,
            }))
        },
    ),
    plain(
        Browse,
        &[Char('r')],
        "r",
        "reverse route on/off",
        Some("r reverse"),
        |_, _| Some(Message::ToggleReverse),
    ),
    plain(
        Browse,
        &[Char('w')],
        "w / Esc",
        "walk the route one step at a time / end the walk",
        Some("w walk"),
        |_, _| Some(Message::Walk),
    ),
    plain(
        Browse,
        &[Char('o')],
        "o",
        "load the optimal concentrations (MDF; rounded to 3 figures)",
        Some("o optimum"),
        |_, _| Some(Message::LoadOptimum),
    ),
    plain(
        Browse,
        &[Char('['), Char(']')],
        "[ / ]",
        "previous / next sample (with --samples TABLE.csv)",
        None,
        |_, k| Some(Message::Sample(if k == Char('[') { -1 } else { 1 })),
    ),
    plain(
        Browse,
        &[Char('u')],
        "u / Ctrl-r",
        "undo / redo",
        Some("u undo"),
        |_, _| Some(Message::Undo),
    ),
    Binding {
        when: Browse,
        keys: Keys::Ctrl('r'),
        label: "",
        help: "",
        hint: None,
        message: |_, _| Some(Message::Redo),
    },
    plain(
        Browse,
        &[Char('s')],
        "s / S",
        "save your edits (a sample is a view) / the values shown",
        Some("s save"),
        |_, _| Some(Message::Save),
    ),
    plain(Browse, &[Char('S')], "", "", None, |_, _| {
        Some(Message::SaveShown)
    }),
    plain(
        Browse,
        &[Esc],
        // Shown on the `w` row (it also clears the message).
        "",
        "",
        None,
        |_, _| Some(Message::Cancel),
    ),
    plain(Help, &[Char('q')], "", "", None, |_, _| Some(Message::Quit)),
    Binding {
        when: Help,
        keys: Keys::Any,
        label: "",
        help: "",
        hint: None,
        message: |_, _| Some(Message::ToggleHelp),
    },
    plain(Overwrite, &[Char('y'), Char('Y')], "", "", None, |_, _| {
        Some(Message::Overwrite(true))
    }),
    // A space (as between words of a key script) answers nothing.
    plain(Overwrite, &[Char(' ')], "", "", None, |_, _| None),
    Binding {
        when: Overwrite,
        keys: Keys::Any,
        label: "",
        help: "",
        hint: None,
        message: |_, _| Some(Message::Overwrite(false)),
    },
];

/// Where the keyboard is, for the key table.
pub fn where_now(mode: &Mode) -> Where {
    match mode {
        Mode::Edit { .. } | Mode::Find { .. } => Where::Line,
        Mode::Help => Where::Help,
        Mode::ConfirmOverwrite => Where::Overwrite,
        Mode::Normal | Mode::ConfirmQuit => Where::Browse,
    }
}

/// The binding that takes `code` (with Ctrl when `ctrl`) in `at`.
pub fn binding_for(at: Where, code: KeyCode, ctrl: bool) -> Option<&'static Binding> {
    BINDINGS.iter().find(|b| {
        (b.when == at || b.when == Where::Always)
            && match b.keys {
                Keys::Plain(ks) => !ctrl && ks.contains(&code),
                Keys::Ctrl(c) => ctrl && code == Char(c),
                Keys::AnyChar => !ctrl && matches!(code, Char(_)),
                Keys::Any => true,
            }
    })
}

/// The hint line: the hint words of the table, as many as fit in `width`
/// (the `?` one always last).
pub fn hint_line(width: usize, sep: &str) -> String {
    let words: Vec<&str> = BINDINGS.iter().filter_map(|b| b.hint).collect();
    let (last, rest): (Vec<&str>, Vec<&str>) = words.into_iter().partition(|w| w.starts_with('?'));
    let tail = last.first().copied().unwrap_or("? keys");
    let mut out = String::new();
    for w in rest {
        if out.chars().count() + w.chars().count() + 2 * sep.chars().count() + tail.chars().count()
            > width
        {
            break;
        }
        out.push_str(w);
        out.push_str(sep);
    }
    out.push_str(tail);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_overlay_row_has_help_and_hints_fit() {
        for b in BINDINGS.iter().filter(|b| !b.label.is_empty()) {
            assert!(!b.help.is_empty(), "{}", b.label);
        }
        let h = hint_line(78, " · ");
        assert!(h.chars().count() <= 78 && h.ends_with("? keys"), "{h}");
        assert!(h.starts_with("Tab pane · j/k move"), "{h}");
        assert_eq!(hint_line(6, " · "), "? keys");
    }
}
