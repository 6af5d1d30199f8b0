
mod plot;
mod samples;
