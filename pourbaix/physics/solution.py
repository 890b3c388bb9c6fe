"""Ionic strength, background electrolytes and activity-coefficient models.

Molalities are in mol/kg of water; log means log10. Five models are offered
(:data:`ACTIVITY_MODELS`): Davies, extended Debye–Hückel, B-dot, SIT and Pitzer
(the last two by charge only here; with the ions, :mod:`pourbaix.physics.sit` and
:mod:`pourbaix.physics.pitzer`). Each states
the ionic strength above which it warns (:class:`~pourbaix.physics.thermo.RangeWarning`)
and above which it refuses (:class:`~pourbaix.errors.ConditionsError`); see
:func:`model_validity`. Neutral species get γ = 1 (no salting-out term).
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Mapping
from typing import NamedTuple

import numpy as np

from pourbaix.constants import E_CHARGE, EPS0, K_B, LN10, N_A
from pourbaix.errors import ConditionsError, FormulaError, OptionError
from pourbaix.physics.thermo import RangeWarning, check_temperature, water_properties

__all__ = [
    "SALTS",
    "KIELLAND_ION_SIZE",
    "DEFAULT_ION_SIZE",
    "ACTIVITY_MODELS",
    "ActivityModel",
    "ionic_strength",
    "parse_background",
    "background_ions",
    "ion_size",
    "debye_huckel_a",
    "debye_huckel_b",
    "bdot",
    "model_validity",
    "log_gamma",
    "mean_activity_coefficient",
    "PITZER_A_PHI_25C",
]

# CODATA 2018 values, from one module with their sources.
_E = E_CHARGE  # elementary charge [C]
_NA = N_A  # Avogadro constant [1/mol]
_KB = K_B  # Boltzmann constant [J/K]
_EPS0 = EPS0  # vacuum permittivity [F/m]
_LN10 = LN10

# --------------------------------------------------------------------------- salts

#: Background salts, taken as fully dissociated into the ions listed (ion,
#: count, charge). Ion pairs (MgSO4°, CaSO4°, NaSO4^-), HSO4^- (pKa2 of H2SO4
#: ≈ 2) and the hydrolysis of CO3^2- and HCO3^- are neglected: the ionic strength
#: is an upper estimate for the sulfates, carbonates and H2SO4.
SALTS: dict[str, tuple[tuple[str, int, int], ...]] = {
    "NaCl": (("Na^+", 1, 1), ("Cl^-", 1, -1)),
    "KCl": (("K^+", 1, 1), ("Cl^-", 1, -1)),
    "CaCl2": (("Ca^2+", 1, 2), ("Cl^-", 2, -1)),
    "MgCl2": (("Mg^2+", 1, 2), ("Cl^-", 2, -1)),
    "Na2SO4": (("Na^+", 2, 1), ("SO4^2-", 1, -2)),
    "K2SO4": (("K^+", 2, 1), ("SO4^2-", 1, -2)),
    "MgSO4": (("Mg^2+", 1, 2), ("SO4^2-", 1, -2)),
    "CaSO4": (("Ca^2+", 1, 2), ("SO4^2-", 1, -2)),
    "NaHCO3": (("Na^+", 1, 1), ("HCO3^-", 1, -1)),
    "Na2CO3": (("Na^+", 2, 1), ("CO3^2-", 1, -2)),
    "KNO3": (("K^+", 1, 1), ("NO3^-", 1, -1)),
    "NaNO3": (("Na^+", 1, 1), ("NO3^-", 1, -1)),
    "NaClO4": (("Na^+", 1, 1), ("ClO4^-", 1, -1)),
    "HCl": (("H^+", 1, 1), ("Cl^-", 1, -1)),
    "NaOH": (("Na^+", 1, 1), ("OH^-", 1, -1)),
    "KOH": (("K^+", 1, 1), ("OH^-", 1, -1)),
    "H2SO4": (("H^+", 2, 1), ("SO4^2-", 1, -2)),
}
_SALT_LOOKUP = {k.lower(): k for k in SALTS}

#: Kielland 1937 (J. Am. Chem. Soc. 59, 1675), Table I: ion-size parameter å in
#: ångström for common ions; from memory. Where Kielland gives a range (Na+,
#: HCO3-: 4-4.5) the lower value is used.
KIELLAND_ION_SIZE: dict[str, float] = {
    "H^+": 9.0,
    "Li^+": 6.0,
    "Na^+": 4.0,
    "K^+": 3.0,
    "Rb^+": 2.5,
    "Cs^+": 2.5,
    "NH4^+": 2.5,
    "Ag^+": 2.5,
    "Tl^+": 2.5,
    "Mg^2+": 8.0,
    "Be^2+": 8.0,
    "Ca^2+": 6.0,
    "Cu^2+": 6.0,
    "Zn^2+": 6.0,
    "Sn^2+": 6.0,
    "Mn^2+": 6.0,
    "Fe^2+": 6.0,
    "Ni^2+": 6.0,
    "Co^2+": 6.0,
    "Sr^2+": 5.0,
    "Ba^2+": 5.0,
    "Cd^2+": 5.0,
    "Hg^2+": 5.0,
    "Pb^2+": 4.5,
    "Hg2^2+": 4.0,
    "Al^3+": 9.0,
    "Fe^3+": 9.0,
    "Cr^3+": 9.0,
    "OH^-": 3.5,
    "F^-": 3.5,
    "HS^-": 3.5,
    "ClO4^-": 3.5,
    "MnO4^-": 3.5,
    "Cl^-": 3.0,
    "Br^-": 3.0,
    "I^-": 3.0,
    "CN^-": 3.0,
    "NO2^-": 3.0,
    "NO3^-": 3.0,
    "HCO3^-": 4.0,
    "H2PO4^-": 4.0,
    "SO4^2-": 4.0,
    "CrO4^2-": 4.0,
    "HPO4^2-": 4.0,
    "PO4^3-": 4.0,
    "CO3^2-": 4.5,
    "SO3^2-": 4.5,
    "S^2-": 5.0,
}
#: Ion-size parameter for ions not in the table [Å] (common practice).
DEFAULT_ION_SIZE = 4.0


# --------------------------------------------------------------------------- ionic strength


def _ion_charge(name):
    from pourbaix.tables.formula import parse_formula

    try:
        return parse_formula(str(name)).charge
    except FormulaError as exc:
        raise FormulaError(f"ion {name!r}: {exc}") from None


def _check_molality(value, what):
    try:
        m = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ConditionsError(f"molality of {what} is not a number: {value!r}") from None
    if np.any(~np.isfinite(m)) or np.any(m < 0):
        bad = m[~np.isfinite(m) | (m < 0)].flat[0] if m.ndim else float(m)
        raise ConditionsError(f"molality of {what} must be a number >= 0 mol/kg, got {bad:g}")
    return m


def ionic_strength(molalities):
    """Ionic strength I = ½ Σ m z².

    Parameters
    ----------
    molalities : Mapping[str, float] or sequence of tuple
        Either ion formula -> molality (the charge is read from the formula,
        e.g. ``"Ca^2+"`` or ``"Ca+2"``), or a sequence of ``(molality, charge)``
        or ``(ion, molality, charge)`` tuples [mol/kg].

    Returns
    -------
    float or numpy.ndarray
        Ionic strength [mol/kg]; an array if any molality is an array.

    Raises
    ------
    ConditionsError
        If a molality is negative or not a number.
    FormulaError
        If an ion name cannot be parsed.

    Notes
    -----
    Lewis & Randall (1921), J. Am. Chem. Soc. 43, 1112. Electroneutrality is
    not checked.

    Examples
    --------
    >>> ionic_strength({"Ca^2+": 0.01, "Cl^-": 0.02})
    0.03
    >>> ionic_strength([(0.1, 1), (0.1, -1)])
    0.1
    """
    if isinstance(molalities, Mapping):
        items = [(str(k), v, _ion_charge(k)) for k, v in molalities.items()]
    else:
        items = []
        for i, entry in enumerate(molalities):
            entry = tuple(entry)
            if len(entry) == 2:
                items.append((f"entry {i}", entry[0], entry[1]))
            elif len(entry) == 3:
                items.append((str(entry[0]), entry[1], entry[2]))
            else:
                raise ConditionsError(
                    f"entry {i} of molalities must be (molality, charge) or "
                    f"(ion, molality, charge), got {entry!r}"
                )
    total = 0.0
    for what, m, z in items:
        m = _check_molality(m, what)
        # Lewis & Randall 1921: I = 1/2 sum m_i z_i^2
        total = total + 0.5 * m * float(z) ** 2
    total = np.asarray(total, dtype=float)
    return float(total) if total.ndim == 0 else total


def parse_background(text):
    """Parse a background electrolyte such as ``"NaCl=0.5,CaCl2=0.01"``.

    Parameters
    ----------
    text : str
        Comma-separated ``SALT=MOLALITY`` items; salt names from :data:`SALTS`
        (case-insensitive) [mol/kg].

    Returns
    -------
    dict
        Canonical salt name -> molality [mol/kg]; empty for an empty string.

    Raises
    ------
    OptionError
        If a salt is unknown (the message lists the valid salts).
    ConditionsError
        If an item is malformed, a molality is negative or not a number, or a
        salt is given twice.

    Examples
    --------
    >>> parse_background("NaCl=0.5, cacl2=0.01")
    {'NaCl': 0.5, 'CaCl2': 0.01}
    """
    result = {}
    for raw in str(text).split(","):
        item = raw.strip()
        if not item:
            continue
        if item.count("=") != 1:
            raise ConditionsError(
                f"background item {item!r} must read SALT=MOLALITY, e.g. NaCl=0.5"
            )
        name, value = (s.strip() for s in item.split("="))
        salt = _SALT_LOOKUP.get(name.lower())
        if salt is None:
            raise OptionError(f"unknown salt {name!r}; valid salts: {', '.join(SALTS)}")
        try:
            m = float(value)
        except ValueError:
            raise ConditionsError(
                f"molality of {salt} is not a number: {value!r} (give mol/kg, e.g. {salt}=0.1)"
            ) from None
        if not math.isfinite(m) or m < 0:
            raise ConditionsError(f"molality of {salt} must be a number >= 0 mol/kg, got {value}")
        if salt in result:
            raise ConditionsError(f"salt {salt} is given twice in the background electrolyte")
        result[salt] = m
    return result


def background_ions(salts):
    """Ions of a background electrolyte, fully dissociated.

    Parameters
    ----------
    salts : Mapping[str, float]
        Salt name -> molality, e.g. from :func:`parse_background` [mol/kg].

    Returns
    -------
    list of tuple
        ``(ion, molality, charge)`` for each distinct ion, in order of first
        appearance; ions shared by several salts are summed [mol/kg].

    Raises
    ------
    OptionError
        If a salt is unknown.
    ConditionsError
        If a molality is negative or not a number.

    Examples
    --------
    >>> background_ions({"NaCl": 0.5, "CaCl2": 0.01})
    [('Na^+', 0.5, 1), ('Cl^-', 0.52, -1), ('Ca^2+', 0.01, 2)]
    """
    totals: dict[str, list] = {}
    for name, molality in dict(salts).items():
        salt = _SALT_LOOKUP.get(str(name).lower())
        if salt is None:
            raise OptionError(f"unknown salt {name!r}; valid salts: {', '.join(SALTS)}")
        m = float(_check_molality(molality, salt))
        for ion, count, charge in SALTS[salt]:
            if ion not in totals:
                totals[ion] = [0.0, charge]
            totals[ion][0] += count * m
    return [(ion, round(m, 15), z) for ion, (m, z) in totals.items()]


def ion_size(ion, default=DEFAULT_ION_SIZE):
    """Ion-size parameter å of an ion from Kielland's table.

    Parameters
    ----------
    ion : str
        Ion formula in canonical form, e.g. ``"Ca^2+"`` (other charge notations
        are normalised).
    default : float
        Value for ions not in the table [Å].

    Returns
    -------
    float
        Ion-size parameter [Å].

    Examples
    --------
    >>> ion_size("Ca+2"), ion_size("Zr^4+")
    (6.0, 4.0)
    """
    if ion in KIELLAND_ION_SIZE:
        return KIELLAND_ION_SIZE[ion]
    from pourbaix.tables.formula import parse_formula

    try:
        text = parse_formula(str(ion)).text
    except FormulaError:
        return float(default)
    return KIELLAND_ION_SIZE.get(text, float(default))


# --------------------------------------------------------------------------- A(T), B(T)


def _per_temperature(func, temperature_c, pressure_bar):
    t = check_temperature(temperature_c)
    if isinstance(t, float):
        return func(water_properties(t, pressure_bar), t)
    out = np.array([func(water_properties(float(v), pressure_bar), float(v)) for v in t.flat])
    return out.reshape(t.shape)


def _a_from(w, t):
    tk = t + 273.15
    # Debye & Hückel 1923 limiting law, log10 form on the molal scale:
    # A = e^3 sqrt(2 N_A rho_w) / (8 pi ln10 (eps0 eps_r k T)^(3/2))
    return (
        _E**3
        * math.sqrt(2.0 * _NA * w.density_kg_m3)
        / (8.0 * math.pi * _LN10 * (_EPS0 * w.dielectric_constant * _KB * tk) ** 1.5)
    )


def _b_from(w, t):
    tk = t + 273.15
    # Debye & Hückel 1923: B = sqrt(2 e^2 N_A rho_w / (eps0 eps_r k T)), per ångström
    return (
        math.sqrt(2.0 * _E**2 * _NA * w.density_kg_m3 / (_EPS0 * w.dielectric_constant * _KB * tk))
        * 1e-10
    )


def debye_huckel_a(temperature_c=25.0, pressure_bar=None):
    """Debye–Hückel A parameter (log10, molal scale) from water's properties.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].
    pressure_bar : float, optional
        Pressure; default as in :func:`pourbaix.physics.thermo.water_properties` [bar].

    Returns
    -------
    float or numpy.ndarray
        A [kg^0.5 mol^-0.5].

    Raises
    ------
    ConditionsError
        If the temperature or pressure is out of range.

    Notes
    -----
    A = e³ (2 N_A ρw)^½ / (8π ln10 (ε0 εr k T)^{3/2}) (Debye & Hückel 1923;
    Robinson & Stokes 1959, ch. 9), with CODATA 2018 constants, ρw from
    IAPWS-95 and εr from IAPWS R8-97.

    Examples
    --------
    >>> round(debye_huckel_a(25.0), 4)
    0.5098
    """
    return _per_temperature(_a_from, temperature_c, pressure_bar)


def debye_huckel_b(temperature_c=25.0, pressure_bar=None):
    """Debye–Hückel B parameter (molal scale) from water's properties.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].
    pressure_bar : float, optional
        Pressure; default as in :func:`pourbaix.physics.thermo.water_properties` [bar].

    Returns
    -------
    float or numpy.ndarray
        B [kg^0.5 mol^-0.5 Å^-1].

    Raises
    ------
    ConditionsError
        If the temperature or pressure is out of range.

    Notes
    -----
    B = (2 e² N_A ρw / (ε0 εr k T))^½ (Debye & Hückel 1923), CODATA 2018
    constants, IAPWS water properties.

    Examples
    --------
    >>> round(debye_huckel_b(25.0), 4)
    0.3284
    """
    return _per_temperature(_b_from, temperature_c, pressure_bar)


# Helgeson 1969 (Am. J. Sci. 267, 729), B-dot for NaCl-dominated solutions
# against temperature; values from memory as commonly tabulated from that paper.
_BDOT_T_C = (0.0, 25.0, 60.0, 100.0, 150.0, 200.0, 250.0, 300.0)
_BDOT = (0.0374, 0.0410, 0.0438, 0.0460, 0.0470, 0.0470, 0.0340, 0.0000)


def bdot(temperature_c=25.0):
    """Helgeson's deviation function Ḃ at T.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].

    Returns
    -------
    float or numpy.ndarray
        Ḃ [kg/mol].

    Raises
    ------
    ConditionsError
        If the temperature is outside 0-600 °C.

    Warns
    -----
    RangeWarning
        Above 300 °C, the end of the table.

    Notes
    -----
    Linear interpolation in the table of Helgeson (1969), 0-300 °C along the
    saturation curve (0.041 at 25 °C); values from memory.

    Examples
    --------
    >>> bdot(25.0)
    0.041
    """
    t = check_temperature(temperature_c)
    if np.any(np.asarray(t) > _BDOT_T_C[-1]):
        warnings.warn(
            f"the B-dot table of Helgeson (1969) ends at {_BDOT_T_C[-1]:g} °C; "
            "its last value is used above",
            RangeWarning,
            stacklevel=2,
        )
    return (
        float(np.interp(t, _BDOT_T_C, _BDOT))
        if isinstance(t, float)
        else np.interp(t, _BDOT_T_C, _BDOT)
    )


# --------------------------------------------------------------------------- models


class ActivityModel(NamedTuple):
    """An activity-coefficient model and where it can be trusted."""

    name: str
    warn_above: float
    """Ionic strength above which a RangeWarning is issued [mol/kg]."""
    refuse_above: float
    """Ionic strength above which the model refuses [mol/kg]."""
    text: str
    """One-line statement of validity, used in outputs."""
    reference: str


def _davies(z, i, t, size, p):
    a = debye_huckel_a(t, p)
    si = np.sqrt(i)
    # Davies 1962 (Ion Association), eq. 3.5: log g = -A z^2 (sqrt(I)/(1+sqrt(I)) - 0.3 I)
    return -a * z**2 * (si / (1.0 + si) - 0.3 * i)


def _extended_dh(z, i, t, size, p):
    a = debye_huckel_a(t, p)
    b = debye_huckel_b(t, p)
    si = np.sqrt(i)
    # Debye & Hückel 1923, with ion size (Kielland 1937): log g = -A z^2 sqrt(I)/(1 + B a sqrt(I))
    return -a * z**2 * si / (1.0 + b * size * si)


def _bdot_model(z, i, t, size, p):
    a = debye_huckel_a(t, p)
    b = debye_huckel_b(t, p)
    si = np.sqrt(i)
    # Helgeson 1969, eq. 2 (B-dot): log g = -A z^2 sqrt(I)/(1 + a B sqrt(I)) + Bdot I
    return -a * z**2 * si / (1.0 + b * size * si) + bdot(t) * i


#: The activity models by name, each with its limits of ionic strength and its source.
ACTIVITY_MODELS: dict[str, ActivityModel] = {
    "davies": ActivityModel(
        "davies",
        0.5,
        1.0,
        "Davies: within about 2 % of measured mean activity coefficients of 1:1 salts "
        "to I = 0.1 mol/kg and about 10 % at 0.5 mol/kg; warns above 0.5, refuses above 1 mol/kg",
        "Davies, C. W. (1962). Ion Association. Butterworths, London.",
    ),
    "extended-debye-huckel": ActivityModel(
        "extended-debye-huckel",
        0.1,
        1.0,
        "extended Debye–Hückel (ion size from Kielland 1937): within about 3 % of measured "
        "mean activity coefficients of 1:1 salts to I = 0.1 mol/kg, about 10 % at 0.5 mol/kg "
        "(no linear term); warns above 0.1, refuses above 1 mol/kg",
        "Debye, P., Hückel, E. (1923). Phys. Z. 24, 185; Kielland, J. (1937). "
        "J. Am. Chem. Soc. 59, 1675.",
    ),
    "b-dot": ActivityModel(
        "b-dot",
        1.0,
        3.0,
        "B-dot (Helgeson 1969): fitted to NaCl-dominated solutions; within about 5 % of "
        "measured mean activity coefficients to I = 1 mol/kg there; warns above 1, refuses "
        "above 3 mol/kg",
        "Helgeson, H. C. (1969). Am. J. Sci. 267, 729-804.",
    ),
    "sit": ActivityModel(
        "sit",
        3.5,
        6.0,
        "SIT (NEA-TDB): log g = -z^2 D + sum eps m, D = A sqrt(I)/(1 + 1.5 sqrt(I)); holds to about "
        "3.5 mol/kg; for an ion known only by its charge the eps terms are 0 (the specific terms "
        "need the ions: pourbaix.physics.sit); warns above 3.5, refuses above 6 mol/kg",
        "Grenthe, I. et al. (1992). Chemical Thermodynamics of Uranium, NEA-TDB vol. 1, "
        "Elsevier, Appendix B; Guillaumont, R. et al. (2003). NEA-TDB vol. 5, Appendix B.",
    ),
    "pitzer": ActivityModel(
        "pitzer",
        9.0,
        20.0,
        "Pitzer with the Harvie-Moller-Weare (1984) parameters, 25 °C, Na-K-Mg-Ca-H-Cl-SO4-HCO3-"
        "CO3-OH; for an ion known only by its charge only the long-range term z^2 f applies (the "
        "specific terms need the ions: pourbaix.physics.pitzer); warns above 9, refuses above "
        "20 mol/kg",
        "Harvie, C. E., Moller, N., Weare, J. H. (1984). Geochim. Cosmochim. Acta 48, 723-751; "
        "Pitzer, K. S. (1973). J. Phys. Chem. 77, 268.",
    ),
}


#: Debye-Hückel osmotic slope A_phi at 25 °C used with the Pitzer parameters
#: [kg^1/2 mol^-1/2] (Pitzer 1991, table 1; from memory).
PITZER_A_PHI_25C = 0.3915


def _sit_model(z, i, t, size, p):
    # NEA-TDB (Grenthe et al. 1992, App. B, eqs. B.2, B.4) with every epsilon 0:
    # log g = -z^2 A sqrt(I)/(1 + 1.5 sqrt(I)), A = 0.509 at 25 °C
    a = 0.509 if t == 25.0 else debye_huckel_a(t, p)
    si = np.sqrt(i)
    return -(z**2) * a * si / (1.0 + 1.5 * si)


def _pitzer_model(z, i, t, size, p):
    if abs(t - 25.0) > 0.5:
        raise ConditionsError(f"the Pitzer parameters here are those of 25 °C; got {t:g} °C")
    si = np.sqrt(i)
    # Pitzer 1973, eq. 18 (b = 1.2): f = -A_phi [sqrt(I)/(1 + b sqrt(I)) + (2/b) ln(1 + b sqrt(I))]
    f = -PITZER_A_PHI_25C * (si / (1 + 1.2 * si) + 2.0 / 1.2 * np.log1p(1.2 * si))
    return z**2 * f / _LN10


_MODEL_FUNCS = {
    "davies": _davies,
    "extended-debye-huckel": _extended_dh,
    "b-dot": _bdot_model,
    "sit": _sit_model,
    "pitzer": _pitzer_model,
}
_MODEL_ALIASES = {
    "davies": "davies",
    "extended-debye-huckel": "extended-debye-huckel",
    "extended-debye-hückel": "extended-debye-huckel",
    "edh": "extended-debye-huckel",
    "b-dot": "b-dot",
    "bdot": "b-dot",
    "sit": "sit",
    "pitzer": "pitzer",
}


def _model(model):
    key = "davies" if model is None else str(model).strip().lower().replace("_", "-")
    name = _MODEL_ALIASES.get(key)
    if name is None:
        raise OptionError(
            f"unknown activity model {model!r}; valid models: {', '.join(ACTIVITY_MODELS)}"
        )
    return ACTIVITY_MODELS[name]


def model_validity(model):
    """Ionic-strength limits and a statement of validity of a model.

    Parameters
    ----------
    model : str
        Model name, a key of :data:`ACTIVITY_MODELS` (case-insensitive; "edh"
        and "bdot" are accepted too).

    Returns
    -------
    tuple
        ``(warn_above, refuse_above, text)`` with ionic strengths in mol/kg.

    Raises
    ------
    OptionError
        If the model is unknown (the message lists the valid models).

    Examples
    --------
    >>> model_validity("davies")[:2]
    (0.5, 1.0)
    """
    m = _model(model)
    return m.warn_above, m.refuse_above, m.text


def log_gamma(
    charge,
    ionic_strength,
    temperature_c=25.0,
    model="davies",
    ion_size_angstrom=None,
    pressure_bar=None,
):
    """Log10 of the activity coefficient of an ion.

    Parameters
    ----------
    charge : int or array_like
        Ionic charge [-]; 0 gives log γ = 0.
    ionic_strength : float or array_like
        Ionic strength [mol/kg].
    temperature_c : float
        Temperature [°C].
    model : str
        "davies" (default), "extended-debye-huckel" or "b-dot".
    ion_size_angstrom : float or array_like, optional
        Ion-size parameter å for the extended Debye–Hückel and B-dot models;
        default 4 Å (see :func:`ion_size` for Kielland's values) [Å].
    pressure_bar : float, optional
        Pressure; default as in :func:`pourbaix.physics.thermo.water_properties` [bar].

    Returns
    -------
    float or numpy.ndarray
        log10 γ on the molal scale [-].

    Raises
    ------
    OptionError
        If the model is unknown.
    ConditionsError
        If the ionic strength is negative or above the model's refusal limit,
        or T is out of range.

    Warns
    -----
    RangeWarning
        If the ionic strength is above the model's warning limit.

    Notes
    -----
    Davies (1962): log γ = -A z² (√I/(1+√I) - 0.3 I).
    Extended Debye–Hückel (1923): log γ = -A z² √I / (1 + B å √I).
    B-dot (Helgeson 1969, eq. 2): log γ = -A z² √I / (1 + B å √I) + Ḃ I.
    A and B from :func:`debye_huckel_a`, :func:`debye_huckel_b`; Ḃ from
    :func:`bdot`. Neutral species: γ = 1 (no Setschenow term).

    Examples
    --------
    >>> round(log_gamma(1, 0.1), 4)
    -0.1072
    """
    m = _model(model)
    t = check_temperature(temperature_c)
    if not isinstance(t, float):
        raise ConditionsError("log_gamma takes one temperature at a time")
    try:
        i = np.asarray(ionic_strength, dtype=float)
    except (TypeError, ValueError):
        raise ConditionsError(
            f"ionic strength {ionic_strength!r} is not a number of mol/kg"
        ) from None
    if np.any(~np.isfinite(i)) or np.any(i < 0):
        raise ConditionsError(f"ionic strength must be a number >= 0 mol/kg, got {ionic_strength}")
    i_max = float(np.max(i)) if i.size else 0.0
    if i_max > m.refuse_above:
        raise ConditionsError(
            f"ionic strength {i_max:g} mol/kg is beyond the {m.name} model's limit of "
            f"{m.refuse_above:g} mol/kg ({m.text})"
        )
    if i_max > m.warn_above:
        warnings.warn(
            f"ionic strength {i_max:g} mol/kg is above {m.warn_above:g} mol/kg, where the "
            f"{m.name} model stops being trustworthy ({m.text})",
            RangeWarning,
            stacklevel=2,
        )
    z = np.asarray(charge, dtype=float)
    size = (
        DEFAULT_ION_SIZE
        if ion_size_angstrom is None
        else np.asarray(ion_size_angstrom, dtype=float)
    )
    if np.any(np.asarray(size) <= 0):
        raise ConditionsError(f"ion size must be > 0 Å, got {ion_size_angstrom}")
    out = _MODEL_FUNCS[m.name](z, i, t, size, pressure_bar)
    out = np.where(z == 0, 0.0, out)  # neutral species: gamma = 1
    return float(out) if np.ndim(out) == 0 else out


def mean_activity_coefficient(
    salt, molality, temperature_c=25.0, model="davies", pressure_bar=None
):
    """Mean activity coefficient γ± of a salt alone in water.

    Parameters
    ----------
    salt : str
        A salt of :data:`SALTS` (case-insensitive).
    molality : float or array_like
        Molality of the salt [mol/kg].
    temperature_c : float
        Temperature [°C].
    model : str
        Activity model, see :func:`log_gamma`.
    pressure_bar : float, optional
        Pressure [bar].

    Returns
    -------
    float or numpy.ndarray
        γ± [-].

    Raises
    ------
    OptionError
        If the salt or model is unknown.
    ConditionsError
        If the molality is negative or the ionic strength is beyond the model.

    Notes
    -----
    log γ± = Σ ν_i log γ_i / Σ ν_i over the ions of the salt, each with its
    Kielland ion size (Robinson & Stokes 1959, ch. 2).

    Examples
    --------
    >>> round(mean_activity_coefficient("NaCl", 0.1), 3)
    0.781
    """
    name = _SALT_LOOKUP.get(str(salt).lower())
    if name is None:
        raise OptionError(f"unknown salt {salt!r}; valid salts: {', '.join(SALTS)}")
    m = _check_molality(molality, name)
    ions = SALTS[name]
    ionic = sum(0.5 * count * m * z**2 for _, count, z in ions)
    total = 0.0
    nu = 0
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # warned once below
        for ion, count, z in ions:
            # Robinson & Stokes 1959: log g+- = sum(nu_i log g_i) / sum(nu_i)
            total = total + count * np.asarray(
                log_gamma(z, ionic, temperature_c, model, ion_size(ion), pressure_bar)
            )
            nu += count
    warn_above = _model(model).warn_above
    if float(np.max(ionic)) > warn_above:
        warnings.warn(
            f"ionic strength {float(np.max(ionic)):g} mol/kg is above {warn_above:g} mol/kg, "
            f"where the {_model(model).name} model stops being trustworthy",
            RangeWarning,
            stacklevel=2,
        )
    out = 10.0 ** (total / nu)
    return float(out) if np.ndim(out) == 0 else out
