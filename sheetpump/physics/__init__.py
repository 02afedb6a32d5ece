"""Pure physics: SI numbers or numpy arrays in, SI numbers out. No units, files or spreadsheets."""
