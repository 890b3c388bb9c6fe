"""A leach window: copper out, iron left behind
==============================================

A hydrometallurgist wants conditions where copper dissolves from a sulfide
concentrate to at least 10⁻² mol/kg while iron stays solid below 10⁻⁵ mol/kg, with
10⁻¹ total sulfur. The window is the region of the map where both hold, inside the
stability window of water; the script prints its widest pH and potential spans.

Caution: acid sulfate leaching and sulfide ores can release hydrogen sulfide, a
toxic gas, and strong acids burn. Leach conditions are set with testwork and under
the applicable occupational-health rules and licensed practice.
"""

from pourbaix.analyses.windows import leach_window
from pourbaix.plot.analysis_figures import draw_window

window = leach_window("Cu", keep_solid="Fe", min_dissolved=1e-2, max_dissolved=1e-5,
                      ligands={"S": 0.1}, ph_range=(-1, 8), potential_range_v=(-0.6, 1.4))
draw_window(window)
low, high = window.ph_bounds
bottom, top = window.potential_bounds_v
print(f"window area {window.area:.2f} pH·V: pH {low:.2f} to {high:.2f}, E {bottom:.3f} to {top:.3f} V vs SHE")
print("best point: pH {:.2f}, {:.3f} V".format(*window.best_point))
for note in window.notes:
    print("-", note)
