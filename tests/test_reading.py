"""Corrosion readings: states, margin to immunity from the Nernst equation, the cathodic-protection check."""

import math

import pytest

from pourbaix.analyses.reading import CP_CRITERION_V, corrosion_reading, immunity_potential
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.domain_map import compute_map

K25 = 8.314462618 * 298.15 * math.log(10) / 96485.33212  # R T ln10 / F at 25 °C (CODATA 2018)


def test_copper_margin_to_immunity_follows_nernst():
    # Cu2+ + 2e- = Cu, E0 = +0.3419 V (CRC electrochemical series); at a(Cu2+) = 1e-6:
    # E = E0 + (k/2) log10(1e-6) (Nernst)
    e_imm = 0.3419 + K25 / 2 * -6
    r = corrosion_reading("Cu", 2.0, 0.5, "SHE")
    assert r.reading == "corroding" and r.species == "Cu^2+"
    # table-derived E0 vs series value: within 3 mV
    assert r.immunity_potential_v == pytest.approx(e_imm, abs=3e-3)
    assert r.margin_to_immunity_mv == pytest.approx((0.5 - r.immunity_potential_v) * 1000, abs=1e-9)
    assert r.cp_check is None  # not iron


def test_immune_point_reports_room_inside_immunity():
    r = corrosion_reading("Cu", 2.0, 0.0, "SHE")
    assert r.reading == "immune" and r.margin_to_immunity_mv < 0
    assert r.immunity_potential_v == pytest.approx(
        corrosion_reading("Cu", 2.0, 0.5).immunity_potential_v, abs=1e-9
    )


def test_reference_electrode_is_honoured():
    # the same physical point vs SHE and vs SCE (0.2412 V, Ives & Janz 1961) reads the same
    a = corrosion_reading("Cu", 2.0, 0.5, "SHE")
    b = corrosion_reading("Cu", 2.0, 0.5 - 0.2412, "SCE")
    assert b.potential_v_she == pytest.approx(0.5, abs=1e-9)
    assert b.reading == a.reading and b.margin_to_immunity_mv == pytest.approx(
        a.margin_to_immunity_mv, abs=1e-6
    )
    assert b.immunity_potential_v == pytest.approx(a.immunity_potential_v - 0.2412, abs=1e-6)


def test_steel_cathodic_protection_criterion_checked_alongside():
    # common practice: -0.85 V vs Cu/CuSO4 (+0.316 V vs SHE, common practice) for carbon steel
    protected = corrosion_reading("Fe", 8.0, -0.95, "Cu/CuSO4")
    assert protected.cp_check["meets"] and protected.cp_check["difference_mv"] == pytest.approx(
        -100.0, abs=1e-6
    )
    assert protected.reading == "immune"
    short = corrosion_reading("Fe", 8.0, -0.40, "SHE")
    assert short.cp_check["potential_v"] == pytest.approx(-0.40 - 0.316, abs=1e-9)
    assert not short.cp_check["meets"]
    assert CP_CRITERION_V == -0.85
    assert any("qualified corrosion engineer" in c for c in short.cautions)
    assert any("applicable" in c and "standard" in c for c in short.cautions)


def test_passive_reading_carries_the_kinetic_caution():
    r = corrosion_reading("Fe", 10.0, 0.0, "SHE")
    assert r.reading == "passive" and r.state == "passivation"
    assert any("kinetic" in c for c in r.cautions)
    assert r.margin_to_immunity_mv > 0


def test_immunity_potential_beyond_the_window_and_scalar_types():
    cu = compute_map("Cu", potential_range_v=(0.5, 1.0))
    # the immunity domain is outside this window; the walk along the exact planes still finds it
    assert immunity_potential(cu, 2.0, 0.8) == pytest.approx(
        immunity_potential(compute_map("Cu"), 2.0), abs=1e-9
    )
    r = corrosion_reading(cu, 2.0, 0.8)
    assert isinstance(r.margin_to_immunity_mv, float) and isinstance(r.to_dict(), dict)


def test_bad_input():
    with pytest.raises(OptionError, match="unknown reference electrode"):
        corrosion_reading("Fe", 8.0, -0.9, "copper-rod")
    with pytest.raises(ConditionsError, match="finite"):
        corrosion_reading("Fe", float("nan"), -0.9)
    with pytest.raises(ConditionsError, match="numbers"):
        corrosion_reading("Fe", "eight", -0.9)
    with pytest.raises(OptionError, match="not both"):
        corrosion_reading(compute_map("Fe"), 8.0, -0.9, temperature_c=60)
