"""Read mineral solubility constants from the Thermoddem PHREEQC data file as printed.

The ``SOLUTION_SPECIES`` section holds one block per aqueous species: its
formation reaction from the master species (``1.000Tl+ + 1.000H2O = TlOH +
1.000H+``), ``log_k`` at 25 C and the same reference comment. The ``PHASES`` section holds one block per mineral: its name, its dissolution
reaction (``PbHPO4 + 1.000H+ = 1.000H2PO4- + 1.000Pb+2``), ``log_k`` at
25 C and a ``#References = LogK/DGf: CODE;`` comment naming the study the
constant comes from; the file's closing comment lines list each code with its
full citation (``# 74nri   Nriagu J.O., 1974. ...``). Values are kept as
printed strings so that the import converts them exactly and a test can
compare a table row against the file.

References
----------
Blanc, P.; Lassin, A.; Piantone, P.; Azaroual, M.; Jacquemet, N.; Fabbri, A.;
Gaucher, E. C. Thermoddem: a geochemical database focused on low temperature
water/rock interactions and waste materials. Appl. Geochem. 27, 2107-2116
(2012) (the database; this file is release V1.10 of 15 Dec 2020 shipped by
pygcc).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

__all__ = [
    "ThermoddemPhase",
    "read_thermoddem_phases",
    "read_thermoddem_references",
    "read_thermoddem_species",
]

_REFERENCE = re.compile(r"^#\s+(\d\d[a-z]?[a-z]+(?:/[a-z]+)?)\s{2,}(.+?)\s*$")


@dataclass(frozen=True)
class ThermoddemPhase:
    """One mineral block of the ``PHASES`` section.

    Attributes
    ----------
    name : str
        Mineral name as printed (``Jarosite(K)``).
    line : int
        1-based line of the name.
    formula : str
        The formula on the left of the reaction.
    reactants, products : tuple of (str, str)
        ``(coefficient, species)`` pairs besides the mineral, as printed.
    logk : str
        ``log_k`` at 25 C as printed.
    source : str
        Reference code of the log K (``LogK/DGf:``); ``Internal calculation``
        when the database derived it.
    """

    name: str
    line: int
    formula: str
    reactants: tuple[tuple[str, str], ...]
    products: tuple[tuple[str, str], ...]
    logk: str
    source: str


def _side(text: str) -> list[tuple[str, str]]:
    out = []
    for term in text.split(" + "):
        m = re.match(r"^\s*(\d+\.\d+)?\s*(\S+)\s*$", term)
        if not m:
            raise ValueError(f"cannot read the reaction term {term!r}")
        out.append((m.group(1) or "1", m.group(2)))
    return out


def _block_logk_source(lines: list[str], j: int) -> tuple[str, str, int]:
    """Read a block from line ``j`` to the next blank line.

    Returns its log_k, the first LogK/DGf source it cites, and the index of the blank line.
    """
    logk, source = "", ""
    while j < len(lines) and lines[j].strip():
        body = lines[j].strip()
        if body.startswith("log_k"):
            logk = body.split()[1]
        m = re.search(r"LogK/DGf:\s*([^;]+);", body)
        if m and not source:
            source = m.group(1).strip()
        j += 1
    return logk, source, j


def read_thermoddem_phases(path: str | Path) -> dict[str, ThermoddemPhase]:
    """Return name -> block of every mineral in the ``PHASES`` section."""
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    start = next(k for k, t in enumerate(lines) if t.strip() == "PHASES")
    out: dict[str, ThermoddemPhase] = {}
    k = start + 1
    while k < len(lines):
        text = lines[k]
        if text and text[0] not in " #\t" and k + 1 < len(lines) and " = " in lines[k + 1]:
            if re.fullmatch(r"[A-Z]+(_[A-Z]+)+|END", text.strip()):  # next keyword section
                break
            left, right = lines[k + 1].split(" = ", 1)
            terms = _side(left)
            logk, source, j = _block_logk_source(lines, k + 2)
            out[text.strip()] = ThermoddemPhase(
                text.strip(),
                k + 1,
                terms[0][1],
                tuple(terms[1:]),
                tuple(_side(right)),
                logk,
                source,
            )
            k = j
            continue
        k += 1
    return out


def read_thermoddem_species(path: str | Path) -> dict[str, ThermoddemPhase]:
    """Return product -> block of every formation reaction in ``SOLUTION_SPECIES``.

    Each block is returned in the form of a mineral's: ``formula`` is the species
    formed (the first term right of ``=``), ``reactants`` the left side and
    ``products`` the other terms of the right side.
    """
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    start = next(k for k, t in enumerate(lines) if t.strip() == "SOLUTION_SPECIES")
    out: dict[str, ThermoddemPhase] = {}
    for k in range(start + 1, len(lines)):
        text = lines[k]
        if text.strip() == "PHASES" or re.fullmatch(r"[A-Z]+(_[A-Z]+)+", text.strip()):
            break
        if " = " not in text or text.startswith((" ", "#", "\t")):
            continue
        left, right = text.split(" = ", 1)
        formed, *others = _side(right)
        logk, source, _ = _block_logk_source(lines, k + 1)
        out.setdefault(
            formed[1],
            ThermoddemPhase(
                formed[1], k + 1, formed[1], tuple(_side(left)), tuple(others), logk, source
            ),
        )
    return out


def read_thermoddem_references(path: str | Path) -> dict[str, str]:
    """Return code -> citation from the file's closing comment lines."""
    refs: dict[str, str] = {}
    for text in Path(path).read_text(encoding="latin-1").splitlines():
        m = _REFERENCE.match(text)
        if m:
            refs.setdefault(m.group(1), m.group(2))
    return refs
