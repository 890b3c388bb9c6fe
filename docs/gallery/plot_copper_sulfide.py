"""Copper in a sulfidic seawater
===============================

Copper–nickel condenser tubes meet polluted, sulfide-bearing harbour water during
shutdowns. With 10⁻³ total sulfur, copper sulfides (chalcocite, covellite) take
over the reducing half of the map where copper would otherwise be immune: the
metal is no longer immune in reducing sulfidic water.

Caution: sulfide waters release toxic H₂S; sulfide-induced corrosion of copper alloys
is a matter of films and flow as much as of equilibrium.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

copper = pourbaix.compute_map("Cu", activity=1e-6, ligands={"S": 1e-3}, ph_range=(2, 12),
                              potential_range_v=(-1.0, 1.0))
draw_map(copper, reading=True)
print(copper.probe(8.0, -0.5).species, copper.probe(8.0, -0.5).state)
