"""The conditions object: checked once, frozen, and the values every path reads from it."""

import dataclasses
import math

import pytest

from pourbaix.conditions import LIMITS, make_conditions
from pourbaix.constants import NERNST_25C_V, F, R
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.compute import compute_map


def test_nernst_factor_and_neutral_ph_at_25c():
    c = make_conditions("Fe")
    # 0.05916 V per decade at 25 °C (Bard & Faulkner 2001, eq. 2.1.38 and text)
    assert c.nernst_v == pytest.approx(0.05916, abs=5e-6)
    assert c.nernst_v == NERNST_25C_V
    # pKw = 13.995 at 25 °C, 0.1 MPa (IAPWS R11-07, Table 3), so neutral pH 6.997
    assert c.neutral_ph == pytest.approx(13.995 / 2, abs=5e-4)


def test_nernst_factor_at_temperature_follows_r_t_ln10_over_f():
    c = make_conditions("Fe", temperature_c=80.0)
    # R and F: CODATA 2018 (Tiesinga et al. 2021)
    assert R == 8.314462618 and F == 96485.33212
    assert c.nernst_v == pytest.approx(8.314462618 * 353.15 * math.log(10) / 96485.33212)


def test_conditions_are_frozen():
    c = make_conditions("Fe")
    with pytest.raises(dataclasses.FrozenInstanceError):
        c.temperature_c = 90.0


def test_reference_offset_is_resolved_once_into_the_conditions():
    c = make_conditions("Cu", reference="SCE")
    # saturated calomel electrode +0.2412 V vs SHE at 25 °C (Bard & Faulkner 2001, Table C.2)
    assert c.reference == "SCE" and c.reference_offset_v == pytest.approx(0.2412, abs=1e-4)
    m = compute_map(conditions=c)
    assert m.conditions is c


def test_activity_coefficients_match_the_davies_equation():
    c = make_conditions("Cu", molality=1e-6, ionic_strength=0.1)
    # Davies: log γ = -A z² (√I/(1+√I) - 0.3 I), A = 0.5091 at 25 °C (Davies 1962; A from
    # Robinson & Stokes 1959, Appendix 7.1); the code takes A from water's properties
    root = math.sqrt(0.1)
    expected = -0.5091 * 4 * (root / (1 + root) - 0.3 * 0.1)
    assert math.log10(c.activity_coefficient(2)) == pytest.approx(expected, abs=2e-3)
    assert c.activity_coefficient(0) == 1.0
    assert c.activity_coefficient(-2) == c.activity_coefficient(2)


def test_an_unknown_activity_model_is_refused_without_an_ionic_strength():
    with pytest.raises(OptionError, match="unknown activity model 'sorcery'"):
        make_conditions("Fe", activity_model="sorcery")


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(activity=1e300), "activity of dissolved species 1e\\+300 is outside"),
        (dict(activity=1e-300), "outside the plausible range"),
        (dict(molality=50.0), "molality of dissolved species 50"),
        (dict(ph_range=(-100, 100)), "pH range -100 .. 100 reaches outside"),
        (dict(ph_range=(7.0, 7.0 + 1e-9)), "too narrow"),
        (dict(potential_range_v=(-50, 50)), "potential range -50 .. 50 V"),
        (dict(ligands={"S": 1e300}), "ligand S total activity"),
        (dict(water_activity=0.001), "water activity 0.001"),
        (dict(elements=["Fe", "Cr"], ratio=(1e12, 1)), "1e\\+12 times the smallest"),
        (dict(temperature_c="hot"), "temperature must be a number"),
    ],
)
def test_implausible_values_are_refused_with_the_range(kwargs, match):
    elements = kwargs.pop("elements", "Fe")
    with pytest.raises(ConditionsError, match=match):
        make_conditions(elements, **kwargs)


def test_unusual_but_legal_values_are_noted():
    c = make_conditions("Fe", activity=5.0, ph_range=(-3.0, 17.0))
    text = " ".join(c.notes)
    assert "activity of dissolved species 5 is unusual" in text
    assert "pH range -3 .. 17 reaches beyond the usual" in text
    m = compute_map(conditions=c)
    assert any("is unusual" in w for w in m.warnings)


def test_a_ligand_given_twice_with_different_values_is_refused():
    with pytest.raises(OptionError, match="ligand S given twice"):
        make_conditions("Cu", ligands=[("S", 1e-3), ("S", 1e-2)])


def test_limits_are_ordered():
    for name, (refuse_lo, warn_lo, warn_hi, refuse_hi) in LIMITS.items():
        assert refuse_lo <= warn_lo <= warn_hi <= refuse_hi, name


def test_conditions_and_keywords_do_not_mix():
    c = make_conditions("Fe")
    with pytest.raises(OptionError, match="not both"):
        compute_map(conditions=c, activity=1e-4)


def test_a_map_is_immutable_once_built():
    m = compute_map("Fe")
    with pytest.raises(dataclasses.FrozenInstanceError, match="immutable"):
        m.domains = []
    s = compute_map("Cu", ligands={"S": 1e-3})
    with pytest.raises(dataclasses.FrozenInstanceError):
        s.never_stable = []
