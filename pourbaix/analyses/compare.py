"""Comparing two maps: how far each boundary moved between data sets, temperatures or activities."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from pourbaix.errors import OptionError
from pourbaix.frames import Tabular

__all__ = [
    "BoundaryShift",
    "MapComparison",
    "compare_maps",
    "comparison_table_lines",
]


@dataclass(frozen=True)
class BoundaryShift:
    """How one boundary (a pair of species) moved from map A to map B.

    Attributes
    ----------
    between : tuple of str
        The two species (assemblages), in map A's order.
    kind : str
        ``potential`` (a sloped or horizontal line, compared at ``at_ph``) or
        ``ph`` (a vertical, electron-free line).
    at_ph : float or None
        pH where a sloped line is compared [-].
    potential_a_v, potential_b_v : float or None
        The line's potential at ``at_ph`` in A and in B [V vs the maps' reference].
    shift_mv : float or None
        ``(potential_b - potential_a) * 1000`` [mV].
    ph_a, ph_b : float or None
        pH of a vertical line in A and in B [-].
    shift_ph : float or None
        ``ph_b - ph_a`` [pH units].
    slope_a_v_per_ph, slope_b_v_per_ph : float or None
        Slopes of the two lines [V/pH].
    """

    between: tuple
    kind: str
    at_ph: float | None = None
    potential_a_v: float | None = None
    potential_b_v: float | None = None
    shift_mv: float | None = None
    ph_a: float | None = None
    ph_b: float | None = None
    shift_ph: float | None = None
    slope_a_v_per_ph: float | None = None
    slope_b_v_per_ph: float | None = None


@dataclass
class MapComparison(Tabular):
    """Boundary-by-boundary comparison of two maps.

    Attributes
    ----------
    map_a, map_b : DomainMap
        The maps (A is the base).
    label_a, label_b : str
        What tells them apart (e.g. "data set default", "data set bpj85").
    shifts : list of BoundaryShift
        Boundaries present in both maps.
    only_a, only_b : list of tuple
        Species pairs with a boundary in one map only (a domain appeared or vanished).
    reference : str
        Reference electrode of all potentials.
    notes : list of str
        Remarks (e.g. the reference electrode's own temperature drift).
    """

    map_a: object
    map_b: object
    label_a: str
    label_b: str
    shifts: list
    only_a: list
    only_b: list
    reference: str
    notes: list = field(default_factory=list)

    def shift(self, a, b):
        """The shift of the boundary between species ``a`` and ``b`` (either order); None if absent.

        Parameters
        ----------
        a, b : str
            Species (assemblage) names as on the maps.

        Returns
        -------
        BoundaryShift or None
        """
        key = frozenset((a, b))
        for s in self.shifts:
            if frozenset(s.between) == key:
                return s
        return None

    def rows(self):
        """The comparison as plain dicts (JSON/CSV-ready), moved boundaries first.

        Returns
        -------
        list of dict
        """
        out = []
        for s in self.shifts:
            d = {k: getattr(s, k) for k in BoundaryShift.__dataclass_fields__}
            d["between"] = list(s.between)
            d["status"] = "in both"
            out.append(d)
        for pair in self.only_a:
            out.append({"between": list(pair), "kind": None, "status": f"only in {self.label_a}"})
        for pair in self.only_b:
            out.append({"between": list(pair), "kind": None, "status": f"only in {self.label_b}"})
        return out


def _labels(a, b):
    ca, cb = a.conditions, b.conditions
    la, lb = [], []
    if ca.dataset != cb.dataset:
        la.append(f"data set {ca.dataset}")
        lb.append(f"data set {cb.dataset}")
    if tuple(ca.data_files) != tuple(cb.data_files):
        la.append("data " + (", ".join(ca.data_files) or "(embedded)"))
        lb.append("data " + (", ".join(cb.data_files) or "(embedded)"))
    if ca.temperature_c != cb.temperature_c:
        la.append(f"{ca.temperature_c:g} °C")
        lb.append(f"{cb.temperature_c:g} °C")
    if (ca.activity, ca.molality) != (cb.activity, cb.molality):
        la.append(
            f"activity {ca.activity:g}" if ca.activity is not None else f"molality {ca.molality:g}"
        )
        lb.append(
            f"activity {cb.activity:g}" if cb.activity is not None else f"molality {cb.molality:g}"
        )
    if ca.ionic_strength != cb.ionic_strength:
        la.append(f"I = {ca.ionic_strength:g}")
        lb.append(f"I = {cb.ionic_strength:g}")
    if dict(ca.ligands) != dict(cb.ligands):
        la.append("ligands " + (", ".join(f"{k}={v:g}" for k, v in ca.ligands.items()) or "none"))
        lb.append("ligands " + (", ".join(f"{k}={v:g}" for k, v in cb.ligands.items()) or "none"))
    return ("; ".join(la) or "map A"), ("; ".join(lb) or "map B")


def _by_pair(dmap):
    out = {}
    for b in dmap.boundaries:
        key = frozenset(b.between)
        length = math.hypot(b.end[0] - b.start[0], b.end[1] - b.start[1])
        if key not in out or length > out[key][1]:
            out[key] = (b, length)
    return {k: v[0] for k, v in out.items()}


def compare_maps(map_a, map_b, *, ph=None, labels=None):
    """How far each boundary moved from one map to another.

    Parameters
    ----------
    map_a, map_b : DomainMap
        The base map and the other one (same element system and reference
        electrode; e.g. two data sets, temperatures or activities).
    ph : float, optional
        pH at which every sloped boundary is compared; default the pH of the
        midpoint of each boundary segment in map A [-].
    labels : (str, str), optional
        Names for the two maps; default built from the conditions that differ.

    Returns
    -------
    MapComparison

    Raises
    ------
    OptionError
        If the maps are of different element systems or reference electrodes,
        or ``labels`` is not two strings.

    Notes
    -----
    Boundaries are matched by their species pair. Each is the Nernst line
    E = E0 - (m/n) k_T pH - (k_T/n) log10 Q of its pair (Bard & Faulkner
    2001, eq. 2.1.38); the shift is B's line minus A's line at the chosen pH,
    or the change of pH of a vertical (electron-free) line. A change δ of
    ΔfG° of a species with ν atoms of the element in a couple exchanging n
    electrons per formula unit moves the line by ν δ / (n F).

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> cmp = compare_maps(compute_map("Cu", activity=1e-6), compute_map("Cu", activity=1e-4))
    >>> round(cmp.shift("Cu", "Cu^2+").shift_mv, 1)
    59.2
    """
    ca, cb = map_a.conditions, map_b.conditions
    if tuple(ca.elements) != tuple(cb.elements):
        raise OptionError(
            f"cannot compare a map of {'-'.join(ca.elements)} with one of {'-'.join(cb.elements)}"
        )
    if ca.reference != cb.reference:
        raise OptionError(
            f"the maps are vs different reference electrodes ({ca.reference}, {cb.reference}); compute both vs one"
        )
    if labels is None:
        la, lb = _labels(map_a, map_b)
    else:
        try:
            la, lb = (str(v) for v in labels)
        except (TypeError, ValueError):
            raise OptionError(f"labels: give two names, got {labels!r}") from None
    if ph is not None:
        ph = float(ph)
        if not math.isfinite(ph):
            raise OptionError(f"ph must be a finite number, got {ph!r}")
    pa, pb = _by_pair(map_a), _by_pair(map_b)
    shifts, only_a = [], []
    for key, ba in pa.items():
        bb = pb.get(key)
        if bb is None:
            only_a.append(tuple(ba.between))
            continue
        if ba.e_at_ph0_v is None or bb.e_at_ph0_v is None:
            if ba.ph is not None and bb.ph is not None:
                shifts.append(
                    BoundaryShift(
                        tuple(ba.between), "ph", ph_a=ba.ph, ph_b=bb.ph, shift_ph=bb.ph - ba.ph
                    )
                )
                continue
            # one vertical, one sloped (only with assemblages): compare where A's segment is
        at = ph if ph is not None else 0.5 * (ba.start[0] + ba.end[0])
        ea = ba.potential_at(at) if ba.e_at_ph0_v is not None else float("nan")
        eb = bb.potential_at(at) if bb.e_at_ph0_v is not None else float("nan")
        shifts.append(
            BoundaryShift(
                tuple(ba.between),
                "potential",
                at_ph=at,
                potential_a_v=ea,
                potential_b_v=eb,
                shift_mv=(eb - ea) * 1000.0,
                slope_a_v_per_ph=ba.slope_v_per_ph,
                slope_b_v_per_ph=bb.slope_v_per_ph,
            )
        )
    only_b = [tuple(b.between) for k, b in pb.items() if k not in pa]
    notes = []
    if (
        abs(ca.reference_offset_v - cb.reference_offset_v) > 1e-9
        or ca.reference_slope_v_per_ph != cb.reference_slope_v_per_ph
    ):
        notes.append(
            f"the {ca.reference} electrode itself sits {1000 * (cb.reference_offset_v - ca.reference_offset_v):+.1f} mV "
            "apart between the two maps (temperature); the shifts include that"
        )
    return MapComparison(map_a, map_b, la, lb, shifts, only_a, only_b, ca.reference, notes)


def comparison_table_lines(cmp):
    """Plain-text table (used by the command line)."""
    out = [
        f"Boundaries of {'-'.join(cmp.map_a.conditions.elements)}: A = {cmp.label_a}, B = {cmp.label_b}; potentials vs {cmp.reference}"
    ]
    w = max([len(" | ".join(s.between)) for s in cmp.shifts] + [20])
    out.append(f"  {'boundary':<{w}}  {'compared at':>12}  {'A':>9}  {'B':>9}  {'moved':>10}")
    moved = sorted(
        cmp.shifts, key=lambda s: -abs(s.shift_mv if s.kind == "potential" else 59.16 * s.shift_ph)
    )
    for s in moved:
        name = " | ".join(s.between)
        if s.kind == "ph":
            out.append(
                f"  {name:<{w}}  {'(vertical)':>12}  {s.ph_a:9.3f}  {s.ph_b:9.3f}  {s.shift_ph:+7.3f} pH"
            )
        else:
            out.append(
                f"  {name:<{w}}  {'pH ' + format(s.at_ph, '.2f'):>12}  {s.potential_a_v:+9.4f}  {s.potential_b_v:+9.4f}  "
                f"{s.shift_mv:+7.1f} mV"
            )
    for pair in cmp.only_a:
        out.append(f"  {' | '.join(pair):<{w}}  only in A ({cmp.label_a})")
    for pair in cmp.only_b:
        out.append(f"  {' | '.join(pair):<{w}}  only in B ({cmp.label_b})")
    out += [f"  note: {n}" for n in cmp.notes]
    return out


# old private names, kept one release for code not yet moved to the public ones
_table_lines = comparison_table_lines
