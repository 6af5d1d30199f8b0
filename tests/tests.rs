mod limits;
mod properties;
mod regressions;
