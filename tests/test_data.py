"""Tests for pourbaix.tables.species: validation of species tables, user overrides, data sets.

The malformed fixture files live in tests/data/. Facts used as checks:
- the species-table columns and rules of DEVELOPERS.md ("Species tables");
- ions exist only in solution here: a charged species is 'aq' (common practice
  for aqueous-equilibrium tables, e.g. the NBS 1982 tables list ions as 'ao'/'ai');
- third-law entropies of pure phases are positive (third law of thermodynamics);
- the CAS check digit: sum of digits times their position from the right, mod 10
  (CAS Registry Number check-digit rule, Chemical Abstracts Service);
- H+(aq) has dGf = 0 at every temperature by convention (NBS82).
"""

import re
from pathlib import Path

import pytest

import pourbaix.tables.species as data_mod
from pourbaix.errors import DataFileError, OptionError, PourbaixError, UnknownSpeciesError
from pourbaix.tables.formula import ELEMENTS, PHASES
from pourbaix.tables.species import (
    COLUMNS,
    Species,
    SpeciesTable,
    available_datasets,
    data_dir,
    load_species,
    read_sources_file,
    read_species_file,
)

DATA = Path(__file__).parent / "data"
KNOWN = {"NBS82": "Wagman et al. 1982"}


def _problems(path, known=KNOWN):
    with pytest.raises(DataFileError) as info:
        read_species_file(path, known)
    assert isinstance(info.value, PourbaixError)
    return info.value


# (line, column, regex) for every fault in tests/data/bad_rows.csv; columns count from 1
BAD_ROWS = [
    (4, 1, r"unknown element 'Xx'"),
    (5, 1, r"unclosed '\(' at position 3"),
    (6, 4, r"dgf_kj_mol: 'abc' is not a number \(unit kJ/mol\)"),
    (7, 4, r"'nan' is not a finite number"),
    (8, 4, r"missing value for required column 'dgf_kj_mol'"),
    (9, 14, r"unknown source key 'NOSUCH' \(known keys: NBS82\)"),
    (10, 2, r"charged species FeO4\^2- cannot have phase 's': ions are 'aq'"),
    (11, 2, r"phase 'crystal' is not one of aq, s, l, g"),
    (12, 12, r"metastable 'maybe': write 'yes', 'no' or leave empty"),
    (13, 0, r"6 fields, the header has 15"),
    (14, 1, r"duplicate species Fe\^2\+\(aq\): already on line 3"),
    (15, 13, r"cas '1309-36-1' is not a valid CAS number"),
    (16, 8, r"Maier-Kelley coefficients come as a set: missing mk_b_j_molk2, mk_c_jk_mol"),
    (17, 6, r"s_j_molk -60.3 must be > 0 for phase 's'"),
    (18, 14, r"missing value for required column 'source'"),
    (19, 0, r"bad CSV quoting"),
]


def test_bad_rows_all_reported_at_once_with_line_and_column():
    err = _problems(DATA / "bad_rows.csv")
    got = {(ln, col): msg for _, ln, col, msg in err.problems}
    for line, col, pattern in BAD_ROWS:
        assert (line, col) in got, f"fault on line {line} col {col} not reported: {got}"
        assert re.search(pattern, got[(line, col)]), got[(line, col)]
    assert len(err.problems) == len(BAD_ROWS)  # the sound row (line 3) raises nothing
    text = str(err)
    for line, col, _ in BAD_ROWS:
        where = f"bad_rows.csv:{line}:{col}:" if col else f"bad_rows.csv:{line}:"
        assert where in text
    # problems come in line order
    assert [p[1] for p in err.problems] == sorted(p[1] for p in err.problems)


@pytest.mark.parametrize(("line", "col", "pattern"), BAD_ROWS)
def test_each_bad_row_alone(tmp_path, line, col, pattern):
    """Each fault also raises on its own (header + that row), naming file, line and column."""
    rows = (DATA / "bad_rows.csv").read_text(encoding="utf-8").splitlines()
    f = tmp_path / "one.csv"
    # header, the sound row, the faulty row -> the fault is now on line 3
    f.write_text("\n".join([rows[1], rows[2], rows[line - 1]]) + "\n", encoding="utf-8")
    err = _problems(f)
    ((path, ln, c, msg),) = err.problems
    assert path == str(f)
    assert ln == 3 and c == col
    assert re.search(pattern.replace("line 3", "line 2"), msg)


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        (
            "bad_header_units.csv",
            [
                (1, 3, r"column 'dgf_kcal_mol': expected 'dgf_kj_mol' \(values in kJ/mol\)"),
                (1, 5, r"column 'S_J_MOLK': write it 's_j_molk'"),
                (1, 0, r"missing required column 'dgf_kj_mol'"),
            ],
        ),
        (
            "bad_header_typo.csv",
            [
                (1, 1, r"unknown column 'fromula'; did you mean 'formula'\?"),
                (1, 5, r"column 'dgf_kj_mol' repeats column 3"),
                (1, 0, r"missing required column 'formula'"),
            ],
        ),
        ("bad_header_missing.csv", [(1, 0, r"missing required column 'source'")]),
        ("empty.csv", [(1, 0, r"empty species table")]),
    ],
)
def test_bad_headers(name, expected):
    err = _problems(DATA / name)
    assert len(err.problems) == len(expected)
    for (_, ln, col, msg), (eln, ecol, pattern) in zip(
        sorted(err.problems, key=lambda p: (p[1], -p[2] if p[2] else 0)),
        sorted(expected, key=lambda p: (p[0], -p[1] if p[1] else 0)),
        strict=True,
    ):
        assert (ln, col) == (eln, ecol)
        assert re.search(pattern, msg), msg


def test_unit_column_variants(tmp_path):
    # a bare quantity or another unit must name the expected column and its unit
    for bad, expected in [
        ("dgf", "dgf_kj_mol"),
        ("dg_cal_mol", "dgf_kj_mol"),
        ("dhf_kcal_mol", "dhf_kj_mol"),
        ("s_cal_molk", "s_j_molk"),
        ("cp_cal_molk", "cp_j_molk"),
        ("mk_b_j_molk", "mk_b_j_molk2"),
    ]:
        f = tmp_path / "u.csv"
        f.write_text(f"formula,phase,dgf_kj_mol,source,{bad}\nFe,s,0,NBS82,1\n", encoding="utf-8")
        if bad.startswith("dg"):
            f.write_text(f"formula,phase,{bad},source\nFe,s,0,NBS82\n", encoding="utf-8")
        err = _problems(f)
        assert any(f"expected {expected!r}" in p[3] for p in err.problems), err.problems


def test_not_utf8_and_unreadable(tmp_path):
    f = tmp_path / "latin.csv"
    f.write_bytes(b"formula,phase,dgf_kj_mol,source,note\nFe,s,0,NBS82,\xe9t\xe9\n")
    err = _problems(f)
    assert err.problems[0][1] == 2 and "not UTF-8" in err.problems[0][3]
    err = _problems(tmp_path / "missing.csv")
    assert "cannot read file" in err.problems[0][3]


def test_h_plus_convention(tmp_path):
    f = tmp_path / "h.csv"
    f.write_text("formula,phase,dgf_kj_mol,source\nH+,aq,0.5,NBS82\n", encoding="utf-8")
    err = _problems(f)
    assert "dgf_kj_mol = 0 by convention" in str(err)


def test_formula_phase_written_twice_must_agree(tmp_path):
    f = tmp_path / "p.csv"
    f.write_text("formula,phase,dgf_kj_mol,source\nFe(OH)3(s),aq,-600,NBS82\n", encoding="utf-8")
    err = _problems(f)
    assert "contradicts (s) written in the formula" in str(err)


def test_sources_file_problems():
    with pytest.raises(DataFileError) as info:
        read_sources_file(DATA / "bad_sources.csv")
    msgs = {(p[1], p[2]): p[3] for p in info.value.problems}
    assert "repeats line 2" in msgs[(3, 1)]
    assert "has no citation" in msgs[(4, 2)]


def test_sound_file_reads(tmp_path):
    f = tmp_path / "ok.csv"
    f.write_text(
        "# comment line\n"
        "formula,phase,form,dgf_kj_mol,metastable,cas,source,note\n"
        "\n"
        'Fe2O3,s,maghemite,-727.9,yes,12134-66-6,NBS82,"a note, with a comma"\n'
        "Fe^2+,aq,,\u221278.9,,,NBS82,unicode minus\n",
        encoding="utf-8",
    )
    rows = read_species_file(f, KNOWN)
    assert [s.name for s in rows] == ["Fe2O3:maghemite", "Fe^2+"]
    mag = rows[0]
    assert mag.metastable and mag.form == "maghemite" and mag.phase == "s"
    assert mag.origin == f"{f}:4"  # comment and blank lines count
    assert mag.note == "a note, with a comma"
    assert mag.key == ("Fe2O3:maghemite", "s")
    assert rows[1].dgf_kj_mol == -78.9 and rows[1].charge == 2
    assert mag.label == "Fe₂O₃ (maghemite)"
    assert mag.mathtext.endswith(r"_{\mathrm{(maghemite)}}$")


# ------------------------------------------------------------------ the embedded tables


def test_data_dir_holds_tables():
    d = data_dir()
    assert (d / "datasets.csv").is_file()
    assert list(d.glob("sources*.csv"))


@pytest.fixture(scope="module")
def tables():
    return {name: load_species(name) for name in available_datasets()}


def test_default_dataset_loads(tables):
    t = tables["default"]
    assert isinstance(t, SpeciesTable) and len(t) > 0
    assert t.dataset == "default" and t.overrides == () and t.dataset_changes == ()


def test_element_charge_and_phase_sanity_for_every_row(tables):
    for t in tables.values():
        for sp in t.species:
            assert set(sp.composition) <= ELEMENTS, sp.origin
            assert all(n >= 1 for n in sp.composition.values()), sp.origin
            assert sp.phase in PHASES, sp.origin
            if sp.charge != 0:
                assert sp.phase == "aq", f"{sp.origin}: charged {sp.name} in phase {sp.phase}"
            assert abs(sp.charge) <= 6, sp.origin  # no aqueous species beyond +-6 (common practice)
            assert sp.formula.phase == sp.phase
            assert sp.name == sp.formula.text + (f":{sp.form}" if sp.form else "")


def test_every_source_key_resolves(tables):
    for t in tables.values():
        for sp in t.species:
            assert sp.source in t.sources, f"{sp.origin}: source {sp.source!r}"
            assert t.sources[sp.source].strip(), sp.source
            assert t.citation(sp) == t.sources[sp.source]


def test_keys_unique(tables):
    for t in tables.values():
        keys = [sp.key for sp in t.species]
        assert len(keys) == len(set(keys))


def test_water_and_proton_present(tables):
    t = tables["default"]
    assert t.get("H+").dgf_kj_mol == 0.0  # convention (NBS82)
    assert t.get("H2O", "l").phase == "l"
    assert t.get("H2O(l)") is t.get("H2O", "l")


def test_iron_system_has_at_least_12_species(tables):
    fe = [s for s in tables["default"].for_elements("Fe") if "Fe" in s.composition]
    assert len(fe) >= 12, [str(s) for s in fe]  # issue 2: `pourbaix species Fe` lists >= 12


def test_for_elements(tables):
    t = tables["default"]
    got = t.for_elements("Fe")
    assert all(s.elements <= {"Fe", "H", "O"} for s in got)
    assert any(s.name == "H2O" for s in got)  # water belongs to every system
    assert [s for s in t.species if s in got] == list(got)  # table order
    assert set(t.for_elements(["Fe", "S"])) >= set(got)
    assert t.for_elements("Fe, S") == t.for_elements(["Fe", "S"])
    with pytest.raises(OptionError, match=r"unknown element symbol 'Fx'; did you mean"):
        t.for_elements("Fx")


def test_get_variants(tables):
    t = tables["default"]
    fe2 = t.get("Fe^2+")
    for name in ("Fe2+", "Fe^2+(aq)", "Fe++", "Fe+2", "Fe²⁺"):
        assert t.get(name) is fe2
    assert t.get("Fe^2+", phase="aq") is fe2
    # an ambiguous charge notation is settled by the table: NO3- is nitrate
    if any(s.name == "NO3^-" for s in t.species):
        assert t.get("NO3-").name == "NO3^-"
    forms = [s for s in t.species if s.form]
    for sp in forms:
        assert t.get(sp.name, sp.phase) is sp


def test_get_errors(tables):
    t = tables["default"]
    with pytest.raises(
        UnknownSpeciesError, match=r"unknown species 'Fe\^7\+'.*close matches: .*Fe"
    ):
        t.get("Fe^7+")
    with pytest.raises(UnknownSpeciesError, match=r"unknown species 'Fe\(OH2'.*unclosed"):
        t.get("Fe(OH2")
    with pytest.raises(UnknownSpeciesError, match=r"ambiguous .* give the phase"):
        t.get("O2")  # O2(g) and O2(aq)
    with pytest.raises(UnknownSpeciesError, match="unknown species"):
        t.get("Fe2O3:nosuchform")
    assert "Fe^2+" in t and "Fe^7+" not in t


def test_unknown_dataset():
    with pytest.raises(OptionError, match=r"unknown data set 'nosuch'; valid data sets: .*default"):
        load_species("nosuch")


def test_dataset_switching(tables):
    base = tables["default"]
    for name, t in tables.items():
        if name in ("default", "criss-cobble"):
            continue  # criss-cobble chooses the older temperature routes, not other rows
        set_rows = [s for s in t.species if s.origin.startswith(f"species_data/sets/{name}/")]
        assert set_rows, f"data set {name} changes nothing"
        for sp in set_rows:
            try:
                old = base.get(sp.name, sp.phase)
            except UnknownSpeciesError:
                continue  # added by the set
            assert any(m.startswith(f"{sp.name}({sp.phase}):") for m in t.dataset_changes)
            assert old.origin != sp.origin


# ------------------------------------------------------------------ user files


def test_user_override_is_reported(tables):
    base = tables["default"]
    old = base.get("Fe^2+")
    t = load_species(user_files=[DATA / "user_override.csv"])
    new = t.get("Fe^2+")
    assert new.dgf_kj_mol == -91.5
    assert new.origin == f"{DATA / 'user_override.csv'}:3"
    (msg,) = t.overrides
    assert msg.startswith("Fe^2+(aq): embedded value")
    assert f"{old.dgf_kj_mol:.2f} kJ/mol ({old.origin})" in msg
    assert f"overridden by -91.50 from {DATA / 'user_override.csv'}:3" in msg
    assert t.sources["my lab notebook 2024"] == f"user file {DATA / 'user_override.csv'}"
    assert t.get("FeMoO4").origin.endswith("user_override.csv:4")
    assert len(t) == len(base) + 1
    # the cached embedded tables are untouched
    assert load_species().get("Fe^2+").dgf_kj_mol == old.dgf_kj_mol


def test_two_user_files_later_wins(tables):
    t = load_species(user_files=[DATA / "user_override.csv", DATA / "user_override2.csv"])
    assert t.get("Fe^2+").dgf_kj_mol == -80.0
    assert len(t.overrides) == 2
    assert t.overrides[1].startswith("Fe^2+(aq): user value -91.50 kJ/mol")


def test_user_file_errors_name_the_file(tmp_path):
    f = tmp_path / "mine.csv"
    f.write_text("formula,phase,dgf_kj_mol,source\nFe^2+,s,-78.9,x\nQq,s,1,x\n", encoding="utf-8")
    with pytest.raises(DataFileError) as info:
        load_species(user_files=[f])
    text = str(info.value)
    assert f"{f}:2:2: charged species" in text
    assert f"{f}:3:1: bad formula 'Qq'" in text


# ------------------------------------------------------------------ a synthetic data folder


def _write(path: Path, text: str):
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")


@pytest.fixture
def tree(tmp_path, monkeypatch):
    root = tmp_path / "species_data"
    _write(root / "sources.csv", "key,citation,note\nA,Author A (2000).,\nB,Author B (2001).,\n")
    _write(root / "datasets.csv", 'name,description\ndefault,base\nalt,"another set"\n')
    _write(
        root / "water.csv",
        "formula,phase,dgf_kj_mol,s_j_molk,source\nH2O,l,-237.1,70.0,A\nH+,aq,0,0,A\nOH-,aq,-157.2,-10.9,A\n",
    )
    _write(root / "metal.csv", "formula,phase,dgf_kj_mol,source\nZn,s,0,A\nZn2+,aq,-147.1,A\n")
    _write(
        root / "sets" / "alt" / "z.csv",
        "formula,phase,dgf_kj_mol,source\nZn2+,aq,-150,B\nZnO,s,-320.5,B\n",
    )
    monkeypatch.setattr(data_mod, "data_dir", lambda: root)
    return root


def test_synthetic_default_and_alt(tree):
    assert available_datasets() == {"default": "base", "alt": "another set"}
    base = load_species()
    assert [s.name for s in base] == ["Zn", "Zn^2+", "H2O", "H^+", "OH^-"]
    alt = load_species("alt")
    assert alt.get("Zn2+").dgf_kj_mol == -150
    assert alt.get("Zn2+").origin == "species_data/sets/alt/z.csv:2"
    assert alt.get("ZnO").phase == "s"
    (change,) = alt.dataset_changes
    assert change.startswith(
        "Zn^2+(aq): default value -147.10 kJ/mol (species_data/metal.csv:3) replaced by -150.00"
    )
    assert [s.name for s in alt][:2] == ["Zn", "Zn^2+"]  # replaced rows keep their place


def test_synthetic_dropped_values_are_said(tree):
    _write(tree / "sets" / "alt" / "w.csv", "formula,phase,dgf_kj_mol,source\nH2O,l,-237.2,B\n")
    alt = load_species("alt")
    msg = [m for m in alt.dataset_changes if m.startswith("H2O(l)")][0]
    assert "gives no s_j_molk" in msg


def test_synthetic_duplicate_across_files(tree):
    _write(tree / "more.csv", "formula,phase,dgf_kj_mol,source\nZn^2+,aq,-147.0,A\n")
    with pytest.raises(
        DataFileError,
        match=r"more\.csv:2:1: duplicate species Zn\^2\+\(aq\): already in species_data/metal\.csv:3",
    ):
        load_species()


def test_synthetic_unknown_source_and_all_files_reported(tree):
    _write(tree / "bad1.csv", "formula,phase,dgf_kj_mol,source\nZnS,s,-201.3,C\n")
    _write(tree / "bad2.csv", "formula,phase,dgf_kj_mol,source\nZnCO3,s,x,A\n")
    with pytest.raises(DataFileError) as info:
        load_species()
    text = str(info.value)
    assert "species_data/bad1.csv:2:4: unknown source key 'C'" in text
    assert "species_data/bad2.csv:2:3: dgf_kj_mol: 'x' is not a number" in text


def test_synthetic_duplicate_source_key(tree):
    _write(tree / "sources_more.csv", "key,citation,note\nA,Someone else,\n")
    with pytest.raises(
        DataFileError, match=r"source key 'A' already defined in species_data/sources\.csv"
    ):
        load_species()


def test_synthetic_unknown_dataset_lists_names(tree):
    with pytest.raises(OptionError, match=r"valid data sets: alt, default"):
        load_species("bpj")


def test_columns_table_matches_developers_guide():
    # DEVELOPERS.md, "Species tables": the column names carry their units
    guide = (Path(__file__).parents[1] / "DEVELOPERS.md").read_text(encoding="utf-8")
    for col in COLUMNS:
        assert f"`{col}`" in guide, col


def test_species_is_hashable_and_frozen(tables):
    sp = tables["default"].get("Fe^2+")
    assert {sp: 1}[sp] == 1
    assert isinstance(sp, Species)
    with pytest.raises(AttributeError):
        sp.dgf_kj_mol = 0.0


def test_synthetic_hydration_hint_and_ambiguous_charge(tree):
    # older tables write zincate as ZnO2^2-; ours may hold it as Zn(OH)4^2- (= ZnO2^2- + 2 H2O)
    _write(tree / "zincate.csv", "formula,phase,dgf_kj_mol,source\nZn(OH)4^2-,aq,-860.6,A\n")
    t = load_species()
    with pytest.raises(UnknownSpeciesError, match=r"Zn\(OH\)4\^2-\(aq\) \(= ZnO2\^2- \+ 2 H2O\)"):
        t.get("ZnO2^2-")
    # 'OH-' reads unambiguously; the table settles nothing here, the parser does
    assert t.get("OH-").name == "OH^-"
