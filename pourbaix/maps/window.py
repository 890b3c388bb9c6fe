"""Default windows that show an element's immunity: how far down the potential axis must reach."""

from __future__ import annotations

import math

import numpy as np

__all__ = ["immunity_top_v", "widened_floor_v", "IMMUNITY_MARGIN_V", "LOWEST_FLOOR_V"]

#: Room kept below the immunity line when the window is widened [V].
IMMUNITY_MARGIN_V = 0.1
#: The window is never widened below this potential [V vs the map's reference]: the usual
#: limit of aqueous thermodynamics (common practice).
LOWEST_FLOOR_V = -3.0


def immunity_top_v(dmap, samples=61):
    """Lowest potential, over the map's pH window, of the top edge of the immunity region.

    Parameters
    ----------
    dmap : DomainMap
        A map whose window reaches low enough to hold the immunity region.
    samples : int
        pH values at which the top edge is read.

    Returns
    -------
    float or None
        [V vs the map's reference]; None when the map shows no immunity.

    Notes
    -----
    Below this potential the metal is immune at every pH of the window where
    the map shows it immune; a window whose floor lies under it shows that
    immunity across the pH range.
    """
    from shapely.geometry import LineString
    from shapely.ops import unary_union

    immune = [d.polygon for d in dmap.domains if d.state == "immunity"]
    if not immune:
        return None
    region = unary_union(immune)
    lo, hi = dmap.conditions.ph_range
    e_lo, e_hi = dmap.conditions.potential_range_v
    tops = []
    for ph in np.linspace(lo, hi, samples):
        cut = region.intersection(LineString([(ph, e_lo - 1), (ph, e_hi + 1)]))
        if not cut.is_empty:
            tops.append(cut.bounds[3])
    return float(min(tops)) if tops else None


def widened_floor_v(dmap_wide, floor_v):
    """Floor of a window widened to show immunity at every pH, or None when no widening is needed.

    Parameters
    ----------
    dmap_wide : DomainMap
        The map computed down to :data:`LOWEST_FLOOR_V`.
    floor_v : float
        The floor of the window asked for [V].

    Returns
    -------
    float or None
        A new floor on a 0.5 V step, :data:`IMMUNITY_MARGIN_V` below the
        immunity line at its lowest, or None.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> widened_floor_v(compute_map("Mg", potential_range_v=(-3.0, 2.0)), -2.0)
    -3.0
    >>> widened_floor_v(compute_map("Fe", potential_range_v=(-3.0, 2.0)), -2.0) is None
    True
    """
    top = immunity_top_v(dmap_wide)
    if top is None or top - IMMUNITY_MARGIN_V >= floor_v:
        return None
    new = math.floor((top - IMMUNITY_MARGIN_V) / 0.5) * 0.5
    return max(new, LOWEST_FLOOR_V)
