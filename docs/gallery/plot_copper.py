"""Copper plumbing in a soft drinking water
==========================================

A water utility asks how copper service pipes behave in a soft, slightly acidic
supply (pH 6.5–7.5) with free chlorine keeping the potential high. The copper map
at 25 °C is drawn with iso-solubility lines of the total dissolved copper
(10⁻² to 10⁻⁸ mol/kg): between them one reads how much copper a water in equilibrium
with the pipe's oxide could carry.

Caution: copper release in drinking water is governed by the applicable
drinking-water regulations and the utility's corrosion-control programme, decided
from sampling, not from a map. A map is a thermodynamic prediction.
"""

import pourbaix
from pourbaix.plot.analysis_figures import add_solubility_lines
from pourbaix.plot.draw import draw_map

copper = pourbaix.compute_map("Cu", activity=1e-6, ph_range=(2, 14), potential_range_v=(-1.0, 1.4))
ax = draw_map(copper)
add_solubility_lines(ax, copper)
point = copper.probe(7.0, 0.6)
print(f"pH 7, 0.6 V: {point.species} ({point.state}); Cu2+ from {point.margin_acid_ph:.2f} pH units more acid")
