"""Read the LLNL ``thermo.com.V8.R6`` thermodynamic data file (GWB oct94 format).

Each species block opens with its name (minerals add ``type=``) and may carry
the comment lines ``reference-state data source = CODE`` and ``delG0f``,
``delH0f``, ``S0PrTr`` (or ``S0``) with their units (kcal/mol or kj/mol;
cal/(mol*K) or j/(mol*K)). The ``references`` section maps each code to a
full citation. Values are kept as printed strings with their units so that
the import converts them exactly and a test can compare a row with the file.

References
----------
Delany, J. M.; Lundeen, S. R. The LLNL thermochemical database. Lawrence
Livermore National Laboratory report UCRL-21658 (1990) (the database and its
file layout; this file is the thermo.com.V8.R6 release shipped by pygcc).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

__all__ = ["LlnlEntry", "read_llnl", "read_llnl_references", "SECTIONS"]

SECTIONS = ("basis species", "redox couples", "aqueous species", "minerals", "gases", "oxides")
_SECTION = re.compile(r"^\s*\d+\s+(" + "|".join(SECTIONS) + r")\s*$")
_VALUE = re.compile(r"^\*\s+(delG0f|delH0f|S0PrTr|S0)\s*=\s*(\S+)\s*(\S*)")
_SOURCE = re.compile(r"^\*\s+(?:reference-state data|logk) source =\s*(.*?)\s*$")
_CHARGE = re.compile(r"charge=\s*(-?\d+\.\d*)")
_FORMULA = re.compile(r"^\s*formula=\s*(\S*)")


@dataclass(frozen=True)
class LlnlEntry:
    """One species block of the file.

    Attributes
    ----------
    name : str
        Species name as printed (the first word of the block).
    section : str
        One of :data:`SECTIONS`.
    line : int
        1-based line of the name.
    formula : str
        The ``formula=`` text of minerals and gases (empty when absent).
    charge : float or None
        ``charge=`` of aqueous species.
    source : str
        Reference code (``92gre/fug``); empty when none is printed.
    values : dict
        ``{"delG0f": (number, unit), ...}`` as printed; ``N/A`` numbers kept.
    """

    name: str
    section: str
    line: int
    formula: str
    charge: float | None
    source: str
    values: tuple[tuple[str, str, str], ...]
    reaction: tuple[tuple[str, str], ...] = ()
    logk: tuple[str, ...] = ()

    def value(self, key: str) -> tuple[str, str] | None:
        """Printed ``(number, unit)`` of ``delG0f``, ``delH0f`` or ``S0``; None if absent/N/A."""
        for k, number, unit in self.values:
            if (k == key or (key == "S0" and k == "S0PrTr")) and number != "N/A":
                return number, unit
        return None


def read_llnl(path: str | Path) -> list[LlnlEntry]:
    """Return every species block that follows a section heading, in file order."""
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    entries: list[LlnlEntry] = []
    section = None
    i = 0
    while i < len(lines):
        text = lines[i]
        m = _SECTION.match(text)
        if m:
            section = m.group(1)
            i += 1
            continue
        if text.startswith("-end-"):
            section = None
            i += 1
            continue
        if section is None or not text.strip() or text[0] in " *":
            i += 1
            continue
        start = i
        name = text.split()[0]
        block = []
        i += 1
        while i < len(lines) and lines[i].strip() and not lines[i].startswith("-end-"):
            block.append(lines[i])
            i += 1
        formula, charge, source, values = "", None, "", []
        reaction, logk = _reaction(block)
        for b in block:
            if (f := _FORMULA.match(b.lstrip("*"))) and not formula:
                formula = f.group(1)
            if (c := _CHARGE.search(b)) and charge is None:
                charge = float(c.group(1))
            if (s := _SOURCE.match(b)) and not source:
                source = s.group(1)
            if v := _VALUE.match(b):
                values.append((v.group(1), v.group(2), v.group(3)))
        entries.append(
            LlnlEntry(
                name, section, start + 1, formula, charge, source, tuple(values), reaction, logk
            )
        )
    return entries


def _reaction(block: list[str]) -> tuple[tuple[tuple[str, str], ...], tuple[str, ...]]:
    """``(coefficient, species)`` pairs of the dissociation reaction and its 8 log K values."""
    for k, b in enumerate(block):
        m = re.match(r"^\s*(\d+) species in reaction", b)
        if not m:
            continue
        count = int(m.group(1))
        tokens: list[str] = []
        j = k + 1
        while len(tokens) < 2 * count and j < len(block):
            tokens += block[j].split()
            j += 1
        pairs = tuple(zip(tokens[0::2], tokens[1::2], strict=False))
        numbers: list[str] = []
        while len(numbers) < 8 and j < len(block) and not block[j].startswith("*"):
            numbers += block[j].split()
            j += 1
        return pairs, tuple(numbers)
    return (), ()


def read_llnl_references(path: str | Path) -> dict[str, str]:
    """Return code -> citation from the file's ``references`` section."""
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    try:
        start = next(k for k, t in enumerate(lines) if t.strip() == "references")
    except StopIteration:
        return {}
    refs: dict[str, str] = {}
    block: list[str] = []
    for t in lines[start + 1 :] + [""]:
        if t.strip() in ("", "stop."):
            if len(block) >= 2:
                refs[block[0].strip()] = " ".join(x.strip() for x in block[1:])
            block = []
            continue
        block.append(t)
    return refs
