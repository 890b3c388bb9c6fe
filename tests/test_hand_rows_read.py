"""Hand-table rows whose values the import reads from the LLNL file (once typed from memory).

Rows of the NBS82 tables and Baes & Mesmer's hydrolysis constants that the
LLNL thermo.com.V8.R6 file (shipped by pygcc) reprints under the same
compilation's reference code (82wag/eva, 76bae/mes) take their values from it
(species_data/import/run_import.py). Checked here against the file by a plain
text scan, independently of the import's reader: printed delG0f, delH0f and S0
(kcal and cal x 4.184 exactly; NIST SP 811), or for a hydrolysis constant the
dG recomputed from the printed log K at 25 C with the tables' values of the
other species.
"""

import math
import re
from pathlib import Path

import pygcc
import pytest

from pourbaix.tables.species import load_species

KCAL = 4.184  # [J/cal] thermochemical calorie (NIST SP 811)
RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol] (CODATA 2018 R)
LLNL = Path(pygcc.__file__).parent / "default_db" / "thermo.com.dat"
MARK = "read by species_data/import from LLNL thermo.com.dat entry '"
# the hand tables the import reads such rows for (run_import.HAND_TABLES)
HAND_TABLES = (
    "carbon", "chromium", "cobalt", "iron", "lead", "manganese", "nitrogen", "sulfur", "titanium",
)  # fmt: skip


def _blocks():
    text = LLNL.read_text(encoding="latin-1")
    out = {}
    for chunk in re.split(r"\n\s*\n", text):
        first = chunk.lstrip("\n").split("\n", 1)[0]
        if first and first[0] not in " *":
            out.setdefault(first.split()[0], chunk)
    return out


def _species_name(name):
    if name == "H2O":
        return "H2O", "l"
    m = re.match(r"^(.*?)([+-]+)$", name)
    if not m:
        return name, "aq"
    n = len(m.group(2))
    return f"{m.group(1)}^{'' if n == 1 else n}{m.group(2)[0]}", "aq"


@pytest.fixture(scope="module")
def read_rows():
    table = load_species()
    rows = [
        s
        for s in table.species
        if MARK in (s.note or "")
        and s.source in ("NBS82", "BM76")
        and Path(s.origin.split(":")[0]).stem in HAND_TABLES
    ]
    return table, rows


def test_enough_rows_read(read_rows):
    _, rows = read_rows
    assert len(rows) >= 20


def test_values_equal_the_file(read_rows):
    table, rows = read_rows
    blocks = _blocks()
    for s in rows:
        name = re.search(MARK + r"([^']+)'", s.note).group(1)
        block = blocks[name]
        assert ("76bae/mes" if s.source == "BM76" else "82wag/eva") in block, s.name
        if s.source == "BM76":
            m = re.search(r"species in reaction\n(.*?)\n\s*([-\d.]+)\s+([-\d.]+)", block, re.S)
            pairs = m.group(1).split()
            g = RT_LN10 * float(m.group(3))
            for c, n in zip(pairs[0::2], pairs[1::2], strict=True):
                if n != "H+":
                    g += float(c) * table.get(*_species_name(n)).dgf_kj_mol
            assert s.dgf_kj_mol == pytest.approx(g, abs=1e-5), s.name
            continue
        for value, key in ((s.dgf_kj_mol, "delG0f"), (s.dhf_kj_mol, "delH0f"), (s.s_j_molk, "S0")):
            m = re.search(r"\*\s+" + key + r"\S*\s*=\s*(\S+)\s*(\S*)", block)
            number = float(m.group(1)) * (
                KCAL if m.group(2).lower().startswith(("kcal", "cal")) else 1
            )
            assert value == pytest.approx(number, abs=1e-5), (s.name, key)


def test_cross_checks_state_the_file_and_the_tables(read_rows):
    """Rows still typed from memory carry the LLNL file's constant of another study.

    Both numbers of the remark are recomputed: the file's printed log K at 25 C, and
    the row's own constant for the same dissociation with the tables' values.
    """
    table, _ = read_rows
    blocks = _blocks()
    checked = close = 0
    for s in table.species:
        m = re.search(
            r"cross-check: the LLNL file's entry '([^']+)' \(reference code [^)]*\) gives log K "
            r"(\S+) for its dissociation where this row gives (\S+) with these tables",
            s.note or "",
        )
        if not m:
            continue
        block = blocks[m.group(1)]
        r = re.search(r"species in reaction\n(.*?)\n\s*([-\d.]+)\s+([-\d.]+)", block, re.S)
        pairs = r.group(1).split()
        basis = sum(
            float(c) * table.get(*_species_name(n)).dgf_kj_mol
            for c, n in zip(pairs[0::2], pairs[1::2], strict=True)
            if n != "H+"
        )
        assert float(m.group(2)) == pytest.approx(float(r.group(3)), abs=0.006), s.name
        ours = (s.dgf_kj_mol - basis) / RT_LN10
        assert float(m.group(3)) == pytest.approx(ours, abs=0.006), s.name
        checked += 1
        close += abs(ours - float(r.group(3))) <= 0.3
    assert checked >= 15
    # most typed constants agree with the other study within 0.3 log units
    assert close >= checked / 2
