"""Map computation: result types, single-element, ligand and fixed-ratio maps."""
