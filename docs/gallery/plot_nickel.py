"""Nickel in a boiler feedwater, read against a hydrogen electrode
==================================================================

A power-plant chemist reads nickel-alloy heat-exchanger tubes against a reversible
hydrogen electrode (RHE), the natural scale for a water with dissolved hydrogen: on it
the water lines are horizontal, and every boundary whose slope is the water lines'
(one H⁺ per electron) is horizontal too.

Caution: high-temperature water chemistry follows the plant's guidelines; this map is
at 25 °C.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

nickel = pourbaix.compute_map("Ni", activity=1e-6, reference="RHE", ph_range=(2, 14),
                              potential_range_v=(-0.8, 2.2))
draw_map(nickel)
print(nickel.probe(9.0, 0.2).species)
