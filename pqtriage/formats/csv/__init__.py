"""CSV: one row per system of a triage result, for spreadsheets."""
