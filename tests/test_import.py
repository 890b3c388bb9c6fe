"""The data import (species_data/import/run_import.py) against the files it reads.

Checks, each against something outside the project:
- re-running the import reproduces the committed tables byte for byte;
- every imported value equals the value printed in its source file: the LLNL
  thermo.com.V8.R6 file and the SUPCRT speq21.dat file shipped by pygcc, and the
  CRC Handbook table shipped by chemicals (read here with plain text scans,
  independently of the import's readers); calories are thermochemical
  (1 cal = 4.184 J exactly; NIST SP 811);
- the LLNL entries left out as defective really disagree with their own log K.
"""

import csv
import importlib.util
import math
import re
import sys
from pathlib import Path

import pytest

from pourbaix.tables.formula import parse_formula

ROOT = Path(__file__).resolve().parents[1]
DATA = ROOT / "species_data"
IMPORT = DATA / "import" / "run_import.py"
KCAL = 4.184  # [J/cal], thermochemical calorie (NIST SP 811)


def _load_import():
    spec = importlib.util.spec_from_file_location("run_import", IMPORT)
    module = importlib.util.module_from_spec(spec)
    sys.modules.setdefault("run_import", module)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def run_import():
    return _load_import()


@pytest.fixture(scope="module")
def built(run_import):
    return run_import.build(DATA)


def _imported_rows():
    rows = []
    for f in sorted(DATA.glob("*.csv")):
        if f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        with f.open(newline="", encoding="utf-8") as handle:
            for line, row in enumerate(csv.DictReader(handle), start=2):
                if row["note"].startswith("read by species_data/import"):
                    rows.append((f"{f.name}:{line}", row))
    return rows


def test_import_reproduces_the_committed_tables(built):
    files, report = built
    assert len(files) > 30
    for name, text in files.items():
        committed = (DATA / name).read_text(encoding="utf-8")
        assert committed == text, f"species_data/{name} differs from a fresh import"
    assert (DATA / "import" / "import_report.txt").read_text(encoding="utf-8") == report


def _llnl_text(run_import):
    return (run_import.pygcc_db() / "thermo.com.dat").read_text(encoding="latin-1")


def _llnl_blocks(text):
    """Name -> text of each blank-line separated block (first word of its first line)."""
    blocks = {}
    for chunk in re.split(r"\n\s*\n", text):
        first = chunk.lstrip("\n").split("\n", 1)
        if first and first[0] and first[0][0] not in " *":
            blocks.setdefault(first[0].split()[0], chunk)
    return blocks


def _printed(block, key):
    m = re.search(r"\*\s+" + key + r"\s*=\s*(\S+)\s*(\S*)", block)
    if not m or m.group(1) == "N/A":
        return None
    return float(m.group(1)), m.group(2).lower()


def test_every_imported_value_equals_its_source(run_import):
    llnl = _llnl_blocks(_llnl_text(run_import))
    supcrt = (run_import.pygcc_db() / "speq21.dat").read_text(encoding="latin-1")
    crc = {}
    with run_import.crc_solids_file().open(newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle, delimiter="\t"):
            crc[row["CAS"]] = row
    with run_import.crc_ions_file().open(newline="", encoding="utf-8") as handle:
        ions = {r["Formula"]: r for r in csv.DictReader(handle, delimiter="\t")}
    rows = _imported_rows()
    assert len(rows) > 500
    counted = {"llnl": 0, "supcrt": 0, "crc": 0, "thermoddem": 0, "log K": 0}
    for where, row in rows:
        note = row["note"]
        if " Thermoddem PHREEQC_ThermoddemV1.10_15Dec2020.dat phase " in note:
            counted["thermoddem"] += 1
            name = re.search(r"phase '([^']+)'", note).group(1)
            reaction, log_k = _thermoddem_printed(run_import, name)
            assert float(row["dgf_kj_mol"]) == pytest.approx(
                _gibbs_from_log_k(reaction, log_k), abs=1e-6
            ), where
            continue
        if " Thermoddem PHREEQC_ThermoddemV1.10_15Dec2020.dat species " in note:
            counted["thermoddem"] += 1
            name = re.search(r"species '([^']+)'", note).group(1)
            text = (run_import.pygcc_db() / "PHREEQC_ThermoddemV1.10_15Dec2020.dat").read_text(
                encoding="latin-1"
            )
            m = re.search(r"\n(.*) = " + re.escape(name) + r"( \+ .*)?\n.*\n\s*log_k\s+(\S+)", text)
            # formed species = left side - other right-side terms - RT ln10 log K
            pairs = [(1.0, t) for t in m.group(1).split(" + ")]
            pairs += [(-1.0, t) for t in (m.group(2) or "").split(" + ")[1:]]
            reaction = []
            for sign, term in pairs:
                c, n = re.match(r"([\d.]+)(\S+)", term.strip()).groups()
                reaction.append((-sign * float(c), _thermoddem_name(n)))
            expected = -_gibbs_from_log_k(reaction, float(m.group(3)))
            assert float(row["dgf_kj_mol"]) == pytest.approx(expected, abs=1e-6), where
            continue
        if " LLNL thermo.com.dat entry " in note and "dG converted from the entry's log K" in note:
            counted["log K"] += 1
            name = re.search(r"entry '([^']+)'", note).group(1)
            numbers = re.search(
                r"species in reaction\n(.*?)\n\s*([-\d.]+)\s+([-\d.]+)", llnl[name], re.S
            )
            pairs = numbers.group(1).split()
            reaction = [
                (float(c), _llnl_name(n)) for c, n in zip(pairs[0::2], pairs[1::2], strict=True)
            ]
            assert float(row["dgf_kj_mol"]) == pytest.approx(
                _gibbs_from_log_k(reaction, float(numbers.group(3))), abs=1e-6
            ), where
            assert row["dhf_kj_mol"] == row["s_j_molk"] == "" or "dH and S from" in note, where
            continue
        if " LLNL thermo.com.dat entry " in note:
            counted["llnl"] += 1
            name = re.search(r"entry '([^']+)'", note).group(1)
            block = llnl[name]
            relabelled = "labels these numbers kJ but they are kcal" in note
            for col, key, scale in (
                ("dgf_kj_mol", "delG0f", 1.0),
                ("dhf_kj_mol", "delH0f", 1.0),
                ("s_j_molk", r"(?:S0PrTr|S0)", 1.0),
            ):
                got = _printed(block, key)
                if got is None:
                    assert row[col] == "", (where, col)
                    continue
                number, unit = got
                calories = unit.startswith(("kcal", "cal")) or relabelled
                expected = number * (KCAL if calories else 1.0) * scale
                assert float(row[col]) == pytest.approx(expected, abs=1e-6), (where, col)
        elif " SUPCRT speq21.dat entry " in note:
            counted["supcrt"] += 1
            name = re.search(r"entry '([^']+)'", note).group(1)
            start = supcrt.index("\n " + name + " ") + 1
            m = re.match(r".*\n.*\n.*\n(.*)", supcrt[start:])
            g, h, s = (float(x) for x in m.group(1).split()[:3])
            # a set anchored on an NBS82 ion: the note states the shift per atom and the ion's
            # value, checked here against the CRC table of aqueous ions
            moved = 0.0
            anchor = re.search(
                r"shifted by ([-+\d.]+) kJ/mol \(([-+\d.]+) per (\w+)\): .*?NBS82 (\S+) of the "
                r"CRC table of aqueous ions \(([-\d.]+) kJ/mol, against ([-\d.]+) here\)",
                note,
            )
            if anchor:
                moved = float(anchor.group(1))
                count = parse_formula(row["formula"]).composition[anchor.group(3)]
                assert moved == pytest.approx(count * float(anchor.group(2)), abs=1e-3), where
                ion = parse_formula(anchor.group(4))
                crc_ion = ions[f"{ion.text.split('^')[0]}+{ion.charge}"]
                assert float(anchor.group(5)) == float(crc_ion["Gf(aq)"]) / 1000, where
                ion_printed = float(anchor.group(6))
                assert float(anchor.group(2)) == pytest.approx(
                    (float(anchor.group(5)) - ion_printed) / ion.composition[anchor.group(3)],
                    abs=1e-3,
                ), where
            assert float(row["dgf_kj_mol"]) == pytest.approx(g * KCAL / 1000 + moved, abs=1e-6), (
                where
            )
            if row["dhf_kj_mol"]:
                assert float(row["dhf_kj_mol"]) == pytest.approx(h * KCAL / 1000 + moved, abs=1e-6)
            if row["s_j_molk"]:
                assert float(row["s_j_molk"]) == pytest.approx(s * KCAL, abs=1e-6), where
        elif " the CRC table (CAS " in note:
            counted["crc"] += 1
            src = crc[row["cas"]]
            if row["phase"] == "g":
                assert float(row["s_j_molk"]) == float(src["S0g"]), where
            else:
                assert float(row["dgf_kj_mol"]) * 1000 == pytest.approx(float(src["Gfs"] or 0))
                assert float(row["s_j_molk"]) == float(src["S0s"]), where
        else:
            pytest.fail(f"{where}: imported row names no source file")
    assert all(n > 5 for k, n in counted.items() if k not in ("thermoddem", "log K")), counted
    assert counted["thermoddem"] >= 2 and counted["log K"] >= 5, counted


def _thermoddem_printed(run_import, name):
    """(coefficient, species) of a Thermoddem phase's reaction (reactants negative) and log_k."""
    text = (run_import.pygcc_db() / "PHREEQC_ThermoddemV1.10_15Dec2020.dat").read_text(
        encoding="latin-1"
    )
    start = text.index("\nPHASES\n")
    m = re.search(r"\n" + re.escape(name) + r"\n(.*) = (.*)\n\s*log_k\s+(\S+)", text[start:])
    pairs = []
    for side, sign in ((m.group(1), -1), (m.group(2), 1)):
        for term in side.split(" + ")[(1 if sign < 0 else 0) :]:
            c, n = re.match(r"([\d.]+)(\S+)", term.strip()).groups()
            pairs.append((sign * float(c), _thermoddem_name(n)))
    return pairs, float(m.group(3))


def _thermoddem_name(name):
    if name == "H2O":
        return "H2O", "l"
    m = re.match(r"^(.*?)([+-])(\d*)$", name)
    return f"{m.group(1)}^{m.group(3)}{m.group(2)}", "aq"


def _llnl_name(name):
    if name == "H2O":
        return "H2O", "l"
    m = re.match(r"^(.*?)([+-]+)$", name)
    n = len(m.group(2))
    return f"{m.group(1)}^{'' if n == 1 else n}{m.group(2)[0]}", "aq"


def _gibbs_from_log_k(reaction, log_k):
    """dG of the solid or complex dissolved by ``reaction`` (products positive) [kJ/mol].

    dG(species) = sum(nu dG(products)) + RT ln10 log K, with the tables' values of the other
    species (the dissociation reaction as both files print it; H+ is zero by convention).
    """
    from pourbaix.tables.species import load_species

    table = load_species()
    rt_ln10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol] (CODATA 2018 R)
    total = rt_ln10 * log_k
    for c, (name, phase) in reaction:
        if name != "H^+":
            total += c * table.get(name, phase).dgf_kj_mol
    return total


def test_left_out_entries_disagree_with_their_own_log_k(run_import, built):
    """Each 'defect' in the report: printed delG0f against the entry's log K at 25 C."""
    _, report = built
    defects = re.findall(r"left out (\S+): delG0f differs by ([+-][\d.]+)", report)
    assert defects
    entries = {
        e.name: e
        for e in sys.modules["llnl_file"].read_llnl(run_import.pygcc_db() / "thermo.com.dat")
    }
    gibbs = {
        n: run_import.to_kj(*e.value("delG0f")) for n, e in entries.items() if e.value("delG0f")
    }
    rt_ln10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol] (CODATA 2018 R)
    for name, stated in defects:
        e = entries[name]
        implied = sum(float(c) * gibbs[s] for c, s in e.reaction) + rt_ln10 * float(e.logk[1])
        assert abs(gibbs[name] - implied) > 1.0
        assert gibbs[name] - implied == pytest.approx(float(stated), abs=0.06)


def test_every_imported_source_key_is_cited():
    from pourbaix.tables.species import load_species

    table = load_species()
    for _, row in _imported_rows():
        assert table.sources[row["source"]].strip(), row["source"]
        assert "in review" not in table.sources[row["source"]]


def _supcrt_printed(text):
    """Scaled HKF 7-tuples of aqueous entries and Maier-Kelley triples of minerals (plain scan).

    Printed scale (Johnson, Oelkers & Helgeson 1992, SUPCRT92): a1 x 10, a2 x 10^-2,
    a4 x 10^-4, c2 x 10^-4, omega x 10^-5 [cal]; Maier-Kelley a, b x 10^3, c x 10^-5 [cal].
    """
    lines = text.splitlines()
    start = next(k for k, t in enumerate(lines) if t.strip() == "aqueous species")
    hkf, mk, temperatures = set(), set(), set()
    for k, t in enumerate(lines):
        if not t.lower().startswith(" ref:"):
            continue
        if k > start:
            a = [float(x) for x in lines[k + 2].split()[:4]]
            c = [float(x) for x in lines[k + 3].split()[:3]]
            scaled = (a[0] / 10, a[1] * 100, a[2], a[3] * 1e4, c[0], c[1] * 1e4, c[2] * 1e5)
            hkf.add(tuple(round(v, 6) for v in scaled))
        else:
            j = k + 2
            while (
                j < len(lines) and len(lines[j].split()) >= 3 and not lines[j].startswith(" ref:")
            ):
                f = lines[j].split()
                try:
                    a, b, c = (float(x) for x in f[:3])
                except ValueError:
                    break
                mk.add((round(a * KCAL, 4), round(b * 1e-3 * KCAL, 6), round(c * 1e5 * KCAL)))
                if len(f) >= 4:
                    temperatures.add(float(f[3]))
                j += 1
    return hkf, mk, temperatures


def test_every_imported_parameter_equals_its_source(run_import):
    text = (run_import.pygcc_db() / "speq21.dat").read_text(encoding="latin-1")
    hkf, mk, temperatures = _supcrt_printed(text)
    columns = (
        "hkf_a1_cal_mol_bar",
        "hkf_a2_cal_mol",
        "hkf_a3_cal_k_mol_bar",
        "hkf_a4_cal_k_mol",
        "hkf_c1_cal_mol_k",
        "hkf_c2_cal_k_mol",
        "hkf_omega_cal_mol",
    )
    n_hkf = n_mk = 0
    for f in sorted(DATA.glob("*.csv")):
        if f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        with f.open(newline="", encoding="utf-8") as handle:
            for line, row in enumerate(csv.DictReader(handle), start=2):
                if row.get("hkf_omega_cal_mol"):
                    got = tuple(round(float(row[c]), 6) for c in columns)
                    assert got in hkf, f"{f.name}:{line} HKF parameters not in speq21.dat"
                    n_hkf += 1
                if row.get("mk_a_j_molk") and row.get("hkf_source"):
                    got = (
                        round(float(row["mk_a_j_molk"]), 4),
                        round(float(row["mk_b_j_molk2"]), 6),
                        round(float(row["mk_c_jk_mol"])),
                    )
                    assert got in mk, f"{f.name}:{line} Maier-Kelley coefficients not in speq21.dat"
                    n_mk += 1
    assert n_hkf > 200 and n_mk > 40
    with (DATA / "transitions" / "phase_transitions.csv").open(encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert rows
    for row in rows:
        assert float(row["t_k"]) in temperatures
        got = (
            round(float(row["mk_a_j_molk"]), 4),
            round(float(row["mk_b_j_molk2"]), 6),
            round(float(row["mk_c_jk_mol"])),
        )
        assert got in mk, row


def test_hand_rows_said_to_equal_the_crc_table_do(run_import):
    """Rows whose note says their values equal the CRC table: dG, dH, S against it."""
    with run_import.crc_solids_file().open(newline="", encoding="utf-8") as handle:
        solids = {r["CAS"]: r for r in csv.DictReader(handle, delimiter="\t")}
    with run_import.crc_ions_file().open(newline="", encoding="utf-8") as handle:
        ions = {r["Formula"]: r for r in csv.DictReader(handle, delimiter="\t")}
    checked = 0
    for f in sorted(DATA.glob("*.csv")):
        if f.name.startswith("sources") or f.name == "datasets.csv":
            continue
        with f.open(newline="", encoding="utf-8") as handle:
            for line, row in enumerate(csv.DictReader(handle), start=2):
                m = re.search(
                    r"equal the CRC table (?:of aqueous ions \(([^)]+)\)|\(CAS)", row["note"]
                )
                if not m:
                    continue
                if m.group(1):
                    src = ions[m.group(1)]
                    pairs = (
                        ("dgf_kj_mol", src["Gf(aq)"], 1000),
                        ("dhf_kj_mol", src["Hf(aq)"], 1000),
                    )
                    pairs += (("s_j_molk", src["S(aq)"], 1),)
                else:
                    src, p = solids[row["cas"]], row["phase"]
                    pairs = (
                        ("dgf_kj_mol", src["Gf" + p] or "0", 1000),
                        ("dhf_kj_mol", src["Hf" + p], 1000),
                        ("s_j_molk", src["S0" + p], 1),
                    )
                for column, printed, scale in pairs:
                    if row[column]:
                        assert float(row[column]) == pytest.approx(
                            float(printed) / scale, abs=0.051
                        ), f"{f.name}:{line} {column}"
                checked += 1
    assert checked > 80
