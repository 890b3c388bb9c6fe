"""Iron from a cooling loop to a boiler
======================================

The same carbon steel at 25, 150 and 300 °C: as water heats, its neutral pH falls
(to about 5.8 at 150 °C and 5.7 at 300 °C), the slopes of all lines steepen with RT/F,
and magnetite's domain grows. The boundaries of each map are overlaid in their own
line style; above 100 °C each map is at water's saturation pressure (both printed
below).

Caution: a map at 300 °C describes water kept liquid at 86 bar. Boilers and
pressurised systems are governed by pressure-equipment codes and water-chemistry
guidelines for their class; some species' data are past their trusted range at the
highest temperature (the map lists them).
"""

from pourbaix.maps.domain_map import compute_sweep
from pourbaix.plot.draw import draw_overlay

maps = compute_sweep("Fe", temperatures_c=[25.0, 150.0, 300.0], activity=1e-6,
                     ph_range=(2, 14), potential_range_v=(-1.4, 1.4))
draw_overlay(maps)
for m in maps:
    print(f"{m.conditions.temperature_c:.0f} °C, {m.conditions.pressure_bar:.1f} bar: "
          f"neutral pH {m.neutral_ph:.2f}")
