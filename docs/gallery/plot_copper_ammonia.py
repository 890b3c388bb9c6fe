"""Copper in an ammoniacal leach
===============================

An ammoniacal leach dissolves copper from a carbonate ore while iron stays behind.
With a total ammonia activity of 1, the copper–ammine complexes open a window of
dissolution in alkaline water (pH about 8–11) where copper in plain water would be
passive. Each domain is labelled by its assemblage: the copper species with the
ammonia species that predominates there.

Caution: ammonia solutions release a toxic, irritating gas; leach circuits follow the
applicable occupational-health rules and licensed practice. The predominant-ligand
method takes the ligand in excess (no mass balance on it).
"""

import pourbaix
from pourbaix.plot.draw import draw_map

copper = pourbaix.compute_map("Cu", activity=1e-4, ligands={"NH3": 1.0}, ph_range=(4, 14),
                              potential_range_v=(-0.8, 1.0))
draw_map(copper)
print(copper.probe(10.0, 0.1).species)
