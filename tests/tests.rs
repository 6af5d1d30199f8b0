mod regressions;
