mod limits;
mod mdf;
mod plot;
mod properties;
mod regressions;
mod samples;
mod uncertainty;
