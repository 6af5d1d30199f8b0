mod mdf;
