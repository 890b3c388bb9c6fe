"""Sulfur's own map: where H₂S comes from
========================================

Before any metal, the ligand: sulfur at a total activity of 10⁻³. Sulfate rules
oxidising water; in reducing water sulfur is hydrogen sulfide below pH 7 and
bisulfide above it, with a sliver of elemental sulfur between. This is the map the
predominant-ligand method computes first for every metal–sulfur system.

Caution: H₂S is toxic at low concentrations and deadens the sense of smell. Reducing,
acidic sulfide waters (sewers, anaerobic digesters, sour wells) release it; work in
them follows confined-space and gas-detection rules.
"""

from pourbaix.maps.systems import compute_ligand_map
from pourbaix.plot.draw import draw_map

sulfur = compute_ligand_map("S", 1e-3, ph_range=(0, 14), potential_range_v=(-1.0, 1.0))
draw_map(sulfur)
for ph in (4.0, 10.0):
    print(ph, sulfur.probe(ph, -0.4).species)
