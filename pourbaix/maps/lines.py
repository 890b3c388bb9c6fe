"""Boundary equations: the reaction behind each line, its E0 and its Nernst form."""

from __future__ import annotations

import math

import numpy as np

from pourbaix.errors import DataError

__all__ = ["boundary_equations", "boundary_equations_frame"]


def _species_by_name(dmap):
    from pourbaix.maps.domain_map import species_id

    return {species_id(se.species): se for se in dmap.species}


def boundary_equations_frame(dmap):
    """:func:`boundary_equations` as a pandas DataFrame (pandas is an optional extra).

    Parameters
    ----------
    dmap : DomainMap
        A computed map.

    Returns
    -------
    pandas.DataFrame
        One row per boundary.
    """
    from pourbaix.frames import as_frame

    return as_frame(boundary_equations(dmap))


def boundary_equations(dmap):
    """Describe every boundary of a single-species-per-domain map.

    Parameters
    ----------
    dmap : DomainMap
        A computed map.

    Returns
    -------
    list of dict
        Per boundary: ``between``, ``reaction`` (text, written as a reduction),
        ``electrons``, ``h_plus``, ``e0_v_she`` (E0 at the map's temperature,
        unit activities; None for an electron-free reaction), ``log_k`` (for
        electron-free reactions), ``nernst`` (text), ``line`` (text, vs the
        map's reference), ``e_at_ph0_v``, ``slope_v_per_ph``, ``ph``, and
        ``routes``: for each side that is a single species, how its ΔG at the
        map's (T, P) was obtained (e.g. "fitted HKF", "Maier–Kelley").

    Notes
    -----
    For ox + m H+ + n e- = red + w H2O the Nernst equation reads
    E = E0 - (m/n) k pH - (k/n) log10(a_red / a_ox) (Bard & Faulkner 2001,
    eq. 2.1.38), k = R T ln10 / F. The line on the map already includes the
    activities; E0 is recovered from it by adding back the activity term.
    Assemblage boundaries (ligand and several-metal maps) are listed with
    their line only. A mass-balanced map's boundaries are curves: each is
    listed once, as its traced polyline (``points``, vs the map's reference)
    with the tolerance it was traced to (``tolerance``: pH and V), and no
    single reaction or Nernst line.
    """
    from pourbaix.physics.reactions import balance_pair

    if getattr(dmap, "curves", None):
        return _curve_rows(dmap)
    by_name = _species_by_name(dmap)
    k = float(_nernst(dmap))
    c = dmap.conditions
    element = c.elements[0]
    ref = c.reference
    rows = []
    for b in dmap.boundaries:
        row = {
            "between": list(b.between),
            "e_at_ph0_v": b.e_at_ph0_v,
            "slope_v_per_ph": b.slope_v_per_ph,
            "ph": b.ph,
            "nernst_v": k,
            "reference": ref,
        }
        if b.ph is not None:
            row["line"] = f"pH = {b.ph:.3f}"
        else:
            slope = b.slope_v_per_ph if abs(b.slope_v_per_ph) > 5e-9 else 0.0
            sign = "-" if slope < 0 else "+"
            row["line"] = f"E = {b.e_at_ph0_v:+.4f} {sign} {abs(slope):.5f} pH  (V vs {ref})"
        a_name, b_name = b.between
        row["routes"] = {n: by_name[n].route for n in b.between if n in by_name}
        if a_name in by_name and b_name in by_name and len(c.elements) == 1 and not c.ligands:
            sa, sb = by_name[a_name], by_name[b_name]
            try:
                rx = _oriented(balance_pair, sa.species, sb.species, element)
            except DataError:
                rx = None
            if rx is not None:
                row.update(_describe(rx, by_name, b, c, k))
        rows.append(row)
    return rows


def _curve_rows(dmap):
    """Rows of a mass-balanced map: one per traced curve."""
    by_name = _species_by_name(dmap)
    tol_ph, tol_v = dmap.tolerance
    ref = dmap.conditions.reference
    rows = []
    for curve in dmap.curves:
        pts = np.asarray(curve.points, dtype=float)
        (x0, y0), (x1, y1) = pts[0], pts[-1]
        rows.append(
            {
                "between": list(curve.between),
                "e_at_ph0_v": None,
                "slope_v_per_ph": None,
                "ph": None,
                "nernst_v": float(_nernst(dmap)),
                "reference": ref,
                "points": [[float(x), float(y)] for x, y in pts],
                "tolerance": {"ph": float(tol_ph), "potential_v": float(tol_v)},
                "line": (
                    f"traced curve, {len(pts)} points from pH {x0:.3f}, E {y0:+.4f} V to "
                    f"pH {x1:.3f}, E {y1:+.4f} V (V vs {ref}); every point and chord midpoint "
                    f"within {tol_ph:g} pH and {tol_v * 1000:g} mV of the boundary"
                ),
                "routes": {n: by_name[n].route for n in curve.between if n in by_name},
            }
        )
    return rows


def _nernst(dmap):
    return dmap.conditions.nernst_v


def _oriented(balance_pair, a, b, element):
    """Balance a pair with the more oxidised species on the left."""
    na = _electrons_per_atom(a, element)
    nb = _electrons_per_atom(b, element)
    if na >= nb:
        return balance_pair(a, b, element)
    return balance_pair(b, a, element)


def _electrons_per_atom(sp, element):
    comp = dict(sp.composition)
    return (2 * comp.get("O", 0) - comp.get("H", 0) + sp.charge) / comp[element]


def _describe(rx, by_name, b, c, k):
    n = rx.electrons
    m = rx.h_plus
    # log10 Q of the activities that sit in the line (not H+): products over reactants.
    log_q = 0.0
    for sp, nu in rx.reduced:
        log_q += nu * math.log10(by_name[_id(sp)].activity)
    for sp, nu in rx.oxidised:
        log_q -= nu * math.log10(by_name[_id(sp)].activity)
    log_q += rx.water * math.log10(c.water_activity)
    out = {"reaction": rx.text(), "electrons": n, "h_plus": m}
    q_text = _q_text(rx)
    if abs(n) > 1e-12:
        # line at pH 0 (SHE) = E0 - (k/n) log Q  ->  E0 = line + (k/n) log Q
        e_line_she = (b.e_at_ph0_v if b.e_at_ph0_v is not None else np.nan) + c.reference_offset_v
        e0 = e_line_she + (k / n) * log_q
        out["e0_v_she"] = float(e0)
        out["log_k"] = None
        coef = m / n * k
        mpart = f" {'-' if coef > 0 else '+'} {abs(coef):.5f} pH" if abs(m) > 1e-12 else ""
        qpart = f" {'-' if n > 0 else '+'} {abs(k / n):.5f} log10({q_text})" if q_text else ""
        out["nernst"] = f"E = E0{mpart}{qpart}"
    else:
        # electron-free: pH = (log K - log Q)/m  with K = a_red a_w^w / (a_ox a_H+^m)
        out["e0_v_she"] = None
        if b.ph is not None and abs(m) > 1e-12:
            log_k = m * b.ph + log_q
            out["log_k"] = float(log_k)
            out["nernst"] = f"pH = (log K - log10({q_text or '1'}))/{m:g}"
        else:
            out["log_k"] = None
            out["nernst"] = ""
    return out


def _id(sp):
    from pourbaix.maps.domain_map import species_id

    return species_id(sp)


def _q_text(rx):
    top = " ".join(_pow(_id(sp), nu) for sp, nu in rx.reduced if sp.phase in ("aq", "g"))
    bot = " ".join(_pow(_id(sp), nu) for sp, nu in rx.oxidised if sp.phase in ("aq", "g"))
    if not top and not bot:
        return ""
    return f"[{top or '1'}]/[{bot or '1'}]"


def _pow(name, nu):
    return name if nu == 1 else f"({name})^{nu:g}"
