"""Specific ion interaction theory (SIT) with the NEA-TDB interaction coefficients.

log10 gamma_j = -z_j^2 D + sum_k epsilon(j, k) m_k, with the Debye-Hückel term
D = A sqrt(I) / (1 + 1.5 sqrt(I)) and the sum over the ions k of opposite
charge (Brønsted 1922; Scatchard 1936; Guggenheim & Turgeon 1955; NEA-TDB,
Grenthe et al. 1992, Appendix B, eqs. B.4-B.5). The epsilon values are those
of the NEA-TDB reviews (Guillaumont et al. 2003, Appendix B), in
``species_data/activity/sit_nea.csv``; an ion pair with no tabulated value
gets epsilon = 0 and is reported. The values were typed from memory; the
tests check those of HCl, NaCl, KCl, CaCl2 and MgCl2 by the NEA-TDB's own
route to them (the slope of log gamma± + abs(z+ z-) D against m through the
mean activity coefficients of Robinson & Stokes 1959, Appendix 8.10; Ciavatta
1980), within the uncertainty the table gives.

Range, enforced: ionic strength to 3.5 mol/kg (a warning above, refused
above 6), temperature 0 to 50 °C (the epsilon values are those of 25 °C; A
follows the temperature).
"""

from __future__ import annotations

import csv
import math
import warnings
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from pourbaix.errors import ConditionsError, DataError, OptionError
from pourbaix.physics.thermo import RangeWarning

__all__ = [
    "WARN_ABOVE",
    "REFUSE_ABOVE",
    "SitResult",
    "load_epsilon",
    "debye_huckel_term",
    "sit",
    "mean_activity_coefficient",
    "log_gamma_long_range",
    "medium_terms",
    "system_medium_terms",
]

WARN_ABOVE = 3.5  # [mol/kg] (NEA-TDB: SIT holds to about 3.5 mol/kg)
REFUSE_ABOVE = 6.0  # [mol/kg]
_BA = 1.5  # [kg^1/2 mol^-1/2] (NEA-TDB, Appendix B: B a_j = 1.5 for every ion)


@dataclass(frozen=True)
class SitResult:
    """Activity coefficients by SIT.

    Attributes
    ----------
    log_gamma : dict
        Ion -> log10 gamma (molal scale) [-].
    ionic_strength : float
        Ionic strength [mol/kg].
    missing : tuple of tuple
        Ion pairs of opposite charge with no tabulated epsilon (taken as 0).
    """

    log_gamma: dict
    ionic_strength: float
    missing: tuple


@lru_cache(maxsize=1)
def load_epsilon(path=None):
    """The epsilon table as ``{(cation, anion): value}`` [kg/mol].

    Raises
    ------
    DataError
        For a row that cannot be read (file and line named).
    """
    if path is None:
        from pourbaix.tables.species import data_dir

        path = Path(data_dir()) / "activity" / "sit_nea.csv"
    with open(path, encoding="utf-8") as f:
        lines = [(n, ln) for n, ln in enumerate(f, 1) if ln.strip() and not ln.startswith("#")]
    reader = csv.reader([ln for _, ln in lines])
    header = next(reader)
    out = {}
    for (lineno, _), row in zip(lines[1:], reader, strict=True):
        rec = dict(zip(header, row, strict=False))
        try:
            out[(rec["ion_1"], rec["ion_2"])] = float(rec["epsilon_kg_mol"])
        except (KeyError, TypeError, ValueError):
            raise DataError(f"{path}:{lineno}: epsilon must be a number") from None
    return out


def debye_huckel_term(ionic_strength, temperature_c=25.0):
    """D = A sqrt(I) / (1 + 1.5 sqrt(I)) [-] (NEA-TDB, Appendix B, eq. B.2).

    Examples
    --------
    >>> round(debye_huckel_term(1.0), 4)  # A = 0.509 at 25 °C gives 0.2036
    0.2036
    """
    from pourbaix.physics.solution import debye_huckel_a

    a = 0.509 if float(temperature_c) == 25.0 else float(debye_huckel_a(temperature_c))
    s = math.sqrt(float(ionic_strength))
    return a * s / (1.0 + _BA * s)


def _charge(ion):
    from pourbaix.tables.formula import parse_formula

    try:
        return parse_formula(ion).charge
    except Exception:  # noqa: BLE001 - any parse failure is a bad name here
        raise OptionError(
            f"cannot read the charge of ion {ion!r}; write it as Na^+, SO4^2-"
        ) from None


def sit(molalities, temperature_c=25.0, epsilon=None):
    """log10 gamma of every ion of a solution by SIT.

    Parameters
    ----------
    molalities : dict
        Ion -> molality [mol/kg], e.g. ``{"Na^+": 1.0, "Cl^-": 1.0}``.
    temperature_c : float
        Temperature [°C], 0 to 50.
    epsilon : dict, optional
        ``{(cation, anion): epsilon}`` [kg/mol]; default the NEA-TDB table.

    Returns
    -------
    SitResult

    Raises
    ------
    ConditionsError
        Negative molality, temperature outside 0-50 °C, or I above 6 mol/kg.

    Warns
    -----
    RangeWarning
        Ionic strength above 3.5 mol/kg.

    References
    ----------
    Grenthe, I., Fuger, J., Konings, R. J. M., Lemire, R. J., Muller, A. B.,
    Nguyen-Trung, C., Wanner, H. (1992). *Chemical Thermodynamics of Uranium*.
    NEA-TDB vol. 1, Elsevier, Appendix B.
    Guillaumont, R. et al. (2003). *Update on the Chemical Thermodynamics of
    Uranium, Neptunium, Plutonium, Americium and Technetium*. NEA-TDB vol. 5,
    Elsevier, Appendix B.

    Examples
    --------
    >>> r = sit({"Na^+": 1.0, "Cl^-": 1.0})
    >>> round(r.log_gamma["Na^+"], 4)  # -D + eps(Na+, Cl-) m = -0.2036 + 0.03
    -0.1736
    """
    t = float(temperature_c)
    if not 0.0 <= t <= 50.0:
        raise ConditionsError(f"SIT is used here from 0 to 50 °C (epsilon at 25 °C); got {t:g} °C")
    eps = load_epsilon() if epsilon is None else epsilon
    m, z = {}, {}
    for ion, value in dict(molalities).items():
        v = float(value)
        if not (math.isfinite(v) and v >= 0):
            raise ConditionsError(f"molality of {ion} must be a number >= 0 mol/kg, got {value!r}")
        m[ion], z[ion] = v, _charge(ion)
    ionic = 0.5 * sum(v * z[i] ** 2 for i, v in m.items())
    if ionic > REFUSE_ABOVE:
        raise ConditionsError(
            f"ionic strength {ionic:g} mol/kg is beyond SIT's limit of {REFUSE_ABOVE:g} mol/kg"
        )
    if ionic > WARN_ABOVE:
        warnings.warn(
            f"ionic strength {ionic:g} mol/kg is above {WARN_ABOVE:g} mol/kg, where SIT stops "
            "being trustworthy (NEA-TDB)",
            RangeWarning,
            stacklevel=2,
        )
    d = debye_huckel_term(ionic, t)
    out, missing = {}, []
    for j in m:
        val = -(z[j] ** 2) * d  # NEA-TDB, eq. B.4
        for k in m:
            if z[j] * z[k] >= 0 or z[j] == 0:
                continue
            pair = (j, k) if z[j] > 0 else (k, j)
            if pair in eps:
                val += eps[pair] * m[k]
            elif m[k] > 0 and pair not in missing:
                missing.append(pair)
        out[j] = val
    return SitResult(log_gamma=out, ionic_strength=ionic, missing=tuple(missing))


def mean_activity_coefficient(salt, molality, temperature_c=25.0):
    """Mean activity coefficient of one salt in water by SIT.

    Parameters
    ----------
    salt : str
        A salt of :data:`pourbaix.physics.solution.SALTS` (e.g. ``"NaCl"``).
    molality : float
        Molality [mol/kg].
    temperature_c : float
        Temperature [°C].

    Returns
    -------
    float
        gamma_± [-].
    """
    from pourbaix.physics.solution import SALTS

    if salt not in SALTS:
        raise OptionError(f"unknown salt {salt!r}; valid: {', '.join(SALTS)}")
    ions = SALTS[salt]
    r = sit({ion: n * float(molality) for ion, n, _ in ions}, temperature_c)
    nu = sum(n for _, n, _ in ions)
    return 10 ** (sum(n * r.log_gamma[ion] for ion, n, _ in ions) / nu)


def log_gamma_long_range(charge, ionic_strength, temperature_c=25.0):
    """-z^2 D: SIT for an ion known only by its charge (epsilon terms need the ions) [-]."""
    from pourbaix.physics.solution import log_gamma

    return log_gamma(charge, ionic_strength, temperature_c, model="sit")


def medium_terms(species, charges, medium, epsilon=None):
    """sum_k epsilon(j, k) m_k of each species j in a background medium [-].

    Parameters
    ----------
    species : sequence of str
        Species names (formula notation, e.g. ``"Cu^2+"``, ``"CuCl^+"``).
    charges : sequence of int
        Their charges.
    medium : sequence of (str, float, int)
        Background ions ``(ion, molality, charge)`` as from
        :func:`pourbaix.physics.solution.background_ions` [mol/kg].
    epsilon : dict, optional
        ``{(cation, anion): epsilon}`` [kg/mol]; default the NEA-TDB table.

    Returns
    -------
    (list of float, list of str)
        The terms, and the species with no tabulated epsilon against an
        opposite-charged medium ion (taken as 0).

    Examples
    --------
    >>> terms, _ = medium_terms(["Cu^2+"], [2], [("Na^+", 1.0, 1), ("Cl^-", 1.0, -1)])
    >>> terms  # eps(Cu2+, Cl-) x 1 mol/kg (NEA-TDB)
    [0.08]
    """
    eps = load_epsilon() if epsilon is None else epsilon
    terms, missing = [], []
    for name, z in zip(species, charges, strict=True):
        total = 0.0
        for ion, m, zk in medium:
            if z * zk >= 0:
                continue
            pair = (name, ion) if z > 0 else (ion, name)
            if pair in eps:
                total += eps[pair] * m
            elif name not in missing:
                missing.append(name)
        terms.append(total)
    return terms, missing


def system_medium_terms(system, background):
    """SIT medium terms of every species of a mass-balance system in a background electrolyte.

    Parameters
    ----------
    system : MassBalanceSystem
        The system (names and charges of its species).
    background : dict or str
        Background salts [mol/kg], e.g. ``"NaCl=3"``.

    Returns
    -------
    (numpy.ndarray, list of str)
        sum_k eps(j, k) m_k per species (0 for solids) [-], and the dissolved
        charged species with no tabulated epsilon.
    """
    import numpy as np

    from pourbaix.physics import solution

    salts = (
        solution.parse_background(background) if isinstance(background, str) else dict(background)
    )
    medium = solution.background_ions(salts)
    names = [n for n, aq in zip(system.names, system.aqueous, strict=True)]
    terms, missing = medium_terms(names, [int(z) for z in system.charges], medium)
    out = np.where(system.aqueous, terms, 0.0)
    charged = {
        n for n, z, aq in zip(system.names, system.charges, system.aqueous, strict=True) if aq and z
    }
    return out, [m for m in missing if m in charged]
