//! The one integration-test binary; each module covers behaviour a user sees.

mod plot;
mod samples;
