//! The pathway file: what it may say, how it is read, and the checked
//! `Pathway` that every other module works from. Reading never guesses: every
//! mistake becomes a `Problem` that names the file, the line and what to write
//! instead. No thermodynamics here, only unit conversion. `samples` reads
//! tables of measured concentrations against a pathway.

pub mod check;
mod load;
mod pathway;
pub mod reaction;
pub mod samples;
pub mod units;

pub use load::{MAX_FILE_BYTES, load_file, load_str};
pub use pathway::*;
