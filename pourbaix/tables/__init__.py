"""Species tables: formulas, rows, files and data sets."""
