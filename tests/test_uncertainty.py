"""Uncertainty bands and probabilities (pourbaix.analyses.uncertainty).

Outside check: for an acid-base line between two species whose Gibbs energies
carry independent standard uncertainties u, the line's pH has standard
uncertainty sqrt(2) u / (RT ln 10) (law of propagation of uncertainty, JCGM
100:2008 eq. 10), so the central 95 % of the sampled positions spans
+-1.96 of that (normal distribution; JCGM 101:2008).
"""

import math

import numpy as np
import pytest

from pourbaix.analyses.uncertainty import boundary_band, sample_maps, species_probabilities
from pourbaix.cli import main
from pourbaix.errors import OptionError

RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol]


@pytest.fixture(scope="module")
def arsenic():
    return sample_maps("As", samples=200, default_uncertainty_kj_mol=2.0, seed=1)


def test_probabilities_sum_to_one_and_favour_the_nominal_species(arsenic):
    p = species_probabilities(arsenic, 4.5, 1.0)  # inside the H2AsO4- field, 2.3 pH from lines
    assert sum(p.values()) == pytest.approx(1.0)
    assert next(iter(p)) == str(arsenic.nominal.probe(4.5, 1.0).species)
    assert p[next(iter(p))] > 0.95


def test_band_width_of_an_acid_base_line_follows_propagation(arsenic):
    # the H2AsO4-/HAsO4^2- line at E = 1.0 V: share of samples on the acid side along pH
    ph = np.linspace(4.5, 9.5, 501)
    acid = np.zeros_like(ph)
    for m in arsenic.samples:
        acid += np.asarray(m.probe(ph, np.full_like(ph, 1.0)).species, dtype=object) == "H2AsO4^-"
    acid /= len(arsenic.samples)
    lo = ph[np.argmax(acid < 0.975)]
    hi = ph[np.argmax(acid < 0.025)]
    expected = 2 * 1.96 * math.sqrt(2) * 2.0 / RT_LN10  # [pH units]
    assert hi - lo == pytest.approx(expected, rel=0.25)


def test_zero_uncertainty_gives_no_band():
    r = sample_maps("Zn", samples=10, default_uncertainty_kj_mol=0.0)
    _, _, band = boundary_band(r, resolution=40)
    assert not band.any()


def test_bad_sample_count():
    with pytest.raises(OptionError):
        sample_maps("Zn", samples=3)


def test_cli_probe_and_map(capsys, tmp_path):
    assert main(["probe", "As", "--ph", "6.9", "--potential", "0.5", "--uncertainty", "2",
                 "--samples", "20"]) == 0  # fmt: skip
    out = capsys.readouterr().out
    assert "probability of each species (20 sampled maps" in out and "HAsO4^2-" in out
    target = tmp_path / "as.png"
    assert main(["map", "As", "--uncertainty", "--samples", "10", "--out", str(target)]) == 0
    assert target.stat().st_size > 0
    assert main(["map", "As", "--uncertainty", "--samples", "2", "--out", str(target)]) == 2
    assert "--samples 2" in capsys.readouterr().err
