"""Corrosion reading of one measurement: immune, passive or corroding, and how far from immunity."""

from __future__ import annotations

import math
from dataclasses import dataclass

from pourbaix.errors import ConditionsError, OptionError

__all__ = [
    "CP_CRITERION_V",
    "CP_REFERENCE",
    "CP_CAUTION",
    "CorrosionReading",
    "corrosion_reading",
    "immunity_potential",
]

#: The usual cathodic-protection criterion for carbon steel: polarised potential at or
#: below -0.85 V vs the copper/copper-sulfate electrode (common practice) [V].
CP_CRITERION_V = -0.85
#: Reference electrode of :data:`CP_CRITERION_V`.
CP_REFERENCE = "Cu/CuSO4"
#: Caution printed with every cathodic-protection check.
CP_CAUTION = (
    "The -0.85 V vs Cu/CuSO4 figure is the usual criterion for carbon steel (common practice), meant for the "
    "polarised potential with the IR drop removed. It is shown beside the thermodynamic reading, not as a "
    "verdict: whether a structure is adequately protected - and which criterion applies (temperature, "
    "sulfate-reducing bacteria, coatings, overprotection of high-strength steels) - is for the applicable "
    "standard and a qualified corrosion engineer to decide."
)
_PASSIVE_CAUTION = (
    "'passive' means a solid compound is thermodynamically stable here; whether its film protects "
    "(pitting, crevices, chloride, flow) is a kinetic question the map cannot answer."
)
_WORDS = {"immunity": "immune", "passivation": "passive", "corrosion": "corroding"}
_STEP_V = 1e-7  # step across a boundary when walking along the potential axis [V]


@dataclass(frozen=True)
class CorrosionReading:
    """What a map says about one measured point.

    Attributes
    ----------
    element : str
        The metal (principal element of the map).
    ph : float
        pH [-].
    potential_v : float
        Potential as given [V vs ``reference``].
    reference : str
        Electrode of ``potential_v``.
    potential_v_she : float
        The same potential vs SHE [V].
    temperature_c : float
        Temperature of the map and of the conversion [°C].
    reading : str
        ``immune``, ``passive`` or ``corroding``.
    state : str
        The map's term: ``immunity``, ``passivation`` or ``corrosion``.
    species : str
        Stable species (assemblage) at the point.
    immunity_potential_v : float or None
        Highest potential of the immunity domain at this pH [V vs
        ``reference``]; None if the metal is not immune at any potential there.
    margin_to_immunity_mv : float or None
        ``(potential - immunity_potential) * 1000``: above 0 the potential
        must fall by that much to reach immunity; at or below 0 the point is
        immune with that much room [mV].
    margin_down_v, margin_up_v : float
        Distance to the nearest boundary below and above [V].
    neighbour_down, neighbour_up : str
        Species across those boundaries.
    cp_check : dict or None
        For iron/steel: ``criterion_v`` (-0.85), ``reference`` (Cu/CuSO4),
        ``potential_v`` (the reading vs Cu/CuSO4), ``meets`` (bool) and
        ``difference_mv`` (reading minus criterion; negative = more negative
        than the criterion).
    cautions : tuple of str
        Texts that go with the reading.
    """

    element: str
    ph: float
    potential_v: float
    reference: str
    potential_v_she: float
    temperature_c: float
    reading: str
    state: str
    species: str
    immunity_potential_v: float | None
    margin_to_immunity_mv: float | None
    margin_down_v: float
    margin_up_v: float
    neighbour_down: str
    neighbour_up: str
    cp_check: dict | None
    cautions: tuple

    def to_dict(self):
        """Plain data (JSON-ready; inf -> None).

        Returns
        -------
        dict
        """
        out = {}
        for k in self.__dataclass_fields__:
            v = getattr(self, k)
            if isinstance(v, float) and not math.isfinite(v):
                v = None
            if isinstance(v, tuple):
                v = list(v)
            out[k] = v
        return out


def immunity_potential(dmap, ph, potential_v=0.0, max_steps=500):
    """Highest potential at which the map's metal is immune, at a given pH.

    Parameters
    ----------
    dmap : DomainMap
        The map.
    ph : float
        pH [-].
    potential_v : float
        Where to start the search [V vs the map's reference].
    max_steps : int
        Most boundaries crossed before giving up.

    Returns
    -------
    float or None
        Potential of the top of the immunity domain [V vs the map's
        reference], or None if there is no immunity at that pH.

    Notes
    -----
    Walks along the potential axis from boundary to boundary with the map's
    exact probe (each step lands on a boundary line, Nernst), so the value is
    exact and valid beyond the drawn window.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> round(immunity_potential(compute_map("Cu"), 2.0), 3)
    0.162
    """
    ph = float(ph)
    cur = float(potential_v)
    if not (math.isfinite(ph) and math.isfinite(cur)):
        raise ConditionsError("immunity_potential: pH and potential must be finite numbers")
    r = dmap.probe(ph, cur)
    if r.state == "immunity":
        for _ in range(max_steps):
            m = r.margin_up_v
            if not math.isfinite(m):
                return math.inf
            edge = cur + m
            nxt = dmap.probe(ph, edge + _STEP_V)
            if nxt.state != "immunity":
                return edge
            cur, r = edge + _STEP_V, nxt
        return None
    for _ in range(max_steps):
        m = r.margin_down_v
        if not math.isfinite(m):
            return None
        edge = cur - m
        nxt = dmap.probe(ph, edge - _STEP_V)
        if nxt.state == "immunity":
            return edge
        cur, r = edge - _STEP_V, nxt
    return None


def corrosion_reading(dmap_or_element, ph, potential_v, reference="SHE", **conditions):
    """Read a measured potential and pH against a metal's map.

    Parameters
    ----------
    dmap_or_element : DomainMap or str
        A computed map, or the metal (e.g. "Fe") whose map is computed with
        ``conditions`` vs ``reference``.
    ph : float
        Measured pH [-].
    potential_v : float
        Measured potential [V vs ``reference``].
    reference : str
        Electrode of the measurement (e.g. "Cu/CuSO4", "SCE", "Ag/AgCl-seawater").
    **conditions
        Keyword arguments of :func:`pourbaix.maps.domain_map.compute_map`
        (temperature_c, activity, ligands ...).

    Returns
    -------
    CorrosionReading

    Raises
    ------
    OptionError
        For an unknown reference, or conditions given with a computed map.
    ConditionsError
        For a pH or potential that is not a finite number.

    Notes
    -----
    The state is the map's: immunity (the metal is stable), passivation (a
    solid compound is), corrosion (a dissolved species is, at the map's set
    activity; 1e-6 by default, the usual corrosion convention). The margin to
    immunity is the drop in potential, at the same pH, down to the top of the
    immunity domain (:func:`immunity_potential`). For iron, the usual
    cathodic-protection criterion (-0.85 V vs Cu/CuSO4; common practice) is
    checked alongside with the electrode's published offset at the map's
    temperature (pourbaix.physics.electrodes).

    Examples
    --------
    >>> r = corrosion_reading("Fe", 8.0, -1.0, "Cu/CuSO4")
    >>> r.reading, r.cp_check["meets"], round(r.margin_to_immunity_mv)
    ('immune', True, -98)
    """
    import warnings

    from pourbaix.maps.domain_map import DomainMap, compute_map
    from pourbaix.physics.electrodes import from_she, get_reference, to_she

    try:
        ph = float(ph)
        e = float(potential_v)
    except (TypeError, ValueError):
        raise ConditionsError(
            f"pH and potential must be numbers, got {ph!r} and {potential_v!r}"
        ) from None
    if not (math.isfinite(ph) and math.isfinite(e)):
        raise ConditionsError(f"pH and potential must be finite, got {ph!r} and {potential_v!r}")
    ref = get_reference(reference).name
    if isinstance(dmap_or_element, DomainMap):
        if conditions:
            raise OptionError("give either a computed map or an element with conditions, not both")
        dmap = dmap_or_element
    else:
        if "reference" in conditions:
            raise OptionError(
                "the reference is the electrode of the measurement; give it once, as reference="
            )
        dmap = compute_map(dmap_or_element, reference=ref, **conditions)
    c = dmap.conditions
    t = c.temperature_c
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # range warnings are in the map's own warnings
        e_she = float(to_she(e, ref, t, ph=ph))
    e_map = float(c.from_she(ph, e_she))
    r = dmap.probe(ph, e_map)
    top = immunity_potential(dmap, ph, e_map)
    if top is None:
        top_ref, margin = None, None
    else:
        top_she = float(c.to_she(ph, top)) if math.isfinite(top) else top
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            top_ref = float(from_she(top_she, ref, t, ph=ph)) if math.isfinite(top_she) else top_she
        margin = (e - top_ref) * 1000.0
    cautions = []
    if r.state == "passivation":
        cautions.append(_PASSIVE_CAUTION)
    cp = None
    element = c.elements[0]
    if element == "Fe":
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            e_cse = float(from_she(e_she, CP_REFERENCE, t))
        cp = {
            "criterion_v": CP_CRITERION_V,
            "reference": CP_REFERENCE,
            "potential_v": e_cse,
            "meets": bool(e_cse <= CP_CRITERION_V),
            "difference_mv": (e_cse - CP_CRITERION_V) * 1000.0,
        }
        if len(c.elements) > 1:
            cautions.append(
                "the -0.85 V criterion is stated for carbon steel; alloys may call for other criteria"
            )
        cautions.append(CP_CAUTION)
    from pourbaix.maps.domain_map import CAUTION

    cautions.append(CAUTION)
    return CorrosionReading(
        element=element,
        ph=ph,
        potential_v=e,
        reference=ref,
        potential_v_she=e_she,
        temperature_c=t,
        reading=_WORDS[r.state],
        state=r.state,
        species=str(r.species),
        immunity_potential_v=top_ref,
        margin_to_immunity_mv=margin,
        margin_down_v=float(r.margin_down_v),
        margin_up_v=float(r.margin_up_v),
        neighbour_down=str(r.neighbour_down),
        neighbour_up=str(r.neighbour_up),
        cp_check=cp,
        cautions=tuple(cautions),
    )
