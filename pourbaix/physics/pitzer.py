"""Pitzer's ion-interaction model with the Harvie-Møller-Weare (1984) parameters at 25 °C.

For concentrated chloride-sulfate-carbonate brines of Na, K, Mg, Ca (and H),
activity coefficients, the osmotic coefficient and the activity of water
follow from the virial expansion of Pitzer (1973, 1991) in the form of
Harvie, Møller & Weare (1984, appendix), with the unsymmetrical mixing terms
of Pitzer (1975). The parameters (beta0, beta1, beta2, C-phi, theta, psi) are
read from ``species_data/activity/pitzer_hmw84.csv``, written mechanically by
``species_data/activity/import_pitzer.py``.

Range, enforced: 25 °C only (the parameters are those of 25 °C), the ions of
the HMW84 system, ionic strength up to 9 mol/kg (a warning above, refused
above 20 mol/kg).

Inside the mass-balanced equilibrium solver (``activity_model="pitzer"`` with
a background), :func:`solver_log_gamma` evaluates the whole solution — the
system's dissolved species and the background ions — at each pass, so the
binary and ternary terms act between all of them.
"""

from __future__ import annotations

import csv
import math
import warnings
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from pourbaix.errors import ConditionsError, DataError, OptionError
from pourbaix.physics.solution import PITZER_A_PHI_25C as A_PHI_25C
from pourbaix.physics.thermo import RangeWarning

__all__ = [
    "PITZER_IONS",
    "WARN_ABOVE",
    "REFUSE_ABOVE",
    "PitzerResult",
    "load_parameters",
    "pitzer",
    "mean_activity_coefficient",
    "log_gamma_long_range",
    "solver_log_gamma",
    "system_note",
]

#: Ions of the Harvie-Møller-Weare (1984) system and their charges.
PITZER_IONS = {
    "Na^+": 1,
    "K^+": 1,
    "Mg^2+": 2,
    "Ca^2+": 2,
    "H^+": 1,
    "Cl^-": -1,
    "SO4^2-": -2,
    "HCO3^-": -1,
    "CO3^2-": -2,
    "OH^-": -1,
}
WARN_ABOVE = 9.0  # [mol/kg] ionic strength (CaCl2 to 3 mol/kg, seawater and NaCl to saturation)
REFUSE_ABOVE = 20.0  # [mol/kg]
_B = 1.2  # [kg^1/2 mol^-1/2] (Pitzer 1973)
_WATER_KG_PER_MOL = 0.018015268  # molar mass of water [kg/mol] (IAPWS)


@dataclass(frozen=True)
class PitzerResult:
    """Activity coefficients of a solution by Pitzer's equations.

    Attributes
    ----------
    log_gamma : dict
        Ion -> log10 of its activity coefficient (molal scale) [-].
    osmotic_coefficient : float
        Practical osmotic coefficient phi [-].
    water_activity : float
        Activity of water, ln a_w = -phi M_w sum m_i [-].
    ionic_strength : float
        Ionic strength [mol/kg].
    """

    log_gamma: dict
    osmotic_coefficient: float
    water_activity: float
    ionic_strength: float


@lru_cache(maxsize=1)
def load_parameters(path=None):
    """The parameter table as ``{kind: {ions (sorted tuple): value}}``.

    Parameters
    ----------
    path : str or Path, optional
        A table of the same form; default the embedded HMW84 table.

    Returns
    -------
    dict

    Raises
    ------
    DataError
        For a row that cannot be read (the message names the file and line).
    """
    if path is None:
        from pourbaix.tables.species import data_dir

        path = Path(data_dir()) / "activity" / "pitzer_hmw84.csv"
    out = {k: {} for k in ("beta0", "beta1", "beta2", "cphi", "theta", "psi")}
    with open(path, encoding="utf-8") as f:
        lines = [(n, ln) for n, ln in enumerate(f, 1) if ln.strip() and not ln.startswith("#")]
    reader = csv.reader([ln for _, ln in lines])
    header = next(reader)
    for (lineno, _), row in zip(lines[1:], reader, strict=True):
        rec = dict(zip(header, row, strict=False))
        kind = rec.get("kind")
        if kind not in out:
            raise DataError(f"{path}:{lineno}: unknown parameter kind {kind!r}")
        ions = [rec.get(k) for k in ("ion_1", "ion_2", "ion_3") if rec.get(k)]
        bad = [i for i in ions if i not in PITZER_IONS]
        if bad:
            raise DataError(f"{path}:{lineno}: ion {bad[0]!r} is not in the HMW84 system")
        try:
            value = float(rec["value"])
        except (KeyError, TypeError, ValueError):
            raise DataError(
                f"{path}:{lineno}: value {rec.get('value')!r} is not a number"
            ) from None
        if kind == "psi":
            key = (*sorted(ions[:2]), ions[2])  # two like-charged ions and one opposite
        else:
            key = tuple(sorted(ions))
        out[kind][key] = value
    return out


def _g(x):
    # Pitzer 1973, eq. 16: g(x) = 2 [1 - (1 + x) e^-x] / x^2
    return 2.0 * (1.0 - (1.0 + x) * math.exp(-x)) / (x * x)


def _g_prime(x):
    # Pitzer 1973: g'(x) = -2 [1 - (1 + x + x^2/2) e^-x] / x^2
    return -2.0 * (1.0 - (1.0 + x + 0.5 * x * x) * math.exp(-x)) / (x * x)


def _j(x):
    # Pitzer 1975, eq. 47: J(x) = x / (4 + 4.581 x^-0.7237 exp(-0.0120 x^0.528))
    if x <= 0:
        return 0.0
    return x / (4.0 + 4.581 * x**-0.7237 * math.exp(-0.0120 * x**0.528))


def _j_prime(x):
    h = 1e-6 * max(x, 1e-6)
    return (_j(x + h) - _j(x - h)) / (2 * h) if x > h else _j(2 * h) / (2 * h)


def _etheta(zi, zj, ionic, a_phi):
    """Unsymmetrical mixing E-theta and its I-derivative (Pitzer 1975, eqs. 32-33)."""
    if zi == zj or ionic <= 0:
        return 0.0, 0.0
    s = math.sqrt(ionic)
    xij, xii, xjj = (6.0 * a * b * a_phi * s for a, b in ((zi, zj), (zi, zi), (zj, zj)))
    e = zi * zj / (4.0 * ionic) * (_j(xij) - 0.5 * _j(xii) - 0.5 * _j(xjj))
    ep = -e / ionic + zi * zj / (8.0 * ionic * ionic) * (
        xij * _j_prime(xij) - 0.5 * xii * _j_prime(xii) - 0.5 * xjj * _j_prime(xjj)
    )
    return e, ep


def pitzer(molalities, temperature_c=25.0, parameters=None, other_charges=None):
    """Activity coefficients, osmotic coefficient and water activity of a brine.

    Parameters
    ----------
    molalities : dict
        Ion -> molality [mol/kg], ions of :data:`PITZER_IONS` (e.g.
        ``{"Na^+": 1.0, "Cl^-": 1.0}``).
    temperature_c : float
        Temperature [°C]; 25 only (the parameters are those of 25 °C).
    parameters : dict, optional
        As returned by :func:`load_parameters`.
    other_charges : dict, optional
        Ion -> charge for ions outside the HMW84 system that may appear in
        ``molalities``: they count in I and Z, and their own ln gamma is
        z^2 F + abs(z) sum m_c m_a C_ca (every specific parameter of theirs
        taken as 0; neutral ones get gamma = 1).

    Returns
    -------
    PitzerResult

    Raises
    ------
    OptionError
        An ion outside the HMW84 system.
    ConditionsError
        A temperature other than 25 °C, a negative molality, or an ionic
        strength above 20 mol/kg.

    Warns
    -----
    RangeWarning
        Ionic strength above 6 mol/kg.

    Notes
    -----
    Harvie, Møller & Weare (1984), appendix eqs. (A1)-(A9): with
    F = -A_phi [sqrt(I)/(1 + b sqrt(I)) + (2/b) ln(1 + b sqrt(I))] + sum m_c m_a B'_ca
    + sum m_c m_c' Phi'_cc' + sum m_a m_a' Phi'_aa',
    ln gamma_M = z_M^2 F + sum_a m_a (2 B_Ma + Z C_Ma) + sum_c m_c (2 Phi_Mc
    + sum_a m_a psi_Mca) + sum m_a m_a' psi_Maa' + abs(z_M) sum m_c m_a C_ca
    (anions alike), and the osmotic coefficient from eq. (A1); B from Pitzer
    (1973) with alpha1 = 2 (alpha1 = 1.4, alpha2 = 12 for 2-2 salts), C = C-phi /
    (2 sqrt(abs(z_M z_X))), Phi = theta + E-theta (Pitzer 1975).

    References
    ----------
    Harvie, C. E., Møller, N. & Weare, J. H. (1984). Geochim. Cosmochim. Acta
    48, 723-751. doi:10.1016/0016-7037(84)90098-X
    Pitzer, K. S. (1973). J. Phys. Chem. 77, 268-277. doi:10.1021/j100621a026
    Pitzer, K. S. (1975). J. Solution Chem. 4, 249-265. doi:10.1007/BF00646562
    Pitzer, K. S., ed. (1991). *Activity Coefficients in Electrolyte
    Solutions*, 2nd ed. CRC Press, ch. 3.

    Examples
    --------
    >>> r = pitzer({"Na^+": 1.0, "Cl^-": 1.0})
    >>> round(r.osmotic_coefficient, 3)  # Robinson & Stokes 1959, App. 8.3: 0.936
    0.936
    """
    if abs(float(temperature_c) - 25.0) > 0.5:
        raise ConditionsError(
            f"the Pitzer parameters here are those of 25 °C (Harvie, Møller & Weare 1984); "
            f"got {temperature_c} °C"
        )
    p = load_parameters() if parameters is None else parameters
    z = dict(PITZER_IONS)
    extra = {}
    for ion, charge in dict(other_charges or {}).items():
        if ion not in PITZER_IONS:
            extra[ion] = int(charge)
    z.update(extra)
    m = {}
    for ion, value in dict(molalities).items():
        if ion not in z:
            raise OptionError(
                f"ion {ion!r} is outside the Pitzer (HMW84) system; valid: {', '.join(PITZER_IONS)}"
            )
        v = float(value)
        if not (math.isfinite(v) and v >= 0):
            raise ConditionsError(f"molality of {ion} must be a number >= 0 mol/kg, got {value!r}")
        if v > 0:
            m[ion] = v
    ionic = 0.5 * sum(v * z[i] ** 2 for i, v in m.items())
    if ionic > REFUSE_ABOVE:
        raise ConditionsError(
            f"ionic strength {ionic:g} mol/kg is beyond the Pitzer model's limit of {REFUSE_ABOVE:g}"
        )
    if ionic > WARN_ABOVE:
        warnings.warn(
            f"ionic strength {ionic:g} mol/kg is above {WARN_ABOVE:g} mol/kg, beyond the "
            "concentrations the HMW84 parameters were checked against",
            RangeWarning,
            stacklevel=2,
        )
    cations = [i for i in m if z[i] > 0]
    anions = [i for i in m if z[i] < 0]
    neutral = [i for i in m if z[i] == 0]
    a_phi = A_PHI_25C
    s = math.sqrt(ionic) if ionic > 0 else 0.0
    big_z = sum(v * abs(z[i]) for i, v in m.items())

    def par(kind, *ions):
        return p[kind].get(tuple(sorted(ions)), 0.0)

    def b_terms(c, a):
        b0, b1, b2 = par("beta0", c, a), par("beta1", c, a), par("beta2", c, a)
        a1, a2 = (1.4, 12.0) if abs(z[c]) == 2 and abs(z[a]) == 2 else (2.0, 0.0)
        if s == 0:
            return b0 + b1 + b2, 0.0, b0 + b1 + b2
        bb = b0 + b1 * _g(a1 * s) + (b2 * _g(a2 * s) if a2 else 0.0)
        bp = (b1 * _g_prime(a1 * s) + (b2 * _g_prime(a2 * s) if a2 else 0.0)) / ionic
        bphi = b0 + b1 * math.exp(-a1 * s) + (b2 * math.exp(-a2 * s) if a2 else 0.0)
        return bb, bp, bphi

    def c_term(c, a):
        return par("cphi", c, a) / (2.0 * math.sqrt(abs(z[c] * z[a])))

    # psi(i, j, k) of the ions present, by their like-charged pair (i, j) sorted
    psi_pair = {}
    for (i, j, k), value in p["psi"].items():
        if i in m and j in m and k in m:
            psi_pair.setdefault((i, j), {})[k] = value

    def psi_sum(i, j):  # sum_k m_k psi(i, j, k)
        return sum(m[k] * v for k, v in psi_pair.get(tuple(sorted((i, j))), {}).items())

    etheta = {}  # E-theta depends on the two charges only (at this I)

    def phi_terms(i, j):
        th = par("theta", i, j)
        charges = (abs(z[i]), abs(z[j]))
        if charges not in etheta:
            etheta[charges] = _etheta(*charges, ionic, a_phi)
        e, ep = etheta[charges]
        return th + e, ep, th + e + ionic * ep

    B = {(c, a): b_terms(c, a) for c in cations for a in anions}
    C = {(c, a): c_term(c, a) for c in cations for a in anions}
    pairs_c = [
        (cations[i], cations[j]) for i in range(len(cations)) for j in range(i + 1, len(cations))
    ]
    pairs_a = [
        (anions[i], anions[j]) for i in range(len(anions)) for j in range(i + 1, len(anions))
    ]
    PH = {pair: phi_terms(*pair) for pair in pairs_c + pairs_a}
    # Harvie, Møller & Weare 1984, eq. (A3): the F function
    F = -a_phi * (s / (1 + _B * s) + 2.0 / _B * math.log(1 + _B * s))
    F += sum(m[c] * m[a] * B[(c, a)][1] for c in cations for a in anions)
    F += sum(m[i] * m[j] * PH[(i, j)][1] for i, j in pairs_c + pairs_a)
    cc = sum(m[c] * m[a] * C[(c, a)] for c in cations for a in anions)
    ln_gamma = {ion: 0.0 for ion in neutral}  # no lambda parameters here: gamma = 1
    for ion in m:
        if z[ion] == 0:
            continue
        same = cations if z[ion] > 0 else anions
        other = anions if z[ion] > 0 else cations
        val = z[ion] ** 2 * F + abs(z[ion]) * cc
        for o in other:
            key = (ion, o) if z[ion] > 0 else (o, ion)
            val += m[o] * (2 * B[key][0] + big_z * C[key])
        for s_ion in same:
            if s_ion == ion:
                continue
            pair = (ion, s_ion) if (ion, s_ion) in PH else (s_ion, ion)
            val += m[s_ion] * (2 * PH[pair][0] + psi_sum(ion, s_ion))
        for (i, j), by_third in psi_pair.items():  # sum m_a m_a' psi(a, a', ion)
            if ion in by_third:
                val += m[i] * m[j] * by_third[ion]
        ln_gamma[ion] = val
    # eq. (A1): the osmotic coefficient
    total = sum(m.values())
    osm = -a_phi * ionic**1.5 / (1 + _B * s)
    osm += sum(m[c] * m[a] * (B[(c, a)][2] + big_z * C[(c, a)]) for c in cations for a in anions)
    for i, j in pairs_c + pairs_a:
        osm += m[i] * m[j] * (PH[(i, j)][2] + psi_sum(i, j))
    phi = 1.0 + 2.0 * osm / total if total > 0 else 1.0
    # ln a_w = -phi M_w sum m (Robinson & Stokes 1959, eq. 2.17)
    water = math.exp(-phi * _WATER_KG_PER_MOL * total)
    return PitzerResult(
        log_gamma={k: v / math.log(10.0) for k, v in ln_gamma.items()},
        osmotic_coefficient=phi,
        water_activity=water,
        ionic_strength=ionic,
    )


def mean_activity_coefficient(salt, molality):
    """Mean activity coefficient of a single salt in water by Pitzer's equations.

    Parameters
    ----------
    salt : str
        A salt of :data:`pourbaix.physics.solution.SALTS` made of HMW84 ions
        (e.g. ``"NaCl"``, ``"CaCl2"``, ``"MgSO4"``).
    molality : float
        Molality of the salt [mol/kg].

    Returns
    -------
    float
        gamma_± [-].

    Examples
    --------
    >>> round(mean_activity_coefficient("NaCl", 1.0), 2)  # Robinson & Stokes 1959: 0.657
    0.66
    """
    from pourbaix.physics.solution import SALTS

    if salt not in SALTS:
        raise OptionError(f"unknown salt {salt!r}; valid: {', '.join(SALTS)}")
    ions = SALTS[salt]
    m = {ion: n * float(molality) for ion, n, _ in ions}
    r = pitzer(m)
    nu = sum(n for _, n, _ in ions)
    return 10 ** (sum(n * r.log_gamma[ion] for ion, n, _ in ions) / nu)


def log_gamma_long_range(charge, ionic_strength):
    """The composition-free part of Pitzer's log10 gamma: z^2 f^gamma / ln 10 [-].

    This is what an ion gets when only its charge is known (the activity-model
    registry's ``pitzer`` entry); the specific terms need the composition
    (:func:`pitzer`).
    """
    from pourbaix.physics.solution import log_gamma

    return log_gamma(charge, ionic_strength, 25.0, model="pitzer")


def solver_log_gamma(names, charges, background=None, temperature_c=25.0, *, water=False):
    """log10 gamma of a system's dissolved species as a function of their molalities.

    For :func:`pourbaix.solve.equilibrium.solve_equilibrium`'s
    ``composition_log_gamma``: the solution is the system's dissolved species
    plus the ions of a background electrolyte, all in one Pitzer evaluation
    (:func:`pitzer`), so the binary and ternary terms of HMW84 act between all of
    them.

    Parameters
    ----------
    names : sequence of str
        Names of the dissolved species, in the solver's order (e.g. ``"Na^+"``,
        ``"NaCl(aq)"``).
    charges : sequence of int
        Their charges.
    background : dict or str, optional
        Background salts [mol/kg], e.g. ``"NaCl=1"``; ions of HMW84 only.
    temperature_c : float
        Temperature [°C]; 25 only.
    water : bool
        Also return ln a_w of the same evaluation (eq. 2.17 of Robinson &
        Stokes 1959 with the osmotic coefficient, as in :func:`pitzer`).

    Returns
    -------
    callable
        ``f(molalities) -> numpy.ndarray`` of log10 gamma per species [-];
        with ``water``, ``f(molalities) -> (log10 gamma, ln a_w)``.

    Raises
    ------
    ConditionsError
        A temperature other than 25 °C.
    OptionError
        A background ion outside the HMW84 system.

    Notes
    -----
    Species that are ions of the HMW84 system get their full Pitzer
    coefficients; other charged species get z^2 F + abs(z) sum m_c m_a C_ca
    (all their own parameters 0) and neutral ones gamma = 1 (HMW84 has no
    lambda terms for them). Ion pairs of HMW84 ions (NaCl(aq), CaSO4(aq),
    MgSO4(aq) ...) should be left out of the system: HMW84 describes those
    interactions by its B terms, with the salts fully dissociated (Harvie,
    Møller & Weare 1984, section 2), so keeping them would count them twice.
    The ions that fix the pH (H+, OH-) are not counted, as in the solver's ionic
    strength.

    References
    ----------
    Harvie, C. E., Møller, N. & Weare, J. H. (1984). Geochim. Cosmochim. Acta
    48, 723-751. doi:10.1016/0016-7037(84)90098-X
    """
    import numpy as np

    from pourbaix.physics import solution

    if abs(float(temperature_c) - 25.0) > 0.5:
        raise ConditionsError(
            f"the Pitzer parameters here are those of 25 °C (Harvie, Møller & Weare 1984); "
            f"got {temperature_c} °C"
        )
    medium = {}
    if background is not None:
        salts = (
            solution.parse_background(background)
            if isinstance(background, str)
            else dict(background)
        )
        for ion, molality, _ in solution.background_ions(salts):
            if ion not in PITZER_IONS:
                raise OptionError(
                    f"background ion {ion!r} is outside the Pitzer (HMW84) system; valid: "
                    + ", ".join(PITZER_IONS)
                )
            medium[ion] = molality
    names = [str(n) for n in names]
    others = {n: int(z) for n, z in zip(names, charges, strict=True) if n not in PITZER_IONS}
    params = load_parameters()

    def log_gamma(molalities):
        comp = dict(medium)
        for n, v in zip(names, np.asarray(molalities, dtype=float), strict=True):
            # a vanishing amount still gets its coefficient (it is dropped at exactly 0)
            comp[n] = comp.get(n, 0.0) + max(float(v), 1e-300)
        r = pitzer(comp, temperature_c, params, other_charges=others)
        lg = np.array([r.log_gamma.get(n, 0.0) for n in names])
        return (lg, math.log(r.water_activity)) if water else lg

    return log_gamma


def system_note(system):
    """What the Pitzer model covers in a mass-balance system, for a map's or a sweep's notes.

    Parameters
    ----------
    system : MassBalanceSystem
        The system.

    Returns
    -------
    str
    """
    aq = [n for n, a in zip(system.names, system.aqueous, strict=True) if a]
    covered = [n for n in aq if n in PITZER_IONS]
    charged = [
        n
        for n, z, a in zip(system.names, system.charges, system.aqueous, strict=True)
        if a and z and n not in PITZER_IONS
    ]
    text = (
        "Pitzer (Harvie, Møller & Weare 1984, 25 °C): full binary and ternary terms for "
        + (", ".join(covered) if covered else "none of this system's species")
        + " with the background ions; the water activity from the osmotic coefficient, in "
        "every equilibrium that takes up water"
    )
    if charged:
        text += "; charge terms only (no parameters) for " + ", ".join(charged)
    pairs = [n for n in aq if n.endswith("(aq)") and n not in PITZER_IONS]
    if pairs:
        text += (
            "; neutral species at gamma = 1 (" + ", ".join(pairs) + "): leave out ion pairs of "
            "HMW84 ions (e.g. NaCl(aq), CaSO4(aq)), which HMW84 describes by its B terms"
        )
    return text
