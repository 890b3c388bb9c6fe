"""Zinc coatings and the amphoteric minimum
==========================================

Galvanised steel in a cooling tower: zinc protects the steel by corroding first, and
how fast its oxide film dissolves depends on pH. The total solubility of zinc in
equilibrium with its oxide, along the O₂/H₂O line of aerated water, falls from acid
water to a minimum near pH 9–10 and rises again in alkaline water (zinc is
amphoteric). The script prints the minimum.

A solubility curve is an equilibrium value; dissolution rates and the white-rust
films on fresh galvanising are kinetic matters the curve cannot predict.
"""

import numpy as np

import pourbaix
from pourbaix.analyses.solubility import solubility_curve, solubility_minimum
from pourbaix.plot.analysis_figures import draw_solubility_curve

zinc = pourbaix.compute_map("Zn", activity=1e-6)
curve = solubility_curve(zinc, np.linspace(4.0, 14.0, 201), along="oxygen")
ax = draw_solubility_curve(curve, label="Zn, along O₂/H₂O (1 bar)")
ph, least = solubility_minimum(zinc, along="oxygen")
print(f"least soluble at pH {ph:.2f}: {least.total_molality:.2e} mol/kg over {least.solid}")
