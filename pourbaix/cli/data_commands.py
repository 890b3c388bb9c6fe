"""Commands about the data: ``pourbaix elements`` (what the tables cover)."""

from __future__ import annotations

import json

__all__ = ["element_summary", "register"]

_SKIP = ("H", "O")


def _routes(species) -> list[str]:
    """Temperature routes the rows of one element allow (van't Hoff and heat-capacity routes; Anderson & Crerar 1993)."""
    routes = []
    if any(getattr(s, "hkf_omega_cal_mol", None) is not None for s in species):
        routes.append("HKF")
    if any(s.mk_a_j_molk is not None for s in species):
        routes.append("Maier-Kelley Cp")
    if any(s.cp_j_molk is not None for s in species):
        routes.append("constant Cp")
    if any(s.dhf_kj_mol is not None and s.s_j_molk is not None for s in species):
        routes.append("dH and S")
    return routes


def element_summary(table) -> list[dict]:
    """One entry per element of a species table.

    Parameters
    ----------
    table : SpeciesTable
        From :func:`pourbaix.tables.species.load_species`.

    Returns
    -------
    list of dict
        ``element``, ``species`` (count), ``solids``, ``aqueous``, ``sources`` (keys, most
        used first), ``routes`` (temperature routes some rows allow), ``from_memory``
        (rows whose note says their value was typed from memory), ``uncertainty_from_memory``
        (rows whose stated uncertainty was), sorted by element.
    """
    from pourbaix.tables.species import typed_from_memory

    by_element: dict[str, list] = {}
    for sp in table.species:
        for el in sp.elements:
            if el not in _SKIP:
                by_element.setdefault(el, []).append(sp)
    out = []
    for el in sorted(by_element):
        rows = by_element[el]
        counts: dict[str, int] = {}
        for s in rows:
            counts[s.source] = counts.get(s.source, 0) + 1
        out.append(
            {
                "element": el,
                "species": len(rows),
                "solids": sum(s.phase in ("s", "l") for s in rows),
                "aqueous": sum(s.phase == "aq" for s in rows),
                "sources": sorted(counts, key=lambda k: (-counts[k], k)),
                "routes": _routes(rows),
                "from_memory": sum(typed_from_memory(s)[0] for s in rows),
                "uncertainty_from_memory": sum(typed_from_memory(s)[1] for s in rows),
            }
        )
    return out


def cmd_elements(args) -> int:
    """Print every element with its number of species, sources and temperature routes."""
    from pourbaix.tables.species import load_species

    table = load_species(args.dataset, args.data)
    summary = element_summary(table)
    if args.json:
        print(json.dumps(summary, indent=2, ensure_ascii=False))
        return 0
    print(f"{len(summary)} elements in data set {table.dataset} (species hold the element)")
    print(f"{'element':<8} {'species':>7} {'solid':>5} {'aq':>4}  {'typed':>5}  routes; sources")
    for e in summary:
        sources = ", ".join(e["sources"][:4]) + (" …" if len(e["sources"]) > 4 else "")
        print(
            f"{e['element']:<8} {e['species']:>7} {e['solids']:>5} {e['aqueous']:>4}  "
            f"{e['from_memory'] or '':>5}  {', '.join(e['routes']) or 'ΔfG° only'}; {sources}"
        )
    print(
        "\n'typed': rows whose note says the value was typed from memory (see the note). "
        "`pourbaix species EL` lists the rows of one element with their sources."
    )
    return 0


def register(sub, add_conditions, map_kwargs):
    """Add ``elements`` to the main parser (``add_conditions``/``map_kwargs`` unused)."""
    p = sub.add_parser(
        "elements",
        help="list every element with its number of species, sources and temperature routes",
        description="List the elements the species tables cover: number of species (solid, "
        "aqueous), the sources cited most, the temperature routes their rows allow and how many "
        "rows were typed from memory.",
        epilog="example: pourbaix elements --json",
    )
    p.add_argument("--dataset", default="default", help="data set (see `pourbaix datasets`)")
    p.add_argument("--data", action="append", default=[], metavar="FILE")
    p.add_argument("--json", action="store_true", help="print JSON")
    p.set_defaults(func=cmd_elements)
