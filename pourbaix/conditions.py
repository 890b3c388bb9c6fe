"""The conditions a map is computed for: checked once from user input, then frozen.

:func:`make_conditions` turns what a user typed (or passed from Python) into a
:class:`Conditions` object: temperature and pressure, the properties of water
there, the Nernst factor, the neutral pH, the reference electrode's offset and
slope, the ionic strength and the activity coefficients of ions of every
charge, the activity or molality of dissolved species, the ligand totals and
the window. Every computing path takes this object and trusts it; nothing
downstream checks or recomputes these values.

Plausible ranges (:data:`LIMITS`) are refused outside; values that are legal
but unusual are kept with a note in :attr:`Conditions.notes`, which maps carry
among their warnings.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from pourbaix.constants import LN10, NERNST_25C_V, ZERO_C_K, F, R
from pourbaix.errors import ConditionsError, OptionError

__all__ = [
    "Conditions",
    "LIMITS",
    "MAX_ION_CHARGE",
    "make_conditions",
    "parse_elements",
    "check_range",
]

#: Largest ionic charge the activity coefficients are tabulated for (and that a
#: species table may hold): the most highly charged polyoxometalates carry about -10.
MAX_ION_CHARGE = 12

#: Plausible ranges: ``name -> (refused below, warned below, warned above, refused above)``.
#: Water window: pH -2..16 spans the strongest practical acids and bases (common
#: practice); a map beyond about -4..18 describes no aqueous solution.
LIMITS = {
    "ph": (-4.0, -2.0, 16.0, 18.0),
    "potential_v": (-5.0, -3.0, 3.0, 5.0),
    # dissolved species: the corrosion criterion is 1e-6 (common practice);
    # below 1e-20 no map line is measurable, above 10 no dilute-solution model holds
    "activity": (1e-20, 1e-12, 1.0, 10.0),
    "molality": (1e-20, 1e-12, 6.0, 20.0),
    "ligand": (1e-20, 1e-12, 10.0, 20.0),
    "ionic_strength": (0.0, 0.0, 6.0, 20.0),
    # water activity of saturated LiCl is about 0.11 (Greenspan 1977); lower is not a brine
    "water_activity": (0.05, 0.5, 1.0, 1.0),
    # ratio of the largest to the smallest metal amount of an alloy
    "ratio_span": (1.0, 1.0, 1e6, 1e9),
}


def _nernst(temperature_c):
    # Nernst factor k_T = R T ln10 / F (Bard & Faulkner 2001, eq. 2.1.38)
    return R * (temperature_c + ZERO_C_K) * LN10 / F


@dataclass(frozen=True)
class Conditions:
    """The conditions a map was computed for (build it with :func:`~pourbaix.conditions.make_conditions`).

    Attributes
    ----------
    elements : tuple of str
        Principal element first, then other metals of a fixed-ratio system.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure used [bar] (1 bar, or saturation above 100 °C).
    activity : float or None
        Activity set for dissolved species of the element(s) [-].
    molality : float or None
        Molality set instead of activity [mol/kg].
    ionic_strength : float
        Ionic strength used [mol/kg].
    activity_model : str or None
        Activity-coefficient model, when the ionic strength is not zero.
    water_activity : float
        Activity of water [-].
    ligands : dict
        Ligand name -> total activity [-].
    ratio : tuple of float or None
        Amounts of the metals, in the order of ``elements``.
    ph_range : tuple of float
        pH window.
    potential_range_v : tuple of float
        Potential window [V vs the reference].
    reference : str
        Reference electrode name.
    reference_offset_v : float
        Reference potential vs SHE at pH 0 [V].
    reference_slope_v_per_ph : float
        pH dependence of the reference vs SHE [V/pH] (non-zero only for RHE).
    dataset : str
        Data set name.
    data_files : tuple of str
        User tables used.
    nernst_v : float
        Nernst factor R T ln10 / F at the temperature [V].
    water : WaterProperties or None
        Density, dielectric constant, pKw and Gibbs energy of water at (T, P).
    neutral_ph : float or None
        pKw / 2 at (T, P) [-].
    log_gamma_by_charge : tuple of float
        log10 of the activity coefficient of an ion of charge z at index
        ``z + MAX_ION_CHARGE`` (empty when the ionic strength is zero) [-].
    notes : tuple of str
        Things the user must know about these conditions (unusual values,
        model limits, reference electrodes past their range).
    """

    elements: tuple
    temperature_c: float = 25.0
    pressure_bar: float = 1.0
    activity: float | None = 1e-6
    molality: float | None = None
    ionic_strength: float = 0.0
    activity_model: str | None = None
    water_activity: float = 1.0
    ligands: dict = field(default_factory=dict)
    ratio: tuple | None = None
    ph_range: tuple = (-2.0, 16.0)
    potential_range_v: tuple = (-2.0, 2.0)
    reference: str = "SHE"
    reference_offset_v: float = 0.0
    reference_slope_v_per_ph: float = 0.0
    dataset: str = "default"
    data_files: tuple = ()
    nernst_v: float = NERNST_25C_V
    water: object = field(default=None, compare=False, repr=False)
    neutral_ph: float | None = None
    log_gamma_by_charge: tuple = field(default=(), repr=False)
    notes: tuple = field(default=(), compare=False)

    @property
    def window(self):
        """``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V] vs the reference."""
        return (*self.ph_range, *self.potential_range_v)

    def activity_coefficient(self, charge):
        """Activity coefficient of an ion of the given charge at these conditions [-].

        Parameters
        ----------
        charge : int
            Ionic charge [-].

        Returns
        -------
        float
            γ (1 when the ionic strength is zero or the species is neutral).
        """
        if not self.log_gamma_by_charge or charge == 0:
            return 1.0
        return float(10.0 ** self.log_gamma_by_charge[int(charge) + MAX_ION_CHARGE])

    def to_she(self, ph, potential_v):
        """Convert a potential vs this map's reference to SHE [V]."""
        return (
            np.asarray(potential_v)
            + self.reference_offset_v
            + self.reference_slope_v_per_ph * np.asarray(ph)
        )

    def from_she(self, ph, potential_v):
        """Convert a potential vs SHE to this map's reference [V]."""
        return (
            np.asarray(potential_v)
            - self.reference_offset_v
            - self.reference_slope_v_per_ph * np.asarray(ph)
        )


# ------------------------------------------------------------------ checks
def parse_elements(elements):
    """Element symbols as a tuple, checked.

    Parameters
    ----------
    elements : str or sequence of str
        ``"Fe"``, ``"Fe Cr"``, ``"Fe,Cr"``, ``"Fe-Cr"`` or ``["Fe", "Cr"]``.

    Returns
    -------
    tuple of str

    Raises
    ------
    OptionError
        For no element, an unknown symbol or a symbol given twice.

    Examples
    --------
    >>> parse_elements("Fe-Cr")
    ('Fe', 'Cr')
    """
    from pourbaix.tables.formula import ELEMENTS

    if isinstance(elements, str):
        elements = elements.replace(",", " ").replace("-", " ").split()
    try:
        elements = tuple(str(e) for e in elements)
    except TypeError:
        raise OptionError(f"elements must be symbols such as Fe, got {elements!r}") from None
    if not elements:
        raise OptionError("give at least one element, e.g. Fe")
    for el in elements:
        if el not in ELEMENTS:
            raise OptionError(
                f"unknown element {_short(el)!r}; give a chemical symbol such as Fe, Cu, Zn"
            )
    if len(set(elements)) != len(elements):
        raise OptionError(f"element listed twice in {' '.join(elements)}")
    return elements


def _short(text, limit=60):
    text = str(text)
    return text if len(text) <= limit else f"{text[: limit - 20]}...({len(text)} characters)"


def _number(name, value, unit=""):
    try:
        v = float(value)
    except (TypeError, ValueError, OverflowError):
        raise ConditionsError(f"{name} must be a number{unit}, got {_short(repr(value))}") from None
    if not math.isfinite(v):
        raise ConditionsError(f"{name} must be a finite number{unit}, got {value!r}")
    return v


def _plausible(name, value, limits, unit, notes, why=""):
    """Refuse a value outside the plausible range; note one that is legal but unusual."""
    refuse_lo, warn_lo, warn_hi, refuse_hi = limits
    if value < refuse_lo or value > refuse_hi:
        raise ConditionsError(
            f"{name} {value:g}{unit} is outside the plausible range {refuse_lo:g} to "
            f"{refuse_hi:g}{unit}{why}"
        )
    if value < warn_lo or value > warn_hi:
        notes.append(
            f"{name} {value:g}{unit} is unusual (ordinary values lie between {warn_lo:g} and "
            f"{warn_hi:g}{unit}); check it is what you meant"
        )


def check_range(name, rng, unit="", limits=None, notes=None):
    """A window (LO, HI) as two floats, checked.

    Parameters
    ----------
    name : str
        What the window is, for messages ("pH range").
    rng : sequence of two numbers
        The window.
    unit : str
        Unit for messages (" V").
    limits : tuple of float, optional
        ``(refused below, warned below, warned above, refused above)``.
    notes : list of str, optional
        Collects a note for an unusual window.

    Returns
    -------
    tuple of float

    Raises
    ------
    ConditionsError
        If the window is not two finite numbers with LO < HI, or lies outside
        ``limits``.
    """
    try:
        lo, hi = (float(v) for v in rng)
    except (TypeError, ValueError, OverflowError) as exc:
        raise ConditionsError(f"{name} must be two numbers LO HI, got {_short(repr(rng))}") from exc
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        raise ConditionsError(f"{name} must be finite with LO < HI, got {lo:g} .. {hi:g}{unit}")
    if limits is not None:
        refuse_lo, warn_lo, warn_hi, refuse_hi = limits
        if lo < refuse_lo or hi > refuse_hi:
            raise ConditionsError(
                f"{name} {lo:g} .. {hi:g}{unit} reaches outside the plausible range "
                f"{refuse_lo:g} to {refuse_hi:g}{unit}"
            )
        # a window narrower than this cannot be drawn or told apart from rounding
        if hi - lo < 1e-3 * (refuse_hi - refuse_lo):
            raise ConditionsError(
                f"{name} {lo:g} .. {hi:g}{unit} is too narrow; make it at least "
                f"{1e-3 * (refuse_hi - refuse_lo):g}{unit} wide"
            )
        if notes is not None and (lo < warn_lo or hi > warn_hi):
            notes.append(
                f"{name} {lo:g} .. {hi:g}{unit} reaches beyond the usual {warn_lo:g} to "
                f"{warn_hi:g}{unit}; aqueous thermodynamics is doubtful out there"
            )
    return (lo, hi)


def _parse_ligands(ligands, notes):
    """Ligand family name -> total activity, checked; a ligand given twice is refused."""
    from pourbaix.tables.ligands import resolve_ligand

    if not ligands:
        return {}
    items = ligands.items() if isinstance(ligands, dict) else ligands
    out, seen = {}, {}
    for item in items:
        try:
            name, value = item
        except (TypeError, ValueError):
            raise OptionError(
                f"ligands must be NAME -> activity pairs such as {{'S': 1e-3}}, "
                f"got {_short(repr(item))}"
            ) from None
        fam = resolve_ligand(name)
        try:
            a = float(value)
        except (TypeError, ValueError, OverflowError):
            a = math.nan
        if not (math.isfinite(a) and a > 0):
            raise ConditionsError(
                f"ligand {name!r}: total activity must be a number > 0, got {_short(repr(value))}"
            )
        if fam.name in seen:
            raise OptionError(
                f"ligand {fam.name} given twice (as {seen[fam.name]!r} = {out[fam.name]:g} and "
                f"{name!r} = {a:g}); give each ligand once"
            )
        _plausible(f"ligand {fam.name} total activity", a, LIMITS["ligand"], "", notes)
        seen[fam.name] = name
        out[fam.name] = a
    return out


def _parse_ratio(elements, ratio):
    if ratio is None:
        if len(elements) > 1:
            ones = ":".join("1" for _ in elements)
            raise OptionError(
                f"several metals ({' '.join(elements)}) need a ratio of their amounts, "
                f"e.g. {ones} (--ratio {ones})"
            )
        return None
    if isinstance(ratio, str):
        ratio = ratio.replace(",", ":").split(":")
    try:
        vals = tuple(float(v) for v in ratio)
    except (TypeError, ValueError, OverflowError):
        raise OptionError(
            f"ratio must be amounts like 70:19:11, got {_short(repr(ratio))}"
        ) from None
    if len(vals) != len(elements):
        raise OptionError(
            f"ratio has {len(vals)} amount(s) but {len(elements)} element(s) are given "
            f"({' '.join(elements)}); give one amount per element, in the same order"
        )
    if not all(math.isfinite(v) and v > 0 for v in vals):
        raise ConditionsError(
            f"ratio amounts must be finite numbers > 0, got {_short(repr(ratio))}"
        )
    span = max(vals) / min(vals)
    if span > LIMITS["ratio_span"][3]:
        raise ConditionsError(
            f"ratio {':'.join(f'{v:g}' for v in vals)}: the largest amount is {span:.3g} times the "
            f"smallest (at most {LIMITS['ratio_span'][3]:g}); leave out a metal present only in traces"
        )
    return vals


def _ionic_strength(ionic_strength, background):
    if background is not None and ionic_strength is not None:
        raise OptionError("give either an ionic strength or a background electrolyte, not both")
    if background is not None:
        from pourbaix.physics import solution

        salts = (
            solution.parse_background(background)
            if isinstance(background, str)
            else dict(background)
        )
        ions = solution.background_ions(salts)
        return float(solution.ionic_strength([(m, z) for _, m, z in ions]))
    if ionic_strength is None:
        return 0.0
    i = _number("ionic strength", ionic_strength, " mol/kg")
    if i < 0:
        raise ConditionsError(f"ionic strength must be a number >= 0 mol/kg, got {ionic_strength}")
    return i


# background ions that are ligands of a family: they set the ionic strength only
_BACKGROUND_LIGANDS = {"Cl^-": ("Cl", "chloride"), "SO4^2-": ("S", "sulfate"),
                       "HCO3^-": ("C", "carbonate"), "CO3^2-": ("C", "carbonate")}  # fmt: skip


def _background_ligand_notes(background, families):
    """Say that a background electrolyte's complexing anions form no complexes unless given as ligands."""
    from pourbaix.physics import solution

    salts = (
        solution.parse_background(background) if isinstance(background, str) else dict(background)
    )
    given = set(families or {})  # ligand names given
    amounts = {}
    for ion, molality, _charge in solution.background_ions(salts):
        if ion in _BACKGROUND_LIGANDS and _BACKGROUND_LIGANDS[ion][0] not in given:
            family, word = _BACKGROUND_LIGANDS[ion]
            amounts[(family, word)] = amounts.get((family, word), 0.0) + float(molality)
    return [
        f"background electrolyte: its {word} ({m:g} mol/kg) sets the ionic strength only and forms "
        f"no {word} complexes on this map; to include them give {word} as a ligand "
        f"(--ligand {family}={m:g} on the command line)"
        for (family, word), m in amounts.items()
    ]


def _reference(reference, temperature_c):
    from pourbaix.physics import electrodes

    info = electrodes.get_reference(reference)
    # the offset at pH 0 and its change per pH unit (non-zero for RHE only), in one call
    at0, at1 = np.asarray(
        electrodes.reference_offset(info.name, temperature_c, ph=[0.0, 1.0]) * np.ones(2)
    )
    return info.name, float(at0), float(at1 - at0)


# ------------------------------------------------------------------ the builder
def make_conditions(
    elements,
    *,
    activity=None,
    molality=None,
    temperature_c=25.0,
    pressure_bar=None,
    ionic_strength=None,
    background=None,
    activity_model="davies",
    water_activity=1.0,
    ligands=None,
    ratio=None,
    ph_range=(-2.0, 16.0),
    potential_range_v=(-2.0, 2.0),
    reference="SHE",
    dataset="default",
    data_files=(),
):
    """Check user input once and build the frozen conditions of a map.

    Parameters
    ----------
    elements : str or sequence of str
        Principal element (e.g. "Fe"); several metals for a fixed-ratio map.
    activity : float, optional
        Activity of every dissolved species of the element [-]; default 1e-6
        (the corrosion convention, common practice). Refused outside 1e-20 to
        10, noted outside 1e-12 to 1.
    molality : float, optional
        Molality of dissolved species instead of activity [mol/kg]; the
        activity is molality × γ from the activity model. Refused outside
        1e-20 to 20, noted above 6.
    temperature_c : float
        Temperature [°C], 0 to 350 along saturation, to 600 with a pressure.
    pressure_bar : float, optional
        Pressure [bar], up to 5000; default 1 bar, or the saturation pressure
        above 100 °C.
    ionic_strength : float, optional
        Ionic strength [mol/kg], 0 to the activity model's limit.
    background : dict or str, optional
        Background electrolyte, e.g. ``{"NaCl": 0.5}`` or ``"NaCl=0.5,CaCl2=0.01"``
        [mol/kg]; sets the ionic strength.
    activity_model : str
        ``davies``, ``extended-debye-huckel`` or ``b-dot``; checked even when
        the ionic strength is zero.
    water_activity : float
        Activity of water [-], 0.05 to 1 (noted below 0.5).
    ligands : dict or sequence of (str, float), optional
        Ligand -> total activity, e.g. ``{"S": 1e-3}`` [-]; refused outside
        1e-20 to 20; a ligand given twice is refused.
    ratio : sequence of float, optional
        Amounts of the metals in ``elements`` for an alloy map; the largest at
        most 1e9 times the smallest.
    ph_range : (float, float)
        pH window, within -4 to 18 (noted beyond -2 to 16).
    potential_range_v : (float, float)
        Potential window [V vs ``reference``], within -5 to 5 (noted beyond ±3).
    reference : str
        Reference electrode for all potentials (in and out), e.g. "SCE".
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables that add or override rows.

    Returns
    -------
    Conditions

    Raises
    ------
    OptionError
        Unknown element, reference, ligand or activity model; options that
        exclude each other.
    ConditionsError
        A value outside its plausible range (the message names it and the range).

    Examples
    --------
    >>> c = make_conditions("Fe", temperature_c=60.0, reference="SCE")
    >>> round(c.nernst_v, 5), round(c.neutral_ph, 2), c.reference
    (0.06611, 6.51, 'SCE')
    """
    from pourbaix.physics import thermo

    notes = []
    elements = parse_elements(elements)
    ph_range = check_range("pH range", ph_range, "", LIMITS["ph"], notes)
    potential_range_v = check_range(
        "potential range", potential_range_v, " V", LIMITS["potential_v"], notes
    )
    if activity is not None and molality is not None:
        raise OptionError("give either activity or molality, not both")
    if activity is None and molality is None:
        activity = 1e-6
    for label, v in (("activity", activity), ("molality", molality)):
        if v is None:
            continue
        x = _number(label, v)
        if x <= 0:
            raise ConditionsError(f"{label} must be a positive number, got {v}")
        unit = " mol/kg" if label == "molality" else ""
        _plausible(f"{label} of dissolved species", x, LIMITS[label], unit, notes)
    activity = None if activity is None else float(activity)
    molality = None if molality is None else float(molality)
    families = _parse_ligands(ligands, notes)
    ratio_vals = _parse_ratio(elements, ratio)
    t = thermo.check_temperature(_number("temperature", temperature_c, " °C"))
    wa = _number("water activity", water_activity)
    if not 0.0 < wa <= 1.0:
        raise ConditionsError(f"water activity must be in (0, 1], got {water_activity}")
    _plausible("water activity", wa, LIMITS["water_activity"], "", notes)
    from pourbaix.physics import solution

    model_name = str(activity_model)
    solution.model_validity(model_name)  # an unknown model is an error whatever the strength
    if model_name.strip().lower() == "pitzer" and wa != 1.0:
        # the solver takes a_w from the brine's osmotic coefficient (pourbaix.physics.pitzer)
        raise ConditionsError(
            f"water activity {water_activity} given with the Pitzer model, which computes it "
            "from the brine; leave the water activity out"
        )
    ionic = _ionic_strength(ionic_strength, background)
    if background is not None:
        notes += _background_ligand_notes(background, families)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        water = thermo.water_properties(t, pressure_bar)
        ref_name, off0, off1 = _reference(reference, t)
        log_gammas = ()
        model = None
        if ionic > 0:
            model = model_name
            charges = np.arange(-MAX_ION_CHARGE, MAX_ION_CHARGE + 1)
            values = solution.log_gamma(charges, ionic, t, model=model, pressure_bar=pressure_bar)
            log_gammas = tuple(float(v) for v in np.asarray(values, dtype=float))
    for w in caught:
        msg = str(w.message)
        if msg not in notes:
            notes.append(msg)
    if ionic > 0:
        _, _, text = solution.model_validity(model)
        notes.append(f"activity coefficients: {model} model at I = {ionic:g} mol/kg ({text})")
        if molality is None:
            notes.append(
                "dissolved species were set by activity, which the activity coefficients do not "
                "change; give a molality to apply the model"
            )
    return Conditions(
        elements=elements,
        temperature_c=t,
        pressure_bar=float(water.pressure_bar),
        activity=activity,
        molality=molality,
        ionic_strength=ionic,
        activity_model=model,
        water_activity=wa,
        ligands=families,
        ratio=ratio_vals,
        ph_range=ph_range,
        potential_range_v=potential_range_v,
        reference=ref_name,
        reference_offset_v=off0,
        reference_slope_v_per_ph=off1,
        dataset=str(dataset),
        data_files=tuple(str(p) for p in data_files),
        nernst_v=_nernst(t),
        water=water,
        neutral_ph=float(water.pkw) / 2.0,
        log_gamma_by_charge=log_gammas,
        notes=tuple(notes),
    )
