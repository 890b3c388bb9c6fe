"""Zinc hydrolysis from the IUPAC critical review (Powell et al., Pure Appl. Chem. 85, 2249, 2013).

Recommended constants at I = 0, 25 °C (from memory; the review's table of
recommended values for Zn2+ + OH-), with their 95 % intervals:

    Zn2+ + j H2O = Zn(OH)_j^(2-j) + j H+   log *beta_j = -8.96, -17.82, -28.05, -40.41
                                           (+/- 0.05, 0.08, 0.05, 0.12)
    ZnO(s) + 2 H+ = Zn2+ + H2O             log *Ks0 = 11.12 +/- 0.05
    eps-Zn(OH)2(s) + 2 H+ = Zn2+ + 2 H2O   log *Ks0 = 11.38 +/- 0.20

The ZnO field at a dissolved activity a follows from mass action by hand
(Pourbaix 1974, ch. II: a solid/ion line at equal activity a):
lower limit, against Zn2+: log a = log *Ks0 - 2 pH; upper limit, against
Zn(OH)3-: log a = log *Ks0 + log *beta3 + pH.
"""

import math
import re
from pathlib import Path

import pygcc
import pytest

from pourbaix.maps.domain_map import compute_map
from pourbaix.tables.species import load_species

RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol]

LOG_KS0_ZNO = 11.12
LOG_KS0_EPSILON = 11.38
LOG_BETA = {1: -8.96, 2: -17.82, 3: -28.05, 4: -40.41}
PLUS_MINUS = {"ZnOH^+": 0.05, "Zn(OH)2": 0.08, "Zn(OH)3^-": 0.05, "Zn(OH)4^2-": 0.12}

THERMODDEM = Path(pygcc.__file__).parent / "default_db" / "PHREEQC_ThermoddemV1.10_15Dec2020.dat"


def _zno_limits(log_a):
    """pH limits of the ZnO field at activity a, by hand from the review's constants."""
    lower = (LOG_KS0_ZNO - log_a) / 2  # ZnO + 2 H+ = Zn2+ + H2O
    upper = log_a - LOG_KS0_ZNO - LOG_BETA[3]  # ZnO + 2 H2O = Zn(OH)3- + H+
    return lower, upper


def test_zno_field_at_1e6_matches_the_review_by_hand():
    lower, upper = _zno_limits(-6.0)
    # 8.56 and 10.93; the hand result is only valid if Zn2+ (not ZnOH+) holds the lower side
    # (Zn2+/ZnOH+ at pH 8.96) and Zn(OH)3- (not Zn(OH)4^2-) the upper (their line at pH 12.36),
    # and if Zn(OH)2(aq) over ZnO stays below 1e-6 (log a = 11.12 - 17.82 = -6.70)
    assert lower < -LOG_BETA[1] and upper < LOG_BETA[3] - LOG_BETA[4]
    assert LOG_KS0_ZNO + LOG_BETA[2] < -6.0
    m = compute_map("Zn", activity=1e-6)
    (zno,) = [d for d in m.domains if d.species[0] == "ZnO"]
    x_min, _, x_max, _ = zno.polygon.bounds
    # the table rows print dG to 0.01 kJ/mol: 0.005 / RT ln10 = 0.001 in log K, halved by the
    # 2 H+ of the lower line
    assert x_min == pytest.approx(lower, abs=0.003)
    assert x_max == pytest.approx(upper, abs=0.003)


def test_zinc_rows_follow_the_review_constants():
    t = load_species()
    zn, water = t.get("Zn^2+", "aq").dgf_kj_mol, t.get("H2O", "l").dgf_kj_mol
    for j, name in enumerate(("ZnOH^+", "Zn(OH)2", "Zn(OH)3^-", "Zn(OH)4^2-"), start=1):
        row = t.get(name, "aq")
        assert row.source == "POWELL13"
        # dG = dG(Zn2+) + j dG(H2O) - RT ln10 log *beta_j
        assert row.dgf_kj_mol == pytest.approx(zn + j * water - RT_LN10 * LOG_BETA[j], abs=0.006)
        # u = RT ln10 x (the review's 95 % interval) / 2
        assert row.dgf_unc_kj_mol == pytest.approx(RT_LN10 * PLUS_MINUS[name] / 2, abs=0.006)
    zno, eps = t.get("ZnO", "s"), t.get("Zn(OH)2", "s")
    assert zno.dgf_kj_mol == pytest.approx(zn + water + RT_LN10 * LOG_KS0_ZNO, abs=0.006)
    assert eps.dgf_kj_mol == pytest.approx(zn + 2 * water + RT_LN10 * LOG_KS0_EPSILON, abs=0.006)
    assert eps.dgf_unc_kj_mol == pytest.approx(RT_LN10 * 0.20 / 2, abs=0.006)


def _thermoddem_log_k(name):
    """log_k of a phase of the Thermoddem file and the references line below it."""
    text = THERMODDEM.read_text(encoding="latin-1")
    m = re.search(rf"^{re.escape(name)}\s*\n[^\n]*\n\s*log_k\s+([-\d.]+)(.*?)\n\n", text, re.M | re.S)
    return float(m.group(1)), m.group(2)


def test_epsilon_hydroxide_agrees_with_the_file_that_reprints_the_review():
    # Thermoddem V1.10 (shipped by pygcc) prints log_k 11.382 for Zn(OH)2_e, citing 13pow/bro
    log_k, refs = _thermoddem_log_k("Zn(OH)2_e")
    assert "13pow/bro" in refs
    assert log_k == pytest.approx(LOG_KS0_EPSILON, abs=0.005)
    eps = load_species().get("Zn(OH)2", "s")
    t = load_species()
    ours = (
        eps.dgf_kj_mol - t.get("Zn^2+", "aq").dgf_kj_mol - 2 * t.get("H2O", "l").dgf_kj_mol
    ) / RT_LN10
    assert ours == pytest.approx(log_k, abs=0.005)
