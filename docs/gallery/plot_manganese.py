"""Manganese in a groundwater treatment plant
============================================

Groundwater with dissolved manganese(II) is oxidised and filtered: the map of
manganese shows why — Mn²⁺ is soluble over the whole neutral range at low
potential, and only oxidation (aeration, chlorine, permanganate) brings it into the
solid oxides' domains (MnO₂, Mn₂O₃, Mn₃O₄). Raising the pH helps too. Printed: the
potential the water must reach at pH 7 and pH 8.5 before an oxide is stable.

Caution: oxidant doses and drinking-water limits follow the applicable regulations;
a map says what is stable, not how fast it forms.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

manganese = pourbaix.compute_map("Mn", activity=1e-6, ph_range=(2, 14), potential_range_v=(-1.6, 1.6))
draw_map(manganese, reading=True)
for ph in (7.0, 8.5):
    point = manganese.probe(ph, 0.0)
    print(f"pH {ph}: {point.species} at 0 V; next above: {point.neighbour_up} "
          f"from {point.margin_up_v:.3f} V higher")
