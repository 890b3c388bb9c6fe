"""A galvanic cell: zinc anodes on a steel hull
==============================================

A boatyard fits zinc anodes to a steel hull in seawater (pH 8.1). Coupled, the two
metals form a cell: each metal's equilibrium potential is the top of its immunity
domain at the water's pH, read from its exact map, and the metal with the lower one —
zinc — is driven anodic. The first figure overlays the two maps; the second is the
Evans diagram of the couple with illustrative Butler–Volmer kinetics (Tafel slopes and
exchange currents invented for this example, the steel's wetted area 20 times the
zinc's): the couple settles at the mixed potential where zinc's anodic current equals
the steel's cathodic current.

The driving force is thermodynamic and the kinetics here are made up: in service,
films, the anodes' alloy, oxygen transport and the water's resistance set the current
and the potential reached. Hull cathodic-protection design follows the applicable
standards and the vessel's class rules, and is checked by measurement.
"""

from pourbaix.analyses.cells import ElectrodeKinetics, galvanic_couple
from pourbaix.plot.cells import draw_couple_maps, draw_evans

kinetics = {  # illustrative values for this example, not measured data
    "Zn": ElectrodeKinetics(0.04, 0.12, exchange_current_a_m2=1e-1),
    "Fe": ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-3),
}
couple = galvanic_couple(["Zn", "Fe"], ph=8.1, kinetics=kinetics, areas={"Zn": 1.0, "Fe": 20.0},
                         reference="Ag/AgCl-seawater")
maps = draw_couple_maps(couple, overlay=True)
evans = draw_evans(couple.mixed, reference="Ag/AgCl-seawater")
print(f"anode {couple.anode}, cathode {couple.cathode}; driving force {couple.driving_force_v:.3f} V")
print(f"mixed potential {couple.mixed.potential_v:.3f} V vs Ag/AgCl (seawater); "
      f"galvanic current {couple.mixed.galvanic_current_a:.2f} A per m² of zinc")
