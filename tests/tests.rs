mod uncertainty;
