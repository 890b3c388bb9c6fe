"""Load the phase-transition table of minerals (``species_data/transitions/*.csv``)."""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

from pourbaix.errors import DataFileError, FormulaError
from pourbaix.tables.formula import PHASES, parse_formula
from pourbaix.tables.species import (
    data_dir,
    parse_number,
    read_csv_rows,
    read_sources,
    source_files,
)

__all__ = [
    "TRANSITION_COLUMNS",
    "PhaseTransition",
    "load_transitions",
    "read_transitions_file",
]

#: Column -> (unit as written in messages, required); DEVELOPERS.md, "Phase transitions".
TRANSITION_COLUMNS: dict[str, tuple[str, bool]] = {
    "formula": ("text", True),
    "phase": ("aq, s, l or g", True),
    "form": ("text", False),
    "t_k": ("K", True),
    "dh_j_mol": ("J/mol", True),
    "dv_cm3_mol": ("cm3/mol", False),
    "dpdt_bar_k": ("bar/K", False),
    "mk_a_j_molk": ("J/(mol K)", True),
    "mk_b_j_molk2": ("J/(mol K^2)", True),
    "mk_c_jk_mol": ("J K/mol", True),
    "source": ("key into sources*.csv", True),
}
_NUMERIC = (
    "t_k",
    "dh_j_mol",
    "dv_cm3_mol",
    "dpdt_bar_k",
    "mk_a_j_molk",
    "mk_b_j_molk2",
    "mk_c_jk_mol",
)


@dataclass(frozen=True)
class PhaseTransition:
    """One phase transition of a mineral, with the heat capacity of the phase above it.

    Attributes
    ----------
    name : str
        Species name (canonical formula plus ``:form``) the transition belongs to.
    phase : str
        Phase of the species row (``s`` for minerals).
    t_k : float
        Transition temperature at 1 bar [K].
    dh_j_mol : float
        Enthalpy of transition [J/mol].
    dv_cm3_mol : float or None
        Volume of transition [cm3/mol].
    dpdt_bar_k : float or None
        Clapeyron slope of the transition [bar/K].
    mk_a_j_molk, mk_b_j_molk2, mk_c_jk_mol : float
        Maier-Kelley coefficients of the phase above the transition,
        Cp = a + bT + c/T^2 [J/(mol K), J/(mol K^2), J K/mol].
    source : str
        Key into the sources.
    origin : str
        ``path:line`` of the row.

    References
    ----------
    Helgeson, H. C.; Delany, J. M.; Nesbitt, H. W.; Bird, D. K. Summary and
    critique of the thermodynamic properties of rock-forming minerals.
    Am. J. Sci. 278-A (1978).
    """

    name: str
    phase: str
    t_k: float
    dh_j_mol: float
    dv_cm3_mol: float | None
    dpdt_bar_k: float | None
    mk_a_j_molk: float
    mk_b_j_molk2: float
    mk_c_jk_mol: float
    source: str
    origin: str = ""

    @property
    def key(self) -> tuple[str, str]:
        """``(name, phase)`` of the species the transition belongs to."""
        return (self.name, self.phase)


def read_transitions_file(
    path: str | Path,
    known_sources: Mapping[str, str] | None = None,
    *,
    display: str | None = None,
) -> dict[tuple[str, str], tuple[PhaseTransition, ...]]:
    """Read a phase-transition table.

    Parameters
    ----------
    path : str or Path
        CSV with the columns of :data:`TRANSITION_COLUMNS`.
    known_sources : Mapping, optional
        When given, every ``source`` must be one of its keys.
    display : str, optional
        Name of the file in messages.

    Returns
    -------
    dict
        ``(name, phase)`` -> transitions in rising temperature.

    Raises
    ------
    DataFileError
        With every problem of the file at once.
    """
    found, problems = _read_transitions(Path(path), display or str(path), known_sources)
    if problems:
        raise DataFileError(problems)
    return found


def _read_transitions(path: Path, display: str, known_sources) -> tuple[dict, list]:
    problems: list = []
    rows = read_csv_rows(path, display, problems)
    if not rows:
        return {}, problems
    hline, header = rows[0]
    cols = {name: i for i, name in enumerate(header)}
    for col, name in enumerate(header, start=1):
        if name not in TRANSITION_COLUMNS:
            problems.append(
                (
                    display,
                    hline,
                    col,
                    f"unknown column {name!r} (valid: {', '.join(TRANSITION_COLUMNS)})",
                )
            )
    for need, (unit, required) in TRANSITION_COLUMNS.items():
        if required and need not in cols:
            problems.append((display, hline, 0, f"missing required column {need!r} ({unit})"))
    if problems:
        return {}, problems
    found: dict[tuple[str, str], list[PhaseTransition]] = {}
    for lineno, fields in rows[1:]:
        row = _read_row(fields, header, cols, display, lineno, known_sources, problems)
        if row is not None:
            found.setdefault(row.key, []).append(row)
    result = {}
    for key, items in found.items():
        items.sort(key=lambda t: t.t_k)
        for a, b in zip(items, items[1:], strict=False):
            if a.t_k == b.t_k:
                line = int(b.origin.rsplit(":", 1)[1])
                problems.append((display, line, 0, f"two transitions of {key[0]} at {b.t_k} K"))
        result[key] = tuple(items)
    return result, problems


def _read_row(fields, header, cols, display, lineno, known_sources, problems):
    n0 = len(problems)
    if len(fields) != len(header):
        problems.append((display, lineno, 0, f"{len(fields)} fields, the header has {len(header)}"))
        return None

    def cell(name: str) -> str:
        return fields[cols[name]] if name in cols else ""

    def add(name: str, msg: str) -> None:
        problems.append((display, lineno, cols[name] + 1 if name in cols else 0, msg))

    values: dict[str, float | None] = {}
    for name, (unit, required) in TRANSITION_COLUMNS.items():
        if required and not cell(name):
            add(name, f"missing value for required column {name!r} ({unit})")
    for name in _NUMERIC:
        text = cell(name)
        values[name] = None
        if not text:
            continue
        x = parse_number(text)
        if x is None or not math.isfinite(x):
            add(name, f"{name}: {text!r} is not a finite number ({TRANSITION_COLUMNS[name][0]})")
        else:
            values[name] = x
    if values.get("t_k") is not None and values["t_k"] <= 0:
        add("t_k", f"t_k {values['t_k']} K must be positive")
    phase = cell("phase")
    if phase and phase not in PHASES:
        add("phase", f"phase {phase!r} is not one of aq, s, l, g")
    formula = None
    if cell("formula"):
        try:
            formula = parse_formula(cell("formula"))
        except FormulaError as exc:
            add("formula", str(exc))
    source = cell("source")
    if source and known_sources is not None and source not in known_sources:
        add("source", f"unknown source key {source!r}")
    if len(problems) > n0 or formula is None:
        return None
    form = cell("form") or None
    return PhaseTransition(
        name=formula.text + (f":{form}" if form else ""),
        phase=phase,
        t_k=values["t_k"],
        dh_j_mol=values["dh_j_mol"],
        dv_cm3_mol=values["dv_cm3_mol"],
        dpdt_bar_k=values["dpdt_bar_k"],
        mk_a_j_molk=values["mk_a_j_molk"],
        mk_b_j_molk2=values["mk_b_j_molk2"],
        mk_c_jk_mol=values["mk_c_jk_mol"],
        source=source,
        origin=f"{display}:{lineno}",
    )


@functools.lru_cache(maxsize=2)
def _embedded(root: Path) -> dict[tuple[str, str], tuple[PhaseTransition, ...]]:
    sources: dict[str, str] = {}
    problems: list = []
    for f in source_files(root):
        got, probs = read_sources(f, "species_data/" + f.name)
        sources.update(got)
        problems += probs
    folder = root / "transitions"
    found: dict[tuple[str, str], tuple[PhaseTransition, ...]] = {}
    if folder.is_dir():
        for f in sorted(folder.glob("*.csv")):
            disp = "species_data/transitions/" + f.name
            got, probs = _read_transitions(f, disp, sources)
            problems += probs
            for key, items in got.items():
                found[key] = tuple(sorted(found.get(key, ()) + items, key=lambda t: t.t_k))
    if problems:
        raise DataFileError(problems)
    return found


def load_transitions() -> Mapping[tuple[str, str], tuple[PhaseTransition, ...]]:
    """Return the embedded phase transitions, ``(name, phase)`` -> transitions by temperature.

    Returns
    -------
    Mapping
        Empty when the tables hold no transitions.

    Raises
    ------
    DataFileError
        A faulty transitions file.
    """
    return _embedded(data_dir())
