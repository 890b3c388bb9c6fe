"""Temperature dependence: Nernst factor, apparent Gibbs energies and liquid water at T.

Everything here is a plain function over floats (most also over numpy arrays).
Temperatures are in degrees Celsius at the interface (``temperature_c``) and in
kelvin inside the formulas. The range of the tool is 0-350 °C along the
liquid-vapour saturation curve and 0-600 °C up to 5000 bar where water is
dense enough for the HKF equations (:mod:`pourbaix.physics.hkf`); outside it a
:class:`~pourbaix.errors.ConditionsError` is raised. Inside it, a route that is
used beyond the range it can be trusted for emits a :class:`RangeWarning`.

The iapws package (IAPWS formulations) is imported lazily, on the first call
that needs water properties, so importing this module stays cheap.
"""

from __future__ import annotations

import functools
import math
import warnings
from collections.abc import Mapping
from typing import NamedTuple

import numpy as np

from pourbaix.constants import CAL, LN10, P_REF_BAR, T_REF_C, T_REF_K, F, R
from pourbaix.errors import ConditionsError, OptionError

__all__ = [
    "R",
    "F",
    "T_REF",
    "T_MIN_C",
    "T_MAX_C",
    "T_SATURATION_MAX_C",
    "P_REF_BAR",
    "P_MAX_BAR",
    "RangeWarning",
    "GibbsResult",
    "WaterProperties",
    "check_temperature",
    "nernst_factor",
    "apparent_gibbs",
    "CRISS_COBBLE_KINDS",
    "CRISS_COBBLE_MAX_C",
    "criss_cobble_kind",
    "criss_cobble_cp",
    "species_gibbs",
    "AQUEOUS_ROUTES",
    "kopp_heat_capacity",
    "heat_capacity_gibbs",
    "saturation_pressure",
    "water_properties",
    "water_gibbs",
    "neutral_ph",
    "pkw_r11_07",
]

# R, F (CODATA 2018) and the reference state, with their sources, from one module.
T_REF = T_REF_K  # reference temperature [K]

T_MIN_C = 0.0  # lowest temperature the tool accepts [°C]
T_MAX_C = 600.0  # highest temperature the tool accepts, at pressures above saturation [°C]
T_SATURATION_MAX_C = 350.0  # highest temperature along liquid-vapour saturation [°C]
# Highest pressure accepted: the range of the g-function fit of the HKF equations
# (Shock et al. 1992, to 5 kbar); IAPWS-95, R8-97 and R11-07 hold beyond it.
P_MAX_BAR = 5000.0
_T_CRITICAL_K = 647.096  # critical temperature of water (IAPWS-95) [K]

_LN10 = LN10
_CAL = CAL  # thermochemical calorie [J]
_M_WATER_G = 18.015268  # molar mass of water used by IAPWS-95 [g/mol]

# NBS tables (Wagman et al. 1982) / CODATA Key Values (Cox et al. 1989) for H2O(l).
_WATER_DGF_KJ_MOL = -237.129
_WATER_DHF_KJ_MOL = -285.83
_WATER_S_J_MOLK = 69.95


class RangeWarning(UserWarning):
    """A value was computed outside the range its method is trustworthy for."""


class GibbsResult(NamedTuple):
    """Apparent Gibbs energy of one species at T and how it was obtained."""

    dg_kj_mol: float
    """Apparent Gibbs energy of formation at T [kJ/mol]."""
    route: str
    """Short name of the route: "25 °C value", "constant Cp", "Maier–Kelley",
    "Criss–Cobble", "S only (Cp = 0)", "no entropy: 25 °C value",
    "IAPWS-95 (liquid water)" or "convention (H+ = 0)"."""
    valid_to_c: float
    """Highest temperature the route is trusted to [°C]; ``math.inf`` where no
    limit applies or the source states none."""


class WaterProperties(NamedTuple):
    """Properties of liquid water at one (T, P)."""

    density_kg_m3: float
    """Density, IAPWS-95 [kg/m³]."""
    dielectric_constant: float
    """Static relative permittivity, IAPWS R8-97 [-]."""
    pressure_bar: float
    """Pressure used [bar]."""
    pkw: float
    """-log10 of the ionic product of water (molal), IAPWS R11-07 [-]."""
    gibbs_kj_mol: float
    """Apparent Gibbs energy of formation of H2O(l) [kJ/mol]."""
    temperature_c: float
    """Temperature [°C]."""
    at_saturation: bool
    """True if the pressure is the liquid-vapour saturation pressure."""


# --------------------------------------------------------------------------- checks


def check_temperature(temperature_c, what="temperature"):
    """Return ``temperature_c`` as float or array after checking the 0-600 °C range.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].
    what : str
        Name used in the error message.

    Returns
    -------
    float or numpy.ndarray
        The temperature [°C]; a float for scalar input.

    Raises
    ------
    ConditionsError
        If any value is not a finite number between 0 and 600 °C (above
        350 °C a pressure must also be given; see :func:`water_properties`).
    """
    try:
        t = np.asarray(temperature_c, dtype=float)
    except (TypeError, ValueError):
        raise ConditionsError(
            f"{what} {temperature_c!r} is not a number; give degrees Celsius "
            f"between {T_MIN_C:g} and {T_MAX_C:g}"
        ) from None
    bad = ~np.isfinite(t) | (t < T_MIN_C) | (t > T_MAX_C)
    if np.any(bad):
        first = t[bad].flat[0] if t.ndim else float(t)
        raise ConditionsError(
            f"{what} {first:g} °C is outside the supported range {T_MIN_C:g} to {T_MAX_C:g} °C"
        )
    return float(t) if t.ndim == 0 else t


def _out(x):
    """Return a Python float for 0-d results, the array otherwise."""
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


# --------------------------------------------------------------------------- Nernst


def nernst_factor(temperature_c=25.0):
    """Nernst factor k_T = R T ln(10) / F.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].

    Returns
    -------
    float or numpy.ndarray
        k_T, the potential change per decade of activity for a one-electron
        couple [V].

    Raises
    ------
    ConditionsError
        If the temperature is outside 0-300 °C.

    Notes
    -----
    k_T = R T ln 10 / F with R and F from CODATA 2018 (Bard & Faulkner 2001,
    eq. 2.1.38 in log10 form).

    Examples
    --------
    >>> round(nernst_factor(25.0), 6)
    0.059159
    """
    t = check_temperature(temperature_c)
    # Nernst: k_T = R T ln10 / F
    return _out(R * (np.asarray(t) + 273.15) * _LN10 / F)


# --------------------------------------------------------------------------- dG(T)


def apparent_gibbs(
    dgf_kj_mol,
    s_j_molk,
    temperature_c,
    *,
    cp_j_molk=None,
    mk=None,
    dhf_kj_mol=None,
):
    """Apparent Gibbs energy of formation at T (Benson–Helgeson convention).

    Parameters
    ----------
    dgf_kj_mol : float
        Standard Gibbs energy of formation at 25 °C, 1 bar [kJ/mol].
    s_j_molk : float
        Standard (third-law or conventional ionic) entropy at 25 °C [J/(mol K)].
    temperature_c : float or array_like
        Temperature [°C].
    cp_j_molk : float, optional
        Heat capacity, taken constant from 25 °C to T [J/(mol K)]. Ignored when
        ``mk`` is given. With neither, Cp = 0 (entropy term only).
    mk : tuple of float, optional
        Maier–Kelley coefficients ``(a, b, c)`` of Cp = a + b T + c / T²
        [J/(mol K), J/(mol K²), J K/mol].
    dhf_kj_mol : float, optional
        Standard enthalpy of formation [kJ/mol]. Not used by this convention
        (which needs S, not ΔfH); accepted so that a table row's fields can be
        passed through unchanged.

    Returns
    -------
    float or numpy.ndarray
        Apparent Gibbs energy of formation at T [kJ/mol]; exactly
        ``dgf_kj_mol`` at 25 °C.

    Raises
    ------
    ConditionsError
        If the temperature is outside 0-300 °C.

    Notes
    -----
    The apparent Gibbs energy of formation keeps the elements at 25 °C and adds
    the change of the species' own Gibbs energy from Tr to T:

        ΔGapp(T) = ΔfG(Tr) - S(Tr) (T - Tr) + ∫ Cp dT - T ∫ Cp/T dT

    (Helgeson et al. 1978, eq. 59; Anderson & Crerar 1993, ch. 7). With
    Cp = a + bT + c/T² the two integrals are closed-form (see the source).

    References
    ----------
    Helgeson, H. C., Delany, J. M., Nesbitt, H. W., Bird, D. K. (1978). Summary
    and critique of the thermodynamic properties of rock-forming minerals.
    Am. J. Sci. 278-A, 1-229.

    Anderson, G. M., Crerar, D. A. (1993). Thermodynamics in Geochemistry.
    Oxford University Press.

    Examples
    --------
    >>> apparent_gibbs(-237.129, 69.95, 25.0)
    -237.129
    >>> round(apparent_gibbs(-237.129, 69.95, 60.0, cp_j_molk=75.29), 3)
    -239.726
    """
    del dhf_kj_mol  # not part of the Benson–Helgeson expression
    t = np.asarray(check_temperature(temperature_c), dtype=float)
    dt = t - T_REF_C  # exactly 0 at 25 °C
    tk = t + 273.15
    ln_ratio = np.log1p(dt / T_REF)  # ln(T/Tr), exactly 0 at 25 °C
    if mk is not None:
        a, b, c = (float(v) for v in mk)
        # Maier & Kelley 1932 Cp = a + bT + c/T²; integrals from Tr to T
        int_cp = a * dt + 0.5 * b * (tk**2 - T_REF**2) - c * (1.0 / tk - 1.0 / T_REF)
        int_cp_t = a * ln_ratio + b * dt - 0.5 * c * (1.0 / tk**2 - 1.0 / T_REF**2)
    elif cp_j_molk is not None:
        cp = float(cp_j_molk)
        int_cp = cp * dt
        int_cp_t = cp * ln_ratio
    else:
        int_cp = 0.0 * dt
        int_cp_t = 0.0 * dt
    # Helgeson et al. 1978, eq. 59: dG(T) = dG(Tr) - S(Tr)(T-Tr) + ∫Cp dT - T∫Cp/T dT
    dg = dgf_kj_mol + (-float(s_j_molk) * dt + int_cp - tk * int_cp_t) / 1000.0
    dg = np.where(dt == 0.0, float(dgf_kj_mol), dg)
    return _out(dg)


# --------------------------------------------------------------------------- Criss–Cobble

# Criss & Cobble 1964 (J. Am. Chem. Soc. 86, 5390), average heat-capacity
# parameters on the absolute entropy scale, Cp_avg(25 °C..T) = alpha + beta S_abs,
# alpha in cal/(mol K), beta dimensionless, for T = 60, 100, 150, 200 °C.
# Typed from memory; the cation and simple-anion rows agree with the entropy
# correspondence parameters (a_T, b_T) of Criss & Cobble 1964 (J. Am. Chem.
# Soc. 86, 5385) through alpha = a_T / ln(T/Tr), beta = (b_T - 1) / ln(T/Tr).
_CC_T_C = (60.0, 100.0, 150.0, 200.0)
_CC_ALPHA_CAL = {
    "cation": (35.0, 46.0, 46.0, 50.0),
    "anion": (-46.0, -58.0, -61.0, -65.0),
    "oxyanion": (-127.0, -138.0, -133.0, -145.0),
    "acid-oxyanion": (-122.0, -135.0, -143.0, -152.0),
}
_CC_BETA = {
    "cation": (-0.41, -0.55, -0.59, -0.63),
    "anion": (-0.28, 0.00, -0.03, -0.04),
    "oxyanion": (1.96, 2.24, 2.27, 2.53),
    "acid-oxyanion": (3.44, 3.97, 3.95, 3.98),
}
# Average absolute heat capacity of H+ from 25 °C to T [cal/(mol K)], from the
# absolute entropies of H+ of Criss & Cobble 1964 (-5.0 cal/(mol K) at 25 °C);
# from memory. Used to return to the conventional scale (H+ = 0).
_CC_CP_H_ABS_CAL = (23.0, 31.0, 33.0, 35.0)
# Criss & Cobble 1964: S_abs(H+, 25 °C) = -5.0 cal/(mol K) = -20.92 J/(mol K).
_CC_S_H_ABS_J = -5.0 * _CAL

CRISS_COBBLE_KINDS = ("cation", "anion", "oxyanion", "acid-oxyanion", "H+")
CRISS_COBBLE_MAX_C = 200.0  # highest temperature of the Criss–Cobble tables [°C]


def criss_cobble_kind(composition, charge):
    """Criss–Cobble class of an aqueous ion from its composition and charge.

    Parameters
    ----------
    composition : Mapping[str, float]
        Element symbol -> count, e.g. ``{"S": 1, "O": 4}``.
    charge : int
        Ionic charge [-].

    Returns
    -------
    str
        "H+", "cation", "anion", "oxyanion" (XOn^m-) or "acid-oxyanion"
        (HmXOn^k-, i.e. an oxyanion that carries hydrogen).

    Raises
    ------
    OptionError
        If the species is neutral (the correspondence principle covers ions only).

    Notes
    -----
    Criss & Cobble (1964) class OH- with the simple anions; an anion counts as
    an oxyanion only if it holds oxygen and at least one element other than H
    and O. All cations, including hydrolysed ones such as FeOH^2+, use the
    cation parameters, which were fitted to simple cations (an approximation).
    """
    z = int(round(float(charge)))
    if z == 0:
        raise OptionError("Criss–Cobble applies to ions only; the species is neutral")
    comp = {k: v for k, v in dict(composition).items() if v}
    if z == 1 and set(comp) == {"H"} and comp["H"] == 1:
        return "H+"
    if z > 0:
        return "cation"
    others = set(comp) - {"H", "O"}
    if "O" in comp and others:
        return "acid-oxyanion" if "H" in comp else "oxyanion"
    return "anion"


def criss_cobble_cp(s_j_molk, charge, temperature_c, kind=None):
    """Average heat capacity of an aqueous ion from 25 °C to T (Criss–Cobble).

    Parameters
    ----------
    s_j_molk : float
        Conventional partial molal entropy at 25 °C (S(H+) = 0) [J/(mol K)].
    charge : int
        Ionic charge [-].
    temperature_c : float or array_like
        Upper temperature of the average [°C].
    kind : str, optional
        "cation", "anion", "oxyanion", "acid-oxyanion" or "H+". Default: "cation"
        for positive and "anion" for negative charge.

    Returns
    -------
    float or numpy.ndarray
        Conventional average heat capacity between 25 °C and T [J/(mol K)];
        0 for H+ by convention.

    Raises
    ------
    OptionError
        If ``kind`` is not one of the classes above.
    ConditionsError
        If the temperature is outside 0-300 °C.

    Warns
    -----
    RangeWarning
        Above 200 °C, the top of the Criss–Cobble tables; the 200 °C
        parameters are then used unchanged.

    Notes
    -----
    S_abs = S_conv - 20.92 z (S_abs(H+) = -5.0 cal/(mol K)); Cp_abs = α(T) + β(T)
    S_abs with α, β of the ion's class; back on the conventional scale
    Cp_conv = Cp_abs - z Cp_abs(H+) (Criss & Cobble 1964). α, β and Cp_abs(H+)
    are tabulated at 60, 100, 150 and 200 °C and interpolated linearly in T;
    below 60 °C the 60 °C values are used (the Cp term in ΔG vanishes at 25 °C).

    References
    ----------
    Criss, C. M., Cobble, J. W. (1964). The thermodynamic properties of high
    temperature aqueous solutions. IV and V. J. Am. Chem. Soc. 86, 5385-5390
    and 5390-5393.

    Examples
    --------
    >>> criss_cobble_cp(0.0, 1, 100.0, kind="H+")
    0.0
    """
    t = np.asarray(check_temperature(temperature_c), dtype=float)
    z = float(charge)
    if kind is None:
        if z == 0:
            raise OptionError("Criss–Cobble applies to ions only; charge 0 was given")
        kind = "cation" if z > 0 else "anion"
    if kind not in CRISS_COBBLE_KINDS:
        raise OptionError(
            f"unknown Criss–Cobble class {kind!r}; valid: {', '.join(CRISS_COBBLE_KINDS)}"
        )
    if np.any(t > CRISS_COBBLE_MAX_C):
        warnings.warn(
            f"Criss–Cobble heat capacities are tabulated to {CRISS_COBBLE_MAX_C:g} °C; "
            f"{float(np.max(t)):g} °C uses the 200 °C parameters (extrapolation)",
            RangeWarning,
            stacklevel=2,
        )
    if kind == "H+":
        return _out(np.zeros_like(t))
    tc = np.clip(t, _CC_T_C[0], _CC_T_C[-1])
    alpha = np.interp(tc, _CC_T_C, _CC_ALPHA_CAL[kind]) * _CAL
    beta = np.interp(tc, _CC_T_C, _CC_BETA[kind])
    cp_h_abs = np.interp(tc, _CC_T_C, _CC_CP_H_ABS_CAL) * _CAL
    # Criss & Cobble 1964: S_abs = S_conv + z S_abs(H+)
    s_abs = float(s_j_molk) + z * _CC_S_H_ABS_J
    # Criss & Cobble 1964 (V): Cp_abs = alpha + beta S_abs; Cp_conv = Cp_abs - z Cp_abs(H+)
    return _out(alpha + beta * s_abs - z * cp_h_abs)


# --------------------------------------------------------------------------- species


def _attr(obj, name):
    value = getattr(obj, name, None)
    if value is None:
        return None
    try:
        if isinstance(value, float) and math.isnan(value):
            return None
    except TypeError:
        pass
    return value


def _is_h_plus(phase, charge, composition):
    return phase == "aq" and charge == 1 and dict(composition) == {"H": 1}


def _is_liquid_water(phase, charge, composition):
    return phase == "l" and charge == 0 and dict(composition) == {"H": 2, "O": 1}


# Upper temperature limits of each route [°C] (judgement, stated in the docs).
_VALID_CONSTANT_CP_AQ = 150.0
# solids, liquids, gases with a constant Cp: Cp of solids rises by 10-20 % from 25 to
# 350 °C, about 1 kJ/mol in ΔG at 350 °C (judgement)
_VALID_CONSTANT_CP_OTHER = 350.0
_VALID_S_ONLY = 100.0

# Kopp's rule: atomic heat capacities of solids at 25 °C [J/(mol K)] (Kopp 1864, the
# values as tabulated in Perry's Chemical Engineers' Handbook; from memory); others 25.9
_KOPP_J_MOLK = {
    "H": 9.6,
    "B": 11.3,
    "C": 7.5,
    "O": 16.7,
    "F": 20.9,
    "Si": 15.9,
    "P": 22.6,
    "S": 22.6,
}
_KOPP_OTHER_J_MOLK = 25.9

#: Routes of :func:`species_gibbs` for aqueous species: the HKF equations of state
#: (default) or the older Criss–Cobble correspondence (kept for comparison).
AQUEOUS_ROUTES = ("hkf", "criss-cobble")


def kopp_heat_capacity(composition):
    """Heat capacity of a solid at 25 °C estimated by Kopp's rule.

    Parameters
    ----------
    composition : Mapping
        Element -> atom count.

    Returns
    -------
    float
        Cp [J/(mol K)].

    Notes
    -----
    Cp = Σ n_i c_i with the atomic contributions of Kopp (1864): H 9.6, B 11.3,
    C 7.5, O 16.7, F 20.9, Si 15.9, P 22.6, S 22.6, other elements 25.9
    J/(mol K) (as tabulated in Perry's Chemical Engineers' Handbook; from
    memory). Typically within 10-20 % for oxides and hydroxides.

    References
    ----------
    Kopp, H. Ann. Chem. Pharm. Suppl. 3, 1-134, 289-342 (1864).

    Examples
    --------
    >>> round(kopp_heat_capacity({"Fe": 1, "O": 1, "H": 1}), 1)
    52.2
    """
    # Kopp 1864: Cp(solid) = sum of atomic heat capacities
    return float(sum(n * _KOPP_J_MOLK.get(e, _KOPP_OTHER_J_MOLK) for e, n in composition.items()))


def heat_capacity_gibbs(dgf_kj_mol, s_j_molk, temperature_c, mk, transitions=()):
    """Apparent Gibbs energy with Maier–Kelley heat capacities across phase transitions.

    Parameters
    ----------
    dgf_kj_mol : float
        ΔfG° at 25 °C [kJ/mol].
    s_j_molk : float
        S° at 25 °C [J/(mol K)].
    temperature_c : float
        Temperature [°C].
    mk : tuple of float
        ``(a, b, c)`` of the phase stable at 25 °C, Cp = a + bT + c/T²
        [J/(mol K), J/(mol K²), J K/mol].
    transitions : sequence of PhaseTransition
        In rising temperature; each carries ΔH of transition and the
        Maier–Kelley coefficients of the phase above it.

    Returns
    -------
    tuple
        ``(dg_kj_mol, crossed)``: ΔG at T [kJ/mol] and the number of
        transitions below T.

    Notes
    -----
    ΔG(T) = ΔfG° - S°(T - Tr) + Σ_k [∫Cp_k dT - T ∫Cp_k/T dT] + Σ_t ΔH_t (1 - T/T_t),
    the integrals over each phase's own temperature interval (Helgeson et al.
    1978, eqs. 59 and 71-72).

    References
    ----------
    Helgeson, H. C.; Delany, J. M.; Nesbitt, H. W.; Bird, D. K. Am. J. Sci.
    278-A, 1-229 (1978).

    Examples
    --------
    >>> dg, n = heat_capacity_gibbs(0.0, 32.05, 25.0, (14.8, 0.0, 0.0))
    >>> dg, n
    (0.0, 0)
    """
    t = float(check_temperature(temperature_c))
    tk = t + 273.15
    if t == T_REF_C:
        return float(dgf_kj_mol), 0
    coeffs = [tuple(float(v) for v in mk)]
    bounds = [T_REF]
    extra = 0.0
    crossed = 0
    for tr in transitions:
        if tr.t_k >= tk or tr.t_k <= T_REF:
            continue
        crossed += 1
        bounds.append(tr.t_k)
        coeffs.append((tr.mk_a_j_molk, tr.mk_b_j_molk2, tr.mk_c_jk_mol))
        # Helgeson et al. 1978, eq. 72: a transition adds dH_t to H and dH_t/T_t to S
        extra += tr.dh_j_mol * (1.0 - tk / tr.t_k)
    bounds.append(tk)
    int_cp = int_cp_t = 0.0
    for (a, b, c), t1, t2 in zip(coeffs, bounds[:-1], bounds[1:], strict=True):
        # Maier & Kelley 1932 Cp = a + bT + c/T^2, integrated from t1 to t2
        int_cp += a * (t2 - t1) + 0.5 * b * (t2**2 - t1**2) - c * (1.0 / t2 - 1.0 / t1)
        int_cp_t += a * math.log(t2 / t1) + b * (t2 - t1) - 0.5 * c * (1.0 / t2**2 - 1.0 / t1**2)
    # Helgeson et al. 1978, eq. 59
    dg = dgf_kj_mol + (-float(s_j_molk) * (tk - T_REF) + int_cp - tk * int_cp_t + extra) / 1000.0
    return float(dg), crossed


def _transitions_of(species_like):
    key = getattr(species_like, "key", None)
    if key is None:
        return ()
    from pourbaix.tables.transitions import load_transitions

    return load_transitions().get(key, ())


def _volume_term(species_like, pressure_bar, transitions_crossed=()):
    """V°(P - Pr) of a solid or liquid [kJ/mol] and whether a volume was available."""
    v = _attr(species_like, "v_cm3_mol")
    if v is None:
        return 0.0, False
    v = float(v) + sum(t.dv_cm3_mol or 0.0 for t in transitions_crossed)
    # constant molar volume (Helgeson et al. 1978, eq. 62); 1 cm3 bar = 0.1 J
    return v * (pressure_bar - P_REF_BAR) * 0.1 / 1000.0, True


def species_gibbs(species_like, temperature_c, pressure_bar=None, aqueous_route="hkf", water=None):
    """Apparent Gibbs energy of one species at (T, P), with the route taken.

    Parameters
    ----------
    species_like : object
        Any object with the attributes ``name``, ``phase`` ("aq", "s", "l",
        "g"), ``charge``, ``composition`` (Mapping element -> count),
        ``dgf_kj_mol``, ``dhf_kj_mol``, ``s_j_molk``, ``cp_j_molk``,
        ``mk_a_j_molk``, ``mk_b_j_molk2``, ``mk_c_jk_mol``, ``mk_tmax_k``
        (missing values None or NaN); optionally ``hkf``, ``v_cm3_mol`` and
        ``key`` (for the phase transitions of the tables).
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure; default 1 bar, or saturation above 100 °C (see
        :func:`water_properties`) [bar].
    aqueous_route : str
        ``"hkf"`` (default) or ``"criss-cobble"`` (the older routes for
        aqueous species, kept for comparison).
    water : WaterProperties, optional
        Water at (T, P) already computed from checked conditions (e.g.
        ``Conditions.water``); then the temperature is not checked again and
        ``pressure_bar`` is taken from it.

    Returns
    -------
    GibbsResult
        ``(dg_kj_mol, route, valid_to_c)``.

    Raises
    ------
    ConditionsError
        Outside the range of the tool (see :func:`water_properties` and
        :func:`pourbaix.physics.hkf.check_hkf_range`).
    OptionError
        An unknown ``aqueous_route``.

    Notes
    -----
    Routes, in order of preference:

    - H+(aq): 0 at every T (convention; the SHE stays the zero of the scale);
    - H2O(l): IAPWS-95 (:func:`water_gibbs`);
    - exactly 25 °C and 1 bar: the tabulated value;
    - aqueous species: "fitted HKF" with the row's HKF parameters, else
      "estimated HKF" with parameters from S° (and Cp° if tabulated) by the
      correlations of :func:`pourbaix.physics.hkf.estimate_hkf`; with
      ``aqueous_route="criss-cobble"`` the older routes below instead;
    - solids, liquids and gases: "Maier–Kelley" (with the tables' phase
      transitions) to ``mk_tmax_k``; "constant Cp" to 350 °C; for solids
      and liquids with S° but no Cp, "constant Cp (Kopp's rule)"; solids and
      liquids add V°(P - 1 bar) when ``v_cm3_mol`` is given (gases: ideal gas
      at 1 bar, no pressure term);
    - older routes (``criss-cobble``, and gases without Cp): constant Cp to
      150 °C for aqueous species, Criss–Cobble average Cp for ions to 200 °C,
      S only (Cp = 0) to 100 °C;
    - no entropy at all: the 25 °C value unchanged, route
      "no entropy: 25 °C value", trusted to 25 °C only, so that a map at T
      flags the species instead of failing.

    Examples
    --------
    >>> from types import SimpleNamespace as S
    >>> h = S(name="H+", phase="aq", charge=1, composition={"H": 1}, dgf_kj_mol=0.0,
    ...       dhf_kj_mol=0.0, s_j_molk=0.0, cp_j_molk=0.0, mk_a_j_molk=None,
    ...       mk_b_j_molk2=None, mk_c_jk_mol=None, mk_tmax_k=None)
    >>> species_gibbs(h, 150.0)
    GibbsResult(dg_kj_mol=0.0, route='convention (H+ = 0)', valid_to_c=600.0)
    """
    if aqueous_route not in AQUEOUS_ROUTES:
        raise OptionError(
            f"unknown aqueous route {aqueous_route!r}; valid: {', '.join(AQUEOUS_ROUTES)}"
        )
    if water is not None:
        # checked conditions (pourbaix.conditions): neither re-checked nor looked up again
        t, pressure_bar = float(temperature_c), water.pressure_bar
    else:
        t = check_temperature(temperature_c)
        if not isinstance(t, float):
            raise ConditionsError("species_gibbs takes one temperature at a time")
    phase = getattr(species_like, "phase", None)
    charge = int(round(float(getattr(species_like, "charge", 0) or 0)))
    composition = getattr(species_like, "composition", None) or {}
    if not isinstance(composition, Mapping):
        composition = dict(composition)
    dgf = float(species_like.dgf_kj_mol)

    if _is_h_plus(phase, charge, composition):
        return GibbsResult(0.0, "convention (H+ = 0)", T_MAX_C)
    reference_pressure = pressure_bar is None or float(pressure_bar) == P_REF_BAR
    if _is_liquid_water(phase, charge, composition):
        if t == T_REF_C and reference_pressure:
            return GibbsResult(dgf, "25 °C value", T_MAX_C)
        g = water.gibbs_kj_mol if water is not None else water_gibbs(t, pressure_bar)
        dg = g - _WATER_DGF_KJ_MOL + dgf
        return GibbsResult(dg, "IAPWS-95 (liquid water)", T_MAX_C)
    if t == T_REF_C and reference_pressure:
        return GibbsResult(dgf, "25 °C value", math.inf)

    s = _attr(species_like, "s_j_molk")
    if s is None:
        # nothing to carry the value to T: keep it and flag it as good for 25 °C only
        return GibbsResult(dgf, "no entropy: 25 °C value", T_REF_C)
    if water is None:
        water = water_properties(t, pressure_bar)
    p = water.pressure_bar
    if phase == "aq" and aqueous_route == "hkf":
        from pourbaix.physics import hkf

        params = _attr(species_like, "hkf")
        route = "fitted HKF"
        if params is None:
            params = hkf.estimate_hkf(s, charge, _attr(species_like, "cp_j_molk"))
            route = "estimated HKF"
        dg = hkf.hkf_gibbs(
            dgf, s, params, charge, t, p, water.density_kg_m3 / 1000.0, water.dielectric_constant
        )
        return GibbsResult(dg, route, hkf.HKF_T_MAX_C)
    mk_a = _attr(species_like, "mk_a_j_molk")
    if mk_a is not None:
        mk = (
            float(mk_a),
            float(_attr(species_like, "mk_b_j_molk2") or 0.0),
            float(_attr(species_like, "mk_c_jk_mol") or 0.0),
        )
        tmax_k = _attr(species_like, "mk_tmax_k")
        valid = math.inf if tmax_k is None else float(tmax_k) - 273.15
        transitions = _transitions_of(species_like) if phase != "aq" else ()
        if transitions and tmax_k is not None and transitions[0].t_k <= float(tmax_k) + 1e-9:
            # mk_tmax_k ends the first phase's fit; the transitions carry the phases above
            # (their own upper limits, 1000 K and more in Helgeson et al. 1978, lie beyond the tool)
            valid = math.inf
        dg, crossed = heat_capacity_gibbs(dgf, s, t, mk, transitions)
        route = "Maier–Kelley" + (" with transitions" if crossed else "")
        if phase in ("s", "l"):
            dv, has_v = _volume_term(species_like, p, transitions[:crossed])
            dg += dv
            route += _no_volume(has_v, p)
        return GibbsResult(dg, route, valid)
    cp = _attr(species_like, "cp_j_molk")
    route = "constant Cp"
    if cp is None and phase in ("s", "l"):
        cp = kopp_heat_capacity(composition)
        route = "constant Cp (Kopp's rule)"
    if cp is not None:
        valid = _VALID_CONSTANT_CP_AQ if phase == "aq" else _VALID_CONSTANT_CP_OTHER
        dg = float(apparent_gibbs(dgf, s, t, cp_j_molk=cp))
        if phase in ("s", "l"):
            dv, has_v = _volume_term(species_like, p)
            dg += dv
            route += _no_volume(has_v, p)
        return GibbsResult(dg, route, valid)
    if phase == "aq" and charge != 0:
        kind = criss_cobble_kind(composition, charge)
        with warnings.catch_warnings():
            # the caller learns the limit from valid_to_c
            warnings.simplefilter("ignore", RangeWarning)
            cp_avg = criss_cobble_cp(s, charge, min(t, CRISS_COBBLE_MAX_C), kind=kind)
        return GibbsResult(
            float(apparent_gibbs(dgf, s, t, cp_j_molk=cp_avg)), "Criss–Cobble", CRISS_COBBLE_MAX_C
        )
    return GibbsResult(float(apparent_gibbs(dgf, s, t)), "S only (Cp = 0)", _VALID_S_ONLY)


# pressures up to this are treated as "about 1 bar or saturation" for the volume note [bar]
_VOLUME_NOTE_BAR = 200.0


def _no_volume(has_volume, pressure_bar):
    """Route suffix when a solid's pressure term is left out for want of V°."""
    if has_volume or pressure_bar <= _VOLUME_NOTE_BAR:
        return ""
    return "; no V°: pressure term left out"


# --------------------------------------------------------------------------- water


def pkw_r11_07(density_kg_m3, temperature_k):
    """Ionic product of water, -log10 Kw, by the IAPWS R11-07 formulation.

    Parameters
    ----------
    density_kg_m3 : float or array_like
        Density of water [kg/m³].
    temperature_k : float or array_like
        Temperature [K].

    Returns
    -------
    float or numpy.ndarray
        pKw on the molal scale (Kw in (mol/kg)²) [-].

    Notes
    -----
    IAPWS R11-07 (Bandura & Lvov 2006), eq. 1::

        pKw = -2 n [log10(1 + Q) - Q/(Q + 1) ρ (β0 + β1/T + β2 ρ)]
              + pKw^G + 2 log10(Mw / 1000),
        Q = ρ exp(α0 + α1/T + α2/T² ρ^(2/3)),

    ρ in g/cm³, with n = 6, α0 = -0.864671, α1 = 8659.19, α2 = -22786.2,
    β0 = 0.642044, β1 = -56.8534, β2 = -0.375754, Mw = 18.015268 g/mol and the
    ideal-gas term pKw^G = 0.61415 + 48251.33/T - 67707.93/T² + 10102100/T³.
    Coefficients from memory; they reproduce the release's check values
    (13.906565 at 300 K, 1000 kg/m³, and four more; see the tests).

    References
    ----------
    IAPWS R11-07 (2007, revised 2019). Release on the Ionization Constant of
    H2O. Bandura, A. V., Lvov, S. N. (2006). J. Phys. Chem. Ref. Data 35, 15-30.
    doi:10.1063/1.1928231

    Examples
    --------
    >>> round(pkw_r11_07(1000.0, 300.0), 6)
    13.906565
    """
    rho = np.asarray(density_kg_m3, dtype=float) / 1000.0  # g/cm³
    tk = np.asarray(temperature_k, dtype=float)
    # IAPWS R11-07, eq. 2 (ideal-gas reaction term)
    pkg = 0.61415 + 48251.33 / tk - 67707.93 / tk**2 + 10102100.0 / tk**3
    # IAPWS R11-07, eq. 1
    q = rho * np.exp(-0.864671 + 8659.19 / tk - 22786.2 / tk**2 * rho ** (2.0 / 3.0))
    pkw = (
        -12.0
        * (np.log10(1.0 + q) - q / (q + 1.0) * rho * (0.642044 - 56.8534 / tk - 0.375754 * rho))
        + pkg
        + 2.0 * np.log10(_M_WATER_G / 1000.0)
    )
    return _out(pkw)


def saturation_pressure(temperature_c):
    """Liquid-vapour saturation pressure of water (IAPWS-IF97 region 4).

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].

    Returns
    -------
    float
        Saturation pressure [bar].

    Raises
    ------
    ConditionsError
        If the temperature is outside 0 °C to the critical point (373.946 °C).

    Notes
    -----
    IAPWS-IF97 (Wagner et al. 2000), eq. 30, as coded in the iapws package.
    """
    t = check_temperature(temperature_c)
    if t + 273.15 > _T_CRITICAL_K:
        raise ConditionsError(
            f"{t:g} °C is above the critical point of water (373.946 °C): "
            "there is no saturation pressure; give a pressure"
        )
    from iapws.iapws97 import _PSat_T

    # IAPWS-IF97, eq. 30 (saturation-pressure equation)
    return float(_PSat_T(float(t) + 273.15)) * 10.0


@functools.lru_cache(maxsize=1024)
def _iapws_liquid(temperature_k, pressure_mpa):
    """IAPWS-95 state of liquid water; pressure None means saturated liquid."""
    from iapws import IAPWS95

    if pressure_mpa is None:
        state = IAPWS95(T=temperature_k, x=0.0)
    else:
        state = IAPWS95(T=temperature_k, P=pressure_mpa)
    return (
        float(state.rho),
        float(state.epsilon),
        float(state.P),
        float(state.h),
        float(state.s),
        float(state.x),
    )


def _resolve_pressure(t, pressure_bar):
    """Return the pressure to use [MPa], or None for the saturated liquid.

    The quick IAPWS-IF97 saturation pressure screens the input; within 0.1 % of
    it, IAPWS-95's own saturation pressure decides (the two differ by up to
    2e-4 relative), so a pressure read back from a saturated state maps onto
    that same state.
    """
    if pressure_bar is None and t > T_SATURATION_MAX_C:
        raise ConditionsError(
            f"temperature {t:g} °C is above {T_SATURATION_MAX_C:g} °C, the end of the range "
            "along the saturation curve: give a pressure (e.g. --pressure 1000), up to "
            f"{P_MAX_BAR:g} bar"
        )
    if pressure_bar is not None and t + 273.15 > _T_CRITICAL_K:
        return _checked_pressure(pressure_bar) / 10.0
    psat = saturation_pressure(t)
    band = 1e-3
    if pressure_bar is None:
        if psat < P_REF_BAR * (1.0 - band):
            return P_REF_BAR / 10.0
        return None
    p = _checked_pressure(pressure_bar)
    if p > psat * (1.0 + band):
        return p / 10.0
    if t >= 0.01:  # IAPWS-95 saturation exists from the triple point up
        psat = _iapws_liquid(t + 273.15, None)[2] * 10.0
        if p < psat * (1.0 - 1e-6):
            _boil(t, p, psat)
        return None if p <= psat * (1.0 + 1e-6) else p / 10.0
    if p < psat:
        _boil(t, p, psat)
    return p / 10.0


def _checked_pressure(pressure_bar):
    try:
        p = float(pressure_bar)
    except (TypeError, ValueError):
        raise ConditionsError(f"pressure {pressure_bar!r} is not a number of bar") from None
    if not math.isfinite(p) or p <= 0.0:
        raise ConditionsError(f"pressure {p:g} bar must be a positive number of bar")
    if p > P_MAX_BAR:
        raise ConditionsError(f"pressure {p:g} bar is above the supported {P_MAX_BAR:g} bar")
    return p


def _boil(t, p, psat):
    raise ConditionsError(
        f"pressure {p:g} bar is below the saturation pressure {psat:.4g} bar at "
        f"{t:g} °C: water would boil; give at least {psat:.4g} bar or omit --pressure"
    )


def water_properties(temperature_c, pressure_bar=None):
    """Density, dielectric constant, ionic product and Gibbs energy of liquid water.

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar]. Default: 1 bar where water does not boil at 1 bar
        (below about 99.6 °C), else the saturation pressure.

    Returns
    -------
    WaterProperties
        Named tuple; results are cached per (T, P).

    Raises
    ------
    ConditionsError
        If the temperature is outside 0-300 °C, or the pressure is below the
        saturation pressure (water would boil), not positive, or above
        1000 bar.

    Notes
    -----
    Density, enthalpy and entropy from IAPWS-95 (Wagner & Pruß 2002), the
    dielectric constant from IAPWS R8-97 (Fernández et al. 1997), both as coded
    in the iapws package; pKw from IAPWS R11-07 (:func:`pkw_r11_07`); the Gibbs
    energy from :func:`water_gibbs`.

    References
    ----------
    Wagner, W., Pruß, A. (2002). J. Phys. Chem. Ref. Data 31, 387-535.
    Fernández, D. P. et al. (1997). J. Phys. Chem. Ref. Data 26, 1125-1166.

    Examples
    --------
    >>> w = water_properties(25.0)
    >>> round(w.density_kg_m3, 3), round(w.dielectric_constant, 2), round(w.pkw, 3)
    (997.047, 78.41, 13.995)
    """
    t = check_temperature(temperature_c)
    if not isinstance(t, float):
        raise ConditionsError("water_properties takes one temperature at a time")
    if t == T_REF_C and (
        pressure_bar is None
        or (isinstance(pressure_bar, int | float) and pressure_bar == P_REF_BAR)
    ):
        # the reference state, kept so a 25 °C map needs no IAPWS-95 solve (or its import);
        # tests/test_thermo.py checks it equals the computed state
        return _WATER_AT_25C
    p_mpa = _resolve_pressure(t, pressure_bar)
    return _water_properties_cached(t, p_mpa)


# IAPWS-95 / R8-97 / R11-07 at 25 °C and 1 bar, as computed by _water_properties_cached
_WATER_AT_25C = WaterProperties(
    density_kg_m3=997.0470390177032,
    dielectric_constant=78.40843280657934,
    pressure_bar=1.0,
    pkw=13.994506659353707,
    gibbs_kj_mol=-237.129,
    temperature_c=25.0,
    at_saturation=False,
)


@functools.lru_cache(maxsize=1024)
def _water_properties_cached(t, p_mpa):
    tk = t + 273.15
    rho, eps, p_used, h, s, x = _iapws_liquid(tk, p_mpa)
    if x != 0.0 and tk <= _T_CRITICAL_K:
        # IAPWS-95 found vapour: cannot happen above saturation, guard anyway
        # (above the critical temperature it reports x = 1 for the dense fluid)
        raise ConditionsError(f"water is not liquid at {t:g} °C and {p_used * 10:g} bar")
    rho_r, _, _, h_r, s_r, _ = _iapws_liquid(T_REF, P_REF_BAR / 10.0)
    m = _M_WATER_G / 1000.0  # kg/mol
    dh = (h - h_r) * 1000.0 * m  # J/mol
    ds = (s - s_r) * 1000.0 * m  # J/(mol K)
    if t == T_REF_C and p_mpa == P_REF_BAR / 10.0:
        g = _WATER_DGF_KJ_MOL
    else:
        # Benson–Helgeson: ΔGapp(T,P) = ΔfG(Tr,Pr) + ΔH - T ΔS - S(Tr)(T - Tr),
        # ΔH, ΔS of H2O(l) from (25 °C, 1 bar) to (T, P) by IAPWS-95
        g = _WATER_DGF_KJ_MOL + (dh - tk * ds - _WATER_S_J_MOLK * (t - T_REF_C)) / 1000.0
    return WaterProperties(
        density_kg_m3=rho,
        dielectric_constant=eps,
        pressure_bar=p_used * 10.0,
        pkw=pkw_r11_07(rho, tk),
        gibbs_kj_mol=g,
        temperature_c=t,
        at_saturation=p_mpa is None,
    )


def water_gibbs(temperature_c, pressure_bar=None):
    """Apparent Gibbs energy of formation of liquid water at (T, P).

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure; default as in :func:`water_properties` [bar].

    Returns
    -------
    float
        ΔGapp of H2O(l) [kJ/mol]; -237.129 at 25 °C and 1 bar.

    Raises
    ------
    ConditionsError
        As :func:`water_properties`.

    Notes
    -----
    ΔGapp(T, P) = ΔfG° + [H(T,P) - H(Tr,Pr)] - T [S(T,P) - S(Tr,Pr)] - S°(T - Tr),
    the Benson–Helgeson form with the integrals of Cp replaced by the IAPWS-95
    enthalpy and entropy differences (which also carry the pressure change).
    ΔfG° = -237.129 kJ/mol and S° = 69.95 J/(mol K) from the NBS tables
    (Wagman et al. 1982) and CODATA (Cox et al. 1989).

    Examples
    --------
    >>> water_gibbs(25.0)
    -237.129
    """
    return water_properties(temperature_c, pressure_bar).gibbs_kj_mol


def neutral_ph(temperature_c, pressure_bar=None):
    """PH of neutral water, pKw / 2, at (T, P).

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].
    pressure_bar : float, optional
        Pressure; default as in :func:`water_properties` [bar].

    Returns
    -------
    float or numpy.ndarray
        Neutral pH [-].

    Raises
    ------
    ConditionsError
        As :func:`water_properties`.

    Notes
    -----
    Activity coefficients of H+ and OH- taken as 1 (pure water).

    Examples
    --------
    >>> round(neutral_ph(25.0), 3)
    6.997
    """
    t = check_temperature(temperature_c)
    if isinstance(t, float):
        return water_properties(t, pressure_bar).pkw / 2.0
    return np.array([water_properties(float(v), pressure_bar).pkw / 2.0 for v in t.flat]).reshape(
        t.shape
    )
