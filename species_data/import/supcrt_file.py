"""Read a SUPCRT-family sequential parameter file (slop/speq format) as printed.

The file holds, in this order, minerals without phase transitions, minerals
with one, two and three transitions, gases and aqueous species. Each entry
starts with three text lines (name and formula; abbreviation and elemental
formula; ``ref:`` codes and date) followed by numbers:

* minerals and gases: ``G H S V`` [cal/mol, cal/mol, cal/(mol K), cm3/mol],
  then one Maier-Kelley line per phase ``a b c`` with, for all but the last
  phase, ``Ttr dHtr dVtr dPdT`` [K, cal/mol, cm3/mol, bar/K], then ``Tmax`` [K].
  Printed scale: a, b x 10^3, c x 10^-5 (Cp = a + bT + c/T^2 in cal/(mol K));
* aqueous species: ``G H S``, then ``a1 a2 a3 a4`` and ``c1 c2 omega Z``.
  Printed scale: a1 x 10, a2 x 10^-2, a4 x 10^-4, c2 x 10^-4, omega x 10^-5.

``999999`` stands for "no value". Values are returned as the printed
strings, so that the import can convert them exactly and a test can compare
a table row against the file.

References
----------
Johnson, J. W.; Oelkers, E. H.; Helgeson, H. C. SUPCRT92: a software package
for calculating the standard molal thermodynamic properties of minerals,
gases, aqueous species, and reactions from 1 to 5000 bar and 0 to 1000 C.
Comput. Geosci. 18, 899-947 (1992) (file layout and printed scale factors).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

__all__ = ["SupcrtEntry", "read_supcrt", "NO_VALUE"]

NO_VALUE = "999999"
_SECTION = {
    "minerals that do not undergo phase transitions": ("s", 0),
    "minerals that undergo one phase transition": ("s", 1),
    "minerals that undergo two phase transitions": ("s", 2),
    "minerals that undergo three phase transitions": ("s", 3),
    "gases": ("g", 0),
    "aqueous species": ("aq", 0),
}
_ELEMENT = re.compile(r"([A-Z][a-z]?)\((\d+)\)")
_CHARGE = re.compile(r"([+-])\((\d+)\)\s*$")


@dataclass(frozen=True)
class SupcrtEntry:
    """One species of the file, numbers as printed (strings).

    Attributes
    ----------
    name, formula_text, abbreviation, elemental : str
        The first two text lines, split at the first run of spaces.
    refs : tuple of str
        Reference codes of the ``ref:`` line, e.g. ``("G9",)``.
    phase : str
        ``s``, ``g`` or ``aq``.
    line : int
        1-based line number of the name line.
    numbers : tuple of tuple of str
        The numeric lines, each split into fields.
    composition : dict
        Atom counts from the elemental formula; ``charge`` the ionic charge.
    """

    name: str
    formula_text: str
    abbreviation: str
    elemental: str
    refs: tuple[str, ...]
    phase: str
    transitions: int
    line: int
    numbers: tuple[tuple[str, ...], ...]
    composition: tuple[tuple[str, int], ...]
    charge: int

    def field(self, row: int, column: int) -> str | None:
        """Printed field, or None for a missing or ``999999`` value."""
        try:
            text = self.numbers[row][column]
        except IndexError:
            return None
        return None if text.startswith(NO_VALUE) else text


def _composition(elemental: str) -> tuple[tuple[str, int], int]:
    counts: dict[str, int] = {}
    for symbol, number in _ELEMENT.findall(elemental):
        counts[symbol] = counts.get(symbol, 0) + int(number)
    m = _CHARGE.search(elemental)
    charge = 0
    if m:
        charge = int(m.group(2)) * (1 if m.group(1) == "+" else -1)
    return tuple(sorted(counts.items())), charge


def read_supcrt(path: str | Path) -> list[SupcrtEntry]:
    """Return every entry of a SUPCRT-family sequential file, in file order."""
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    entries: list[SupcrtEntry] = []
    phase, transitions = None, 0
    i = 0
    while i < len(lines):
        text = lines[i].strip()
        if text.lower() in _SECTION:
            phase, transitions = _SECTION[text.lower()]
            i += 1
            continue
        if text.startswith("*") or not text:
            i += 1
            continue
        if phase is None:
            i += 1
            continue
        if re.match(r"\d+\s", text):  # the closing count summary
            break
        head = lines[i].split(None, 1)
        abbr = lines[i + 1].split(None, 1)
        ref_line = lines[i + 2].split()
        refs = tuple(ref_line[0][len("ref:") :].split(",")) if ref_line else ()
        count = 3 if phase == "aq" else 3 + transitions
        numbers = tuple(tuple(lines[i + 3 + k].split()) for k in range(count))
        elemental = abbr[1].strip() if len(abbr) > 1 else ""
        composition, charge = _composition(elemental)
        entries.append(
            SupcrtEntry(
                name=head[0],
                formula_text=head[1].strip() if len(head) > 1 else "",
                abbreviation=abbr[0],
                elemental=elemental,
                refs=refs,
                phase=phase,
                transitions=transitions,
                line=i + 1,
                numbers=numbers,
                composition=composition,
                charge=charge,
            )
        )
        i += 3 + count
    return entries


def read_supcrt_references(path: str | Path) -> dict[str, str]:
    """Return code -> citation from the file's ``* CODE ... citation`` comment blocks."""
    refs: dict[str, str] = {}
    code, text = None, []
    for line in Path(path).read_text(encoding="latin-1").splitlines():
        m = re.match(r"^\*\s*([A-Za-z0-9]+)\s*\.\.\.\s*(.*)$", line)
        if m:
            if code:
                refs[code] = " ".join(text)
            code, text = m.group(1), [m.group(2).strip()]
        elif code and line.startswith("*") and line[1:].strip():
            text.append(line[1:].strip())
        elif code:
            refs[code] = " ".join(text)
            code, text = None, []
    return refs
