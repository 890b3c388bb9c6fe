"""Parse and print chemical formulas: composition, charge, phase and labels."""

from __future__ import annotations

import re
import types
from collections.abc import Mapping
from dataclasses import dataclass, field

from pourbaix.errors import FormulaError

__all__ = [
    "ELEMENTS",
    "PHASES",
    "Formula",
    "parse_formula",
    "TO_SUPERSCRIPT",
    "formula_readings",
]

# IUPAC periodic table (2016 names), hydrogen to oganesson.
_ELEMENT_LIST = (
    "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn "
    "Ga Ge As Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce "
    "Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn "
    "Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf Es Fm Md No Lr Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl "
    "Mc Lv Ts Og"
).split()
ELEMENTS: frozenset[str] = frozenset(_ELEMENT_LIST)
"""All element symbols, H to Og (118)."""

PHASES: tuple[str, ...] = ("aq", "s", "l", "g")
"""Phase codes: aqueous, solid, liquid, gas."""

_PHASE_ALIASES = {"aq": "aq", "s": "s", "cr": "s", "l": "l", "g": "g"}
_PHASE_SUFFIX = re.compile(r"\((aq|s|cr|l|g)\)$")

_SUPER = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻", "0123456789+-")
_SUB = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")
TO_SUPERSCRIPT = str.maketrans("0123456789+-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻")
_TO_SUB = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")
_SUPER_CHARS = "⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻"
_HYDRATE_SEPARATORS = "·*"
_CLOSE = {"(": ")", "[": "]"}


@dataclass(frozen=True)
class Formula:
    """A parsed species formula.

    Attributes
    ----------
    text : str
        Canonical text, e.g. ``"Fe(OH)2^+"``, ``"SO4^2-"``, ``"Fe^3+"``,
        ``"H2O"``; the phase is not part of it.
    composition : Mapping[str, int]
        Read-only atom counts, elements in order of first appearance, e.g.
        ``{"Fe": 1, "O": 2, "H": 2}``.
    charge : int
        Ionic charge [elementary charges].
    phase : str or None
        ``"aq"``, ``"s"``, ``"l"``, ``"g"`` or None when not given.
    """

    text: str
    composition: Mapping[str, int] = field(compare=False)
    charge: int
    phase: str | None = None

    def mathtext(self) -> str:
        r"""Return a matplotlib mathtext label, without the phase.

        Examples
        --------
        >>> parse_formula("Fe(OH)2^+").mathtext()
        '$\\mathrm{Fe(OH)_{2}^{+}}$'
        >>> parse_formula("Fe3+").mathtext()
        '$\\mathrm{Fe^{3+}}$'
        """
        body = re.sub(r"(?<=[A-Za-z)\]])(\d+)", r"_{\1}", _body(self.text))
        body = body.replace("·", r"\cdot ")
        return "$\\mathrm{" + body + _charge_suffix(self.charge, "{%s}") + "}$"

    def plain(self) -> str:
        """Return a unicode label for terminals, e.g. ``"SO₄²⁻"``.

        Examples
        --------
        >>> parse_formula("SO4^2-").plain()
        'SO₄²⁻'
        >>> parse_formula("Fe(OH)2^+").plain()
        'Fe(OH)₂⁺'
        """
        body = re.sub(
            r"(?<=[A-Za-z)\]])(\d+)", lambda m: m.group(1).translate(_TO_SUB), _body(self.text)
        )
        return body + _charge_suffix(self.charge, "%s").translate(TO_SUPERSCRIPT).replace("^", "")

    @property
    def elements(self) -> frozenset[str]:
        """Element symbols in the formula."""
        return frozenset(self.composition)

    def __str__(self) -> str:
        return self.text


def _body(text: str) -> str:
    """Return the canonical text without its ``^charge`` suffix."""
    return text.split("^", 1)[0]


def _charge_suffix(charge: int, wrap: str) -> str:
    """Return ``^`` + magnitude + sign (magnitude 1 omitted), or ``""`` for 0."""
    if charge == 0:
        return ""
    sign = "+" if charge > 0 else "-"
    mag = "" if abs(charge) == 1 else str(abs(charge))
    return "^" + wrap % (mag + sign)


def _fail(text: str, what: str, pos: int | None = None) -> FormulaError:
    """Build a FormulaError naming the input and the 1-based position."""
    where = f" at position {pos + 1}" if pos is not None else ""
    err = FormulaError(f"bad formula {text!r}: {what}{where}")
    err.text = text
    err.position = None if pos is None else pos + 1
    return err


def _parse_phase(text: str, phase: str | None) -> str | None:
    """Normalise a phase argument ('cr' -> 's'); None stays None."""
    if phase is None:
        return None
    p = _PHASE_ALIASES.get(str(phase).strip().lower())
    if p is None:
        raise FormulaError(
            f"bad phase {phase!r} for formula {text!r}: valid phases are aq, s (or cr), l, g"
        )
    return p


def _split_charge(text: str, s: str) -> tuple[str, int]:
    """Split the charge suffix off ``s`` (the text without its phase).

    Returns the body and the charge. ``text`` is the original input, used in
    error messages; positions in ``s`` equal positions in ``text``.
    """
    # unicode superscripts: a trailing run like '²⁺' or '⁻'
    sup = re.search(f"[{_SUPER_CHARS}]+$", s)
    if sup:
        stray = re.search(f"[{_SUPER_CHARS}]", s[: sup.start()])
        if stray:
            raise _fail(text, f"superscript {stray.group()!r} inside the formula", stray.start())
        spec = sup.group().translate(_SUPER)
        return s[: sup.start()], _charge_spec(text, spec, sup.start(), allow_bare_zero=False)
    stray = re.search(f"[{_SUPER_CHARS}]", s)
    if stray:
        raise _fail(text, f"superscript {stray.group()!r} inside the formula", stray.start())

    if "^" in s:
        i = s.index("^")
        if "^" in s[i + 1 :]:
            raise _fail(text, "more than one '^'", s.index("^", i + 1))
        spec = s[i + 1 :]
        start = i + 1
        if spec.startswith("{"):
            if not spec.endswith("}"):
                raise _fail(text, "unclosed '{' in the charge", i + 1)
            spec = spec[1:-1]
            start += 1
        if not spec:
            raise _fail(text, "no charge after '^'", i)
        return s[:i], _charge_spec(text, spec, start, allow_bare_zero=True)

    # sign then digits at the end: 'Fe+2', 'SO4-2'
    m = re.search(r"([+-])(\d+)$", s)
    if m and not re.search(r"[+-]$", s[: m.start()]):
        return s[: m.start()], _charge_spec(text, m.group(), m.start(), allow_bare_zero=False)

    m = re.search(r"[+-]+$", s)
    if not m:
        return s, 0
    signs = m.group()
    if len(set(signs)) > 1:
        raise _fail(text, f"mixed charge signs {signs!r}", m.start())
    sign = 1 if signs[0] == "+" else -1
    body = s[: m.start()]
    if len(signs) > 1:  # 'Fe++', 'SO4--': one charge per sign; digits before are counts
        return body, sign * len(signs)
    digits = re.search(r"\d+$", body)
    if not digits:  # 'Cl-', 'OH-', 'Fe(OH)-'
        return body, sign
    head = body[: digits.start()]
    if re.fullmatch(r"[A-Z][a-z]?", head):
        # monatomic: 'Fe2+', 'Cu2+', 'S2-', 'O2-' -> all digits are the charge
        mag = int(digits.group())
        if mag == 0 or digits.group().startswith("0"):
            raise _fail(text, f"bad charge {digits.group() + signs!r}", digits.start())
        return head, sign * mag
    if len(digits.group()) >= 2:
        # 'SO42-', 'Cu(NH3)42+', 'Fe(CN)64-': the last digit is the charge
        mag = int(digits.group()[-1])
        if mag == 0:
            raise _fail(text, f"bad charge '0{signs}'", digits.end() - 1)
        return body[:-1], sign * mag
    # polyatomic with one digit before one sign, e.g. 'NO3-', 'FeOH2+': refuse to guess
    d = digits.group()
    alt1 = f"{body}^{signs}"
    alt2 = f"{head}^{d}{signs}"
    err = _fail(
        text,
        f"ambiguous charge {d + signs!r} (write {alt1!r} for charge {signs}1 "
        f"or {alt2!r} for charge {d}{signs})",
        digits.start(),
    )
    err.alternatives = (alt1, alt2)
    raise err


def _charge_spec(text: str, spec: str, start: int, *, allow_bare_zero: bool) -> int:
    """Read a charge like '2+', '+2', '+', '--', '0'."""
    if spec == "0" and allow_bare_zero:
        return 0
    if re.fullmatch(r"\++|-+", spec):
        return len(spec) if spec[0] == "+" else -len(spec)
    m = re.fullmatch(r"(\d+)([+-])|([+-])(\d+)", spec)
    if m:
        digits = m.group(1) or m.group(4)
        sign = m.group(2) or m.group(3)
        if digits.startswith("0"):
            raise _fail(text, f"bad charge {spec!r}", start)
        return int(digits) if sign == "+" else -int(digits)
    signs = re.search(r"[+-]{2,}", spec)
    if signs and len(set(signs.group())) > 1:
        raise _fail(text, f"mixed charge signs {signs.group()!r}", start + signs.start())
    if re.fullmatch(r"\d+", spec):
        raise _fail(text, f"charge {spec!r} has no sign (write {spec}+ or {spec}-)", start)
    raise _fail(text, f"bad charge {spec!r} (write e.g. 2+, +2, ++ or -)", start)


class _Parser:
    """Recursive-descent parser for the formula body (no charge, no phase)."""

    def __init__(self, text: str, body: str):
        self.text = text
        self.s = body
        self.i = 0

    def error(self, what: str, pos: int | None = None) -> FormulaError:
        return _fail(self.text, what, self.i if pos is None else pos)

    def count(self) -> int:
        m = re.compile(r"\d+").match(self.s, self.i)
        if not m:
            return 1
        if m.group().startswith("0"):
            raise self.error(f"count {m.group()!r} (counts start at 1, no leading zero)")
        self.i = m.end()
        return int(m.group())

    def sequence(self, closer: str | None) -> tuple[list, dict]:
        """Parse units until ``closer`` or the end; return (items, composition)."""
        items: list = []
        comp: dict[str, int] = {}
        while self.i < len(self.s):
            c = self.s[self.i]
            if c.isupper():
                start = self.i
                sym = c
                if self.i + 1 < len(self.s) and self.s[self.i + 1].islower():
                    sym = self.s[self.i : self.i + 2]
                if sym not in ELEMENTS:
                    raise self.error(f"unknown element {sym!r}", start)
                self.i += len(sym)
                n = self.count()
                items.append((sym, n))
                comp[sym] = comp.get(sym, 0) + n
            elif c in _CLOSE:
                start = self.i
                self.i += 1
                inner, icomp = self.sequence(_CLOSE[c])
                if self.i >= len(self.s):
                    raise self.error(f"unclosed {c!r}", start)
                self.i += 1  # the closer
                if not inner:
                    raise self.error(f"empty {c}{_CLOSE[c]}", start)
                n = self.count()
                items.append((c, inner, n))
                for k, v in icomp.items():
                    comp[k] = comp.get(k, 0) + v * n
            elif c in ")]":
                if closer is None:
                    raise self.error(f"unmatched {c!r}")
                if c != closer:
                    raise self.error(f"{c!r} where {closer!r} was expected")
                return items, comp
            elif c.isdigit():
                raise self.error(f"count {c!r} without an element or group before it")
            elif c.islower():
                raise self.error(f"lower-case {c!r} where an element symbol must start")
            elif c in "+-":
                raise self.error(f"charge sign {c!r} inside the formula")
            elif c == ":":
                raise self.error("':form' tags belong to species names, not formulas")
            else:
                raise self.error(f"stray character {c!r}")
        return items, comp


def _render(items: list) -> str:
    out = []
    for it in items:
        if len(it) == 2:
            sym, n = it
            out.append(sym + (str(n) if n != 1 else ""))
        else:
            opener, inner, n = it
            out.append(opener + _render(inner) + _CLOSE[opener] + (str(n) if n != 1 else ""))
    return "".join(out)


def parse_formula(text: str, phase: str | None = None) -> Formula:
    """Parse a species formula with charge and optional phase.

    Parameters
    ----------
    text : str
        Formula as chemists type it. Charges: ``Fe^2+``, ``Fe^{2+}``,
        ``Fe^+2``, ``Fe+2``, ``Fe2+``, ``Fe++``, ``SO4--``, ``SO4^2-``,
        ``SO4-2``, ``SO42-``, ``Cl-``, ``OH^-``, ``Fe²⁺``, ``SO₄²⁻``; ``^0``
        means neutral. Groups ``(OH)2`` and ``[...]`` nest; a hydrate is
        written ``CuSO4·5H2O`` (or with ``*``). An optional trailing phase
        ``(aq)``, ``(s)``, ``(cr)`` (= s), ``(l)`` or ``(g)``.
    phase : str, optional
        Phase code (``aq``, ``s``/``cr``, ``l``, ``g``); must agree with a
        phase written in ``text``.

    Returns
    -------
    Formula
        Canonical text (``Fe(OH)2^+``), composition, charge and phase.

    Raises
    ------
    FormulaError
        Empty or malformed input, unknown element, unbalanced brackets, bad
        or ambiguous charge; the message quotes the input and gives the
        1-based position of the fault.

    Notes
    -----
    Ambiguity rule for digits directly before a single trailing sign
    (no ``^``):

    - a single element symbol before the digits: all digits are the charge,
      so ``Fe2+`` is Fe with charge 2+ and ``O2-`` is the oxide ion (write
      ``O2^-`` for superoxide);
    - two or more digits after a group of atoms: the last digit is the charge
      and the rest a count, so ``SO42-`` is sulfate and ``Cu(NH3)42+`` is the
      tetraammine;
    - one digit after a group of atoms (``NO3-``, ``FeOH2+``) is ambiguous
      and refused: write ``NO3^-`` or ``FeOH^2+``.

    Without a trailing sign, digits are counts (``O2`` is two O atoms).
    ``:form`` tags (``Fe2O3:maghemite``) are part of species names, not
    formulas.

    Examples
    --------
    >>> f = parse_formula("Fe(OH)2^+(aq)")
    >>> f.text, dict(f.composition), f.charge, f.phase
    ('Fe(OH)2^+', {'Fe': 1, 'O': 2, 'H': 2}, 1, 'aq')
    >>> parse_formula("SO4--").text
    'SO4^2-'
    >>> parse_formula("Fe2+").charge
    2
    """
    if not isinstance(text, str):
        raise FormulaError(f"bad formula {text!r}: expected text, got {type(text).__name__}")
    phase = _parse_phase(text, phase)
    text = text.strip()  # positions in messages count from the first non-blank
    if not text:
        raise FormulaError(f"bad formula {text!r}: empty")
    offset = 0
    s = text.translate(_SUB)

    bad = re.search(
        f"[^A-Za-z0-9()\\[\\]{{}}^+\\-{_HYDRATE_SEPARATORS}{_SUPER_CHARS}:]", s[offset:]
    )
    if bad:
        raise _fail(text, f"stray character {bad.group()!r}", offset + bad.start())

    m = _PHASE_SUFFIX.search(s)
    if m:
        written = _PHASE_ALIASES[m.group(1)]
        if phase is not None and phase != written:
            raise _fail(
                text, f"phase ({m.group(1)}) in the formula contradicts phase {phase!r}", m.start()
            )
        phase = written
        s = s[: m.start()]

    s, charge = _split_charge(text, s)
    if not s.strip():
        raise _fail(text, "no atoms before the charge", offset)

    parts = []
    comp: dict[str, int] = {}
    pos = offset
    chunks = re.split(f"([{_HYDRATE_SEPARATORS}])", s[offset:])
    for k, chunk in enumerate(chunks):
        if k % 2 == 1:  # a separator
            pos += 1
            continue
        mult = 1
        mm = re.match(r"\d+", chunk)
        if k > 0 and mm:
            if mm.group().startswith("0"):
                raise _fail(text, f"hydrate count {mm.group()!r}", pos)
            mult = int(mm.group())
        if k == 0 and mm:
            raise _fail(text, f"count {mm.group()!r} without an element or group before it", pos)
        lead = len(mm.group()) if (mm and k > 0) else 0
        if not chunk[lead:]:
            raise _fail(text, "nothing after '·'" if k else "empty part", pos)
        p = _Parser(text, " " * (pos + lead) + chunk[lead:])
        p.i = pos + lead
        items, pcomp = p.sequence(None)
        parts.append((mult, items))
        for el, n in pcomp.items():
            comp[el] = comp.get(el, 0) + n * mult
        pos += len(chunk)

    canon = "·".join((str(m) if m != 1 else "") + _render(items) for m, items in parts)
    canon += _charge_suffix(charge, "%s")
    return Formula(canon, types.MappingProxyType(comp), charge, phase)


def formula_readings(text: str, phase: str | None = None) -> list[Formula]:
    """Return the possible readings of ``text``: one, or two when the charge is ambiguous.

    Used for look-ups, where the table decides between ``NO3^-`` and ``NO^3-``.
    """
    try:
        return [parse_formula(text, phase)]
    except FormulaError as exc:
        alternatives = getattr(exc, "alternatives", None)
        if not alternatives:
            raise
        m = _PHASE_SUFFIX.search(text.strip())
        suffix = m.group() if m else ""
        return [parse_formula(a + suffix, phase) for a in alternatives]


# old private names, kept one release for code not yet moved to the public ones
_TO_SUPER = TO_SUPERSCRIPT
_readings = formula_readings
