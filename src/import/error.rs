//! The one error type of the import: a `Problem` (file, line where known,
//! what is wrong and what to write instead), as the loader reports them.

use crate::model::Problem;
use std::fmt;

/// An import mistake: the file, the line where known, what is wrong and what to write instead.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub struct ImportError(pub Problem);

impl ImportError {
    /// An error about `file` (at `line`, where known).
    pub fn new(file: &str, line: Option<usize>, message: String) -> Self {
        ImportError(Problem {
            file: file.to_string(),
            line,
            column: None,
            message,
        })
    }
}

impl fmt::Display for ImportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}
