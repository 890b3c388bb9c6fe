"""Lead service lines in a carbonate water
=========================================

A town still has lead service lines and its water carries dissolved inorganic
carbon (about 10⁻³ mol/kg total carbonate). The map of lead with carbonate shows
where cerussite and hydrocerussite-type carbonates or lead oxides are stable, and how
a change in disinfectant (which moves the potential: free chlorine holds it high,
chloramine lower) can move a pipe scale from one domain to another.

Caution: there is no safe level of lead exposure. Lead-service-line decisions follow
the applicable drinking-water regulations, sampling protocols and the utility's
corrosion-control plan; a map is a thermodynamic prediction and says nothing about
particulate lead or release rates.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

lead = pourbaix.compute_map("Pb", activity=1e-6, ligands={"C": 1e-3}, ph_range=(4, 12),
                            potential_range_v=(-1.0, 1.6))
draw_map(lead)
print(lead.probe(7.5, 0.9).species, "|", lead.probe(7.5, 0.3).species)
