"""Revised Helgeson-Kirkham-Flowers (HKF) equation of state for aqueous species.

Plain functions over floats: the g-function of Shock et al. (1992), the
effective Born coefficient, the Born function Y of water, the standard partial
molal Gibbs energy G(T, P) of an aqueous species from its HKF parameters, and
the estimation of those parameters by published correlations where none are
tabulated. The equations are written in calories, bars and kelvin, as
published; the public functions return kJ/mol.

Water's density comes from IAPWS-95 and its dielectric constant from IAPWS
R8-97 (:func:`pourbaix.physics.thermo.water_properties`).

References
----------
Helgeson, H. C.; Kirkham, D. H.; Flowers, G. C. Am. J. Sci. 281, 1249-1516 (1981).
Tanger, J. C.; Helgeson, H. C. Am. J. Sci. 288, 19-98 (1988).
Shock, E. L.; Oelkers, E. H.; Johnson, J. W.; Sverjensky, D. A.; Helgeson, H. C.
J. Chem. Soc. Faraday Trans. 88, 803-826 (1992). doi:10.1039/FT9928800803
Shock, E. L.; Helgeson, H. C. Geochim. Cosmochim. Acta 52, 2009-2036 (1988).
Johnson, J. W.; Oelkers, E. H.; Helgeson, H. C. Comput. Geosci. 18, 899-947 (1992).
"""

from __future__ import annotations

import functools
import math

from pourbaix.errors import ConditionsError

__all__ = [
    "THETA_K",
    "PSI_BAR",
    "ETA_ANGSTROM_CAL_MOL",
    "DENSITY_MIN_G_CM3",
    "HKF_T_MAX_C",
    "HKF_P_MAX_BAR",
    "check_hkf_range",
    "g_function",
    "effective_born_coefficient",
    "born_y",
    "reference_born",
    "hkf_gibbs",
    "estimate_hkf",
    "hydroxo_form",
    "estimate_hydroxo_entropy",
    "cobble_oxyanion_entropy",
]

CAL = 4.184  # thermochemical calorie [J]
T_REF_K = 298.15  # reference temperature [K]
P_REF_BAR = 1.0  # reference pressure [bar]
THETA_K = 228.0  # solvent singular temperature (Helgeson et al. 1981) [K]
PSI_BAR = 2600.0  # solvent pressure constant (Tanger & Helgeson 1988) [bar]
ETA_ANGSTROM_CAL_MOL = 1.66027e5  # Born constant eta = N e^2 / 2 (Helgeson et al. 1981) [Å cal/mol]
R_E_H_PLUS = 3.082  # effective electrostatic radius of H+ (Shock & Helgeson 1988) [Å]
DENSITY_MIN_G_CM3 = 0.35  # lowest water density of the g-function fit (Shock et al. 1992)
HKF_T_MAX_C = 600.0  # highest temperature accepted by this tool's HKF route [°C]
HKF_P_MAX_BAR = 5000.0  # highest pressure accepted (Shock et al. 1992 fit: to 5 kbar) [bar]

# Shock et al. 1992, Table 3: g = ag (1 - rho)^bg - f(T, P); T in °C, rho in g/cm3
_AG = (-2.037662, 5.747000e-3, -6.557892e-6)
_BG = (6.107361, -1.074377e-2, 1.268348e-5)
_AF = (3.666666e1, -1.504956e-10, 5.01799e-14)


def check_hkf_range(temperature_c, pressure_bar, density_g_cm3):
    """Raise if (T, P) lies outside the range of the HKF g-function and water model.

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    density_g_cm3 : float
        Density of water at (T, P) [g/cm³].

    Raises
    ------
    ConditionsError
        Above 600 °C or 5000 bar; water density below 0.35 g/cm³; or within
        350-400 °C below 500 bar, the near-critical region the g-function
        fit excludes (Shock et al. 1992; the same limits as SUPCRT92,
        Johnson et al. 1992).
    """
    if temperature_c > HKF_T_MAX_C or pressure_bar > HKF_P_MAX_BAR:
        raise ConditionsError(
            f"{temperature_c:g} °C, {pressure_bar:g} bar is outside the range of the HKF "
            f"equations used here (to {HKF_T_MAX_C:g} °C and {HKF_P_MAX_BAR:g} bar)"
        )
    if density_g_cm3 < DENSITY_MIN_G_CM3:
        raise ConditionsError(
            f"water density {density_g_cm3:.3f} g/cm³ at {temperature_c:g} °C, "
            f"{pressure_bar:g} bar is below {DENSITY_MIN_G_CM3} g/cm³, where the g-function "
            "of Shock et al. (1992) stops holding; give a higher --pressure"
        )
    if 350.0 < temperature_c < 400.0 and pressure_bar < 500.0:
        raise ConditionsError(
            f"{temperature_c:g} °C at {pressure_bar:g} bar is in the near-critical region "
            "(350-400 °C below 500 bar) where the HKF g-function is not valid "
            "(Shock et al. 1992); give at least 500 bar"
        )


def g_function(temperature_c, pressure_bar, density_g_cm3):
    """Solvent function g of the effective Born coefficient (Shock et al. 1992).

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    density_g_cm3 : float
        Density of water [g/cm³].

    Returns
    -------
    float
        g [Å]; 0 where the density is 1 g/cm³ or more.

    Notes
    -----
    g = ag (1 - ρ)^bg - f(T, P), ag = ag1 + ag2 T + ag3 T², bg = bg1 + bg2 T +
    bg3 T² (T in °C; Shock et al. 1992, eqs. 25 and 32-33), and for
    155 < T < 355 °C and P < 1000 bar the correction
    f = [((T - 155)/300)^4.8 + af1 ((T - 155)/300)^16] [af2 (1000 - P)³ + af3 (1000 - P)⁴]
    (eq. 32).

    References
    ----------
    Shock, E. L. et al. J. Chem. Soc. Faraday Trans. 88, 803-826 (1992).

    Examples
    --------
    >>> g_function(4.0, 1.0, 1.0)
    0.0
    >>> round(g_function(300.0, 85.9, 0.712), 4)
    -0.0036
    """
    rho, t, p = float(density_g_cm3), float(temperature_c), float(pressure_bar)
    if rho >= 1.0:
        return 0.0
    # Shock et al. 1992, eqs. 25 and 33
    ag = _AG[0] + _AG[1] * t + _AG[2] * t * t
    bg = _BG[0] + _BG[1] * t + _BG[2] * t * t
    g = ag * (1.0 - rho) ** bg
    if 155.0 < t < 355.0 and p < 1000.0:
        # Shock et al. 1992, eq. 32 (low-pressure correction)
        tg = (t - 155.0) / 300.0
        pg = 1000.0 - p
        g -= (tg**4.8 + _AF[0] * tg**16) * (_AF[1] * pg**3 + _AF[2] * pg**4)
    return g


def effective_born_coefficient(omega_ref_cal_mol, charge, g_angstrom):
    """Born coefficient ω of a charged species at (T, P).

    Parameters
    ----------
    omega_ref_cal_mol : float
        ω at 298.15 K and 1 bar [cal/mol].
    charge : int
        Charge of the species [-].
    g_angstrom : float
        The g-function at (T, P) [Å].

    Returns
    -------
    float
        ω [cal/mol]; ``omega_ref_cal_mol`` for a neutral species.

    Notes
    -----
    ω = η [Z²/re - Z/(3.082 + g)], re = Z²/(ωr/η + Z/3.082) + abs(Z) g
    (Shock et al. 1992, eqs. 5 and 48-49; η = 1.66027e5 Å cal/mol).

    Examples
    --------
    >>> effective_born_coefficient(33060.0, 1, 0.0)
    33060.0
    """
    z = int(charge)
    if z == 0:
        return float(omega_ref_cal_mol)
    # Shock et al. 1992, eq. 48: re = re,ref + |Z| g; eq. 5: omega = eta (Z^2/re - Z/(3.082 + g))
    re_ref = z * z / (omega_ref_cal_mol / ETA_ANGSTROM_CAL_MOL + z / R_E_H_PLUS)
    re = re_ref + abs(z) * g_angstrom
    omega = ETA_ANGSTROM_CAL_MOL * (z * z / re - z / (R_E_H_PLUS + g_angstrom))
    if g_angstrom == 0.0:
        return float(omega_ref_cal_mol)  # exact at rho >= 1 (the formula returns it to rounding)
    return omega


def _dielectric(temperature_k, pressure_mpa):
    from iapws import IAPWS95

    state = IAPWS95(T=temperature_k, P=pressure_mpa)
    return float(state.epsilon)


@functools.lru_cache(maxsize=256)
def born_y(temperature_c, pressure_bar):
    """Born function Y = (∂ε/∂T)_P / ε² of water.

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].

    Returns
    -------
    float
        Y [1/K].

    Notes
    -----
    Y = (1/ε²)(∂ε/∂T)_P (Helgeson & Kirkham 1974, Am. J. Sci. 274, eq. 42),
    by a three-point difference from below (T - h, T - 2h, T - 3h, h = 0.02 K;
    from below so that a state on the saturation curve stays liquid) of the
    IAPWS R8-97 dielectric constant on IAPWS-95 densities at constant pressure.

    Examples
    --------
    >>> round(born_y(25.0, 1.0) * 1e5, 3)
    -5.837
    """
    tk = float(temperature_c) + 273.15
    p_mpa = float(pressure_bar) / 10.0
    h = 0.02
    e1, e2, e3 = (_dielectric(tk - k * h, p_mpa) for k in (1, 2, 3))
    # derivative at T of the parabola through T - h, T - 2h, T - 3h (Lagrange)
    de = (2.5 * e1 - 4.0 * e2 + 1.5 * e3) / h
    e0 = 3.0 * e1 - 3.0 * e2 + e3  # the same parabola's value at T
    return de / (e0 * e0)


@functools.lru_cache(maxsize=1)
def reference_born():
    """ε and Y of water at 298.15 K and 1 bar (IAPWS-95 and R8-97).

    Returns
    -------
    tuple of float
        ``(epsilon_r, y_r)`` [-, 1/K].
    """
    return _dielectric(T_REF_K, P_REF_BAR / 10.0), born_y(25.0, P_REF_BAR)


def hkf_gibbs(
    dgf_kj_mol,
    s_j_molk,
    hkf,
    charge,
    temperature_c,
    pressure_bar,
    density_g_cm3,
    dielectric_constant,
):
    """Apparent standard partial molal Gibbs energy of an aqueous species at (T, P).

    Parameters
    ----------
    dgf_kj_mol : float
        ΔfG° at 298.15 K, 1 bar [kJ/mol].
    s_j_molk : float
        S° at 298.15 K, 1 bar [J/(mol K)].
    hkf : HKFParameters
        a1-a4, c1, c2, ω (unscaled, calories; :class:`pourbaix.tables.species.HKFParameters`).
    charge : int
        Charge [-].
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    density_g_cm3 : float
        Water density at (T, P), IAPWS-95 [g/cm³].
    dielectric_constant : float
        Water's dielectric constant at (T, P), IAPWS R8-97 [-].

    Returns
    -------
    float
        ΔG°(T, P) in the Benson-Helgeson convention [kJ/mol].

    Raises
    ------
    ConditionsError
        Outside the range of :func:`check_hkf_range`.

    Notes
    -----
    In calories, bars and kelvin (Tanger & Helgeson 1988, eq. 59 as revised
    by Shock et al. 1992, eq. B10; Tr = 298.15 K, Pr = 1 bar, Θ = 228 K,
    Ψ = 2600 bar)::

        G = ΔfG° - S°(T - Tr) - c1[T ln(T/Tr) - T + Tr]
            + a1(P - Pr) + a2 ln((Ψ+P)/(Ψ+Pr))
            - c2{[1/(T-Θ) - 1/(Tr-Θ)](Θ-T)/Θ - (T/Θ²) ln[Tr(T-Θ)/(T(Tr-Θ))]}
            + [a3(P - Pr) + a4 ln((Ψ+P)/(Ψ+Pr))]/(T - Θ)
            + ω(1/ε - 1) - ωr(1/εr - 1) + ωr Yr (T - Tr)

    with ω from :func:`effective_born_coefficient` for charged species.

    References
    ----------
    Tanger, J. C.; Helgeson, H. C. Am. J. Sci. 288, 19-98 (1988).
    Shock, E. L. et al. J. Chem. Soc. Faraday Trans. 88, 803-826 (1992).
    """
    t = float(temperature_c)
    p = float(pressure_bar)
    check_hkf_range(t, p, density_g_cm3)
    tk = t + 273.15
    tr, theta, psi, pr = T_REF_K, THETA_K, PSI_BAR, P_REF_BAR
    g0 = dgf_kj_mol * 1000.0 / CAL
    s0 = s_j_molk / CAL
    eps_r, y_r = reference_born()
    g = g_function(t, p, density_g_cm3) if charge else 0.0
    omega = effective_born_coefficient(hkf.omega, charge, g)
    ln_p = math.log((psi + p) / (psi + pr))
    # Tanger & Helgeson 1988, eq. 59 (Shock et al. 1992, eq. B10)
    c2_term = ((1.0 / (tk - theta) - 1.0 / (tr - theta)) * (theta - tk) / theta) - (
        tk / theta**2
    ) * math.log(tr * (tk - theta) / (tk * (tr - theta)))
    cal = (
        g0
        - s0 * (tk - tr)
        - hkf.c1 * (tk * math.log(tk / tr) - tk + tr)
        + hkf.a1 * (p - pr)
        + hkf.a2 * ln_p
        - hkf.c2 * c2_term
        + (hkf.a3 * (p - pr) + hkf.a4 * ln_p) / (tk - theta)
        + omega * (1.0 / dielectric_constant - 1.0)
        - hkf.omega * (1.0 / eps_r - 1.0)
        + hkf.omega * y_r * (tk - tr)
    )
    return cal * CAL / 1000.0


# --------------------------------------------------------------------------- estimates


def estimate_hkf(s_j_molk, charge, cp_j_molk=None):
    """HKF parameters of an aqueous species estimated from S° (and Cp° if known).

    Parameters
    ----------
    s_j_molk : float
        S° at 298.15 K [J/(mol K)].
    charge : int
        Charge [-].
    cp_j_molk : float, optional
        Cp° at 298.15 K [J/(mol K)]; estimated from S° and charge when None.

    Returns
    -------
    HKFParameters
        Unscaled, calories.

    Notes
    -----
    - ω: for ions ω = ω_abs - Z ω_abs(H+), ω_abs(H+) = η/3.082 = 53870 cal/mol,
      and ω_abs = -1514.4 S° + β_Z (S° in cal/(mol K)), the correlation form of
      Shock et al. (1997, GCA 61, 907) and Sverjensky, Shock & Helgeson (1997,
      GCA 61, 1359); for neutral species ω = -1514.4 S° + 34393 (Shock,
      Helgeson & Sverjensky 1989, GCA 53, 2157, eq. 62), bounded to
      ±0.4e5 cal/mol (the carbon-free neutral species of the SUPCRT-family
      file span -0.34e5 to +0.09e5 between their 5th and 95th percentiles).
      The β_Z values (109030, 213560, 319520, 432920 cal/mol
      for abs(Z) = 1-4) are the medians of ω_abs + 1514.4 S° over the ions of the
      SUPCRT-family file speq21.dat (shipped with pygcc), whose interquartile
      ranges are ±200 cal/mol: that file's ions follow this correlation.
    - c2 = (0.2037 Cp° - 3.0346) × 10⁴ (Cp° in cal/(mol K); Shock & Helgeson
      1988, eq. 89), and c1 from Cp°(Tr) = c1 + c2/(Tr - Θ)² + ω Tr X_r with
      X_r = -3.09e-7 1/K² (Helgeson & Kirkham 1974; SUPCRT92 value).
    - Cp° when not given: a per-charge straight line in S° through the
      carbon-free species of the same file (our regression; residual standard
      deviation 16-60 cal/(mol K), so such estimates are rough).
    - a1-a4: per-charge medians of the same file's ions (volumes affect
      G by < 1 kJ/mol below 1000 bar); a4 = -4.134 a2 - 27790 (Shock &
      Helgeson 1988, eq. 61).

    The route using these values is marked "estimated HKF".

    References
    ----------
    Shock, E. L.; Helgeson, H. C. Geochim. Cosmochim. Acta 52, 2009-2036 (1988).
    Shock, E. L.; Sassani, D. C.; Willis, M.; Sverjensky, D. A. Geochim.
    Cosmochim. Acta 61, 907-950 (1997).
    Sverjensky, D. A.; Shock, E. L.; Helgeson, H. C. Geochim. Cosmochim. Acta
    61, 1359-1412 (1997).
    """
    from pourbaix.tables.species import HKFParameters

    z = int(charge)
    s_cal = float(s_j_molk) / CAL
    if z == 0:
        # Shock, Helgeson & Sverjensky 1989, eq. 62
        omega = min(max(-1514.4 * s_cal + 34393.0, -0.4e5), 0.4e5)
    else:
        beta = _BETA_Z[min(abs(z), 4)]
        omega_abs = -1514.4 * s_cal + beta  # Shock et al. 1997 form
        omega = omega_abs - z * ETA_ANGSTROM_CAL_MOL / R_E_H_PLUS
    if cp_j_molk is None:
        slope, intercept = _CP_FROM_S[max(-2, min(z, 3))]
        cp_cal = slope * s_cal + intercept
    else:
        cp_cal = float(cp_j_molk) / CAL
    # Shock & Helgeson 1988, eq. 89
    c2 = (0.2037 * cp_cal - 3.0346) * 1e4
    # Cp(Tr) = c1 + c2/(Tr - Theta)^2 + omega Tr X (Tanger & Helgeson 1988, eq. 29)
    c1 = cp_cal - c2 / (T_REF_K - THETA_K) ** 2 - omega * T_REF_K * _X_REF
    a1, a2, a3 = _VOLUME[max(-2, min(z, 3))]
    a4 = -4.134 * a2 - 27790.0  # Shock & Helgeson 1988, eq. 61
    return HKFParameters(a1, a2, a3, a4, c1, c2, omega)


_X_REF = -3.09e-7  # Born function X at 298.15 K, 1 bar (SUPCRT92; Johnson et al. 1992) [1/K^2]
_BETA_Z = {1: 109030.0, 2: 213560.0, 3: 319520.0, 4: 432920.0}
# Per-charge regressions over the inorganic (carbon-free) species of the SUPCRT-family
# file speq21.dat as shipped with pygcc (Shock & Helgeson 1988; Shock et al. 1997;
# Sverjensky et al. 1997 parameters); tests/test_hkf.py recomputes them from the file.
# charge -> (slope, intercept) of Cp°(Tr) [cal/(mol K)] against S° [cal/(mol K)]
_CP_FROM_S: dict[int, tuple[float, float]] = {
    -2: (0.1548, -13.6353),
    -1: (0.5574, -35.9249),
    0: (-0.0473, -8.4293),
    1: (-0.2812, -8.4822),
    2: (-0.8101, -18.0401),
    3: (-0.5150, -52.7938),
}
# charge -> medians of (a1 [cal/(mol bar)], a2 [cal/mol], a3 [cal K/(mol bar)])
_VOLUME: dict[int, tuple[float, float, float]] = {
    -2: (0.69651, 873.96, 2.3150),
    -1: (0.54533, 565.56, 3.3240),
    0: (0.50806, 445.82, 3.9917),
    1: (0.18973, -262.99, 6.9876),
    2: (0.00486, -770.42, 8.7097),
    3: (-0.28962, -1471.425, 11.52385),
}


# Shock et al. (1997, GCA 61, 907) correlate the entropies of hydroxide complexes
# with those of their cations, one straight line per cation charge z and number of
# hydroxide groups n (the complex written M(OH)n, i.e. with the water of MO, HMO2 ...
# forms added back at S°(H2O, l) = 69.95 J/(mol K)). Coefficients: our regression
# over the cation/complex pairs of speq21.dat as shipped with pygcc (at least 7 pairs
# each; tests/test_hkf.py recomputes them). (z, n) -> (slope [-], intercept [J/(mol K)])
_HYDROXO_ENTROPY: dict[tuple[int, int], tuple[float, float]] = {
    (1, 1): (0.9569, 12.0457),
    (2, 1): (0.9462, 62.7742),
    (2, 2): (0.8811, 131.6708),
    (2, 3): (1.2905, 131.3319),
    (2, 4): (1.6008, 179.0963),
    (3, 1): (1.3030, 241.7168),
    (3, 2): (1.3174, 394.5971),
    (3, 3): (1.4938, 578.8096),
    (3, 4): (1.5293, 613.3047),
}


def hydroxo_form(composition, charge):
    """Metal, cation charge and hydroxide count of a mononuclear hydroxide complex.

    Parameters
    ----------
    composition : Mapping
        Element -> count of the species.
    charge : int
        Charge of the species [-].

    Returns
    -------
    tuple or None
        ``(metal, cation_charge, n)`` for M(OH)n^(z-n) written with any amount of
        water removed (MO, HMO2, MO2 ...), else None.

    Examples
    --------
    >>> hydroxo_form({"Fe": 1, "O": 2, "H": 1}, -1)
    ('Fe', 2, 3)
    """
    metals = [e for e in composition if e not in ("H", "O")]
    if len(metals) != 1 or composition[metals[0]] != 1:
        return None
    oxygen, hydrogen = composition.get("O", 0), composition.get("H", 0)
    n = 2 * oxygen - hydrogen  # M(OH)n - k H2O has O = n - k, H = n - 2k
    if n <= 0 or oxygen - hydrogen < 0:
        return None
    return metals[0], int(charge) + n, n


def estimate_hydroxo_entropy(parent_s_j_molk, parent_charge, n_hydroxide, water_removed=0):
    """S° of a hydroxide complex from the S° of its cation (Shock et al. 1997 correlations).

    Parameters
    ----------
    parent_s_j_molk : float
        S° of the cation M^z+ [J/(mol K)].
    parent_charge : int
        z [-].
    n_hydroxide : int
        Number of hydroxide groups n of M(OH)n [-].
    water_removed : int
        Waters k by which the species as written differs from M(OH)n [-].

    Returns
    -------
    float or None
        S° of the species as written [J/(mol K)]; None where no correlation exists.

    References
    ----------
    Shock, E. L.; Sassani, D. C.; Willis, M.; Sverjensky, D. A. Geochim.
    Cosmochim. Acta 61, 907-950 (1997).

    Examples
    --------
    >>> round(estimate_hydroxo_entropy(-137.7, 2, 1), 1)
    -67.5
    """
    coefficients = _HYDROXO_ENTROPY.get((int(parent_charge), int(n_hydroxide)))
    if coefficients is None:
        return None
    slope, intercept = coefficients
    # Shock et al. 1997 form: S°(complex) linear in S°(cation) per charge type
    return slope * float(parent_s_j_molk) + intercept - 69.95 * water_removed


def cobble_oxyanion_entropy(charge, oxygen_count):
    """S° of an oxyanion XO_n^z- by Cobble's correlation.

    Parameters
    ----------
    charge : int
        Charge of the oxyanion (negative) [-].
    oxygen_count : int
        Number of oxygen atoms n [-].

    Returns
    -------
    float
        S° [J/(mol K)].

    Notes
    -----
    S° = 43.5 - 46.5 (abs(z) - 0.28 n) cal/(mol K) (Cobble 1953; from memory).
    It gives 36 cal/(mol K) for NO3- (tabulated 35.0), 49 for MnO4- (45.7),
    2.6 for SO4^2- (4.8) and -44 for PO4^3- (-53; NBS82 values): a few
    cal/(mol K), i.e. a few kJ/mol in ΔG at 300 °C.

    References
    ----------
    Cobble, J. W. Empirical considerations of entropy. II. The entropies of
    inorganic complex ions. J. Chem. Phys. 21, 1446-1450 (1953).

    Examples
    --------
    >>> round(cobble_oxyanion_entropy(-1, 3) / CAL, 2)
    36.06
    """
    # Cobble 1953: S = 43.5 - 46.5 (|z| - 0.28 n) [cal/(mol K)]
    return (43.5 - 46.5 * (abs(int(charge)) - 0.28 * int(oxygen_count))) * CAL
