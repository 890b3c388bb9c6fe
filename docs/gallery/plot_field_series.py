"""A year of readings on a buried steel main
===========================================

A corrosion technician reads the pipe-to-soil potential of a buried steel main at one
test post each month, against a portable Cu/CuSO₄ electrode, through the first year
of a cathodic-protection system. The readings are placed on the iron map drawn
against the same electrode, as a path in time: from the magnetite domain before
protection, through the Fe²⁺ (corrosion) domain as the potential falls, to immunity
once the rectifier is turned up — and back into corrosion when the anode bed dries
out. Each reading's notes say it was taken at soil temperature, not at the map's
25 °C.

Caution: −0.85 V against Cu/CuSO₄ is the usual criterion for steel (common
practice); whether a structure is protected is decided under the applicable
cathodic-protection standard (IR-drop correction, polarisation criteria, coating and
interference surveys) by qualified personnel. A map is a thermodynamic prediction.
The readings are invented for this example.
"""

from pourbaix.analyses.field import field_readings
from pourbaix.plot.analysis_figures import draw_field

iron, readings = field_readings("Fe", "data/buried_pipe_survey.csv", activity=1e-6,
                                reference="Cu/CuSO4", ph_range=(5.5, 9.5),
                                potential_range_v=(-1.3, 0.1))
draw_field(iron, readings, reading=True)
for row in readings.rows:
    print(f"{row.time}  {row.potential_v:+.2f} V vs Cu/CuSO4  {row.species:7s} {row.state:12s} {row.label}")
