"""Copper at four dissolved activities
=====================================

The corrosion convention draws maps at 10⁻⁶; a hydrometallurgist reads them at 10⁻²
or more. Overlaying copper's map at 10⁻², 10⁻⁴, 10⁻⁶ and 10⁻⁸ shows the solid
domains shrinking as the set activity rises: each line between a solid and a
dissolved species moves by 0.05916/n V per decade (n electrons per copper atom), and
the vertical lines by 1/m pH per decade (m H⁺ per copper atom).
"""

from pourbaix.maps.domain_map import compute_sweep
from pourbaix.plot.draw import draw_overlay

maps = compute_sweep("Cu", activities=[1e-2, 1e-4, 1e-6, 1e-8], ph_range=(0, 14),
                     potential_range_v=(-0.8, 1.2))
draw_overlay(maps)
for m in maps:
    line = next((b for b in m.boundaries if b.between == ("Cu", "Cu^2+")), None)
    where = "no Cu | Cu2+ boundary on this map" if line is None else f"Cu | Cu2+ at {line.e_at_ph0_v:.3f} V"
    print(f"activity {m.conditions.activity:.0e}: {where}")
