"""A galvanic cell: zinc anodes on a steel hull
==============================================

A boatyard fits zinc anodes to a steel hull. Zinc and iron in the same seawater
(pH 8.1) form a cell: the maps of zinc and iron, overlaid, show zinc's corrosion
line well below iron's, so zinc dissolves and the steel is driven towards immunity.
The script reads the two metals' equilibrium lines at pH 8.1 and prints the cell's
open-circuit driving force between them, E(Fe²⁺/Fe) − E(Zn²⁺/Zn), with 10⁻⁶ of each
dissolved metal.

The equilibrium difference is an upper bound: in service, polarisation, film
formation, the anodes' alloy and the water's resistance set the current and the
potential reached (a mixed potential). Hull cathodic-protection design follows the
applicable standards and the vessel's class rules.
"""

import pourbaix
from pourbaix.plot.draw import draw_overlay

window = dict(activity=1e-6, ph_range=(4, 12), potential_range_v=(-1.4, 0.6), reference="Ag/AgCl-seawater")
zinc = pourbaix.compute_map("Zn", **window)
iron = pourbaix.compute_map("Fe", **window)
draw_overlay([iron, zinc], labels=["iron", "zinc"])


def immunity_limit(dmap, ph=8.1):
    """Top of the metal's immunity domain at ``ph`` [V vs the map's reference]."""
    bottom = dmap.conditions.potential_range_v[0]
    return bottom + dmap.probe(ph, bottom).margin_up_v


e_iron, e_zinc = immunity_limit(iron), immunity_limit(zinc)
print(f"iron's immunity limit at pH 8.1: {e_iron:.3f} V vs Ag/AgCl (seawater)")
print(f"zinc's immunity limit at pH 8.1: {e_zinc:.3f} V vs Ag/AgCl (seawater)")
print(f"driving force of the couple: {e_iron - e_zinc:.3f} V")
