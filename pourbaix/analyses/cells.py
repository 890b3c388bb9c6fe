"""Electrochemical series, cells, galvanic couples in a water and mixed potentials.

Everything here computes; drawing is in :mod:`pourbaix.plot.cells`. Every
potential is held vs SHE and shown on the reference asked for. A cell's
potential and a couple's driving force are thermodynamic: they say which
electrode is the anode and how hard it is driven, not how fast anything
corrodes. A mixed potential needs kinetics (Tafel slopes and exchange or
corrosion currents) that only measurements on the real surfaces give.
Cathodic-protection and material-selection decisions belong to the
applicable standards and licensed practice.
"""

from __future__ import annotations

import math
import re
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from pourbaix.constants import F_KJ, LN10
from pourbaix.errors import ConditionsError, OptionError, ReactionError, UnknownSpeciesError
from pourbaix.frames import Tabular
from pourbaix.physics import thermo
from pourbaix.physics.halfreactions import (
    HalfReaction,
    SolutionState,
    activity_function,
    find_species,
    from_reaction,
    log10_quotient,
    nernst_text,
    parse_half_reaction,
    reaction_gibbs_at,
    water_ion_product_log10,
)
from pourbaix.tables.species import SpeciesTable, load_species

__all__ = [
    "CAUTION",
    "NO_KINETICS",
    "SERIES",
    "SeriesEntry",
    "SeriesResult",
    "electrochemical_series",
    "simple_ion_couples",
    "describe_half_reaction",
    "Electrode",
    "parse_electrode",
    "parse_cell",
    "CellResult",
    "cell_potential",
    "ElectrodeKinetics",
    "butler_volmer",
    "MixedPotential",
    "mixed_potential",
    "tafel_intersection",
    "MetalInWater",
    "CoupleResult",
    "galvanic_couple",
]


#: Caution every cell, series and couple output carries.
CAUTION = (
    "A cell potential or a galvanic driving force is thermodynamic: it says which metal is the "
    "anode and how hard it is driven, not how fast it corrodes (a thermodynamic driving force is "
    "not a corrosion rate). Films, areas, conductivity, oxygen supply and flow decide rates. "
    "Cathodic-protection and material-selection decisions belong to the applicable standards and "
    "licensed practice."
)

#: What is said when no kinetics are given.
NO_KINETICS = (
    "No kinetics given: thermodynamics gives only the driving force (which metal is driven "
    "anodic, and by how many volts at open circuit). The couple's mixed potential and the "
    "galvanic current need Tafel slopes and exchange or corrosion current densities measured "
    "for these surfaces in this water."
)

# ---------------------------------------------------------------------------- the series
#: Couples of the electrochemical series written as reductions (label, half-reaction). Each
#: is shown when the tables hold its species; E° always comes from the tables (ΔrG° = -nFE°).
#: Selection after the CRC Handbook "Electrochemical Series" and Bard, Parsons & Jordan
#: (1985), Standard Potentials in Aqueous Solution; alkaline forms are written with OH-.
SERIES = (
    ("O2/H2O", "O2(g) + 4 H+ + 4 e- = 2 H2O(l)"),
    ("H+/H2", "2 H+ + 2 e- = H2(g)"),
    ("Cl2/Cl-", "Cl2(g) + 2 e- = 2 Cl-"),
    ("S/H2S", "S(s) + 2 H+ + 2 e- = H2S(aq)"),
    ("HClO/Cl-", "HClO(aq) + H+ + 2 e- = Cl- + H2O(l)"),
    ("NO3-/HNO2", "NO3- + 3 H+ + 2 e- = HNO2(aq) + H2O(l)"),
    ("SO4^2-/SO2", "SO4^2- + 4 H+ + 2 e- = SO2(aq) + 2 H2O(l)"),
    ("O2/H2O2", "O2(g) + 2 H+ + 2 e- = H2O2(aq)"),
    ("H2O2/H2O", "H2O2(aq) + 2 H+ + 2 e- = 2 H2O(l)"),
    ("Fe2+/Fe", "Fe2+ + 2 e- = Fe(s)"),
    ("Fe3+/Fe", "Fe3+ + 3 e- = Fe(s)"),
    ("Cu2+/Cu", "Cu2+ + 2 e- = Cu(s)"),
    ("Cu+/Cu", "Cu+ + e- = Cu(s)"),
    ("Zn2+/Zn", "Zn2+ + 2 e- = Zn(s)"),
    ("Ni2+/Ni", "Ni2+ + 2 e- = Ni(s)"),
    ("Co2+/Co", "Co2+ + 2 e- = Co(s)"),
    ("Pb2+/Pb", "Pb2+ + 2 e- = Pb(s)"),
    ("Sn2+/Sn", "Sn2+ + 2 e- = Sn(s)"),
    ("Ag+/Ag", "Ag+ + e- = Ag(s)"),
    ("Al3+/Al", "Al3+ + 3 e- = Al(s)"),
    ("Mg2+/Mg", "Mg2+ + 2 e- = Mg(s)"),
    ("Mn2+/Mn", "Mn2+ + 2 e- = Mn(s)"),
    ("Cr3+/Cr", "Cr3+ + 3 e- = Cr(s)"),
    ("Cr2+/Cr", "Cr2+ + 2 e- = Cr(s)"),
    ("Au3+/Au", "Au3+ + 3 e- = Au(s)"),
    ("Au+/Au", "Au+ + e- = Au(s)"),
    ("Ti2+/Ti", "Ti2+ + 2 e- = Ti(s)"),
    ("Fe3+/Fe2+", "Fe3+ + e- = Fe2+"),
    ("Cu2+/Cu+", "Cu2+ + e- = Cu+"),
    ("Cr3+/Cr2+", "Cr3+ + e- = Cr2+"),
    ("Sn4+/Sn2+", "Sn4+ + 2 e- = Sn2+"),
    ("Co3+/Co2+", "Co3+ + e- = Co2+"),
    ("MnO4-/MnO4^2-", "MnO4- + e- = MnO4^2-"),
    ("Cr2O7^2-/Cr3+", "Cr2O7^2- + 14 H+ + 6 e- = 2 Cr3+ + 7 H2O(l)"),
    ("MnO4-/Mn2+", "MnO4- + 8 H+ + 5 e- = Mn2+ + 4 H2O(l)"),
    ("MnO2/Mn2+", "MnO2(s) + 4 H+ + 2 e- = Mn2+ + 2 H2O(l)"),
    ("PbO2/Pb2+", "PbO2(s) + 4 H+ + 2 e- = Pb2+ + 2 H2O(l)"),
    ("MoO2/Mo", "MoO2(s) + 4 H+ + 4 e- = Mo(s) + 2 H2O(l)"),
    ("AgCl/Ag", "AgCl(s) + e- = Ag(s) + Cl-"),
    ("AuCl4-/Au", "AuCl4- + 3 e- = Au(s) + 4 Cl-"),
    ("Au(CN)2-/Au", "Au(CN)2^- + e- = Au(s) + 2 CN-"),
    ("Ag(CN)2-/Ag", "Ag(CN)2^- + e- = Ag(s) + 2 CN-"),
    ("PbSO4/Pb", "PbSO4(s) + 2 e- = Pb(s) + SO4^2-"),
    ("PbO2/PbSO4", "PbO2(s) + SO4^2- + 4 H+ + 2 e- = PbSO4(s) + 2 H2O(l)"),
    ("Ag2S/Ag", "Ag2S(s) + 2 H+ + 2 e- = 2 Ag(s) + H2S(g)"),
    ("Ni(NH3)6^2+/Ni", "Ni(NH3)6^2+ + 2 e- = Ni(s) + 6 NH3(aq)"),
    ("Co(NH3)6^3+/Co(NH3)6^2+", "Co(NH3)6^3+ + e- = Co(NH3)6^2+"),
    ("Hg2+/Hg", "Hg2+ + 2 e- = Hg(l)"),
    ("Hg2^2+/Hg", "Hg2^2+ + 2 e- = 2 Hg(l)"),
    ("Hg2+/Hg2^2+", "2 Hg2+ + 2 e- = Hg2^2+"),
    ("Hg2Cl2/Hg", "Hg2Cl2:calomel + 2 e- = 2 Hg(l) + 2 Cl-"),
    ("Hg2SO4/Hg", "Hg2SO4(s) + 2 e- = 2 Hg(l) + SO4^2-"),
    ("O2/OH-", "O2(g) + 2 H2O(l) + 4 e- = 4 OH-"),
    ("H2O/H2", "2 H2O(l) + 2 e- = H2(g) + 2 OH-"),
    ("Ag2O/Ag", "Ag2O(s) + H2O(l) + 2 e- = 2 Ag(s) + 2 OH-"),
    ("Cu2O/Cu", "Cu2O(s) + H2O(l) + 2 e- = 2 Cu(s) + 2 OH-"),
    ("Cu(OH)2/Cu", "Cu(OH)2(s) + 2 e- = Cu(s) + 2 OH-"),
    ("ZnO/Zn", "ZnO(s) + H2O(l) + 2 e- = Zn(s) + 2 OH-"),
    ("Ni(OH)2/Ni", "Ni(OH)2(s) + 2 e- = Ni(s) + 2 OH-"),
    ("Co(OH)2/Co", "Co(OH)2(s) + 2 e- = Co(s) + 2 OH-"),
    ("Mg(OH)2/Mg", "Mg(OH)2(s) + 2 e- = Mg(s) + 2 OH-"),
    ("PbO/Pb", "PbO(s) + H2O(l) + 2 e- = Pb(s) + 2 OH-"),
    ("MnO4-/MnO2", "MnO4- + 2 H2O(l) + 3 e- = MnO2(s) + 4 OH-"),
    ("CrO4^2-/Cr(OH)3", "CrO4^2- + 4 H2O(l) + 3 e- = Cr(OH)3(s) + 5 OH-"),
    ("Fe(OH)3/Fe(OH)2", "Fe(OH)3(s) + e- = Fe(OH)2(s) + OH-"),
    ("Al(OH)4-/Al", "Al(OH)4- + 3 e- = Al(s) + 4 OH-"),
    ("HgO/Hg", "HgO:montroydite + H2O(l) + 2 e- = Hg(l) + 2 OH-"),
)

_SORTS = ("potential", "descending", "element", "table")


@dataclass(frozen=True)
class SeriesEntry:
    """One couple of the series at the chosen conditions.

    Attributes
    ----------
    label : str
        Couple, e.g. ``"Zn2+/Zn"``.
    reaction : HalfReaction
        The reduction.
    e0_v : float
        Standard potential at T [V vs the reference].
    e_v : float or None
        Formal potential at the given pH and activities [V vs the reference];
        None at standard state.
    e0_she_v : float
        Standard potential at T [V vs SHE].
    dg_kj_mol : float
        ΔrG° at T of the reduction as written [kJ/mol].
    elements : tuple of str
        Elements of the couple (other than H and O where there are others).
    sources : tuple of (str, str)
        ``(species, source key)`` for every species.
    routes : dict
        Species -> how its Gibbs energy at T was obtained.
    valid_to_c : float
        Highest temperature every route is trusted to [°C].
    nernst : str
        The Nernst equation on the reference's scale.
    """

    label: str
    reaction: HalfReaction
    e0_v: float
    e_v: float | None
    e0_she_v: float
    dg_kj_mol: float
    elements: tuple
    sources: tuple
    routes: dict
    valid_to_c: float
    nernst: str

    @property
    def n(self) -> float:
        """Electrons transferred [-]."""
        return self.reaction.electrons

    def row(self) -> dict:
        """JSON/CSV-ready dict."""
        return {
            "couple": self.label,
            "reaction": self.reaction.text(),
            "n": self.n,
            "e0_v": round(self.e0_v, 5),
            "e_v": None if self.e_v is None else round(self.e_v, 5),
            "e0_v_she": round(self.e0_she_v, 5),
            "dg_kj_mol": round(self.dg_kj_mol, 3),
            "elements": " ".join(self.elements),
            "nernst": self.nernst,
            "sources": "; ".join(f"{sp}: {key}" for sp, key in self.sources),
        }


@dataclass(frozen=True)
class SeriesResult(Tabular):
    """A series of reduction potentials at one set of conditions.

    Attributes
    ----------
    entries : tuple of SeriesEntry
        In the order asked for.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    reference : str
        Reference electrode of every potential.
    reference_offset_v : float
        Its potential vs SHE at T [V] (the series value vs SHE minus this is
        the value vs the reference).
    state : SolutionState or None
        Activities for the formal potentials; None: standard state only.
    skipped : tuple of str
        Couples of :data:`SERIES` whose species the tables lack.
    sources : dict
        Source key -> citation.
    warnings : tuple of str
        Temperature routes past their range, reference ranges, activity models.
    dataset : str
        Data set.
    """

    entries: tuple
    temperature_c: float
    pressure_bar: float
    reference: str
    reference_offset_v: float
    state: SolutionState | None
    skipped: tuple
    sources: dict
    warnings: tuple
    dataset: str = "default"

    def rows(self) -> list[dict]:
        """One dict per couple, with the conditions (JSON/CSV-ready)."""
        out = []
        for e in self.entries:
            row = e.row()
            row["reference"] = self.reference
            row["temperature_c"] = self.temperature_c
            out.append(row)
        return out


def _reference_offset(reference: str, temperature_c: float, ph, notes: list) -> tuple[str, float]:
    from pourbaix.physics.electrodes import get_reference, reference_offset

    ref = get_reference(reference)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        if ref.name == "RHE" and ph is None:
            raise ConditionsError("reference RHE needs the pH of the solution (--ph)")
        off = float(reference_offset(ref.name, temperature_c, ph))
    notes += [str(w.message) for w in caught if str(w.message) not in notes]
    return ref.name, off


def _reference_sources(names) -> dict:
    """Reference electrode name -> where its potential at T comes from (SHE: nothing to cite)."""
    from pourbaix.physics.electrodes import get_reference

    out = {}
    for name in names:
        ref = get_reference(name)
        if ref.name != "SHE":
            out[ref.name] = ref.source
    return out


def _entry(label, half, table, temperature_c, pressure_bar, state, offset, log_kw, k):
    dg, routes, valid = reaction_gibbs_at(half, temperature_c, table, pressure_bar)
    e0_she = -dg / (half.electrons * F_KJ) + 0.0  # Bard & Faulkner 2001, eq. 2.1.22
    e_she = None
    if state is not None:
        q = log10_quotient(half, activity_function(state, temperature_c, log_kw))
        e_she = e0_she - k / half.electrons * q  # Nernst (Bard & Faulkner 2001, eq. 2.1.38)
    return SeriesEntry(
        label=label,
        reaction=half,
        e0_v=e0_she - offset,
        e_v=None if e_she is None else e_she - offset,
        e0_she_v=e0_she,
        dg_kj_mol=dg,
        elements=tuple(sorted(half.elements())),
        sources=tuple((str(sp), sp.source) for sp in half.species()),
        routes=routes,
        valid_to_c=valid,
        nernst=nernst_text(half, e0_she - offset, temperature_c),
    )


def _identity(half: HalfReaction):
    """A key that is the same for one reduction however it is scaled."""
    n = half.electrons
    return tuple(sorted((k, round(v / n, 9)) for k, v in half.stoichiometry().items()))


def _ion_label(sp) -> str:
    return sp.name.replace("^", "")


def simple_ion_couples(table: SpeciesTable) -> list:
    """Metal/ion and ion/ion couples of every element, built from the tables' simple ions.

    Parameters
    ----------
    table : SpeciesTable
        The tables.

    Returns
    -------
    list of (str, HalfReaction)
        For each element E with a reference state (ΔfG° = 0) and simple
        aqueous ions E^z (one atom, no H or O): ``E^z+ + z e- = E`` for
        cations, ``E + |z| e- = E^z-`` for anions (per atom of a molecular
        reference state such as Cl2), and ``E^a+ + (a-b) e- = E^b+`` between
        each pair of cations. Metastable rows are left out.

    Examples
    --------
    >>> labels = [label for label, _ in simple_ion_couples(load_species())]
    >>> "Zn2+/Zn" in labels and "Fe3+/Fe2+" in labels
    True
    """
    from pourbaix.physics.energies import reference_species
    from pourbaix.physics.reactions import balance_pair

    out = []
    elements = sorted(
        {
            e
            for sp in table.species
            if sp.phase == "aq" and len(sp.composition) == 1
            for e in sp.composition
        }
        - {"H", "O"}
    )
    for element in elements:
        ions = sorted(
            (
                sp
                for sp in table.species
                if sp.phase == "aq"
                and dict(sp.composition) == {element: 1}
                and sp.charge != 0
                and not sp.metastable
            ),
            key=lambda sp: -sp.charge,
        )
        try:
            ref = reference_species(table, element)
        except Exception:  # DataError: no reference state, ion/ion couples only
            ref = None
        pairs = []
        if ref is not None:
            for ion in ions:
                ox, red = (ion, ref) if ion.charge > 0 else (ref, ion)
                pairs.append((f"{_ion_label(ox)}/{_ion_label(red)}", ox, red))
        cations = [sp for sp in ions if sp.charge > 0]
        for i, high in enumerate(cations):
            for low in cations[i + 1 :]:
                pairs.append((f"{_ion_label(high)}/{_ion_label(low)}", high, low))
        for label, ox, red in pairs:
            try:
                reaction = balance_pair(ox, red, element)
            except Exception:  # DataError: cannot be balanced with H2O, H+ and e-
                continue
            if reaction.electrons > 0:
                out.append((label, from_reaction(reaction, table)))
    return out


def _label_of(half: HalfReaction) -> str:
    main = [sp for sp, _ in half.oxidised if sp.name not in ("H^+", "H2O")]
    low = [sp for sp, _ in half.reduced if sp.name not in ("OH^-", "H2O")]
    a = main[0].name if main else half.oxidised[0][0].name
    b = low[0].name if low else half.reduced[0][0].name
    return f"{a}/{b}"


def _route_notes(entries, temperature_c, notes):
    late = sorted({e.label for e in entries if e.valid_to_c < temperature_c})
    if late:
        notes.append(
            f"at {temperature_c:g} °C some species' energies are used past the range their "
            f"temperature route is trusted to ({', '.join(late)}); see the routes in the JSON output"
        )


def electrochemical_series(
    temperature_c: float = 25.0,
    *,
    reference: str = "SHE",
    elements: Sequence[str] | None = None,
    state: SolutionState | None = None,
    sort: str = "potential",
    reactions: Sequence[str] = (),
    table: SpeciesTable | None = None,
    dataset: str = "default",
    data_files: Sequence = (),
    pressure_bar: float | None = None,
    automatic: bool = True,
) -> SeriesResult:
    """The reduction couples the tables support, with E° (and formal E) at T on any reference.

    Parameters
    ----------
    temperature_c : float
        Temperature [°C], 0-300.
    reference : str
        Reference electrode of the output (SHE, SCE, Ag/AgCl-sat, ...).
    elements : sequence of str, optional
        Keep couples holding any of these elements.
    state : SolutionState, optional
        pH and activities for formal potentials E (None: standard state only).
    sort : {"potential", "descending", "element", "table"}
        Most negative first, most positive first, by element, or as listed.
    reactions : sequence of str
        Typed half-reactions to use instead of the built-in list.
    table : SpeciesTable, optional
        Pre-loaded tables; else ``dataset`` and ``data_files`` are loaded.
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables.
    pressure_bar : float, optional
        Pressure [bar].
    automatic : bool
        Add the simple-ion couples of every element the tables hold
        (:func:`simple_ion_couples`) to the listed :data:`SERIES`.

    Returns
    -------
    SeriesResult

    Raises
    ------
    OptionError
        Unknown sort, reference or element, or no couple left after the filter.
    ReactionError, UnknownSpeciesError
        A typed half-reaction that does not balance or names an unknown species.

    Notes
    -----
    E° = -ΔrG°/(nF) with ΔrG° from apparent Gibbs energies at T and the
    electron on the SHE scale (Bard & Faulkner 2001, eq. 2.1.22); E = E° -
    (k/n) log10 Q (Nernst); vs a reference, E(ref) = E(SHE) - E_ref(T).

    References
    ----------
    Bard, A. J., Parsons, R., Jordan, J. (1985). Standard Potentials in
    Aqueous Solution. Marcel Dekker.

    Examples
    --------
    >>> s = electrochemical_series(elements=["Zn"])
    >>> [(e.label, round(e.e0_v, 3)) for e in s.entries][:2]
    [('ZnO/Zn', -1.26), ('Zn2+/Zn', -0.762)]
    """
    if sort not in _SORTS:
        raise OptionError(f"unknown sort {sort!r}; choose one of {', '.join(_SORTS)}")
    table = table if table is not None else load_species(dataset, tuple(data_files))
    t = float(thermo.check_temperature(temperature_c))
    notes: list = list(getattr(table, "overrides", ()))
    ref_name, offset = _reference_offset(reference, t, None if state is None else state.ph, notes)
    wanted = None
    if elements:
        from pourbaix.tables.formula import ELEMENTS

        wanted = set()
        for el in elements:
            if el not in ELEMENTS:
                raise OptionError(f"unknown element symbol {el!r}")
            wanted.add(el)
    skipped = []
    halves = []
    if reactions:
        for text in reactions:
            half = parse_half_reaction(text, table)
            halves.append((_label_of(half), half))
    else:
        for label, text in SERIES:
            try:
                halves.append((label, parse_half_reaction(text, table)))
            except UnknownSpeciesError:
                skipped.append(label)
        if automatic:
            known = {_identity(h) for _, h in halves}
            for label, half in simple_ion_couples(table):
                if _identity(half) not in known:
                    known.add(_identity(half))
                    halves.append((label, half))
    log_kw = water_ion_product_log10(t, table, pressure_bar)
    k = float(thermo.nernst_factor(t))
    entries = []
    for label, half in halves:
        if wanted is not None:
            held = {e for sp in half.species() for e in sp.composition}
            if not (held & wanted):
                continue
        entries.append(_entry(label, half, table, t, pressure_bar, state, offset, log_kw, k))
    if not entries:
        raise OptionError(
            f"no couple of the series holds {', '.join(sorted(wanted or ()))} in data set "
            f"{table.dataset!r}"
        )
    if sort == "potential":
        entries.sort(key=lambda e: e.e0_v)
    elif sort == "descending":
        entries.sort(key=lambda e: -e.e0_v)
    elif sort == "element":
        entries.sort(key=lambda e: (e.elements, e.e0_v))
    _route_notes(entries, t, notes)
    if state is not None and state.ionic_strength > 0:
        from pourbaix.physics.solution import model_validity

        lo, hi, text = model_validity(state.activity_model)
        notes.append(
            f"activity coefficients: {state.activity_model} at I = {state.ionic_strength:g} mol/kg ({text})"
        )
    from pourbaix.physics.energies import make_context

    pressure = make_context(table, t, pressure_bar).pressure_bar
    used = {key for e in entries for _, key in e.sources}
    refs = [ref_name]
    return SeriesResult(
        entries=tuple(entries),
        temperature_c=t,
        pressure_bar=float(pressure),
        reference=ref_name,
        reference_offset_v=offset,
        state=state,
        skipped=tuple(skipped),
        sources={
            **{key: table.sources.get(key, key) for key in sorted(used)},
            **_reference_sources(refs),
        },
        warnings=tuple(notes),
        dataset=table.dataset,
    )


def describe_half_reaction(
    text: str,
    temperature_c: float = 25.0,
    *,
    reference: str = "SHE",
    state: SolutionState | None = None,
    table: SpeciesTable | None = None,
) -> SeriesEntry:
    """Check a typed half-reaction and give its E°, E and Nernst form.

    Parameters
    ----------
    text : str
        E.g. ``"MnO4- + 8H+ + 5e- = Mn2+ + 4H2O"``.
    temperature_c : float
        Temperature [°C].
    reference : str
        Reference electrode.
    state : SolutionState, optional
        pH and activities for E.
    table : SpeciesTable, optional
        The tables.

    Returns
    -------
    SeriesEntry

    Raises
    ------
    ReactionError, UnknownSpeciesError
        Unbalanced, malformed or unknown species.

    Examples
    --------
    >>> e = describe_half_reaction("MnO4- + 8H+ + 5e- = Mn2+ + 4H2O")
    >>> round(e.e0_v, 2), e.n
    (1.51, 5.0)
    """
    s = electrochemical_series(
        temperature_c, reference=reference, state=state, reactions=[text], table=table
    )
    return s.entries[0]


# ---------------------------------------------------------------------------- electrodes
_INERT = {"pt", "c", "graphite", "gc", "ir", "pd", "rh", "au"}
_INLINE = re.compile(
    r"\(\s*(?:(?P<kind>[ampf])\s*=\s*)?(?P<value>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*"
    r"(?P<unit>mol/kg|m|bar)?\s*\)\s*$"
)


@dataclass(frozen=True)
class Electrode:
    """One electrode of a cell.

    Attributes
    ----------
    label : str
        As written, e.g. ``"Zn | Zn2+"``.
    reaction : HalfReaction or None
        Its reduction; None for a reference electrode.
    reference : str or None
        Reference electrode name when the electrode is one (fixed potential).
    activities : dict
        Species (``str(species)``) -> activity or gas pressure written inline [-, bar].
    molalities : dict
        Species -> molality written inline (``m=``) [mol/kg].
    """

    label: str
    reaction: HalfReaction | None
    reference: str | None = None
    activities: dict = field(default_factory=dict)
    molalities: dict = field(default_factory=dict)


def _to_hydroxide_form(half: HalfReaction, table: SpeciesTable) -> HalfReaction:
    """Rewrite an acid-form reduction with OH-: add m (H2O = H+ + OH-) for its m H+."""
    m = sum(c for sp, c in half.oxidised if sp.name == "H^+") - sum(
        c for sp, c in half.reduced if sp.name == "H^+"
    )
    if m == 0:
        return half
    water, oh = table.get("H2O", "l"), table.get("OH-")
    left = [
        (sp, Fraction(c).limit_denominator(1000)) for sp, c in half.oxidised if sp.name != "H^+"
    ]
    right = [
        (sp, Fraction(c).limit_denominator(1000)) for sp, c in half.reduced if sp.name != "H^+"
    ]
    mm = Fraction(m).limit_denominator(1000)
    if mm > 0:
        left.append((water, mm))
        right.append((oh, mm))
    else:
        right.append((water, -mm))
        left.append((oh, -mm))
    from pourbaix.physics.halfreactions import net_reaction

    ox, red = net_reaction(left, right)
    return HalfReaction(
        tuple((sp, float(c)) for sp, c in ox),
        tuple((sp, float(c)) for sp, c in red),
        half.electrons,
    )


def _electrode_species(text: str, table: SpeciesTable):
    found = []
    acts, mols = {}, {}
    for phase_text in text.split("|"):
        for raw in phase_text.split(","):
            raw = raw.strip()
            if not raw:
                continue
            value = None
            m = _INLINE.search(raw)
            if m:
                value = (m.group("kind") or "a", float(m.group("value")))
                raw = raw[: m.start()].strip()
                if not (math.isfinite(value[1]) and value[1] > 0):
                    raise ConditionsError(f"electrode {text!r}: {raw} must be > 0, got {value[1]}")
            if raw.lower() in _INERT:
                found.append((raw, None, value))
                continue
            try:
                sp = find_species(table, raw)
            except UnknownSpeciesError as exc:
                raise UnknownSpeciesError(f"electrode {text.strip()!r}: {exc}") from None
            found.append((raw, sp, value))
    for _raw, sp, value in found:
        if value is None or sp is None:
            continue
        (mols if value[0] == "m" else acts)[str(sp)] = value[1]
    return found, acts, mols


def parse_electrode(text: str, table: SpeciesTable | None = None) -> Electrode:
    """Read one electrode: a metal/ion, redox couple, gas electrode, half-reaction or reference.

    Parameters
    ----------
    text : str
        ``"Zn | Zn2+"``, ``"Cu2+(0.01) | Cu"`` (an activity inline, ``m=`` for a
        molality, ``p=`` for a gas pressure in bar), ``"Pt | Fe3+, Fe2+"``,
        ``"Pt | H2(g) | H+"``, ``"Ag | AgCl | Cl-"``, ``"Zn | ZnO | OH-"``
        (written with OH-), a reference electrode name (``"SCE"``,
        ``"Ag/AgCl-sat"``) or a half-reaction with ``=``. Pt, Au (when its
        element takes no part), C and graphite are inert conductors.
    table : SpeciesTable, optional
        The tables.

    Returns
    -------
    Electrode

    Raises
    ------
    ReactionError
        Fewer or more than one couple on the electrode.
    UnknownSpeciesError
        A species not in the tables.

    Examples
    --------
    >>> parse_electrode("Zn | Zn2+").reaction.text()
    'Zn^2+ + 2 e- = Zn'
    """
    from pourbaix.physics.electrodes import get_reference
    from pourbaix.physics.reactions import balance_pair

    table = table if table is not None else load_species()
    label = " ".join(str(text).split())
    if not label:
        raise ReactionError("an electrode is empty (write e.g. 'Zn | Zn2+')")
    if "=" in label and "|" not in label:
        return Electrode(label, parse_half_reaction(label, table))
    if "|" not in label and "," not in label:
        try:
            ref = get_reference(label)
        except OptionError:
            ref = None
        if ref is not None:
            return Electrode(label, None, reference=ref.name)
    found, acts, mols = _electrode_species(label, table)
    species = [sp for _, sp, _ in found if sp is not None]
    # an inert metal takes no part: drop a pure-element solid whose element nothing else holds
    inert_named = [raw for raw, sp, _ in found if sp is None]
    active = []
    for sp in species:
        comp = dict(sp.composition)
        others = [o for o in species if o is not sp]
        if (
            len(comp) == 1
            and sp.phase == "s"
            and not any(next(iter(comp)) in o.composition for o in others)
            and len(species) > 1
        ):
            inert_named.append(sp.name)
            continue
        active.append(sp)
    hydroxide = any(sp.name == "OH^-" for sp in active)
    extra = [sp for sp in active if sp.name not in ("H^+", "OH^-") and sp.key != ("H2O", "l")]
    if len(extra) < 2 and not hydroxide and not any(sp.name == "H^+" for sp in active):
        raise ReactionError(
            f"electrode {label!r}: needs two forms of one element (e.g. 'Zn | Zn2+', "
            "'Pt | Fe3+, Fe2+', 'Pt | H2(g) | H+')"
        )
    candidates = [sp for sp in active if sp.key != ("H2O", "l") and sp.name != "OH^-"]
    core = [sp for sp in candidates if sp.name != "H^+"]
    if len(core) == 1 and set(core[0].composition) <= {"H", "O"}:
        # a gas electrode written with its gas only: O2 pairs with water, H2 with H+
        partner = "H2O(l)" if "O" in core[0].composition else "H+"
        candidates = [core[0], table.get(partner)]
    pair = _find_pair(candidates)
    if pair is None:
        raise ReactionError(
            f"electrode {label!r}: no two species share an element other than H and O, so no "
            "couple can be written"
        )
    a, b, element = pair
    rest = [sp for sp in candidates if sp is not a and sp is not b and sp.name != "H^+"]
    reaction = None
    for ox, red in ((a, b), (b, a)):
        try:
            r = balance_pair(ox, red, element, rest)
        except Exception as exc:  # DataError: the extra species do not balance it
            raise ReactionError(f"electrode {label!r}: {exc}") from None
        if r.electrons > 0:
            reaction = r
            break
    if reaction is None:
        raise ReactionError(
            f"electrode {label!r}: {a} and {b} are in the same oxidation state; no electrons move"
        )
    half = from_reaction(reaction, table)
    if hydroxide:
        half = _to_hydroxide_form(half, table)
    return Electrode(label, half, None, acts, mols)


def _find_pair(species):
    """Two species sharing an element (other than H/O first), and that element."""
    for light in (False, True):
        for i, a in enumerate(species):
            for b in species[i + 1 :]:
                shared = set(a.composition) & set(b.composition)
                heavy = shared - {"H", "O"}
                if heavy:
                    return a, b, sorted(heavy)[0]
                if light and shared:
                    return a, b, "H" if "H" in shared else "O"
    return None


def parse_cell(text: str, table: SpeciesTable | None = None) -> tuple[Electrode, Electrode]:
    """Read a cell in the notation of the trade, anode on the left: ``"Zn | Zn2+ || Cu2+ | Cu"``.

    Parameters
    ----------
    text : str
        Two electrodes separated by ``||`` (a salt bridge or shared solution).
    table : SpeciesTable, optional
        The tables.

    Returns
    -------
    (Electrode, Electrode)
        The anode (left) and the cathode (right) as written.

    Raises
    ------
    ReactionError
        No ``||`` or more than one; an electrode that cannot be read.

    Examples
    --------
    >>> anode, cathode = parse_cell("Zn | Zn2+ || Cu2+ | Cu")
    >>> cathode.reaction.text()
    'Cu^2+ + 2 e- = Cu'
    """
    parts = str(text).split("||")
    if len(parts) != 2:
        raise ReactionError(
            f"cell {text!r}: write two electrodes separated by '||', anode on the left, "
            "e.g. 'Zn | Zn2+ || Cu2+ | Cu'"
        )
    table = table if table is not None else load_species()
    return parse_electrode(parts[0], table), parse_electrode(parts[1], table)


# ---------------------------------------------------------------------------- cells
@dataclass(frozen=True)
class CellResult:
    """A galvanic (or electrolytic) cell as written, anode on the left.

    Attributes
    ----------
    anode, cathode : Electrode
        As written (left, right).
    anode_e0_v, cathode_e0_v : float
        Standard reduction potentials at T [V vs SHE].
    anode_e_v, cathode_e_v : float
        Reduction potentials at the given activities (Nernst) [V vs SHE].
    e0_cell_v : float
        E°cell = E°cathode - E°anode [V].
    e_cell_v : float
        Ecell = E°cell - (k/n) log10 Q = Ecathode - Eanode [V].
    n : float
        Electrons in the cell reaction as written [-].
    dg_kj_mol : float
        ΔrG = -nF Ecell for the reaction as written [kJ/mol].
    dg0_kj_mol : float
        ΔrG° = -nF E°cell [kJ/mol].
    log10_q : float
        log10 Q of the cell reaction [-].
    reaction : str
        The balanced cell reaction (anode oxidised, cathode reduced).
    temperature_c : float
        Temperature [°C].
    reference : str
        Reference for :meth:`electrode_rows` (each electrode's E shown on it too).
    reference_offset_v : float
        Its potential vs SHE [V].
    warnings : tuple of str
        Notes (temperature routes, electrode ranges).
    sources : dict
        Source key -> citation.
    reaction_typeset : str
        The cell reaction with Unicode sub- and superscripts.
    """

    anode: Electrode
    cathode: Electrode
    anode_e0_v: float
    cathode_e0_v: float
    anode_e_v: float
    cathode_e_v: float
    e0_cell_v: float
    e_cell_v: float
    n: float
    dg_kj_mol: float
    dg0_kj_mol: float
    log10_q: float
    reaction: str
    temperature_c: float
    reference: str = "SHE"
    reference_offset_v: float = 0.0
    warnings: tuple = ()
    sources: dict = field(default_factory=dict)
    reaction_typeset: str = ""

    @property
    def spontaneous(self) -> bool:
        """True if the reaction as written runs by itself (Ecell > 0, ΔrG < 0)."""
        return self.e_cell_v > 0

    @property
    def actual_anode(self) -> Electrode:
        """The electrode that is the anode when the cell discharges (the lower E)."""
        return self.anode if self.e_cell_v >= 0 else self.cathode

    def multiplied(self, factor: float) -> dict:
        """The reaction multiplied by ``factor``: n and ΔrG scale, E does not.

        Parameters
        ----------
        factor : float
            Positive multiplier of every coefficient [-].

        Returns
        -------
        dict
            ``factor``, ``n``, ``e_cell_v``, ``e0_cell_v``, ``dg_kj_mol``, ``dg0_kj_mol``.
        """
        if not (factor > 0 and math.isfinite(factor)):
            raise ConditionsError(f"a reaction can be multiplied by a number > 0, got {factor}")
        n = self.n * factor
        return {
            "factor": factor,
            "n": n,
            "e0_cell_v": self.e0_cell_v,
            "e_cell_v": self.e_cell_v,
            "dg0_kj_mol": -n * F_KJ * self.e0_cell_v,  # ΔrG° = -nFE°
            "dg_kj_mol": -n * F_KJ * self.e_cell_v,  # ΔrG = -nFE
        }

    def electrode_rows(self, unicode: bool = False) -> list[dict]:
        """Each half-reaction as a reduction with E° and E (vs SHE and the reference).

        Parameters
        ----------
        unicode : bool
            Typeset the formulas with Unicode sub- and superscripts.
        """
        out = []
        for role, el, e0, e in (
            ("anode (left)", self.anode, self.anode_e0_v, self.anode_e_v),
            ("cathode (right)", self.cathode, self.cathode_e0_v, self.cathode_e_v),
        ):
            out.append(
                {
                    "role": role,
                    "electrode": el.label,
                    "reduction": el.reaction.text(unicode)
                    if el.reaction is not None
                    else f"reference electrode {el.reference}",
                    "n": None if el.reaction is None else el.reaction.electrons,
                    "e0_v_she": round(e0, 5),
                    "e_v_she": round(e, 5),
                    "e_v_ref": round(e - self.reference_offset_v, 5),
                }
            )
        return out

    def to_dict(self) -> dict:
        """Everything as plain data (JSON-ready)."""
        return {
            "cell": f"{self.anode.label} || {self.cathode.label}",
            "temperature_c": self.temperature_c,
            "reference": self.reference,
            "electrodes": self.electrode_rows(),
            "reaction": self.reaction,
            "n": self.n,
            "e0_cell_v": round(self.e0_cell_v, 5),
            "e_cell_v": round(self.e_cell_v, 5),
            "log10_q": round(self.log10_q, 5),
            "dg0_kj_mol": round(self.dg0_kj_mol, 3),
            "dg_kj_mol": round(self.dg_kj_mol, 3),
            "spontaneous_as_written": self.spontaneous,
            "anode_as_written": self.anode.label,
            "anode_when_discharging": self.actual_anode.label,
            "multiplied": [
                {k: (round(v, 5) if isinstance(v, float) else v) for k, v in r.items()}
                for r in (self.multiplied(1.0), self.multiplied(2.0))
            ],
            "warnings": list(self.warnings),
            "caution": CAUTION,
        }


def _cell_reaction_text(anode_half, cathode_half, n, fa, fc, anode_ref, cathode_ref, unicode=False):
    def nm(sp):
        return sp.formula.plain() if unicode else sp.name

    electron = "e⁻" if unicode else "e-"
    if anode_half is None or cathode_half is None:
        half, ref, role = (
            (cathode_half, anode_ref, "anode")
            if anode_half is None
            else (anode_half, cathode_ref, "cathode")
        )
        if half is None:
            return "(two reference electrodes: no chemical reaction to write)"
        if role == "cathode":  # the written electrode is the anode: oxidation
            left = " + ".join(f"{_c(c)}{nm(sp)}" for sp, c in half.reduced)
            right = " + ".join(f"{_c(c)}{nm(sp)}" for sp, c in half.oxidised)
            return f"{left} = {right} + {_c(half.electrons)}{electron} (the electrons reduce the {ref} electrode)"
        return f"{half.text(unicode)} (the electrons come from the {ref} electrode)"
    net: dict = {}
    names: dict = {}
    for sp, c in cathode_half.oxidised:
        net[sp.key] = net.get(sp.key, 0.0) - c * fc
        names[sp.key] = nm(sp)
    for sp, c in cathode_half.reduced:
        net[sp.key] = net.get(sp.key, 0.0) + c * fc
        names[sp.key] = nm(sp)
    for sp, c in anode_half.oxidised:  # the anode runs backwards
        net[sp.key] = net.get(sp.key, 0.0) + c * fa
        names[sp.key] = nm(sp)
    for sp, c in anode_half.reduced:
        net[sp.key] = net.get(sp.key, 0.0) - c * fa
        names[sp.key] = nm(sp)
    left = [f"{_c(-v)}{names[k]}" for k, v in net.items() if v < -1e-12]
    right = [f"{_c(v)}{names[k]}" for k, v in net.items() if v > 1e-12]
    if not left and not right:
        moved = [f"{_c(c * fc)}{nm(sp)}" for sp, c in cathode_half.oxidised]
        return (
            f"{' + '.join(moved)} (cathode side) = {' + '.join(moved)} (anode side): a "
            f"concentration cell  (n = {n:g})"
        )
    return f"{' + '.join(left)} = {' + '.join(right)}  (n = {n:g})"


def _c(c):
    if math.isclose(c, 1.0):
        return ""
    return f"{round(c)} " if math.isclose(c, round(c)) else f"{c:.4g} "


def _merged_state(state: SolutionState, electrode: Electrode) -> SolutionState:
    acts = dict(state.activities)
    acts.update(electrode.activities)
    mols = dict(state.molalities)
    mols.update(electrode.molalities)
    return SolutionState(
        ph=state.ph,
        activity=state.activity,
        molality=state.molality,
        activities=acts,
        molalities=mols,
        gas_bar=state.gas_bar,
        water_activity=state.water_activity,
        ionic_strength=state.ionic_strength,
        activity_model=state.activity_model,
    )


def cell_potential(
    cell: str | tuple,
    temperature_c: float = 25.0,
    *,
    state: SolutionState | None = None,
    activities: Mapping[str, float] | None = None,
    molalities: Mapping[str, float] | None = None,
    reference: str = "SHE",
    table: SpeciesTable | None = None,
    dataset: str = "default",
    data_files: Sequence = (),
    pressure_bar: float | None = None,
) -> CellResult:
    """E°cell, Ecell, n, ΔrG and the anode of a cell written anode on the left.

    Parameters
    ----------
    cell : str or (str, str) or (Electrode, Electrode)
        ``"Zn | Zn2+ || Cu2+ | Cu"``, or the anode and the cathode apart
        (electrodes or half-reactions).
    temperature_c : float
        Temperature [°C].
    state : SolutionState, optional
        pH, default activities, ionic strength (default: standard state, every
        activity 1).
    activities, molalities : mapping, optional
        Species name -> activity [-] (gases: bar) or molality [mol/kg]; they
        override ``state`` and are overridden by values written inline.
    reference : str
        Scale on which each electrode's E is also shown.
    table : SpeciesTable, optional
        The tables; else ``dataset`` and ``data_files`` are loaded.
    dataset : str
        Data set.
    data_files : sequence of path
        User tables.
    pressure_bar : float, optional
        Pressure [bar].

    Returns
    -------
    CellResult

    Raises
    ------
    ReactionError
        A cell that cannot be read, or whose two electrodes are the same.
    UnknownSpeciesError, ConditionsError, OptionError
        Unknown species, bad activities or temperature, unknown reference.

    Notes
    -----
    E°cell = E°cathode - E°anode (both reductions, same scale);
    Ecell = E°cell - (R T ln10 / nF) log10 Q; ΔrG = -nF Ecell for the
    reaction as written, so ΔrG scales with the coefficients and E does not
    (Bard & Faulkner 2001, §2.1). Reference electrodes have a fixed potential
    at T (:mod:`pourbaix.physics.electrodes`).

    References
    ----------
    Bard, A. J., Faulkner, L. R. (2001). Electrochemical Methods, 2nd ed. Wiley.

    Examples
    --------
    >>> r = cell_potential("Zn | Zn2+ || Cu2+ | Cu")
    >>> round(r.e_cell_v, 2), r.n, r.spontaneous
    (1.1, 2.0, True)
    """
    table = table if table is not None else load_species(dataset, tuple(data_files))
    t = float(thermo.check_temperature(temperature_c))
    state = state if state is not None else SolutionState()
    if activities or molalities:
        extra_a = {str(find_species(table, k)): float(v) for k, v in (activities or {}).items()}
        extra_m = {str(find_species(table, k)): float(v) for k, v in (molalities or {}).items()}
        state = _merged_state(state, Electrode("", None, None, extra_a, extra_m))
    if isinstance(cell, str):
        anode, cathode = parse_cell(cell, table)
    else:
        if len(cell) != 2:
            raise ReactionError("a cell has two electrodes: give (anode, cathode)")
        anode, cathode = (
            c if isinstance(c, Electrode) else parse_electrode(str(c), table) for c in cell
        )
    notes: list = list(getattr(table, "overrides", ()))
    ref_name, offset = _reference_offset(reference, t, state.ph, notes)
    log_kw = water_ion_product_log10(t, table, pressure_bar)
    k = float(thermo.nernst_factor(t))
    values = []
    quotients = []
    used = set()
    for el in (anode, cathode):
        if el.reaction is None:
            _, e_ref = _reference_offset(el.reference, t, state.ph, notes)
            values.append((e_ref, e_ref))
            quotients.append(0.0)
            continue
        st = _merged_state(state, el)
        dg, routes, valid = reaction_gibbs_at(el.reaction, t, table, pressure_bar)
        if valid < t:
            notes.append(f"{el.label}: energies used past their trusted range ({valid:g} °C)")
        e0 = -dg / (el.reaction.electrons * F_KJ) + 0.0  # Bard & Faulkner 2001, eq. 2.1.22
        q = log10_quotient(el.reaction, activity_function(st, t, log_kw))
        values.append((e0, e0 - k / el.reaction.electrons * q))  # Nernst
        quotients.append(q)
        used |= {sp.source for sp in el.reaction.species()}
    _check_not_same(anode, cathode, values)
    refs = [el.reference for el in (anode, cathode) if el.reference is not None]
    (ea0, ea), (ec0, ec) = values
    na = anode.reaction.electrons if anode.reaction is not None else None
    nc = cathode.reaction.electrons if cathode.reaction is not None else None
    n = _common_n(na, nc)
    fa = n / na if na else 0.0
    fc = n / nc if nc else 0.0
    log_q = fc * quotients[1] - fa * quotients[0]
    e0_cell = ec0 - ea0  # E°cell = E°cathode - E°anode
    e_cell = ec - ea  # = E°cell - (k/n) log10 Q (Nernst)
    args = (anode.reaction, cathode.reaction, n, fa, fc, anode.reference, cathode.reference)
    text = _cell_reaction_text(*args)
    typeset = _cell_reaction_text(*args, unicode=True)
    return CellResult(
        anode=anode,
        cathode=cathode,
        anode_e0_v=ea0,
        cathode_e0_v=ec0,
        anode_e_v=ea,
        cathode_e_v=ec,
        e0_cell_v=e0_cell,
        e_cell_v=e_cell,
        n=n,
        dg_kj_mol=-n * F_KJ * e_cell,  # ΔrG = -nFE
        dg0_kj_mol=-n * F_KJ * e0_cell,
        log10_q=log_q,
        reaction=text,
        reaction_typeset=typeset,
        temperature_c=t,
        reference=ref_name,
        reference_offset_v=offset,
        warnings=tuple(notes),
        sources={
            **{key: table.sources.get(key, key) for key in sorted(used)},
            **_reference_sources(refs),
        },
    )


def _common_n(na, nc):
    known = [x for x in (na, nc) if x]
    if len(known) == 1:
        return float(known[0])
    if not known:
        return 1.0
    a, b = (Fraction(x).limit_denominator(1000) for x in known)
    if a.denominator == 1 and b.denominator == 1:
        return float(math.lcm(int(a), int(b)))
    return float(max(a, b))


def _check_not_same(anode: Electrode, cathode: Electrode, values):
    same_ref = anode.reference is not None and anode.reference == cathode.reference
    same_reaction = (
        anode.reaction is not None
        and cathode.reaction is not None
        and anode.reaction.stoichiometry() == cathode.reaction.stoichiometry()
        and anode.reaction.electrons == cathode.reaction.electrons
    )
    if (same_ref or same_reaction) and math.isclose(values[0][1], values[1][1], abs_tol=1e-12):
        raise ReactionError(
            f"the two electrodes are the same ({anode.label} and {cathode.label}, same activities): "
            "no cell; for a concentration cell give different activities"
        )


# ---------------------------------------------------------------------------- kinetics
@dataclass(frozen=True)
class ElectrodeKinetics:
    """Butler–Volmer kinetics of one electrode.

    Attributes
    ----------
    anodic_tafel_v : float
        Anodic Tafel slope b_a [V/decade] (b_a = ln10 RT/(α_a F)).
    cathodic_tafel_v : float
        Cathodic Tafel slope b_c [V/decade], given positive.
    exchange_current_a_m2 : float or None
        Exchange current density i0 about the electrode's equilibrium potential [A/m²].
    corrosion_current_a_m2 : float or None
        Instead of i0: the freely corroding electrode's corrosion current density
        about its corrosion potential [A/m²] (Stern & Geary 1957).
    rest_potential_v : float or None
        The potential the current is zero at, if known (a measured corrosion
        potential) [V vs the reference in use]; None: the equilibrium potential.
    """

    anodic_tafel_v: float
    cathodic_tafel_v: float
    exchange_current_a_m2: float | None = None
    corrosion_current_a_m2: float | None = None
    rest_potential_v: float | None = None

    def __post_init__(self):
        for what, v in (
            ("anodic Tafel slope", self.anodic_tafel_v),
            ("cathodic Tafel slope", self.cathodic_tafel_v),
        ):
            if not (isinstance(v, int | float) and math.isfinite(v) and v > 0):
                raise ConditionsError(f"{what} must be a number > 0 V/decade, got {v!r}")
        given = [
            (w, v)
            for w, v in (
                ("exchange current density", self.exchange_current_a_m2),
                ("corrosion current density", self.corrosion_current_a_m2),
            )
            if v is not None
        ]
        if len(given) != 1:
            raise ConditionsError(
                "give one of an exchange current density (i0) or a corrosion current density "
                f"(icorr) per electrode, got {len(given)}"
            )
        what, v = given[0]
        if not (isinstance(v, int | float) and math.isfinite(v) and v > 0):
            raise ConditionsError(f"{what} must be a number > 0 A/m², got {v!r}")
        if self.rest_potential_v is not None and not math.isfinite(self.rest_potential_v):
            raise ConditionsError(f"rest potential must be finite, got {self.rest_potential_v!r}")

    @property
    def current_a_m2(self) -> float:
        """i0 or icorr, whichever was given [A/m²]."""
        return (
            self.exchange_current_a_m2
            if self.exchange_current_a_m2 is not None
            else self.corrosion_current_a_m2
        )


def butler_volmer(potential_v, rest_potential_v, kinetics: ElectrodeKinetics):
    """Net current density of an electrode, anodic positive.

    Parameters
    ----------
    potential_v : float or array_like
        Electrode potential [V].
    rest_potential_v : float
        Potential of zero net current on the same scale [V].
    kinetics : ElectrodeKinetics
        Tafel slopes and i0 (or icorr).

    Returns
    -------
    float or numpy.ndarray
        i [A/m²].

    Notes
    -----
    i = i0 [10^(η/b_a) - 10^(-η/b_c)], η = E - E_rest: the Butler–Volmer
    equation with b = ln10 RT/(αF) (Bard & Faulkner 2001, eq. 3.4.11); with
    icorr about Ecorr it is the Wagner–Traud / Stern–Geary form (Wagner &
    Traud 1938; Stern & Geary 1957).

    Examples
    --------
    >>> k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-2)
    >>> round(float(butler_volmer(0.06, 0.0, k)), 6)
    0.096838
    """
    import numpy as np

    eta = np.asarray(potential_v, dtype=float) - float(rest_potential_v)
    i0 = kinetics.current_a_m2
    # Butler–Volmer in Tafel-slope form (Bard & Faulkner 2001, eq. 3.4.11)
    out = i0 * (
        10.0 ** (eta / kinetics.anodic_tafel_v) - 10.0 ** (-eta / kinetics.cathodic_tafel_v)
    )
    return float(out) if np.ndim(out) == 0 else out


@dataclass(frozen=True)
class MixedPotential(Tabular):
    """The potential of coupled electrodes at which their currents cancel.

    Attributes
    ----------
    potential_v : float
        Mixed (couple) potential [V, scale of the rest potentials].
    names : tuple of str
        Electrodes.
    rest_potentials_v : tuple of float
        Their potentials of zero current [V].
    areas_m2 : tuple of float
        Their areas [m²] (or relative areas).
    kinetics : tuple of ElectrodeKinetics
        Their kinetics.
    currents_a : tuple of float
        Net current of each at the mixed potential, anodic positive [A] (sums to 0).
    current_densities_a_m2 : tuple of float
        The same per unit area [A/m²].
    anode : str
        The electrode with the largest net anodic current.
    galvanic_current_a : float
        Sum of the net anodic currents [A].
    galvanic_current_density_a_m2 : float
        Net anodic current density on the anode [A/m²].
    """

    potential_v: float
    names: tuple
    rest_potentials_v: tuple
    areas_m2: tuple
    kinetics: tuple
    currents_a: tuple
    current_densities_a_m2: tuple
    anode: str
    galvanic_current_a: float
    galvanic_current_density_a_m2: float

    def rows(self) -> list[dict]:
        """One dict per electrode (JSON-ready)."""
        return [
            {
                "electrode": n,
                "rest_potential_v": round(e, 5),
                "area_m2": a,
                "anodic_tafel_v": k.anodic_tafel_v,
                "cathodic_tafel_v": k.cathodic_tafel_v,
                "i0_a_m2": k.exchange_current_a_m2,
                "icorr_a_m2": k.corrosion_current_a_m2,
                "net_current_a": i,
                "net_current_density_a_m2": j,
            }
            for n, e, a, k, i, j in zip(
                self.names,
                self.rest_potentials_v,
                self.areas_m2,
                self.kinetics,
                self.currents_a,
                self.current_densities_a_m2,
                strict=True,
            )
        ]


def _logsumexp(values):
    top = max(values)
    return top + math.log(sum(math.exp(v - top) for v in values))


def mixed_potential(
    rest_potentials_v: Sequence[float],
    kinetics: Sequence[ElectrodeKinetics],
    areas_m2: Sequence[float] | None = None,
    names: Sequence[str] | None = None,
) -> MixedPotential:
    """Solve Σ A_k i_k(E) = 0 for coupled Butler–Volmer electrodes.

    Parameters
    ----------
    rest_potentials_v : sequence of float
        Each electrode's potential of zero current (equilibrium or corrosion
        potential) on one scale [V].
    kinetics : sequence of ElectrodeKinetics
        Each electrode's kinetics.
    areas_m2 : sequence of float, optional
        Areas [m²] (relative areas give the same potential); default 1 each.
    names : sequence of str, optional
        Electrode names.

    Returns
    -------
    MixedPotential

    Raises
    ------
    ConditionsError
        Fewer than two electrodes, lengths that differ, areas ≤ 0, or all rest
        potentials equal (nothing drives a current).

    Notes
    -----
    Mixed-potential theory (Wagner & Traud 1938): the couple sits where the
    anodic and cathodic currents over all surfaces cancel. Written as
    ln Σ A i0 10^(η/b_a) = ln Σ A i0 10^(-η/b_c), both sides computed as
    log-sum-exp, the difference rises monotonically with E and stays finite, so
    Brent's method on the bracket [min E_rest, max E_rest] always converges
    (Brent 1973, through scipy.optimize.brentq).

    References
    ----------
    Wagner, C., Traud, W. (1938). Z. Elektrochem. 44, 391-402.
    Stern, M., Geary, A. L. (1957). J. Electrochem. Soc. 104, 56-63.

    Examples
    --------
    >>> k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-2)
    >>> m = mixed_potential([-0.76, 0.34], [k, k])
    >>> round(m.potential_v, 3)
    -0.393
    """
    from scipy.optimize import brentq

    rest = [float(e) for e in rest_potentials_v]
    kin = list(kinetics)
    count = len(rest)
    areas = [1.0] * count if areas_m2 is None else [float(a) for a in areas_m2]
    names = [f"electrode {i + 1}" for i in range(count)] if names is None else list(names)
    if count < 2:
        raise ConditionsError("a couple needs at least two electrodes")
    if not (len(kin) == len(areas) == len(names) == count):
        raise ConditionsError(
            "give kinetics, area and name for every electrode (the lengths differ)"
        )
    for n, a in zip(names, areas, strict=True):
        if not (math.isfinite(a) and a > 0):
            raise ConditionsError(f"area of {n} must be a number > 0, got {a!r}")
    if any(not math.isfinite(e) for e in rest):
        raise ConditionsError(f"rest potentials must be finite, got {rest}")
    lo, hi = min(rest), max(rest)
    if hi - lo < 1e-9:
        raise ConditionsError(
            "every electrode rests at the same potential: no driving force, no galvanic current"
        )

    def balance(e):
        # Wagner & Traud 1938: Σ anodic = Σ cathodic, as log-sum-exp on each side
        up = [
            math.log(a * k.current_a_m2) + LN10 * (e - r) / k.anodic_tafel_v
            for r, k, a in zip(rest, kin, areas, strict=True)
        ]
        down = [
            math.log(a * k.current_a_m2) - LN10 * (e - r) / k.cathodic_tafel_v
            for r, k, a in zip(rest, kin, areas, strict=True)
        ]
        return _logsumexp(up) - _logsumexp(down)

    e_mix = float(brentq(balance, lo, hi, xtol=1e-12, rtol=1e-14, maxiter=500))
    dens = [float(butler_volmer(e_mix, r, k)) for r, k in zip(rest, kin, strict=True)]
    currents = [j * a for j, a in zip(dens, areas, strict=True)]
    anode_index = max(range(count), key=lambda i: currents[i])
    galvanic = sum(i for i in currents if i > 0)
    return MixedPotential(
        potential_v=e_mix,
        names=tuple(names),
        rest_potentials_v=tuple(rest),
        areas_m2=tuple(areas),
        kinetics=tuple(kin),
        currents_a=tuple(currents),
        current_densities_a_m2=tuple(dens),
        anode=names[anode_index],
        galvanic_current_a=galvanic,
        galvanic_current_density_a_m2=dens[anode_index],
    )


def tafel_intersection(
    anode_rest_v: float,
    anode_current_a: float,
    anodic_tafel_v: float,
    cathode_rest_v: float,
    cathode_current_a: float,
    cathodic_tafel_v: float,
) -> tuple[float, float]:
    """Where the anode's anodic Tafel line meets the cathode's cathodic Tafel line.

    Parameters
    ----------
    anode_rest_v, cathode_rest_v : float
        Rest potentials [V].
    anode_current_a, cathode_current_a : float
        i0 × area of each [A].
    anodic_tafel_v, cathodic_tafel_v : float
        Tafel slopes [V/decade].

    Returns
    -------
    (float, float)
        Potential [V] and current [A] of the intersection.

    Notes
    -----
    I_a 10^((E - E_a)/b_a) = I_c 10^(-(E - E_c)/b_c) gives
    E = [log10(I_c/I_a) + E_a/b_a + E_c/b_c] / (1/b_a + 1/b_c): the graphical
    construction of the Evans diagram in closed form (Evans 1929; Stern &
    Geary 1957), exact when both back reactions are negligible.

    Examples
    --------
    >>> e, i = tafel_intersection(-0.76, 1e-2, 0.06, 0.34, 1e-2, 0.12)
    >>> round(e, 4)
    -0.3933
    """
    inv = 1.0 / anodic_tafel_v + 1.0 / cathodic_tafel_v
    # Evans diagram: intersection of the two Tafel lines
    e = (
        math.log10(cathode_current_a / anode_current_a)
        + anode_rest_v / anodic_tafel_v
        + cathode_rest_v / cathodic_tafel_v
    ) / inv
    return e, anode_current_a * 10.0 ** ((e - anode_rest_v) / anodic_tafel_v)


# ---------------------------------------------------------------------------- couples
@dataclass(frozen=True)
class MetalInWater:
    """One metal of a couple, read from its own map.

    Attributes
    ----------
    element : str
        Metal.
    equilibrium_potential_v : float or None
        Top of the metal's immunity domain at the water's pH [V vs the reference];
        None if the metal is nowhere stable at that pH in the window.
    above : str
        What the metal turns into just above that potential.
    state_above : str
        ``corrosion`` or ``passivation`` (the state it is driven into when anodic).
    state_at_couple : str or None
        Its state at the couple's potential (the mixed potential with
        kinetics, else None).
    species_at_couple : str or None
        The stable species there.
    dmap : DomainMap
        Its map at the water's conditions.
    """

    element: str
    equilibrium_potential_v: float | None
    above: str
    state_above: str
    state_at_couple: str | None
    species_at_couple: str | None
    dmap: object


@dataclass(frozen=True)
class CoupleResult(Tabular):
    """Metals coupled in one water.

    Attributes
    ----------
    metals : tuple of MetalInWater
        In the order given.
    ph : float
        pH of the water.
    temperature_c : float
        Temperature [°C].
    reference : str
        Reference electrode of every potential.
    anode : str
        The metal driven anodic (lowest equilibrium potential).
    cathode : str
        The noblest metal.
    driving_force_v : float
        Open-circuit driving force, E(cathode) - E(anode) [V].
    mixed : MixedPotential or None
        With kinetics: the couple's mixed potential and currents.
    statement : str
        What thermodynamics says and does not (see :data:`NO_KINETICS`).
    warnings : tuple of str
        Notes from the maps.
    """

    metals: tuple
    ph: float
    temperature_c: float
    reference: str
    anode: str
    cathode: str
    driving_force_v: float
    mixed: MixedPotential | None
    statement: str
    warnings: tuple = ()

    def rows(self) -> list[dict]:
        """One dict per metal (JSON/CSV-ready)."""
        out = []
        for m in self.metals:
            row = {
                "metal": m.element,
                "equilibrium_potential_v": None
                if m.equilibrium_potential_v is None
                else round(m.equilibrium_potential_v, 5),
                "above_it": m.above,
                "state_when_anodic": m.state_above,
                "role": "anode"
                if m.element == self.anode
                else ("cathode" if m.element == self.cathode else "between"),
            }
            if self.mixed is not None:
                i = self.mixed.names.index(m.element)
                row["state_at_mixed_potential"] = m.state_at_couple
                row["species_at_mixed_potential"] = m.species_at_couple
                row["net_current_a"] = self.mixed.currents_a[i]
                row["net_current_density_a_m2"] = self.mixed.current_densities_a_m2[i]
            out.append(row)
        return out

    def to_dict(self) -> dict:
        """Everything as plain data (JSON-ready)."""
        d = {
            "metals": self.rows(),
            "ph": self.ph,
            "temperature_c": self.temperature_c,
            "reference": self.reference,
            "anode": self.anode,
            "cathode": self.cathode,
            "driving_force_v": round(self.driving_force_v, 5),
            "statement": self.statement,
            "warnings": list(self.warnings),
            "caution": CAUTION,
        }
        if self.mixed is not None:
            d["mixed_potential_v"] = round(self.mixed.potential_v, 5)
            d["galvanic_current_a"] = self.mixed.galvanic_current_a
            d["galvanic_current_density_a_m2"] = self.mixed.galvanic_current_density_a_m2
        return d


def _equilibrium_potential(dmap, ph):
    """Top of the immunity domain(s) at pH, or None."""
    from shapely.geometry import LineString

    lo, hi = dmap.conditions.potential_range_v
    line = LineString([(ph, lo - 1.0), (ph, hi + 1.0)])
    top = None
    for d in dmap.domains:
        if d.state != "immunity":
            continue
        cut = d.polygon.intersection(line)
        if cut.is_empty:
            continue
        y = max(c[1] for c in _coords(cut))
        top = y if top is None else max(top, y)
    return top


def _coords(geom):
    if hasattr(geom, "geoms"):
        for g in geom.geoms:
            yield from _coords(g)
    else:
        yield from geom.coords


def galvanic_couple(
    metals: Sequence[str],
    ph: float,
    temperature_c: float = 25.0,
    *,
    kinetics: Mapping[str, ElectrodeKinetics] | None = None,
    areas: Mapping[str, float] | None = None,
    cathode_to_anode_area: float | None = None,
    reference: str = "SHE",
    **map_kwargs,
) -> CoupleResult:
    """Two or more metals in one water: which is driven anodic, by how much, and (with kinetics) where the couple sits.

    Parameters
    ----------
    metals : sequence of str
        Element symbols, e.g. ``["Zn", "Cu"]``.
    ph : float
        pH of the water.
    temperature_c : float
        Temperature [°C].
    kinetics : mapping, optional
        Metal -> ElectrodeKinetics, for every metal or none.
    areas : mapping, optional
        Metal -> wetted area [m²] (relative areas are enough); default 1.
    cathode_to_anode_area : float, optional
        Instead of ``areas``, for two metals: area of the noble metal over
        that of the active one [-] (known only once the anode is found).
    reference : str
        Reference electrode of every potential (in and out).
    **map_kwargs
        Passed to :func:`pourbaix.maps.domain_map.compute_map` (activity,
        molality, ionic_strength, background, dataset, data_files ...);
        the dissolved activity defaults to 1e-6 as on the maps.

    Returns
    -------
    CoupleResult

    Raises
    ------
    OptionError
        Fewer than two metals, a metal twice, or kinetics for some metals only.
    ConditionsError
        A metal with no immunity domain at that pH, bad kinetics or areas.

    Notes
    -----
    Each metal's equilibrium potential is the top of its immunity domain at
    the water's pH, from its exact map. Coupled, the metal with the lower
    potential is driven anodic; the open-circuit driving force is the
    difference. With kinetics each electrode follows Butler–Volmer about that
    potential (or about a given corrosion potential) and the couple sits at
    the mixed potential (Wagner & Traud 1938).

    Examples
    --------
    >>> c = galvanic_couple(["Zn", "Cu"], ph=8.0, temperature_c=15.0)
    >>> c.anode, c.cathode
    ('Zn', 'Cu')
    """
    from pourbaix.maps.domain_map import compute_map

    metals = [str(m).strip() for m in metals]
    if len(metals) < 2:
        raise OptionError("a couple needs at least two metals, e.g. Zn Cu")
    if len(set(metals)) != len(metals):
        raise OptionError(
            f"the same metal appears twice ({' '.join(metals)}): a metal coupled to itself has "
            "no driving force"
        )
    if not math.isfinite(float(ph)):
        raise ConditionsError(f"pH must be finite, got {ph!r}")
    ph = float(ph)
    kinetics = dict(kinetics or {})
    if kinetics and set(kinetics) != set(metals):
        missing = [m for m in metals if m not in kinetics]
        unknown = [m for m in kinetics if m not in metals]
        raise OptionError(
            "give kinetics for every metal of the couple or none"
            + (f"; missing: {', '.join(missing)}" if missing else "")
            + (f"; not in the couple: {', '.join(unknown)}" if unknown else "")
        )
    areas = dict(areas or {})
    if cathode_to_anode_area is not None:
        if areas or len(metals) != 2:
            raise OptionError(
                "an area ratio (cathode to anode) is for two metals and replaces per-metal areas"
            )
        ratio = float(cathode_to_anode_area)
        if not (math.isfinite(ratio) and ratio > 0):
            raise ConditionsError(f"area ratio must be a number > 0, got {cathode_to_anode_area!r}")
    unknown = [m for m in areas if m not in metals]
    if unknown:
        raise OptionError(f"area given for {', '.join(unknown)}, which is not in the couple")
    notes: list = []
    first = []
    for metal in metals:
        dmap = None
        e_eq = None
        for window in ((-2.0, 2.0), (-3.5, 2.5)):
            dmap = compute_map(
                metal,
                temperature_c=temperature_c,
                reference=reference,
                ph_range=(min(-2.0, ph - 1.0), max(16.0, ph + 1.0)),
                potential_range_v=window,
                **map_kwargs,
            )
            e_eq = _equilibrium_potential(dmap, ph)
            if e_eq is not None and e_eq < window[1] - 1e-9:
                break
        if e_eq is None:
            raise ConditionsError(
                f"{metal} has no immunity domain at pH {ph:g} between -3.5 and 2.5 V: no "
                "equilibrium potential to couple"
            )
        for w in dmap.warnings:
            if w not in notes:
                notes.append(w)
        probe = dmap.probe(ph, e_eq + 0.001)
        first.append((metal, dmap, e_eq, str(probe.species), str(probe.state)))
    order = sorted(first, key=lambda r: r[2])
    anode, cathode = order[0][0], order[-1][0]
    driving = order[-1][2] - order[0][2]
    if cathode_to_anode_area is not None:
        areas = {anode: 1.0, cathode: float(cathode_to_anode_area)}
    mixed = None
    if kinetics:
        rests = []
        for metal, _, e_eq, _, _ in first:
            k = kinetics[metal]
            rests.append(e_eq if k.rest_potential_v is None else float(k.rest_potential_v))
            if k.corrosion_current_a_m2 is not None and k.rest_potential_v is None:
                notes.append(
                    f"{metal}: a corrosion current was given without a corrosion potential; the "
                    "equilibrium potential from the map stands in for it"
                )
        mixed = mixed_potential(
            rests,
            [kinetics[m] for m in metals],
            [float(areas.get(m, 1.0)) for m in metals],
            metals,
        )
    results = []
    for metal, dmap, e_eq, above, state in first:
        at_state = at_species = None
        if mixed is not None:
            p = dmap.probe(ph, mixed.potential_v)
            at_state, at_species = str(p.state), str(p.species)
        results.append(MetalInWater(metal, e_eq, above, state, at_state, at_species, dmap))
    if mixed is None:
        statement = NO_KINETICS
    else:
        statement = (
            f"With the kinetics given the couple sits at {mixed.potential_v:+.3f} V vs "
            f"{first[0][1].conditions.reference}; {mixed.anode} carries the net anodic current "
            f"({mixed.galvanic_current_density_a_m2:.3g} A/m² on its surface). Kinetic "
            "parameters are the user's; the result is as good as they are."
        )
        if any(kinetics[m].exchange_current_a_m2 is not None for m in metals):
            statement += (
                " An electrode given an exchange current rests at its equilibrium potential from "
                "the map; a real surface in an aerated water rests at a mixed potential set largely "
                "by oxygen reduction (give icorr with a measured ecorr for that), and no limiting "
                "(diffusion) current is modelled."
            )
    return CoupleResult(
        metals=tuple(results),
        ph=ph,
        temperature_c=float(first[0][1].conditions.temperature_c),
        reference=first[0][1].conditions.reference,
        anode=anode,
        cathode=cathode,
        driving_force_v=driving,
        mixed=mixed,
        statement=statement,
        warnings=tuple(notes),
    )
