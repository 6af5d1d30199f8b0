mod mdf;
mod uncertainty;
