"""Tests for pourbaix.tables.formula: parsing, canonical text, labels, errors.

Expected compositions and charges follow IUPAC formula conventions
(IUPAC, Nomenclature of Inorganic Chemistry, Recommendations 2005, "Red
Book", IR-4: formulae; ionic charge as a right superscript). The element list
is the IUPAC periodic table (118 elements, names final since 2016).
"""

import os

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pourbaix.errors import FormulaError, PourbaixError
from pourbaix.tables.formula import ELEMENTS, Formula, parse_formula

# examples per property test multiply by this (a larger run: see DEVELOPERS.md)
PROPERTY_SCALE = int(os.environ.get("POURBAIX_PROPERTY_SCALE", "1"))

# (input, canonical text, composition, charge, phase) -- IUPAC Red Book IR-4 conventions
VALID = [
    ("Fe^2+", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe2+", "Fe^2+", {"Fe": 1}, 2, None),  # documented rule: monatomic + digits + sign = charge
    ("Fe+2", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe++", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe+++", "Fe^3+", {"Fe": 1}, 3, None),
    ("Fe^{2+}", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe^+2", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe²⁺", "Fe^2+", {"Fe": 1}, 2, None),
    ("Fe³⁺(aq)", "Fe^3+", {"Fe": 1}, 3, "aq"),
    ("SO4--", "SO4^2-", {"S": 1, "O": 4}, -2, None),
    ("SO4^2-", "SO4^2-", {"S": 1, "O": 4}, -2, None),
    ("SO4-2", "SO4^2-", {"S": 1, "O": 4}, -2, None),
    ("SO42-", "SO4^2-", {"S": 1, "O": 4}, -2, None),  # documented rule: last digit is the charge
    ("SO₄²⁻", "SO4^2-", {"S": 1, "O": 4}, -2, None),
    ("Cl-", "Cl^-", {"Cl": 1}, -1, None),
    ("Cl⁻", "Cl^-", {"Cl": 1}, -1, None),
    ("OH^-", "OH^-", {"O": 1, "H": 1}, -1, None),
    ("H+", "H^+", {"H": 1}, 1, None),
    ("O2", "O2", {"O": 2}, 0, None),  # digits without a sign are counts
    ("O2(g)", "O2", {"O": 2}, 0, "g"),
    ("O2-", "O^2-", {"O": 1}, -2, None),  # oxide ion by the documented rule
    ("O2^-", "O2^-", {"O": 2}, -1, None),  # superoxide, written with a caret
    ("H2O", "H2O", {"H": 2, "O": 1}, 0, None),
    ("H2O(l)", "H2O", {"H": 2, "O": 1}, 0, "l"),
    ("Fe^0", "Fe", {"Fe": 1}, 0, None),
    ("Fe(OH)2^+", "Fe(OH)2^+", {"Fe": 1, "O": 2, "H": 2}, 1, None),
    ("Fe(OH)3(s)", "Fe(OH)3", {"Fe": 1, "O": 3, "H": 3}, 0, "s"),
    ("Fe2O3(cr)", "Fe2O3", {"Fe": 2, "O": 3}, 0, "s"),
    ("Fe(CN)6^4-", "Fe(CN)6^4-", {"Fe": 1, "C": 6, "N": 6}, -4, None),
    ("Fe(CN)64-", "Fe(CN)6^4-", {"Fe": 1, "C": 6, "N": 6}, -4, None),
    ("Cu(NH3)4^2+", "Cu(NH3)4^2+", {"Cu": 1, "N": 4, "H": 12}, 2, None),
    ("Cu(NH3)42+", "Cu(NH3)4^2+", {"Cu": 1, "N": 4, "H": 12}, 2, None),
    ("Cu[(NH3)4]^2+", "Cu[(NH3)4]^2+", {"Cu": 1, "N": 4, "H": 12}, 2, None),
    ("Cu4(OH)6SO4", "Cu4(OH)6SO4", {"Cu": 4, "O": 10, "H": 6, "S": 1}, 0, None),
    ("CuSO4·5H2O", "CuSO4·5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0, None),
    ("CuSO4*5H2O", "CuSO4·5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0, None),
    ("Cr2O7^2-", "Cr2O7^2-", {"Cr": 2, "O": 7}, -2, None),
    ("Au(CN)2^-", "Au(CN)2^-", {"Au": 1, "C": 2, "N": 2}, -1, None),
    ("HFeO2^-", "HFeO2^-", {"H": 1, "Fe": 1, "O": 2}, -1, None),
    ("Fe2(OH)2^4+", "Fe2(OH)2^4+", {"Fe": 2, "O": 2, "H": 2}, 4, None),
    ("  NH4^+  ", "NH4^+", {"N": 1, "H": 4}, 1, None),
    ("CO", "CO", {"C": 1, "O": 1}, 0, None),  # carbon monoxide, not cobalt
    ("Co", "Co", {"Co": 1}, 0, None),
]


@pytest.mark.parametrize(("text", "canon", "comp", "charge", "phase"), VALID)
def test_valid_formulas(text, canon, comp, charge, phase):
    f = parse_formula(text)
    assert f.text == canon
    assert dict(f.composition) == comp
    assert f.charge == charge
    assert f.phase == phase


def test_phase_argument_and_aliases():
    assert parse_formula("Fe2O3", "cr").phase == "s"  # 'cr' (crystalline) is a solid
    assert parse_formula("Fe^2+(aq)", "aq").phase == "aq"
    with pytest.raises(FormulaError, match=r"contradicts phase 's'"):
        parse_formula("Fe^2+(aq)", "s")
    with pytest.raises(FormulaError, match=r"bad phase 'solid'.*valid phases are aq, s"):
        parse_formula("Fe", "solid")


def test_composition_is_read_only_and_formula_hashable():
    f = parse_formula("Fe(OH)2^+")
    with pytest.raises(TypeError):
        f.composition["Fe"] = 2
    assert hash(f) == hash(parse_formula("Fe(OH)2^+"))
    assert {f: 1}[parse_formula("Fe(OH)2^+")] == 1


def test_elements_list():
    # IUPAC periodic table: 118 elements, H (Z=1) to Og (Z=118)
    assert len(ELEMENTS) == 118
    assert {"H", "He", "Fe", "Au", "Og", "Ts"} <= ELEMENTS
    assert "Xx" not in ELEMENTS and "J" not in ELEMENTS


def test_labels():
    # typesetting convention: counts as subscripts, charge as a right superscript (IUPAC IR-4)
    f = parse_formula("Fe(OH)2^+")
    assert f.mathtext() == r"$\mathrm{Fe(OH)_{2}^{+}}$"
    assert parse_formula("Fe3+").mathtext() == r"$\mathrm{Fe^{3+}}$"
    assert parse_formula("SO4^2-").plain() == "SO₄²⁻"
    assert f.plain() == "Fe(OH)₂⁺"
    assert parse_formula("Fe^3+").plain() == "Fe³⁺"
    assert parse_formula("H2O(l)").mathtext() == r"$\mathrm{H_{2}O}$"  # phase not shown
    assert str(parse_formula("Cl-")) == "Cl^-"


def test_mathtext_of_odd_formulas_parses():
    from matplotlib.mathtext import MathTextParser

    parser = MathTextParser("path")
    for text in ("Cu[(NH3)4]^2+", "CuSO4·5H2O", "Fe2(OH)2^4+", "Fe(CN)6^4-", "H^+"):
        parser.parse(parse_formula(text).mathtext())


def test_mathtext_and_plain_for_every_embedded_species():
    """Every label of the embedded tables must be valid mathtext and round-trip as plain text."""
    from matplotlib.mathtext import MathTextParser

    from pourbaix.tables.species import available_datasets, load_species

    parser = MathTextParser("path")
    seen = set()
    for dataset in available_datasets():
        for sp in load_species(dataset).species:
            if sp.key in seen:
                continue
            seen.add(sp.key)
            parser.parse(sp.formula.mathtext())  # raises ValueError on bad mathtext
            parser.parse(sp.mathtext)
            assert "$" not in sp.label and sp.label.startswith(sp.formula.plain()), sp.name
            again = parse_formula(sp.formula.plain())
            assert (again.text, again.charge) == (sp.formula.text, sp.charge), sp.name
    assert seen, "no embedded species found"


# (input, regex the message must match) -- each a different fault
MALFORMED = [
    ("", r"empty"),
    ("   ", r"empty"),
    ("Xx", r"unknown element 'Xx' at position 1"),
    ("FeXq2", r"unknown element 'Xq' at position 3"),
    ("Fe(OH2^+", r"unclosed '\(' at position 3"),
    ("Fe(OH)2)^+", r"unmatched '\)' at position 8"),
    ("Cu[(NH3)4)^2+", r"'\)' where '\]' was expected at position 10"),
    ("()", r"empty \(\) at position 1"),
    ("Fe+-", r"mixed charge signs '\+-' at position 3"),
    ("Fe^+-", r"mixed charge signs '\+-'"),
    ("Fe^0+", r"bad charge '0\+'"),
    ("Fe^2", r"charge '2' has no sign"),
    ("Fe^", r"no charge after '\^'"),
    ("Fe^{2+", r"unclosed '\{'"),
    ("Fe^2+^3+", r"more than one '\^'"),
    ("Fe0", r"count '0'"),
    ("Fe(OH)02", r"count '02'"),
    ("2H2O", r"count '2' without an element"),
    ("fe", r"lower-case 'f'"),
    ("Fe 2+", r"stray character ' ' at position 3"),
    ("Fe$", r"stray character '\$' at position 3"),
    ("Fe⁺2", r"superscript '⁺' inside the formula"),
    ("Fe:maghemite", r"':form' tags belong to species names"),
    ("Fe2+(aq)(s)", r"charge sign '\+' inside the formula"),
    ("NO3-", r"ambiguous charge '3-' \(write 'NO3\^-' .* or 'NO\^3-'"),
    ("Fe(OH)2+", r"ambiguous charge '2\+'"),
    ("SO40-", r"bad charge '0-'"),
    ("^2+", r"no atoms before the charge"),
    ("e-", r"lower-case 'e'"),
]


@pytest.mark.parametrize(("text", "pattern"), MALFORMED)
def test_malformed_formulas(text, pattern):
    with pytest.raises(FormulaError, match=pattern) as info:
        parse_formula(text)
    assert isinstance(info.value, PourbaixError)
    assert repr(text.strip()) in str(info.value)  # the message quotes the input


def test_error_carries_position():
    with pytest.raises(FormulaError) as info:
        parse_formula("Fe(OH2^+")
    assert info.value.position == 3
    assert str(info.value) == "bad formula 'Fe(OH2^+': unclosed '(' at position 3"


def test_not_text():
    with pytest.raises(FormulaError, match="expected text"):
        parse_formula(26)


# --- property: the canonical and the plain text parse back to the same formula -------------
_SYMBOLS = sorted(ELEMENTS)


@st.composite
def _formulas(draw):
    parts = []
    for _ in range(draw(st.integers(1, 4))):
        sym = draw(st.sampled_from(_SYMBOLS))
        n = draw(st.integers(1, 12))
        if draw(st.booleans()) and parts:
            parts.append(f"({sym}{n if n > 1 else ''})" + str(draw(st.integers(2, 6))))
        else:
            parts.append(sym + (str(n) if n > 1 else ""))
    charge = draw(st.integers(-4, 4))
    suffix = "" if charge == 0 else "^" + (str(abs(charge)) if abs(charge) > 1 else "")
    suffix += "" if charge == 0 else ("+" if charge > 0 else "-")
    return "".join(parts) + suffix


@settings(max_examples=200 * PROPERTY_SCALE, deadline=None)
@given(_formulas())
def test_canonical_and_plain_round_trip(text):
    f = parse_formula(text)
    assert isinstance(f, Formula)
    for again in (parse_formula(f.text), parse_formula(f.plain())):
        assert again == f
        assert dict(again.composition) == dict(f.composition)
