"""Load, validate and merge the species tables; keep each value's provenance."""

from __future__ import annotations

import csv
import difflib
import functools
import math
import re
import types
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

from pourbaix.errors import DataFileError, FormulaError, OptionError, UnknownSpeciesError
from pourbaix.tables.formula import ELEMENTS, PHASES, Formula, formula_readings, parse_formula

__all__ = [
    "COLUMNS",
    "HKF_COLUMNS",
    "HKFParameters",
    "REQUIRED_COLUMNS",
    "Species",
    "SpeciesTable",
    "available_datasets",
    "data_dir",
    "load_species",
    "read_species_file",
    "read_sources_file",
    "parse_number",
    "read_csv_rows",
    "read_sources",
    "source_files",
    "typed_from_memory",
]

def typed_from_memory(species):
    """Whether a row's note says its value, or its stated uncertainty, was typed from memory.

    The remark on a stated uncertainty begins with ``u(dG) =`` and comes after
    everything the note says about the value (a convention of these tables).

    Parameters
    ----------
    species : Species
        A table row.

    Returns
    -------
    tuple of (bool, bool)
        (the value was typed from memory, the uncertainty was).
    """
    note = species.note or ""
    at = note.find("u(dG) =")
    if at < 0:
        return "from memory" in note, False
    return "from memory" in note[:at], "from memory" in note[at:]


# column -> (unit as written in messages, required)  -- DEVELOPERS.md, "Species tables"
COLUMNS: dict[str, tuple[str, bool]] = {
    "formula": ("text", True),
    "phase": ("aq, s, l or g", True),
    "form": ("text", False),
    "dgf_kj_mol": ("kJ/mol", True),
    "dgf_unc_kj_mol": ("kJ/mol", False),
    "dgf_unc_parent": ("species name", False),
    "dgf_unc_parent_units": ("count", False),
    "dhf_kj_mol": ("kJ/mol", False),
    "s_j_molk": ("J/(mol K)", False),
    "cp_j_molk": ("J/(mol K)", False),
    "mk_a_j_molk": ("J/(mol K)", False),
    "mk_b_j_molk2": ("J/(mol K^2)", False),
    "mk_c_jk_mol": ("J K/mol", False),
    "mk_tmax_k": ("K", False),
    "v_cm3_mol": ("cm3/mol", False),
    "hkf_a1_cal_mol_bar": ("cal/(mol bar)", False),
    "hkf_a2_cal_mol": ("cal/mol", False),
    "hkf_a3_cal_k_mol_bar": ("cal K/(mol bar)", False),
    "hkf_a4_cal_k_mol": ("cal K/mol", False),
    "hkf_c1_cal_mol_k": ("cal/(mol K)", False),
    "hkf_c2_cal_k_mol": ("cal K/mol", False),
    "hkf_omega_cal_mol": ("cal/mol", False),
    "hkf_source": ("key into sources*.csv", False),
    "metastable": ("yes, no or empty", False),
    "cas": ("CAS number", False),
    "source": ("key into sources*.csv", True),
    "note": ("text", False),
}
REQUIRED_COLUMNS: tuple[str, ...] = tuple(c for c, (_, req) in COLUMNS.items() if req)
# revised-HKF parameters, unscaled, in the units the equations are written in
# (Tanger & Helgeson 1988; Shock et al. 1992); they come as a set
HKF_COLUMNS: tuple[str, ...] = (
    "hkf_a1_cal_mol_bar",
    "hkf_a2_cal_mol",
    "hkf_a3_cal_k_mol_bar",
    "hkf_a4_cal_k_mol",
    "hkf_c1_cal_mol_k",
    "hkf_c2_cal_k_mol",
    "hkf_omega_cal_mol",
)
_NUMERIC = (
    "dgf_kj_mol",
    "dgf_unc_kj_mol",
    "dgf_unc_parent_units",
    "dhf_kj_mol",
    "s_j_molk",
    "cp_j_molk",
    "mk_a_j_molk",
    "mk_b_j_molk2",
    "mk_c_jk_mol",
    "mk_tmax_k",
    "v_cm3_mol",
    *HKF_COLUMNS,
)
#: Largest |charge| of a species (the most highly charged polyoxometalates carry about -10).
MAX_CHARGE = 12
#: Most atoms of one element in a formula unit (large polyoxometalates hold about 100).
MAX_ATOMS = 500
#: Largest plausible |value| per numeric column, in the column's unit: ΔfG° and ΔfH° of the
#: largest tabulated minerals are a few 10^4 kJ/mol; third-law entropies and heat capacities
#: of formula units stay below 10^4 J/(mol K) (Robie & Hemingway 1995 tables, by inspection).
MAGNITUDE = {
    "dgf_kj_mol": 1e5,
    "dgf_unc_kj_mol": 1e3,
    "dgf_unc_parent_units": 100.0,
    "dhf_kj_mol": 1e5,
    "s_j_molk": 1e4,
    "cp_j_molk": 1e4,
    "mk_a_j_molk": 1e4,
    "mk_b_j_molk2": 10.0,
    "mk_c_jk_mol": 1e9,
    "mk_tmax_k": 5000.0,
    "v_cm3_mol": 1e4,
}

# quantity stems people write for the numeric columns, mapped to our column
_STEMS = {
    "dgf": "dgf_kj_mol",
    "dg": "dgf_kj_mol",
    "gf": "dgf_kj_mol",
    "g": "dgf_kj_mol",
    "deltag": "dgf_kj_mol",
    "dhf": "dhf_kj_mol",
    "dh": "dhf_kj_mol",
    "hf": "dhf_kj_mol",
    "h": "dhf_kj_mol",
    "deltah": "dhf_kj_mol",
    "s": "s_j_molk",
    "s0": "s_j_molk",
    "entropy": "s_j_molk",
    "cp": "cp_j_molk",
    "mk_a": "mk_a_j_molk",
    "mk_b": "mk_b_j_molk2",
    "mk_c": "mk_c_jk_mol",
    "mk_tmax": "mk_tmax_k",
    "tmax": "mk_tmax_k",
    "v": "v_cm3_mol",
    "v0": "v_cm3_mol",
    "volume": "v_cm3_mol",
}
_SOURCE_COLUMNS = ("key", "citation", "note")
# one way to split the digits (no nested repetition: linear time on any input)
_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_NUMBER_MAX_LENGTH = 64  # longer text is no number anyone typed
_FORM = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.\- ]*")
_CAS = re.compile(r"(\d{2,7})-(\d{2})-(\d)")


@dataclass(frozen=True)
class HKFParameters:
    """Revised-HKF equation-of-state parameters of one aqueous species (unscaled).

    Attributes
    ----------
    a1 : float
        [cal/(mol bar)]
    a2 : float
        [cal/mol]
    a3 : float
        [cal K/(mol bar)]
    a4 : float
        [cal K/mol]
    c1 : float
        [cal/(mol K)]
    c2 : float
        [cal K/mol]
    omega : float
        Born coefficient at 298.15 K, 1 bar [cal/mol].

    References
    ----------
    Tanger, J. C.; Helgeson, H. C. Am. J. Sci. 288, 19-98 (1988).
    """

    a1: float
    a2: float
    a3: float
    a4: float
    c1: float
    c2: float
    omega: float


@dataclass(frozen=True)
class Species:
    """One row of a species table, validated.

    Attributes
    ----------
    name : str
        Canonical formula text, plus ``:form`` when a form is given, e.g.
        ``"Fe2O3:maghemite"``.
    formula : Formula
        Parsed formula (its phase equals ``phase``).
    phase : str
        ``aq``, ``s``, ``l`` or ``g``.
    form : str or None
        Polymorph or variant tag (``maghemite``, ``am``).
    dgf_kj_mol : float
        Standard Gibbs energy of formation at 298.15 K, 1 bar [kJ/mol].
    dhf_kj_mol : float or None
        Standard enthalpy of formation [kJ/mol].
    dgf_unc_kj_mol : float or None
        Standard uncertainty of ``dgf_kj_mol`` [kJ/mol], from the uncertainty the row's own
        source states (CODATA key values, NEA-TDB volumes and the IUPAC reviews print 95 %
        intervals, about twice the standard uncertainty; the row's note gives the printed
        values and the propagation); None where the source states none (used by
        :mod:`pourbaix.analyses.uncertainty`).
    dgf_unc_parent : str or None
        Name of the species (``Zn^2+``) that ``dgf_kj_mol`` was derived from by a constant
        (a hydrolysis or solubility constant converted with that species' ΔfG°):
        ``dgf_unc_kj_mol`` is then the uncertainty relative to it, and a sampled
        energy moves with that species' draw plus its own.
    dgf_unc_parent_units : float
        How many units of ``dgf_unc_parent`` the species holds (2 for (UO2)2(OH)2²⁺
        from UO2²⁺): its sampled energy moves with that many times the parent's draw.
    s_j_molk : float or None
        Standard entropy [J/(mol K)].
    cp_j_molk : float or None
        Standard heat capacity at 298.15 K [J/(mol K)].
    mk_a_j_molk, mk_b_j_molk2, mk_c_jk_mol : float or None
        Maier-Kelley coefficients, Cp = a + bT + c/T^2 [J/(mol K), J/(mol K^2), J K/mol].
    mk_tmax_k : float or None
        Upper limit of the Maier-Kelley fit [K].
    v_cm3_mol : float or None
        Standard molar volume, for the pressure term of solids [cm3/mol].
    hkf : HKFParameters or None
        Revised-HKF parameters of an aqueous species (unscaled, calories).
    hkf_source : str or None
        Source key of the HKF parameters when it differs from ``source``.
    metastable : bool
        A metastable form users may include or exclude.
    cas : str or None
        CAS registry number.
    source : str
        Key into the table's sources.
    note : str
        Free text: "from memory", known disagreements, choices.
    origin : str
        ``path:line`` of the row that supplied the values.
    """

    name: str
    formula: Formula
    phase: str
    form: str | None
    dgf_kj_mol: float
    dhf_kj_mol: float | None = None
    s_j_molk: float | None = None
    cp_j_molk: float | None = None
    mk_a_j_molk: float | None = None
    mk_b_j_molk2: float | None = None
    mk_c_jk_mol: float | None = None
    mk_tmax_k: float | None = None
    v_cm3_mol: float | None = None
    hkf: HKFParameters | None = None
    hkf_source: str | None = None
    metastable: bool = False
    cas: str | None = None
    source: str = ""
    note: str = ""
    origin: str = ""
    dgf_unc_kj_mol: float | None = None
    dgf_unc_parent: str | None = None
    dgf_unc_parent_units: float = 1.0

    @property
    def composition(self) -> Mapping[str, int]:
        """Atom counts of the formula."""
        return self.formula.composition

    @property
    def charge(self) -> int:
        """Ionic charge [elementary charges]."""
        return self.formula.charge

    @property
    def elements(self) -> frozenset[str]:
        """Element symbols of the formula."""
        return frozenset(self.formula.composition)

    @property
    def key(self) -> tuple[str, str]:
        """Identity of the species: ``(name, phase)``."""
        return (self.name, self.phase)

    @property
    def label(self) -> str:
        """Typeset label with Unicode sub- and superscripts, the form in brackets.

        E.g. ``"Fe(OH)₂⁺"``, ``"Fe₂O₃ (maghemite)"``. Figures use these (no
        mathtext parse, so drawing stays fast; DejaVu Sans has the glyphs).
        """
        text = self.formula.plain()
        return f"{text} ({self.form})" if self.form else text

    @property
    def mathtext(self) -> str:
        """Matplotlib mathtext label; a form is shown as a small subscript."""
        text = self.formula.mathtext()
        if self.form:
            tag = self.form.replace("\\", "").replace("_", r"\_").replace(" ", r"\ ")
            text = text[:-1] + r"_{\mathrm{(" + tag + ")}}$"
        return text

    def __str__(self) -> str:
        return f"{self.name}({self.phase})"


def _water_difference(sp: Species, f: Formula) -> int:
    """Return k where sp = f + k H2O (same charge, other elements equal), else 0."""
    if sp.charge != f.charge:
        return 0
    a, b = dict(sp.composition), dict(f.composition)
    if {e for e in a if e not in "HO"} != {e for e in b if e not in "HO"}:
        return 0
    if any(a[e] != b[e] for e in a if e not in ("H", "O")):
        return 0
    k = a.get("O", 0) - b.get("O", 0)
    return k if k != 0 and a.get("H", 0) - b.get("H", 0) == 2 * k else 0


def _display(key: tuple[str, str]) -> str:
    return f"{key[0]}({key[1]})"


@dataclass(frozen=True)
class SpeciesTable:
    """The species of one data set, merged with any user files.

    Attributes
    ----------
    species : tuple of Species
        In table order.
    sources : Mapping[str, str]
        Source key -> full citation.
    dataset : str
        Name of the data set.
    overrides : tuple of str
        One message per embedded row a user file overrode (never silent).
    dataset_changes : tuple of str
        One message per base row the chosen data set replaced.
    """

    species: tuple[Species, ...]
    sources: Mapping[str, str]
    dataset: str = "default"
    overrides: tuple[str, ...] = ()
    dataset_changes: tuple[str, ...] = ()

    def __iter__(self):
        return iter(self.species)

    def __len__(self) -> int:
        return len(self.species)

    def __contains__(self, name) -> bool:
        try:
            self.get(name)
        except (UnknownSpeciesError, FormulaError):
            return False
        return True

    def get(self, name: str, phase: str | None = None) -> Species:
        """Find a species by name.

        Parameters
        ----------
        name : str
            ``"Fe2+"``, ``"Fe^2+"``, ``"Fe^2+(aq)"``, ``"Fe2O3:maghemite"``;
            any charge notation :func:`~pourbaix.tables.formula.parse_formula` accepts. Ambiguous
            notations such as ``"NO3-"`` are resolved against the table.
        phase : str, optional
            ``aq``, ``s``, ``l`` or ``g``; needed when the name alone matches
            species in several phases.

        Returns
        -------
        Species

        Raises
        ------
        UnknownSpeciesError
            Not found, or found in several phases; the message lists close
            matches.
        """
        if not isinstance(name, str):
            raise UnknownSpeciesError(f"species name must be text, got {name!r}")
        formula_text, _, form = name.partition(":")
        form = form.strip() or None
        try:
            candidates = formula_readings(formula_text, phase)
        except FormulaError as exc:
            raise UnknownSpeciesError(
                f"unknown species {name!r} in data set {self.dataset!r}: {exc}"
                + self._suggest(name)
            ) from None
        for exact in (True, False):
            found: list[Species] = []
            for f in candidates:
                for sp in self.species:
                    if sp.form != form or (f.phase is not None and sp.phase != f.phase):
                        continue
                    if exact and sp.formula.text != f.text:
                        continue
                    if not exact and (
                        sp.charge != f.charge or dict(sp.composition) != dict(f.composition)
                    ):
                        continue
                    if sp not in found:
                        found.append(sp)
            if len(found) == 1:
                return found[0]
            if len(found) > 1:
                listed = ", ".join(str(s) for s in found)
                raise UnknownSpeciesError(
                    f"species {name!r} is ambiguous in data set {self.dataset!r}: it matches "
                    f"{listed}; give the phase, e.g. {str(found[0])!r}"
                )
        raise UnknownSpeciesError(
            f"unknown species {name!r} in data set {self.dataset!r}" + self._suggest(name)
        )

    def _suggest(self, name: str) -> str:
        by_label = {str(s): s for s in self.species}
        by_name: dict[str, Species] = {}
        for s in self.species:
            by_name.setdefault(s.name, s)
        close = [by_label[c] for c in difflib.get_close_matches(name, list(by_label), 5, 0.5)]
        close += [by_name[c] for c in difflib.get_close_matches(name, list(by_name), 5, 0.6)]
        hydrates: list[str] = []
        try:
            f = formula_readings(name.partition(":")[0])[0]
        except FormulaError:
            f = None
        if f is not None:
            close += [s for s in self.species if set(s.composition) == set(f.composition)]
            for s in self.species:  # the same species written with more or less water
                k = _water_difference(s, f)
                if k:
                    sign = "+" if k > 0 else "-"
                    water = "H2O" if abs(k) == 1 else f"{abs(k)} H2O"
                    hydrates.append(f"{s} (= {f.text} {sign} {water})")
        uniq: list[str] = hydrates[:]
        for sp in close:
            if str(sp) not in uniq and not any(h.startswith(f"{sp} ") for h in hydrates):
                uniq.append(str(sp))
        if not uniq:
            return "; no close match"
        return "; close matches: " + ", ".join(uniq[:8])

    def for_elements(self, elements: str | Iterable[str]) -> tuple[Species, ...]:
        """Species made only of the given elements plus H and O, in table order.

        Parameters
        ----------
        elements : str or iterable of str
            ``"Fe"``, ``"Fe,Cr"`` or ``["Fe", "S"]``.

        Returns
        -------
        tuple of Species

        Raises
        ------
        OptionError
            An unknown element symbol.
        """
        if isinstance(elements, str):
            elements = [e for e in re.split(r"[\s,;+]+", elements) if e]
        wanted = set()
        for e in elements:
            if e not in ELEMENTS:
                close = difflib.get_close_matches(str(e), sorted(ELEMENTS), n=3)
                hint = f"; did you mean {', '.join(close)}?" if close else ""
                raise OptionError(f"unknown element symbol {e!r}{hint}")
            wanted.add(e)
        allowed = wanted | {"H", "O"}
        return tuple(s for s in self.species if s.elements <= allowed)

    def citation(self, species: Species | str) -> str:
        """Full citation for a species (or a source key)."""
        key = species.source if isinstance(species, Species) else species
        return self.sources[key]


# --------------------------------------------------------------------------- files


def data_dir() -> Path:
    """Return the folder of the embedded tables (package data or source checkout)."""
    try:
        from importlib.resources import files

        d = Path(str(files("pourbaix.species_data")))
        if d.is_dir():
            return d
    except (ModuleNotFoundError, TypeError):
        pass
    return Path(__file__).resolve().parents[2] / "species_data"


def read_csv_rows(path: Path, display: str, problems: list) -> list[tuple[int, list[str]]]:
    """Return ``(line number, fields)`` for the header and data lines of a CSV file."""
    try:
        raw = path.read_bytes()
    except OSError as exc:
        problems.append((display, 0, 0, f"cannot read file: {exc.strerror or exc}"))
        return []
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        problems.append((display, line, 0, "not UTF-8 text"))
        return []
    rows = []
    for lineno, line in enumerate(text.splitlines(), start=1):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        try:
            fields = next(csv.reader([line], strict=True))
        except csv.Error as exc:
            problems.append((display, lineno, 0, f"bad CSV quoting: {exc}"))
            continue
        rows.append((lineno, [f.strip() for f in fields]))
    return rows


def _header_problems(header: list[str], display: str, line: int, allowed: dict) -> list:
    """Check a species-table header; return problems (fatal ones are unknown columns)."""
    problems = []
    seen: dict[str, int] = {}
    for col, name in enumerate(header, start=1):
        low = name.lower()
        if name in seen:
            problems.append((display, line, col, f"column {name!r} repeats column {seen[name]}"))
            continue
        seen[name] = col
        if name in allowed:
            continue
        expected = _STEMS.get(low)
        if expected is None:
            for stem, target in sorted(_STEMS.items(), key=lambda kv: -len(kv[0])):
                if low.startswith(stem + "_") or low.startswith(stem + "("):
                    expected = target
                    break
        if expected is not None and expected == low and expected in allowed:
            problems.append(
                (display, line, col, f"column {name!r}: write it {expected!r} (lower case)")
            )
            continue
        if expected is not None and expected in allowed:
            problems.append(
                (
                    display,
                    line,
                    col,
                    f"column {name!r}: expected {expected!r} (values in "
                    f"{allowed[expected][0]}); convert the values and rename the column",
                )
            )
            continue
        close = difflib.get_close_matches(low, list(allowed), n=1, cutoff=0.6)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        problems.append(
            (
                display,
                line,
                col,
                f"unknown column {name!r}{hint} (valid columns: {', '.join(allowed)})",
            )
        )
    return problems


def parse_number(text: str) -> float | None:
    """Parse a decimal number; a unicode minus is accepted. None when not a number."""
    t = text.replace("\u2212", "-")
    if len(t) > _NUMBER_MAX_LENGTH:
        return None
    if t.lower().lstrip("+-") in ("nan", "inf", "infinity"):
        return math.nan
    if not _NUMBER.fullmatch(t):
        return None
    return float(t)


def _cas_ok(cas: str) -> bool:
    """CAS number format and check digit (CAS Registry, check-digit rule)."""
    m = _CAS.fullmatch(cas)
    if not m:
        return False
    digits = (m.group(1) + m.group(2))[::-1]
    total = sum((i + 1) * int(d) for i, d in enumerate(digits))
    return total % 10 == int(m.group(3))


def read_sources_file(path: str | Path, display: str | None = None) -> dict[str, str]:
    """Read a sources file (columns ``key,citation,note``).

    Parameters
    ----------
    path : str or Path
        The file.
    display : str, optional
        Name used in messages (default: the path as given).

    Returns
    -------
    dict
        Key -> citation.

    Raises
    ------
    DataFileError
        With every problem of the file.
    """
    sources, problems = read_sources(Path(path), display or str(path))
    if problems:
        raise DataFileError(problems)
    return sources


def read_sources(path: Path, display: str) -> tuple[dict[str, str], list]:
    """Read a sources file: ``(key -> citation, problems)``; problems are (file, line, column, message)."""
    problems: list = []
    rows = read_csv_rows(path, display, problems)
    sources: dict[str, str] = {}
    if not rows:
        if not problems:
            problems.append(
                (display, 1, 0, "empty sources file: expected header key,citation,note")
            )
        return sources, problems
    hline, header = rows[0]
    cols = {name: i for i, name in enumerate(header)}
    for need in ("key", "citation"):
        if need not in cols:
            problems.append(
                (display, hline, 0, f"missing column {need!r} (header must be key,citation,note)")
            )
    for col, name in enumerate(header, start=1):
        if name not in _SOURCE_COLUMNS:
            problems.append(
                (display, hline, col, f"unknown column {name!r} (valid: key, citation, note)")
            )
    if problems:
        return sources, problems
    first_line: dict[str, int] = {}
    for lineno, fields in rows[1:]:
        if len(fields) != len(header):
            problems.append(
                (display, lineno, 0, f"{len(fields)} fields, the header has {len(header)}")
            )
            continue
        key, citation = fields[cols["key"]], fields[cols["citation"]]
        if not key:
            problems.append((display, lineno, cols["key"] + 1, "empty source key"))
            continue
        if not citation:
            problems.append(
                (display, lineno, cols["citation"] + 1, f"source {key!r} has no citation")
            )
        if key in first_line:
            problems.append(
                (
                    display,
                    lineno,
                    cols["key"] + 1,
                    f"source key {key!r} repeats line {first_line[key]}",
                )
            )
            continue
        first_line[key] = lineno
        sources[key] = citation
    return sources, problems


def read_species_file(
    path: str | Path,
    known_sources: Mapping[str, str] | None = None,
    *,
    display: str | None = None,
) -> list[Species]:
    """Read and validate one species table.

    Parameters
    ----------
    path : str or Path
        A CSV file in the species-table form (DEVELOPERS.md).
    known_sources : Mapping, optional
        When given, every row's ``source`` must be one of its keys; when None
        (user files) any non-empty source text is accepted.
    display : str, optional
        Name of the file in messages and in each species' ``origin``.

    Returns
    -------
    list of Species
        In file order.

    Raises
    ------
    DataFileError
        With every problem of the file at once, each as ``file:line:column``.
    """
    species, problems = _read_species(Path(path), display or str(path), known_sources)
    if problems:
        raise DataFileError(problems)
    return species


def _read_species(
    path: Path, display: str, known_sources: Mapping[str, str] | None
) -> tuple[list[Species], list]:
    problems: list = []
    rows = read_csv_rows(path, display, problems)
    if not rows:
        if not problems:
            problems.append((display, 1, 0, "empty species table: expected a header row"))
        return [], problems
    hline, header = rows[0]
    problems += _header_problems(header, display, hline, COLUMNS)
    cols: dict[str, int] = {}
    for i, name in enumerate(header):
        if name in COLUMNS and name not in cols:
            cols[name] = i
    for need in REQUIRED_COLUMNS:
        if need not in cols:
            problems.append(
                (
                    display,
                    hline,
                    0,
                    f"missing required column {need!r} ({COLUMNS[need][0]}); "
                    f"required: {', '.join(REQUIRED_COLUMNS)}",
                )
            )
    species: list[Species] = []
    seen: dict[tuple[str, str], int] = {}
    for lineno, fields in rows[1:]:
        sp = _read_row(fields, header, cols, display, lineno, known_sources, problems)
        if sp is None:
            continue
        if sp.key in seen:
            problems.append(
                (
                    display,
                    lineno,
                    cols["formula"] + 1,
                    f"duplicate species {_display(sp.key)}: already on line {seen[sp.key]} "
                    "(give a different 'form' for a second polymorph)",
                )
            )
            continue
        seen[sp.key] = lineno
        species.append(sp)
    problems.sort(key=lambda p: (p[1], p[2]))
    return species, problems


def _read_row(fields, header, cols, display, lineno, known_sources, problems) -> Species | None:
    """Validate one data row; append problems; return a Species when the row is sound."""
    n0 = len(problems)
    if len(fields) != len(header):
        problems.append(
            (
                display,
                lineno,
                0,
                f"{len(fields)} fields, the header has {len(header)} "
                "(a comma inside a note needs double quotes)",
            )
        )
        return None

    def cell(name: str) -> str:
        return fields[cols[name]] if name in cols else ""

    def add(name: str, msg: str) -> None:
        problems.append((display, lineno, cols[name] + 1 if name in cols else 0, msg))

    for name in REQUIRED_COLUMNS:
        if name in cols and not cell(name):
            add(name, f"missing value for required column {name!r} ({COLUMNS[name][0]})")

    formula = None
    if cell("formula"):
        try:
            formula = parse_formula(cell("formula"))
        except FormulaError as exc:
            add("formula", str(exc))

    phase = cell("phase")
    if phase and phase not in PHASES:
        add("phase", f"phase {phase!r} is not one of aq, s, l, g")
        phase = ""
    if formula is not None and phase:
        if formula.phase is not None and formula.phase != phase:
            add("phase", f"phase {phase!r} contradicts ({formula.phase}) written in the formula")
        if formula.charge != 0 and phase != "aq":
            add(
                "phase",
                f"charged species {formula.text} cannot have phase {phase!r}: ions are 'aq'",
            )

    form = cell("form") or None
    if form is not None and not _FORM.fullmatch(form):
        add("form", f"form {form!r}: use letters, digits, '-', '_', '.' or spaces (no ':' or ',')")

    if formula is not None:
        if abs(formula.charge) > MAX_CHARGE:
            add(
                "formula",
                f"charge {formula.charge:+d} of {cell('formula')[:40]!r} is not a real ionic charge (at most ±{MAX_CHARGE})",
            )
        big = [el for el, n in formula.composition.items() if n > MAX_ATOMS]
        if big:
            add(
                "formula",
                f"{cell('formula')[:40]!r}: more than {MAX_ATOMS} atoms of {', '.join(big)} in one formula unit",
            )

    values: dict[str, float | None] = {}
    for name in _NUMERIC:
        text = cell(name)
        if not text:
            values[name] = None
            continue
        x = parse_number(text)
        if x is None:
            add(name, f"{name}: {text!r} is not a number (unit {COLUMNS[name][0]})")
        elif not math.isfinite(x):
            add(name, f"{name}: {text!r} is not a finite number")
        elif name in MAGNITUDE and abs(x) > MAGNITUDE[name]:
            add(
                name,
                f"{name}: {text[:40]!r} is implausible (|value| above {MAGNITUDE[name]:g} "
                f"{COLUMNS[name][0]}); check the unit and the exponent",
            )
        else:
            values[name] = x
    if cell("dgf_unc_parent") and values.get("dgf_unc_kj_mol") is None:
        add(
            "dgf_unc_parent",
            f"dgf_unc_parent {cell('dgf_unc_parent')!r} needs dgf_unc_kj_mol (the uncertainty "
            "relative to that species)",
        )
    units = values.get("dgf_unc_parent_units")
    if units is not None and not cell("dgf_unc_parent"):
        add("dgf_unc_parent_units", "dgf_unc_parent_units needs dgf_unc_parent (units of what)")
    elif units is not None and units <= 0:
        add("dgf_unc_parent_units", f"dgf_unc_parent_units {units} must be > 0")
    if values.get("dgf_unc_kj_mol") is not None and values["dgf_unc_kj_mol"] < 0:
        add(
            "dgf_unc_kj_mol",
            f"dgf_unc_kj_mol {values['dgf_unc_kj_mol']} must be >= 0 (a standard uncertainty)",
        )
    if phase in ("s", "l", "g"):
        if values.get("s_j_molk") is not None and values["s_j_molk"] <= 0:
            # third law: S(298 K) > 0 for a pure phase (conventional ionic entropies may be < 0)
            add("s_j_molk", f"s_j_molk {values['s_j_molk']} must be > 0 for phase {phase!r}")
        if values.get("cp_j_molk") is not None and values["cp_j_molk"] <= 0:
            add("cp_j_molk", f"cp_j_molk {values['cp_j_molk']} must be > 0 for phase {phase!r}")
    mk = [n for n in ("mk_a_j_molk", "mk_b_j_molk2", "mk_c_jk_mol") if cell(n)]
    if mk and len(mk) != 3:
        missing = [n for n in ("mk_a_j_molk", "mk_b_j_molk2", "mk_c_jk_mol") if n not in mk]
        add(mk[0], f"Maier-Kelley coefficients come as a set: missing {', '.join(missing)}")
    hkf_given = [n for n in HKF_COLUMNS if values.get(n) is not None]
    if hkf_given and len(hkf_given) != len(HKF_COLUMNS):
        missing = [n for n in HKF_COLUMNS if n not in hkf_given]
        add(hkf_given[0], f"HKF parameters come as a set: missing {', '.join(missing)}")
    if hkf_given and phase and phase != "aq":
        add(hkf_given[0], f"HKF parameters are for aqueous species, not phase {phase!r}")
    if values.get("v_cm3_mol") is not None and values["v_cm3_mol"] <= 0 and phase == "s":
        add("v_cm3_mol", f"v_cm3_mol {values['v_cm3_mol']} must be > 0 for a solid")
    if values.get("mk_tmax_k") is not None and values["mk_tmax_k"] <= 298.15:
        add("mk_tmax_k", f"mk_tmax_k {values['mk_tmax_k']} K must be above 298.15 K")
    if (
        formula is not None
        and formula.text == "H^+"
        and phase == "aq"
        and values.get("dgf_kj_mol") not in (None, 0.0)
    ):
        add("dgf_kj_mol", "H^+(aq) has dgf_kj_mol = 0 by convention")

    meta = cell("metastable").lower()
    if meta not in ("", "yes", "no"):
        add("metastable", f"metastable {cell('metastable')!r}: write 'yes', 'no' or leave empty")

    cas = cell("cas") or None
    if cas is not None and not _cas_ok(cas):
        add("cas", f"cas {cas!r} is not a valid CAS number (form 1234-56-7, check digit)")

    source = cell("source")
    hkf_source = cell("hkf_source") or None
    for column, key in (("source", source), ("hkf_source", hkf_source)):
        if key and known_sources is not None and key not in known_sources:
            close = difflib.get_close_matches(key, list(known_sources), n=3)
            hint = f"; did you mean {', '.join(close)}?" if close else ""
            add(
                column,
                f"unknown source key {key!r}{hint} "
                f"(known keys: {', '.join(sorted(known_sources))})",
            )

    if len(problems) > n0 or formula is None or values.get("dgf_kj_mol") is None:
        return None
    formula = Formula(formula.text, formula.composition, formula.charge, phase)
    name = formula.text + (f":{form}" if form else "")
    return Species(
        name=name,
        formula=formula,
        phase=phase,
        form=form,
        dgf_kj_mol=values["dgf_kj_mol"],
        dgf_unc_kj_mol=values["dgf_unc_kj_mol"],
        dgf_unc_parent=cell("dgf_unc_parent") or None,
        dgf_unc_parent_units=(
            1.0
            if values.get("dgf_unc_parent_units") is None
            else values["dgf_unc_parent_units"]
        ),
        dhf_kj_mol=values["dhf_kj_mol"],
        s_j_molk=values["s_j_molk"],
        cp_j_molk=values["cp_j_molk"],
        mk_a_j_molk=values["mk_a_j_molk"],
        mk_b_j_molk2=values["mk_b_j_molk2"],
        mk_c_jk_mol=values["mk_c_jk_mol"],
        mk_tmax_k=values["mk_tmax_k"],
        v_cm3_mol=values["v_cm3_mol"],
        hkf=_hkf_parameters(values),
        hkf_source=hkf_source,
        metastable=meta == "yes",
        cas=cas,
        source=source,
        note=cell("note"),
        origin=f"{display}:{lineno}",
    )


def _hkf_parameters(values: Mapping[str, float | None]) -> HKFParameters | None:
    """The row's HKF parameters (validated as a complete set), or None."""
    if any(values.get(n) is None for n in HKF_COLUMNS):
        return None
    return HKFParameters(*(float(values[n]) for n in HKF_COLUMNS))


# --------------------------------------------------------------------------- data sets


def _datasets_in(root: Path) -> dict[str, str]:
    described: dict[str, str] = {"default": "The base tables."}
    f = root / "datasets.csv"
    if f.is_file():
        problems: list = []
        rows = read_csv_rows(f, "species_data/datasets.csv", problems)
        if problems:
            raise DataFileError(problems)
        if rows:
            hline, header = rows[0]
            if header[:2] != ["name", "description"]:
                raise DataFileError(
                    [("species_data/datasets.csv", hline, 1, "header must be name,description")]
                )
            for lineno, fields in rows[1:]:
                if len(fields) != 2 or not fields[0]:
                    raise DataFileError(
                        [("species_data/datasets.csv", lineno, 0, "expected name,description")]
                    )
                described[fields[0]] = fields[1]
    sets = root / "sets"
    if sets.is_dir():
        for d in sorted(sets.iterdir()):
            if d.is_dir() and any(d.glob("*.csv")):
                described.setdefault(d.name, "(no description in datasets.csv)")
    return described


def available_datasets() -> dict[str, str]:
    """Return the selectable data sets, name -> description.

    ``default`` is the base tables; every other name is a folder
    ``species_data/sets/NAME/`` whose rows replace or add to the base.
    """
    return _datasets_in(data_dir())


def _species_files(folder: Path) -> list[Path]:
    return sorted(
        p
        for p in folder.glob("*.csv")
        if p.is_file() and p.name != "datasets.csv" and not p.name.startswith("sources")
    )


def source_files(folder: Path) -> list[Path]:
    """The ``sources*.csv`` files of a data folder, sorted."""
    return sorted(p for p in folder.glob("sources*.csv") if p.is_file())


def _value_summary(sp: Species) -> str:
    return f"{sp.dgf_kj_mol:.2f} kJ/mol ({sp.origin})"


def _dropped(old: Species, new: Species) -> str:
    lost = [
        n
        for n in ("dhf_kj_mol", "s_j_molk", "cp_j_molk", "mk_a_j_molk", "hkf")
        if getattr(old, n) is not None and getattr(new, n) is None
    ]
    if not lost:
        return ""
    words = {"mk_a_j_molk": "Maier-Kelley Cp", "hkf": "HKF parameters"}
    names = ", ".join(words.get(n, n) for n in lost)
    return f"; the new row gives no {names}, so none is used"


@functools.lru_cache(maxsize=8)
def _embedded(
    root: Path, dataset: str
) -> tuple[tuple[Species, ...], tuple[tuple[str, str], ...], tuple[str, ...]]:
    """Load, validate and merge the embedded tables of one data set (cached per folder)."""
    names = _datasets_in(root)
    if dataset not in names:
        raise OptionError(
            f"unknown data set {dataset!r}; valid data sets: {', '.join(sorted(names))}"
        )
    problems: list = []
    folders = [root] + ([root / "sets" / dataset] if dataset != "default" else [])
    sources: dict[str, str] = {}
    source_line: dict[str, str] = {}
    for folder in folders:
        for f in source_files(folder):
            disp = "species_data/" + f.relative_to(root).as_posix()
            got, probs = read_sources(f, disp)
            problems += probs
            for k, v in got.items():
                if k in sources:
                    problems.append(
                        (disp, 0, 0, f"source key {k!r} already defined in {source_line[k]}")
                    )
                    continue
                sources[k] = v
                source_line[k] = disp
    if not sources and not problems:
        problems.append(("species_data/", 0, 0, "no sources*.csv file found"))

    merged: dict[tuple[str, str], Species] = {}
    overrides: list[str] = []
    for level, folder in enumerate(folders):
        level_seen: dict[tuple[str, str], Species] = {}
        for f in _species_files(folder):
            disp = "species_data/" + f.relative_to(root).as_posix()
            rows, probs = _read_species(f, disp, sources)
            problems += probs
            for sp in rows:
                if sp.key in level_seen:
                    first = level_seen[sp.key]
                    line = sp.origin.rsplit(":", 1)[1]
                    problems.append(
                        (
                            disp,
                            int(line),
                            1,
                            f"duplicate species {_display(sp.key)}: already in {first.origin}",
                        )
                    )
                    continue
                level_seen[sp.key] = sp
                if level > 0 and sp.key in merged:
                    old = merged[sp.key]
                    overrides.append(
                        f"{_display(sp.key)}: default value {_value_summary(old)} replaced by "
                        f"{sp.dgf_kj_mol:.2f} from data set {dataset!r} ({sp.origin})"
                        + _dropped(old, sp)
                    )
                merged[sp.key] = sp
    if problems:
        raise DataFileError(problems)
    return tuple(merged.values()), tuple(sources.items()), tuple(overrides)


def load_species(dataset: str = "default", user_files: Sequence[str | Path] = ()) -> SpeciesTable:
    """Load the embedded tables of a data set, merged with user files.

    Parameters
    ----------
    dataset : str
        ``"default"`` or a name from :func:`available_datasets`.
    user_files : sequence of str or Path
        Species tables of the same form; their rows add species or override
        embedded ones with the same (name, phase). Each override is recorded
        in ``SpeciesTable.overrides``. A user row's source may be any text;
        unknown keys are cited as "user file PATH". Rows of the chosen data
        set that replace base rows are listed in
        ``SpeciesTable.dataset_changes``.

    Returns
    -------
    SpeciesTable

    Raises
    ------
    OptionError
        Unknown data set.
    DataFileError
        Problems in an embedded table or a user file (all problems of the
        faulty files at once).
    """
    if isinstance(user_files, (str, Path)):
        user_files = [user_files]
    species, sources_items, changes = _embedded(data_dir(), str(dataset))
    sources = dict(sources_items)
    merged = {sp.key: sp for sp in species}
    overrides: list[str] = []
    problems: list = []
    for uf in user_files:
        path = Path(uf)
        disp = str(uf)
        rows, probs = _read_species(path, disp, None)
        problems += probs
        for sp in rows:
            if sp.source not in sources:
                sources[sp.source] = f"user file {disp}"
            if sp.key in merged:
                old = merged[sp.key]
                kind = "embedded" if old.origin.startswith("species_data/") else "user"
                overrides.append(
                    f"{_display(sp.key)}: {kind} value {_value_summary(old)} overridden by "
                    f"{sp.dgf_kj_mol:.2f} from {sp.origin}" + _dropped(old, sp)
                )
            merged[sp.key] = sp
    table = SpeciesTable(
        species=tuple(merged.values()),
        sources=types.MappingProxyType(sources),
        dataset=str(dataset),
        overrides=tuple(overrides),
        dataset_changes=changes,
    )
    problems += _parent_problems(table)
    if problems:
        raise DataFileError(problems)
    return table


def _parent_problems(table: SpeciesTable) -> list:
    """Rows whose ``dgf_unc_parent`` names no species of the table, or itself."""
    problems = []
    for sp in table.species:
        if sp.dgf_unc_parent is None:
            continue
        where, _, line = sp.origin.rpartition(":")
        try:
            parent = table.get(sp.dgf_unc_parent)
        except UnknownSpeciesError as exc:
            problems.append((where, int(line), 0, f"dgf_unc_parent: {exc}"))
            continue
        if parent.key == sp.key:
            problems.append((where, int(line), 0, "dgf_unc_parent names the row itself"))
    return problems


# old private names, kept one release for code not yet moved to the public ones
_number = parse_number
_read_lines = read_csv_rows
_read_sources = read_sources
_source_files = source_files
