"""Aluminium in an alkaline cleaner
==================================

A maintenance team cleans aluminium heat-exchanger fins and wants to know the pH
range where the oxide film is stable. The map shows aluminium's narrow passive range
around neutral pH, between Al³⁺ in acid and the aluminate ion Al(OH)₄⁻ in alkaline
water; the metal itself is stable only far below the water window.

Caution: alkaline cleaners dissolve aluminium with hydrogen evolution (a fire and
explosion hazard in closed spaces) and are corrosive to skin and eyes; follow the
product's safety data sheet and local rules.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

aluminium = pourbaix.compute_map("Al", activity=1e-6, ph_range=(0, 14), potential_range_v=(-3.0, 1.5))
draw_map(aluminium, reading=True)
for ph in (3.0, 7.0, 12.0):
    print(ph, aluminium.probe(ph, 0.0).species)
