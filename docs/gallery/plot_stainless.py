"""A stainless steel as one assemblage
=====================================

An 18-8 type stainless steel (Fe:Cr:Ni = 70:19:11 by atoms) in water at 25 °C. At a
fixed ratio the stable state is an assemblage of phases that together hold the metals
in that ratio — at mildly reducing potentials in alkaline water, magnetite with
chromite and nickel ferrite. The domains are the critical regions of one
parametric linear programme (see the methods page on alloys).

The map shows stable stoichiometric phases of the bulk alloy. The real passive film
on stainless steel is thin, chromium-rich and non-stoichiometric, and pitting,
crevice and stress-corrosion attack in chloride waters are outside any such map.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

steel = pourbaix.compute_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11), activity=1e-6)
draw_map(steel)
print(len(steel.domains), "domains;", steel.probe(9.0, -0.4).species)
