"""Reference electrodes: potentials vs SHE at temperature, and conversions.

Every potential inside the tool is vs SHE; this module converts to and from
the reference electrode in use. ``E(vs SHE) = E(vs ref) + offset`` where the
offset is the reference's own potential vs SHE (:func:`reference_offset`).
Each electrode carries its 25 °C value, its temperature dependence, the range
that dependence covers and its source ("from memory" or "common practice"
where that is what it is). Practical electrodes drift by a few mV with filling
solution, junction and age: calibrate against a master electrode for work
that needs better.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.physics.thermo import RangeWarning, check_temperature, nernst_factor

__all__ = [
    "ReferenceElectrode",
    "REFERENCES",
    "agcl_standard_potential",
    "get_reference",
    "reference_offset",
    "to_she",
    "from_she",
    "list_references",
]

_AGCL_RANGE_C = (0.0, 95.0)


def _bates_bower(t):
    # Bates & Bower 1954, J. Res. NBS 53, 283, eq. for E°(AgCl/Ag), t in °C
    return 0.23659 - 4.8564e-4 * t - 3.4205e-6 * t**2 + 5.869e-9 * t**3


def agcl_standard_potential(temperature_c=25.0):
    """Return the standard potential of the silver/silver chloride electrode at T.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [°C].

    Returns
    -------
    float or numpy.ndarray
        E°(AgCl/Ag) [V vs SHE].

    Raises
    ------
    ConditionsError
        If the temperature is outside 0-300 °C.

    Warns
    -----
    RangeWarning
        Outside 0-95 °C, the range of the measurements.

    Notes
    -----
    E° = 0.23659 - 4.8564e-4 t - 3.4205e-6 t² + 5.869e-9 t³ (t in °C), from
    cells without liquid junction in HCl (Bates & Bower 1954); coefficients
    from memory, checked against the paper's table in the tests.

    References
    ----------
    Bates, R. G., Bower, V. E. (1954). Standard potential of the
    silver-silver-chloride electrode from 0 to 95 °C and the thermodynamic
    properties of dilute hydrochloric acid solutions. J. Res. Natl. Bur. Stand.
    53, 283-290.

    Examples
    --------
    >>> round(agcl_standard_potential(25.0), 5)
    0.22239
    """
    t = check_temperature(temperature_c)
    lo, hi = _AGCL_RANGE_C
    if np.any((np.asarray(t) < lo) | (np.asarray(t) > hi)):
        warnings.warn(
            f"E°(AgCl/Ag) of Bates & Bower 1954 covers {lo:g}-{hi:g} °C; "
            f"{float(np.max(t)):g} °C is an extrapolation",
            RangeWarning,
            stacklevel=2,
        )
    out = _bates_bower(np.asarray(t, dtype=float))
    return float(out) if np.ndim(out) == 0 else out


@dataclass(frozen=True)
class ReferenceElectrode:
    """A reference electrode: its potential vs SHE and where that comes from.

    Attributes
    ----------
    name : str
        Registry name, e.g. ``"SCE"``.
    potential_25_v : float or None
        Potential at 25 °C [V vs SHE]; None for RHE (pH-dependent).
    valid_range_c : tuple of float
        Temperatures covered by the temperature dependence [°C].
    description : str
        What the electrode is.
    source : str
        Where the value and its temperature dependence come from.
    temperature_model : str
        How the potential moves with T, in words.
    potential : callable
        ``potential(t_c)`` [V vs SHE] at T (not used for RHE).
    aliases : tuple of str
        Other accepted names (case-insensitive).
    """

    name: str
    potential_25_v: float | None
    valid_range_c: tuple[float, float]
    description: str
    source: str
    temperature_model: str
    potential: Callable = lambda t: 0.0
    aliases: tuple[str, ...] = ()

    def de_dt_v_per_k(self, temperature_c=25.0):
        """Temperature coefficient dE/dT at T [V/K]; None for RHE."""
        if self.potential_25_v is None:
            return None
        h = 0.01
        t = float(temperature_c)
        return (self.potential(t + h) - self.potential(t - h)) / (2 * h)


def _linear(e25, coeff):
    # linear temperature coefficient: E(t) = E25 + dE/dT (t - 25)
    return lambda t: e25 + coeff * (np.asarray(t, dtype=float) - 25.0)


def _fixed_chloride(e25):
    # Nernst with the chloride activity held at its 25 °C value:
    # E(T) = E°(T) + (E25 - E°(25)) T / 298.15  (Bates & Bower 1954 for E°(T))
    shift = e25 - _bates_bower(25.0)
    return lambda t: (
        _bates_bower(np.asarray(t, dtype=float))
        + shift * (np.asarray(t, dtype=float) + 273.15) / 298.15
    )


def _sce(t):
    d = np.asarray(t, dtype=float) - 25.0
    # Ives & Janz 1961 (Reference Electrodes), saturated calomel, t in °C
    return 0.2412 - 6.61e-4 * d - 1.75e-6 * d**2 - 9.0e-10 * d**3


_NO_COEFF = (15.0, 35.0)  # range for a value without a temperature coefficient (judgement)

#: The reference electrodes by name, each with its potential, temperature model and source.
REFERENCES: dict[str, ReferenceElectrode] = {
    e.name: e
    for e in (
        ReferenceElectrode(
            "SHE",
            0.0,
            (0.0, 600.0),
            "standard hydrogen electrode (H2 at 1 bar, a(H+) = 1); the zero of the scale",
            "definition (IUPAC)",
            "zero at every temperature by convention",
            lambda t: 0.0 * np.asarray(t, dtype=float),
            ("NHE",),
        ),
        ReferenceElectrode(
            "SCE",
            0.2412,
            (0.0, 60.0),
            "saturated calomel electrode, Hg/Hg2Cl2 in saturated KCl",
            "Ives & Janz, Reference Electrodes (1961): 0.2412 V at 25 °C and the cubic "
            "E = 0.2412 - 6.61e-4 (t-25) - 1.75e-6 (t-25)^2 - 9.0e-10 (t-25)^3; from memory; "
            "range assumed (calomel disproportionates above about 70 °C)",
            "cubic in t (Ives & Janz 1961)",
            _sce,
            ("calomel", "saturated-calomel", "Hg/Hg2Cl2"),
        ),
        ReferenceElectrode(
            "Ag/AgCl-sat",
            0.197,
            (0.0, 60.0),
            "silver/silver chloride in saturated KCl",
            "Bard & Faulkner, Electrochemical Methods, 2nd ed. (2001): 0.197 V (0.199 V in "
            "other tables); dE/dT = -1.01 mV/K (Sawyer, Sobkowiak & Roberts, "
            "Electrochemistry for Chemists, 1995); both from memory, range assumed",
            "linear, -1.01 mV/K",
            _linear(0.197, -1.01e-3),
            ("AgCl-sat", "Ag/AgCl-satKCl", "Ag/AgCl-saturated"),
        ),
        ReferenceElectrode(
            "Ag/AgCl-3M",
            0.210,
            _AGCL_RANGE_C,
            "silver/silver chloride in 3 mol/L KCl",
            "0.210 V at 25 °C (manufacturers' and handbook value; from memory); temperature "
            "dependence from E°(AgCl/Ag) of Bates & Bower 1954 with the chloride activity held "
            "at its 25 °C value",
            "E°(T) of Bates & Bower 1954 + fixed chloride-activity term",
            _fixed_chloride(0.210),
            ("AgCl-3M", "Ag/AgCl-3MKCl"),
        ),
        ReferenceElectrode(
            "Ag/AgCl-1M",
            0.235,
            _AGCL_RANGE_C,
            "silver/silver chloride in 1 mol/L KCl",
            "0.235 V at 25 °C (0.2355 V in some tables; from memory); temperature dependence "
            "from E°(AgCl/Ag) of Bates & Bower 1954 with the chloride activity held at its "
            "25 °C value",
            "E°(T) of Bates & Bower 1954 + fixed chloride-activity term",
            _fixed_chloride(0.235),
            ("AgCl-1M", "Ag/AgCl-1MKCl"),
        ),
        ReferenceElectrode(
            "Ag/AgCl-seawater",
            0.250,
            (0.0, 40.0),
            "silver/silver chloride immersed in seawater (salinity about 35), as used in "
            "cathodic protection offshore",
            "+0.25 V vs SHE at 25 °C (common practice; it moves with salinity); temperature "
            "dependence from E°(AgCl/Ag) of Bates & Bower 1954 with the chloride activity held "
            "fixed; range: seawater temperatures",
            "E°(T) of Bates & Bower 1954 + fixed chloride-activity term",
            _fixed_chloride(0.250),
            ("AgCl-seawater", "Ag/AgCl-sw", "Ag/AgCl/seawater"),
        ),
        ReferenceElectrode(
            "Cu/CuSO4",
            0.316,
            (0.0, 40.0),
            "copper/saturated copper sulfate electrode (CSE), used for buried and immersed "
            "structures in cathodic protection",
            "+0.316 V vs SHE at 25 °C and +0.9 mV/K (common practice in cathodic protection; "
            "values of 0.30-0.32 V are quoted); range: soil and water temperatures",
            "linear, +0.9 mV/K",
            _linear(0.316, 0.9e-3),
            ("CSE", "CCSE", "Cu/CuSO4-sat", "copper-sulfate"),
        ),
        ReferenceElectrode(
            "Hg/HgO-1M",
            0.140,
            _NO_COEFF,
            "mercury/mercury oxide in 1 mol/L NaOH (or KOH), for alkaline solutions",
            "0.140 V at 25 °C for 1 M NaOH (from memory; 0.098 V, the standard potential "
            "E°(HgO/Hg), is also quoted for 1 M KOH: calibrate); no temperature coefficient "
            "known to us, value used within 15-35 °C",
            "none (25 °C value)",
            lambda t: 0.140 + 0.0 * np.asarray(t, dtype=float),
            ("Hg/HgO", "MOE"),
        ),
        ReferenceElectrode(
            "Hg/Hg2SO4",
            0.640,
            _NO_COEFF,
            "mercury/mercurous sulfate in saturated K2SO4, for chloride-free work",
            "0.64 V at 25 °C (Bard & Faulkner 2001; from memory; 0.64-0.65 V are quoted); no "
            "temperature coefficient known to us, value used within 15-35 °C",
            "none (25 °C value)",
            lambda t: 0.640 + 0.0 * np.asarray(t, dtype=float),
            ("MSE", "Hg/Hg2SO4-sat", "mercurous-sulfate"),
        ),
        ReferenceElectrode(
            "RHE",
            None,
            (0.0, 300.0),
            "reversible hydrogen electrode in the test solution: E = -k_T pH vs SHE",
            "Nernst equation for H+/H2 at 1 bar H2 (k_T = R T ln10 / F)",
            "-k_T pH with k_T at T",
            lambda t: 0.0,
            ("reversible-hydrogen",),
        ),
    )
}

_AMBIGUOUS = {
    "ag/agcl": [n for n in REFERENCES if n.startswith("Ag/AgCl")],
    "agcl": [n for n in REFERENCES if n.startswith("Ag/AgCl")],
}


def _norm(name):
    return "".join(str(name).split()).lower().replace("_", "-")


_LOOKUP = {}
for _e in REFERENCES.values():
    for _n in (_e.name, *_e.aliases):
        _LOOKUP[_norm(_n)] = _e.name


def get_reference(name):
    """Look up a reference electrode by name or alias (case-insensitive).

    Parameters
    ----------
    name : str
        A key of :data:`REFERENCES` or an alias (e.g. "calomel", "CSE", "MSE").

    Returns
    -------
    ReferenceElectrode

    Raises
    ------
    OptionError
        If the name is unknown or ambiguous; the message lists the valid names.

    Examples
    --------
    >>> get_reference("calomel").name
    'SCE'
    """
    key = _norm(name)
    if key in _LOOKUP:
        return REFERENCES[_LOOKUP[key]]
    if key in _AMBIGUOUS:
        raise OptionError(
            f"reference {name!r} is ambiguous: the filling solution matters; "
            f"choose one of {', '.join(_AMBIGUOUS[key])}"
        )
    raise OptionError(f"unknown reference electrode {name!r}; valid: {', '.join(REFERENCES)}")


def reference_offset(name, temperature_c=25.0, ph=None):
    """Potential of a reference electrode vs SHE at T.

    Parameters
    ----------
    name : str
        Reference electrode name or alias.
    temperature_c : float or array_like
        Temperature [°C].
    ph : float or array_like, optional
        pH of the solution; required for RHE, ignored otherwise [-].

    Returns
    -------
    float or numpy.ndarray
        Potential of the reference [V vs SHE].

    Raises
    ------
    OptionError
        If the name is unknown.
    ConditionsError
        If T is outside 0-300 °C, or RHE is asked for without a pH.

    Warns
    -----
    RangeWarning
        If T is outside the range the electrode's temperature dependence covers.

    Notes
    -----
    RHE: E = -k_T pH with k_T = R T ln10 / F (Nernst equation for 2H+ + 2e- = H2
    at 1 bar H2). The others: see ``list_references()``.

    Examples
    --------
    >>> reference_offset("SCE")
    0.2412
    >>> round(reference_offset("RHE", 25.0, ph=7.0), 4)
    -0.4141
    """
    ref = get_reference(name)
    t = check_temperature(temperature_c)
    lo, hi = ref.valid_range_c
    ta = np.asarray(t, dtype=float)
    if np.any((ta < lo) | (ta > hi)):
        bad = float(ta[(ta < lo) | (ta > hi)].flat[0]) if ta.ndim else float(ta)
        warnings.warn(
            f"reference {ref.name}: its temperature dependence covers {lo:g}-{hi:g} °C; "
            f"{bad:g} °C is outside (value extrapolated)",
            RangeWarning,
            stacklevel=2,
        )
    if ref.name == "RHE":
        if ph is None:
            raise ConditionsError("reference RHE needs the pH of the solution (ph=...)")
        try:
            p = np.asarray(ph, dtype=float)
        except (TypeError, ValueError):
            raise ConditionsError(f"pH {ph!r} is not a number") from None
        if np.any(~np.isfinite(p)):
            raise ConditionsError(f"pH must be finite, got {ph!r}")
        # Nernst, 2H+ + 2e- = H2 (1 bar): E(RHE) = -k_T pH vs SHE
        out = -np.asarray(nernst_factor(t)) * p
    else:
        out = np.asarray(ref.potential(ta), dtype=float)
    if np.ndim(out) == 0:
        return float(out)
    return out


def to_she(potential_v, reference, temperature_c=25.0, ph=None):
    """Convert potentials measured vs a reference electrode to vs SHE.

    Parameters
    ----------
    potential_v : float or array_like
        Potential [V vs the reference].
    reference : str
        Reference electrode name or alias.
    temperature_c : float or array_like
        Temperature [°C].
    ph : float or array_like, optional
        pH, required for RHE [-].

    Returns
    -------
    float or numpy.ndarray
        Potential [V vs SHE].

    Raises
    ------
    OptionError, ConditionsError
        As :func:`reference_offset`; ConditionsError also for a non-numeric
        potential.

    Examples
    --------
    >>> round(to_she(-0.85, "CSE"), 3)
    -0.534
    """
    e = _potential(potential_v)
    out = e + np.asarray(reference_offset(reference, temperature_c, ph))
    return float(out) if np.ndim(out) == 0 else out


def from_she(potential_v, reference, temperature_c=25.0, ph=None):
    """Convert potentials vs SHE to vs a reference electrode.

    Parameters
    ----------
    potential_v : float or array_like
        Potential [V vs SHE].
    reference : str
        Reference electrode name or alias.
    temperature_c : float or array_like
        Temperature [°C].
    ph : float or array_like, optional
        pH, required for RHE [-].

    Returns
    -------
    float or numpy.ndarray
        Potential [V vs the reference].

    Raises
    ------
    OptionError, ConditionsError
        As :func:`to_she`.

    Examples
    --------
    >>> round(from_she(0.0, "SCE"), 4)
    -0.2412
    """
    e = _potential(potential_v)
    out = e - np.asarray(reference_offset(reference, temperature_c, ph))
    return float(out) if np.ndim(out) == 0 else out


def _potential(potential_v):
    try:
        e = np.asarray(potential_v, dtype=float)
    except (TypeError, ValueError):
        raise ConditionsError(f"potential {potential_v!r} is not a number of volts") from None
    return e


def list_references():
    """All reference electrodes with their values and sources.

    Returns
    -------
    list of dict
        One dict per electrode with keys ``name``, ``offset_v`` (25 °C, V vs
        SHE; None for RHE), ``dE_dT_v_per_k`` (at 25 °C; None for RHE),
        ``valid_range_c``, ``temperature_model``, ``description``, ``source``,
        ``aliases``.

    Examples
    --------
    >>> [r["name"] for r in list_references()][:2]
    ['SHE', 'SCE']
    """
    out = []
    for ref in REFERENCES.values():
        slope = ref.de_dt_v_per_k(25.0)
        out.append(
            {
                "name": ref.name,
                "offset_v": ref.potential_25_v,
                "dE_dT_v_per_k": None if slope is None else round(slope, 7),
                "valid_range_c": list(ref.valid_range_c),
                "temperature_model": ref.temperature_model,
                "description": ref.description,
                "source": ref.source,
                "aliases": list(ref.aliases),
            }
        )
    return out


del _e, _n
