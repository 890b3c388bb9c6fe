"""Half-reactions as typed by users: parsing, balance checks, E° at T and the Nernst equation.

A half-reaction is always held as a reduction, ``oxidised + n e- = reduced``,
with every species (H+, OH-, H2O included) taken from the species tables. Its
standard potential comes from the tables through ΔrG° = -nFE°, at 25 °C or at
any temperature the tables reach (apparent Gibbs energies, the same route the
maps use, with the SHE kept at zero at every temperature). Its potential at
real activities comes from the Nernst equation.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from fractions import Fraction

from pourbaix.constants import F_KJ, LN10, ZERO_C_K, R
from pourbaix.errors import ConditionsError, ReactionError, UnknownSpeciesError
from pourbaix.physics import thermo
from pourbaix.physics.reactions import Reaction
from pourbaix.tables.species import Species, SpeciesTable, load_species

__all__ = [
    "HalfReaction",
    "SolutionState",
    "parse_half_reaction",
    "from_reaction",
    "find_species",
    "reaction_gibbs_at",
    "standard_potential_at",
    "log10_quotient",
    "nernst_potential",
    "nernst_text",
    "water_ion_product_log10",
    "net_reaction",
]

_PHASE_PREFERENCE = ("s", "l", "g", "aq")  # a name without phase: the usual standard state first
_ELECTRON_NAMES = {"e-", "e", "e^-", "e⁻", "e(-)", "electron", "electrons"}
_ARROWS = re.compile(r"\s*(?:<=>|<->|⇌|⇄|->|→|=)\s*")
_TERM = re.compile(r"^\s*(\d+(?:\.\d+)?(?:/\d+)?)?\s*(\S.*?)\s*$")


# --------------------------------------------------------------------------- the object
def _coefficient_text(c: float) -> str:
    if math.isclose(c, 1.0):
        return ""
    if math.isclose(c, round(c)):
        return f"{round(c)} "
    return f"{c:.4g} "


@dataclass(frozen=True)
class HalfReaction:
    """A reduction ``oxidised + n e- = reduced`` between species of the tables.

    Attributes
    ----------
    oxidised : tuple of (Species, float)
        Left-hand side without the electrons (H+ and H2O included where they
        take part), with positive coefficients.
    reduced : tuple of (Species, float)
        Right-hand side, positive coefficients.
    electrons : float
        n, the electrons on the left [-]; always positive.
    reversed_input : bool
        True when the user wrote an oxidation and it was turned round.
    """

    oxidised: tuple
    reduced: tuple
    electrons: float
    reversed_input: bool = False

    @property
    def n(self) -> float:
        """Electrons transferred [-]."""
        return self.electrons

    def text(self, unicode: bool = False) -> str:
        """The reduction as text, e.g. ``MnO4^- + 8 H^+ + 5 e- = Mn^2+ + 4 H2O``.

        Parameters
        ----------
        unicode : bool
            Typeset formulas with Unicode sub- and superscripts.
        """

        def name(sp):
            return sp.formula.plain() if unicode else sp.name

        left = [f"{_coefficient_text(c)}{name(sp)}" for sp, c in self.oxidised]
        left.append(f"{_coefficient_text(self.electrons)}{'e⁻' if unicode else 'e-'}")
        right = [f"{_coefficient_text(c)}{name(sp)}" for sp, c in self.reduced]
        return f"{' + '.join(left)} = {' + '.join(right) or '0'}"

    def __str__(self) -> str:
        return self.text()

    def stoichiometry(self) -> dict:
        """Species key -> signed coefficient (products positive), electrons left out."""
        out: dict = {}
        for sp, c in self.oxidised:
            out[sp.key] = out.get(sp.key, 0.0) - c
        for sp, c in self.reduced:
            out[sp.key] = out.get(sp.key, 0.0) + c
        return out

    def species(self) -> tuple:
        """Every species of the reaction, left to right."""
        return tuple(sp for sp, _ in self.oxidised) + tuple(sp for sp, _ in self.reduced)

    def elements(self) -> frozenset:
        """Elements of the species other than H and O (all of them if there are no others)."""
        found = frozenset(e for sp in self.species() for e in sp.composition)
        return (found - {"H", "O"}) or found

    def scaled(self, factor: float) -> HalfReaction:
        """The same reduction with every coefficient times ``factor`` (> 0)."""
        if not (factor > 0 and math.isfinite(factor)):
            raise ReactionError(f"a reaction can be multiplied by a positive number, got {factor}")
        return HalfReaction(
            tuple((sp, c * factor) for sp, c in self.oxidised),
            tuple((sp, c * factor) for sp, c in self.reduced),
            self.electrons * factor,
            self.reversed_input,
        )


# --------------------------------------------------------------------------- parsing
def find_species(table: SpeciesTable, name: str) -> Species:
    """Look a species up by name; a name matching several phases takes the usual standard state.

    Parameters
    ----------
    table : SpeciesTable
        The tables.
    name : str
        ``"Zn2+"``, ``"O2"``, ``"H2S(aq)"``, ``"Fe2O3:maghemite"``.

    Returns
    -------
    Species
        Without a written phase, the first phase found in the order solid,
        liquid, gas, aqueous (``O2`` is the gas, ``H2O`` the liquid, ``AgCl``
        the solid); write ``(aq)`` for the dissolved form. A formula held only
        under a form tag (``Hg2Cl2`` as ``Hg2Cl2:calomel``) is found when one
        stable form carries it.

    Raises
    ------
    UnknownSpeciesError
        Not in the tables (the message lists close matches).
    """
    try:
        return table.get(name)
    except UnknownSpeciesError as exc:
        if "ambiguous" in str(exc):
            for phase in _PHASE_PREFERENCE:
                try:
                    return table.get(name, phase)
                except UnknownSpeciesError:
                    continue
        tagged = _only_tagged_form(table, name)
        if tagged is not None:
            return tagged
        raise


def _only_tagged_form(table: SpeciesTable, name: str) -> Species | None:
    """The one stable species with this formula held under a form tag (``Hg2Cl2:calomel``)."""
    from pourbaix.errors import FormulaError
    from pourbaix.tables.formula import parse_formula

    if ":" in name:
        return None
    try:
        f = parse_formula(name)
    except FormulaError:
        return None
    found = [
        sp
        for sp in table.species
        if sp.form is not None
        and not sp.metastable
        and sp.charge == f.charge
        and dict(sp.composition) == dict(f.composition)
        and (f.phase is None or sp.phase == f.phase)
    ]
    return found[0] if len(found) == 1 else None


def _parse_side(text: str, side: str, whole: str, table: SpeciesTable):
    terms: list = []
    electrons = Fraction(0)
    if not text.strip():
        raise ReactionError(f"half-reaction {whole!r}: the {side} side is empty")
    for raw in re.split(r"\s+\+\s*", text.strip()):
        m = _TERM.match(raw)
        if not m or not m.group(2):
            raise ReactionError(f"half-reaction {whole!r}: cannot read the term {raw!r}")
        coeff = Fraction(m.group(1)) if m.group(1) else Fraction(1)
        if coeff <= 0:
            raise ReactionError(f"half-reaction {whole!r}: coefficient of {raw!r} must be > 0")
        name = m.group(2)
        if name.strip().lower() in _ELECTRON_NAMES:
            electrons += coeff
            continue
        try:
            sp = find_species(table, name)
        except UnknownSpeciesError as exc:
            raise UnknownSpeciesError(f"half-reaction {whole!r}: {exc}") from None
        terms.append((sp, coeff))
    return terms, electrons


def net_reaction(left, right):
    """Cancel species written on both sides; return the two sides with positive coefficients."""
    net: dict = {}
    order: list = []
    for sp, c in left:
        if sp.key not in net:
            order.append(sp)
            net[sp.key] = Fraction(0)
        net[sp.key] -= c
    for sp, c in right:
        if sp.key not in net:
            order.append(sp)
            net[sp.key] = Fraction(0)
        net[sp.key] += c
    ox = [(sp, -net[sp.key]) for sp in order if net[sp.key] < 0]
    red = [(sp, net[sp.key]) for sp in order if net[sp.key] > 0]
    return ox, red


def _balance_problems(ox, red, electrons) -> list[str]:
    counts: dict = {}
    for sp, c in ox:
        for el, k in sp.composition.items():
            counts.setdefault(el, [Fraction(0), Fraction(0)])[0] += c * k
    for sp, c in red:
        for el, k in sp.composition.items():
            counts.setdefault(el, [Fraction(0), Fraction(0)])[1] += c * k
    problems = [
        f"{el}: {float(lhs):g} on the left, {float(rhs):g} on the right"
        for el, (lhs, rhs) in counts.items()
        if lhs != rhs
    ]
    q_left = sum((c * sp.charge for sp, c in ox), Fraction(0)) - electrons
    q_right = sum((c * sp.charge for sp, c in red), Fraction(0))
    if q_left != q_right:
        problems.append(
            f"charge: {float(q_left):+g} on the left (electrons included), {float(q_right):+g} "
            "on the right"
        )
    return problems


def parse_half_reaction(text: str, table: SpeciesTable | None = None) -> HalfReaction:
    """Read a typed half-reaction, check its balance and hold it as a reduction.

    Parameters
    ----------
    text : str
        E.g. ``"MnO4- + 8H+ + 5e- = Mn2+ + 4H2O"``. Sides are separated by
        ``=``, ``->``, ``→`` or ``⇌``; terms by `` + ``; coefficients may be
        integers, decimals or fractions (``1/2 O2``). Electrons are ``e-``.
        An oxidation (electrons on the right) is turned round.
    table : SpeciesTable, optional
        The tables (default data set when None).

    Returns
    -------
    HalfReaction

    Raises
    ------
    ReactionError
        Not two sides, an unreadable term, no electrons, or a reaction that
        does not balance in an element or in charge (each named).
    UnknownSpeciesError
        A species not in the tables.

    Notes
    -----
    Balance: every element and the charge (electrons counted as -1) equal on
    both sides (conservation of mass and charge; Bard & Faulkner 2001, ch. 2).

    Examples
    --------
    >>> r = parse_half_reaction("MnO4- + 8H+ + 5e- = Mn2+ + 4H2O")
    >>> r.n, r.text()
    (5.0, 'MnO4^- + 8 H^+ + 5 e- = Mn^2+ + 4 H2O')
    """
    if not isinstance(text, str) or not text.strip():
        raise ReactionError(f"half-reaction {text!r}: empty")
    table = table if table is not None else load_species()
    sides = _ARROWS.split(text.strip())
    if len(sides) != 2:
        raise ReactionError(
            f"half-reaction {text!r}: write two sides separated by '=', e.g. 'Cu2+ + 2e- = Cu'"
        )
    left, e_left = _parse_side(sides[0], "left", text, table)
    right, e_right = _parse_side(sides[1], "right", text, table)
    electrons = e_left - e_right
    ox, red = net_reaction(left, right)
    problems = _balance_problems(ox, red, electrons)
    if problems:
        raise ReactionError(f"half-reaction {text!r} does not balance: " + "; ".join(problems))
    if electrons == 0:
        raise ReactionError(
            f"half-reaction {text!r} transfers no electrons: not a half-reaction (write the "
            "electrons, e.g. '+ 2e-')"
        )
    reversed_input = electrons < 0
    if reversed_input:
        ox, red, electrons = red, ox, -electrons
    return HalfReaction(
        tuple((sp, float(c)) for sp, c in ox),
        tuple((sp, float(c)) for sp, c in red),
        float(electrons),
        reversed_input,
    )


def from_reaction(reaction: Reaction, table: SpeciesTable | None = None) -> HalfReaction:
    """A :class:`~pourbaix.physics.reactions.Reaction` (from ``balance_pair``) as a HalfReaction.

    Parameters
    ----------
    reaction : Reaction
        A reduction with electrons > 0.
    table : SpeciesTable, optional
        Where H+ and H2O(l) come from (default data set).

    Returns
    -------
    HalfReaction

    Raises
    ------
    ReactionError
        If the reaction transfers no electrons.
    """
    table = table if table is not None else load_species()
    if reaction.electrons <= 0:
        raise ReactionError(
            f"{reaction.text()} is not a reduction (electrons {reaction.electrons})"
        )
    h_plus = table.get("H+")
    water = table.get("H2O", "l")
    left = [(sp, Fraction(c).limit_denominator(1000)) for sp, c in reaction.oxidised if c > 0]
    right = [(sp, Fraction(c).limit_denominator(1000)) for sp, c in reaction.reduced if c > 0]
    left += [(sp, Fraction(-c).limit_denominator(1000)) for sp, c in reaction.reduced if c < 0]
    right += [(sp, Fraction(-c).limit_denominator(1000)) for sp, c in reaction.oxidised if c < 0]
    for sp, c in ((h_plus, -reaction.h_plus), (water, reaction.water)):
        if c > 0:
            right.append((sp, Fraction(c).limit_denominator(1000)))
        elif c < 0:
            left.append((sp, Fraction(-c).limit_denominator(1000)))
    ox, red = net_reaction(left, right)
    return HalfReaction(
        tuple((sp, float(c)) for sp, c in ox),
        tuple((sp, float(c)) for sp, c in red),
        float(reaction.electrons),
    )


# --------------------------------------------------------------------------- energies
@dataclass(frozen=True)
class _Energies:
    by_key: dict
    routes: dict
    valid_to_c: float
    electron_kj: float
    pressure_bar: float


def _energies(half: HalfReaction, table: SpeciesTable, temperature_c: float, pressure_bar=None):
    from pourbaix.physics.energies import make_context, species_gibbs_at

    t = float(thermo.check_temperature(temperature_c))
    ctx = make_context(table, t, pressure_bar)
    by_key, routes = {}, {}
    valid = math.inf
    for sp in half.species():
        if sp.key in by_key:
            continue
        if sp.phase == "l" and dict(sp.composition) == {"H": 2, "O": 1}:
            g, route, upto = ctx.g_water_kj, "IAPWS-95 (liquid water)", thermo.T_MAX_C
        else:
            # the route at the context's (T, P), with the tables' S° estimates
            g, route, upto = species_gibbs_at(sp, ctx)
        by_key[sp.key] = g
        routes[str(sp)] = route
        valid = min(valid, upto)
    return _Energies(by_key, routes, valid, ctx.g_electron_kj, ctx.pressure_bar)


def reaction_gibbs_at(
    half: HalfReaction,
    temperature_c: float = 25.0,
    table: SpeciesTable | None = None,
    pressure_bar: float | None = None,
) -> tuple[float, dict, float]:
    """Standard Gibbs energy of a reduction at T, electrons on the SHE scale.

    Parameters
    ----------
    half : HalfReaction
        The reduction.
    temperature_c : float
        Temperature [°C], 0-300.
    table : SpeciesTable, optional
        The tables (default data set).
    pressure_bar : float, optional
        Pressure [bar]; 1 bar, or saturation above 100 °C.

    Returns
    -------
    (float, dict, float)
        ΔrG° [kJ/mol], the route of each species' energy (species -> route),
        and the highest temperature all routes are trusted to [°C].

    Notes
    -----
    ΔrG°(T) = Σ ν G_app,i(T) - n G_e(T), products minus reactants, with
    apparent Gibbs energies (Helgeson et al. 1978, eq. 59), G(H+) = 0 and
    G_e = G(H2, g)/2 at every T so that the SHE stays the zero of potential.
    """
    table = table if table is not None else load_species()
    en = _energies(half, table, temperature_c, pressure_bar)
    dg = sum(c * en.by_key[sp.key] for sp, c in half.reduced)
    dg -= sum(c * en.by_key[sp.key] for sp, c in half.oxidised)
    dg -= half.electrons * en.electron_kj  # electrons are reactants
    return float(dg), en.routes, en.valid_to_c


def standard_potential_at(
    half: HalfReaction,
    temperature_c: float = 25.0,
    table: SpeciesTable | None = None,
    pressure_bar: float | None = None,
) -> float:
    """Standard reduction potential of a half-reaction at T.

    Parameters
    ----------
    half : HalfReaction
        The reduction.
    temperature_c : float
        Temperature [°C].
    table : SpeciesTable, optional
        The tables (default data set).
    pressure_bar : float, optional
        Pressure [bar].

    Returns
    -------
    float
        E° [V vs SHE].

    Notes
    -----
    E° = -ΔrG° / (nF) (Bard & Faulkner 2001, eq. 2.1.22).

    References
    ----------
    Bard, A. J., Faulkner, L. R. (2001). Electrochemical Methods, 2nd ed. Wiley.

    Examples
    --------
    >>> round(standard_potential_at(parse_half_reaction("Cu2+ + 2e- = Cu")), 3)
    0.339
    """
    dg, _, _ = reaction_gibbs_at(half, temperature_c, table, pressure_bar)
    return -dg / (half.electrons * F_KJ) + 0.0  # Bard & Faulkner 2001, eq. 2.1.22 (+0.0: no -0)


def water_ion_product_log10(
    temperature_c: float = 25.0, table: SpeciesTable | None = None, pressure_bar=None
) -> float:
    """log10 Kw from the tables' own H2O(l) and OH- at T (so acid and alkaline forms agree).

    Parameters
    ----------
    temperature_c : float
        Temperature [°C].
    table : SpeciesTable, optional
        The tables.
    pressure_bar : float, optional
        Pressure [bar].

    Returns
    -------
    float
        log10 Kw [-] (about -14.0 at 25 °C).

    Notes
    -----
    H2O = H+ + OH-:  log10 Kw = -(G(OH-) - G(H2O)) / (R T ln 10)  (van 't Hoff isotherm).
    """
    from pourbaix.physics.energies import make_context, species_gibbs_at

    table = table if table is not None else load_species()
    t = float(thermo.check_temperature(temperature_c))
    ctx = make_context(table, t, pressure_bar)
    oh = species_gibbs_at(table.get("OH-"), ctx)[0]
    return -(oh - ctx.g_water_kj) * 1000.0 / (R * (t + ZERO_C_K) * LN10)


# --------------------------------------------------------------------------- activities
@dataclass(frozen=True)
class SolutionState:
    """Activities of everything a half-reaction may hold.

    Attributes
    ----------
    ph : float or None
        pH; None is the standard state (a(H+) = 1 and a(OH-) = 1).
    activity : float
        Activity of dissolved species not named in ``activities`` [-].
    molality : float or None
        Molality of dissolved species not named, instead of ``activity``
        (activity = m γ) [mol/kg].
    activities : Mapping
        Species (``str(species)``, e.g. ``"Zn^2+(aq)"``) -> activity [-];
        for gases the fugacity in bar.
    molalities : Mapping
        Species -> molality [mol/kg] (activity = m γ).
    gas_bar : float
        Partial pressure of gases not named [bar].
    water_activity : float
        Activity of liquid water [-].
    ionic_strength : float
        Ionic strength for the activity coefficients [mol/kg].
    activity_model : str
        ``davies``, ``extended-debye-huckel`` or ``b-dot``.
    """

    ph: float | None = None
    activity: float = 1.0
    molality: float | None = None
    activities: Mapping = field(default_factory=dict)
    molalities: Mapping = field(default_factory=dict)
    gas_bar: float = 1.0
    water_activity: float = 1.0
    ionic_strength: float = 0.0
    activity_model: str = "davies"

    def __post_init__(self):
        checks = [("activity", self.activity), ("gas pressure", self.gas_bar)]
        checks += [("water activity", self.water_activity)]
        if self.molality is not None:
            checks.append(("molality", self.molality))
        checks += [(f"activity of {k}", v) for k, v in self.activities.items()]
        checks += [(f"molality of {k}", v) for k, v in self.molalities.items()]
        for what, v in checks:
            if not (isinstance(v, int | float) and math.isfinite(v) and v > 0):
                raise ConditionsError(f"{what} must be a number > 0, got {v!r}")
        if self.ph is not None and not math.isfinite(self.ph):
            raise ConditionsError(f"pH must be finite, got {self.ph!r}")
        if not (math.isfinite(self.ionic_strength) and self.ionic_strength >= 0):
            raise ConditionsError(
                f"ionic strength must be a number >= 0 mol/kg, got {self.ionic_strength!r}"
            )


def _gamma(sp: Species, state: SolutionState, temperature_c: float) -> float:
    if state.ionic_strength <= 0 or sp.charge == 0:
        return 1.0
    import warnings

    from pourbaix.physics.solution import log_gamma

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the caller reports the model's range once
        return float(
            10 ** log_gamma(sp.charge, state.ionic_strength, temperature_c, state.activity_model)
        )


def activity_function(
    state: SolutionState, temperature_c: float, log10_kw: float
) -> Callable[[Species], float]:
    """The activity of each species under ``state`` (solids 1, water a_w, H+ from pH ...)."""

    def activity(sp: Species) -> float:
        key = str(sp)
        if key in state.activities:
            return float(state.activities[key])
        if key in state.molalities:
            return float(state.molalities[key]) * _gamma(sp, state, temperature_c)
        comp = dict(sp.composition)
        if sp.phase in ("s",):
            return 1.0
        if sp.phase == "l":
            return state.water_activity if comp == {"H": 2, "O": 1} else 1.0
        if sp.phase == "g":
            return state.gas_bar
        if comp == {"H": 1} and sp.charge == 1:
            return 1.0 if state.ph is None else 10.0**-state.ph
        if comp == {"O": 1, "H": 1} and sp.charge == -1:
            return 1.0 if state.ph is None else 10.0 ** (state.ph + log10_kw)
        if state.molality is not None:
            return state.molality * _gamma(sp, state, temperature_c)
        return state.activity

    return activity


def log10_quotient(half: HalfReaction, activity: Callable[[Species], float]) -> float:
    """log10 Q of the reduction, Q = Π a(reduced)^ν / Π a(oxidised)^ν (electrons left out).

    Parameters
    ----------
    half : HalfReaction
        The reduction.
    activity : callable
        Species -> activity [-].

    Returns
    -------
    float
        log10 Q [-].
    """
    out = sum(c * math.log10(activity(sp)) for sp, c in half.reduced)
    return out - sum(c * math.log10(activity(sp)) for sp, c in half.oxidised)


def nernst_potential(
    half: HalfReaction,
    state: SolutionState | None = None,
    temperature_c: float = 25.0,
    table: SpeciesTable | None = None,
    pressure_bar: float | None = None,
) -> tuple[float, float]:
    """Standard and actual potential of a reduction at T.

    Parameters
    ----------
    half : HalfReaction
        The reduction.
    state : SolutionState, optional
        Activities; None is the standard state (E = E°).
    temperature_c : float
        Temperature [°C].
    table : SpeciesTable, optional
        The tables.
    pressure_bar : float, optional
        Pressure [bar].

    Returns
    -------
    (float, float)
        E° and E [V vs SHE].

    Notes
    -----
    Nernst: E = E° - (R T ln10 / nF) log10 Q (Bard & Faulkner 2001, eq. 2.1.38).

    Examples
    --------
    >>> r = parse_half_reaction("Cu2+ + 2e- = Cu")
    >>> e0, e = nernst_potential(r, SolutionState(activity=0.01))
    >>> round(e - e0, 4)  # two decades at n = 2: -2 × 0.05916/2
    -0.0592
    """
    table = table if table is not None else load_species()
    state = state if state is not None else SolutionState()
    e0 = standard_potential_at(half, temperature_c, table, pressure_bar)
    log_kw = water_ion_product_log10(temperature_c, table, pressure_bar)
    k = float(thermo.nernst_factor(temperature_c))
    q = log10_quotient(half, activity_function(state, temperature_c, log_kw))
    return e0, e0 - k / half.electrons * q  # Bard & Faulkner 2001, eq. 2.1.38


def _activity_symbol(sp: Species) -> str:
    return f"a({sp.formula.plain()})" if sp.phase != "g" else f"p({sp.formula.plain()})"


def nernst_text(half: HalfReaction, e0_v: float, temperature_c: float = 25.0) -> str:
    """The Nernst equation of a reduction, written out.

    Parameters
    ----------
    half : HalfReaction
        The reduction.
    e0_v : float
        Its standard potential on the scale wanted [V].
    temperature_c : float
        Temperature [°C] (sets k = R T ln10 / F).

    Returns
    -------
    str
        E.g. ``E = +1.5070 - (0.05916/5) log10[a(Mn²⁺) / (a(MnO₄⁻) a(H⁺)⁸)]``;
        solids and liquid water (activity 1) are left out of Q.

    Examples
    --------
    >>> nernst_text(parse_half_reaction("Cu2+ + 2e- = Cu"), 0.3419)
    'E = +0.3419 - (0.05916/2) log10[1 / a(Cu²⁺)]'
    """
    k = float(thermo.nernst_factor(temperature_c))
    sup = str.maketrans("0123456789.", "⁰¹²³⁴⁵⁶⁷⁸⁹·")

    def part(terms):
        items = []
        for sp, c in terms:
            if sp.phase == "s" or sp.phase == "l":
                continue
            power = "" if math.isclose(c, 1.0) else f"{c:g}".translate(sup)
            items.append(_activity_symbol(sp) + power)
        return items

    num, den = part(half.reduced), part(half.oxidised)
    top = " ".join(num) or "1"
    bottom = " ".join(den)
    quotient = top if not bottom else f"{top} / " + (f"({bottom})" if len(den) > 1 else bottom)
    n = f"{half.electrons:g}"
    return f"E = {e0_v:+.4f} - ({k:.5f}/{n}) log10[{quotient}]"


# old private names, kept one release for code not yet moved to the public ones
_net = net_reaction
