"""How far a line moves between compilations
============================================

Compilations disagree: the NBS tables' ΔfG°(Fe²⁺) puts E°(Fe²⁺/Fe) at −0.41 V, the
electrochemical series at −0.447 V. The base tables keep the NBS value; the data set
``bpj85`` holds the values consistent with Bard, Parsons & Jordan (1985). Overlaying
the two iron maps shows every line that moves and by how much (printed in mV).

Before a decision rests on a boundary, check the rows behind it on the data pages.
"""

import pourbaix
from pourbaix.analyses.compare import compare_maps
from pourbaix.plot.analysis_figures import draw_comparison

base = pourbaix.compute_map("Fe", activity=1e-6, ph_range=(0, 14), potential_range_v=(-1.2, 1.4))
other = pourbaix.compute_map("Fe", activity=1e-6, dataset="bpj85", ph_range=(0, 14),
                             potential_range_v=(-1.2, 1.4))
comparison = compare_maps(base, other, labels=("default (NBS 1982)", "bpj85"))
draw_comparison(comparison)
for shift in comparison.shifts:
    between = " | ".join(shift.between)
    if shift.kind == "ph":
        print(f"{between:18s} moves {shift.shift_ph:+.2f} pH")
    else:
        print(f"{between:18s} moves {shift.shift_mv:+.0f} mV at pH {shift.at_ph:.1f}")
