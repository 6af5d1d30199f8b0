//! The one integration-test binary; each module tests one kind of behaviour a user sees.

mod explorer;
mod explorer_tmux;
