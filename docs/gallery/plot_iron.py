"""Iron in a cooling-water loop
==============================

A plant engineer checks carbon-steel pipework in an open recirculating cooling loop at
25 °C. The map of iron at a dissolved activity of 10⁻⁶ (the corrosion convention) is
read against the saturated calomel electrode the plant's probes use, with the
corrosion reading shaded: immunity below the Fe | Fe²⁺ line, corrosion where Fe²⁺ or
Fe³⁺ is stable, passivation over the oxides.

Passivation here means only that an oxide is stable; whether the film protects the
steel in this water is a kinetic question the map cannot answer.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

iron = pourbaix.compute_map("Fe", activity=1e-6, reference="SCE", ph_range=(0, 14),
                            potential_range_v=(-1.6, 1.4))
draw_map(iron, reading=True)
point = iron.probe(8.2, -0.65)
print(f"pH 8.2, -0.65 V vs SCE: {point.species} ({point.state}); {point.margin_up_v:.3f} V below {point.neighbour_up}")
