//! What the person is changing: conditions, concentrations and direction,
//! with undo and redo. Computing results is the analysis module's job; this
//! module uses only `model` (`analysis` uses it, never the other way round).
//! `save` writes a state back into the pathway file.

pub mod save;

use crate::model::{Conditions, Pathway};

/// Which way the route runs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum Direction {
    /// As written.
    #[default]
    Forward,
    /// Backward, with bypasses in place of the steps they replace.
    Reverse,
}

impl Direction {
    /// "forward" or "reverse".
    pub fn as_str(self) -> &'static str {
        match self {
            Direction::Forward => "forward",
            Direction::Reverse => "reverse",
        }
    }
    /// The other direction.
    pub fn flipped(self) -> Self {
        match self {
            Direction::Forward => Direction::Reverse,
            Direction::Reverse => Direction::Forward,
        }
    }
}

/// One state of the editable inputs.
#[derive(Debug, Clone, PartialEq)]
pub struct State {
    /// Temperature, pH, ionic strength.
    pub conditions: Conditions,
    /// Concentration of each compound, mol/L (solvents 1).
    pub conc: Vec<f64>,
    /// Which way the route runs.
    pub direction: Direction,
}

impl State {
    /// The state a file describes.
    pub fn from_pathway(p: &Pathway) -> Self {
        State {
            conditions: p.conditions,
            conc: p.file_concentrations(),
            direction: Direction::Forward,
        }
    }
}

/// The editable state with its history.
#[derive(Debug, Clone)]
pub struct Scenario {
    current: State,
    undo: Vec<State>,
    redo: Vec<State>,
}

impl Scenario {
    /// Starts a scenario at `state` with empty history.
    pub fn new(state: State) -> Self {
        Scenario {
            current: state,
            undo: Vec::new(),
            redo: Vec::new(),
        }
    }
    /// The current state.
    pub fn state(&self) -> &State {
        &self.current
    }
    /// Applies an edit as one undoable step; returns false when nothing changed.
    pub fn edit(&mut self, f: impl FnOnce(&mut State)) -> bool {
        let mut next = self.current.clone();
        f(&mut next);
        if next == self.current {
            return false;
        }
        self.undo.push(std::mem::replace(&mut self.current, next));
        self.redo.clear();
        true
    }
    /// Steps back one edit; false when there is none.
    pub fn undo(&mut self) -> bool {
        match self.undo.pop() {
            Some(prev) => {
                self.redo.push(std::mem::replace(&mut self.current, prev));
                true
            }
            None => false,
        }
    }
    /// Re-applies an undone edit; false when there is none.
    pub fn redo(&mut self) -> bool {
        match self.redo.pop() {
            Some(next) => {
                self.undo.push(std::mem::replace(&mut self.current, next));
                true
            }
            None => false,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn st(x: f64) -> State {
        State {
            conditions: Conditions {
                temperature: 303.15,
                ph: 7.0,
                ionic_strength: 0.0,
            },
            conc: vec![x],
            direction: Direction::Forward,
        }
    }

    #[test]
    fn undo_redo_walks_history() {
        let mut s = Scenario::new(st(1.0));
        assert!(s.edit(|x| x.conc[0] = 2.0));
        assert!(s.edit(|x| x.conc[0] = 3.0));
        assert!(!s.edit(|x| x.conc[0] = 3.0), "no-op edits are not recorded");
        assert!(s.undo());
        assert_eq!(s.state().conc[0], 2.0);
        assert!(s.redo());
        assert_eq!(s.state().conc[0], 3.0);
        assert!(s.undo() && s.undo() && !s.undo());
        assert_eq!(s.state().conc[0], 1.0);
        s.edit(|x| x.conc[0] = 5.0);
        assert!(!s.redo(), "a new edit clears redo");
    }
}
