mod mdf;
mod plot;
mod samples;
mod uncertainty;
