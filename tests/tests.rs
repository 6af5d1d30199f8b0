mod bad_input;
mod cli;
mod library;
mod references;
mod support;
