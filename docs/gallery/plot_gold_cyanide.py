"""Gold in an alkaline cyanide leach
===================================

A heap leach dissolves gold as the dicyanoaurate ion Au(CN)₂⁻. With 10⁻² total
cyanide and 10⁻⁶ dissolved gold, gold dissolves above about −0.73 V in alkaline
water, where cyanide is CN⁻ rather than HCN. The map shows why leach liquors are kept
well above pH 10: below pH 9.2 the cyanide is volatile HCN.

Caution: cyanide and hydrogen cyanide are acutely lethal. Cyanide leaching is
regulated (cyanide management codes, permits, emergency plans); keep solutions
alkaline, never acidify them, and follow the applicable codes and licensed practice.
"""

import pourbaix
from pourbaix.plot.draw import draw_map

gold = pourbaix.compute_map("Au", activity=1e-6, ligands={"CN": 1e-2}, ph_range=(6, 14),
                            potential_range_v=(-1.2, 1.4))
draw_map(gold)
print(gold.probe(10.5, -0.3).species)
