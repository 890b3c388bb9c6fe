"""Chromium: trivalent films and hexavalent rinses
=================================================

A plating shop keeps chromium(III) in its passivation bath and must keep chromium(VI)
out of its rinse water. The chromium map shows Cr₂O₃ stable over a wide range around
neutral pH, and the chromate ions (HCrO₄⁻, CrO₄²⁻) taking over at high potentials —
the oxidising conditions in which the hexavalent form appears.

Caution: chromium(VI) is toxic and carcinogenic; its handling, discharge and
monitoring are set by occupational-health and environmental regulations. A map is a
thermodynamic prediction, not a discharge analysis.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

chromium = pourbaix.compute_map("Cr", activity=1e-6, ph_range=(0, 14), potential_range_v=(-1.8, 1.6))
draw_map(chromium)
print(chromium.probe(7.0, 1.0).species, chromium.probe(7.0, 0.0).species)
