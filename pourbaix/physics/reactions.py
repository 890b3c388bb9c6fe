"""Balance a reduction between two species; standard potentials and log K from the tables."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction

from pourbaix.constants import T_REF_K, F, R
from pourbaix.errors import DataError
from pourbaix.tables.species import Species, SpeciesTable, load_species

__all__ = [
    "FARADAY",
    "GAS_CONSTANT",
    "T_REF_K",
    "Reaction",
    "balance_pair",
    "reaction_gibbs_kj_mol",
    "standard_potential",
    "log_k",
]

FARADAY = F  # C/mol, CODATA 2018 (see pourbaix.constants)
GAS_CONSTANT = R  # J/(mol K), CODATA 2018 (see pourbaix.constants)


def _fmt(c: float) -> str:
    """Coefficient text: '' for 1, integer without decimals, else up to 4 digits."""
    c = abs(c)
    if math.isclose(c, 1.0):
        return ""
    if math.isclose(c, round(c)):
        return f"{round(c)} "
    return f"{c:.4g} "


@dataclass(frozen=True)
class Reaction:
    """A reduction ``ox + m H+ + n e- -> red + w H2O``.

    Attributes
    ----------
    oxidised : tuple of (Species, float)
        Species and coefficients on the oxidised (left) side.
    reduced : tuple of (Species, float)
        Species and coefficients on the reduced (right) side.
    h_plus : float
        Moles of H+ on the left (negative: produced on the right).
    electrons : float
        Moles of electrons on the left (0 for an acid-base or solubility
        reaction; negative would be an oxidation).
    water : float
        Moles of H2O on the right (negative: consumed on the left).
    """

    oxidised: tuple[tuple[Species, float], ...]
    reduced: tuple[tuple[Species, float], ...]
    h_plus: float
    electrons: float
    water: float

    def text(self) -> str:
        """Return the reaction as text, e.g. ``Fe2O3 + 6 H+ + 2 e- = 2 Fe^2+ + 3 H2O``.

        Negative coefficients are moved to the other side; zero terms are left out.
        """
        left: list[str] = []
        right: list[str] = []

        def term(name: str, coeff: float) -> str:
            return f"{_fmt(coeff)}{name}"

        def nonzero(c: float) -> bool:
            return not math.isclose(c, 0.0, abs_tol=1e-12)

        # left: oxidised species, H+, e-, then whatever moved over from the right
        left += [term(s.name, c) for s, c in self.oxidised if c > 0 and nonzero(c)]
        left += [term("H+", self.h_plus)] if self.h_plus > 0 and nonzero(self.h_plus) else []
        left += (
            [term("e-", self.electrons)] if self.electrons > 0 and nonzero(self.electrons) else []
        )
        left += [term(s.name, c) for s, c in self.reduced if c < 0 and nonzero(c)]
        left += [term("H2O", self.water)] if self.water < 0 and nonzero(self.water) else []
        # right: reduced species, H2O, then whatever moved over from the left
        right += [term(s.name, c) for s, c in self.reduced if c > 0 and nonzero(c)]
        right += [term("H2O", self.water)] if self.water > 0 and nonzero(self.water) else []
        right += [term(s.name, c) for s, c in self.oxidised if c < 0 and nonzero(c)]
        right += [term("H+", self.h_plus)] if self.h_plus < 0 and nonzero(self.h_plus) else []
        right += (
            [term("e-", self.electrons)] if self.electrons < 0 and nonzero(self.electrons) else []
        )
        return f"{' + '.join(left) or '0'} = {' + '.join(right) or '0'}"

    def __str__(self) -> str:
        return self.text()


def _solve_exact(rows: list[list[Fraction]], rhs: list[Fraction]) -> list[Fraction] | None:
    """Solve a square-or-tall linear system exactly (Gauss-Jordan); None if no unique solution."""
    n = len(rows[0]) if rows else 0
    a = [r[:] + [b] for r, b in zip(rows, rhs, strict=True)]
    piv_row = 0
    pivots = []
    for col in range(n):
        p = next((r for r in range(piv_row, len(a)) if a[r][col] != 0), None)
        if p is None:
            return None
        a[piv_row], a[p] = a[p], a[piv_row]
        pv = a[piv_row][col]
        a[piv_row] = [x / pv for x in a[piv_row]]
        for r in range(len(a)):
            if r != piv_row and a[r][col] != 0:
                f = a[r][col]
                a[r] = [x - f * y for x, y in zip(a[r], a[piv_row], strict=True)]
        pivots.append(col)
        piv_row += 1
    for r in range(piv_row, len(a)):  # leftover equations must read 0 = 0
        if a[r][n] != 0:
            return None
    return [a[i][n] for i in range(n)]


def balance_pair(
    ox: Species, red: Species, element: str, extra: Sequence[Species] = ()
) -> Reaction:
    """Balance the reduction of ``ox`` to ``red`` with H2O, H+ and electrons.

    Parameters
    ----------
    ox : Species
        The oxidised species (e.g. ``Fe2O3``).
    red : Species
        The reduced species (e.g. ``Fe^2+``).
    element : str
        The element both share (e.g. ``"Fe"``); the reaction carries equal
        amounts of it on each side.
    extra : sequence of Species, optional
        Species that carry the other elements (e.g. ``Cl^-`` for
        AgCl/Ag, ``CN^-`` for Au(CN)2^-/Au); their coefficients are solved
        for and put on whichever side they belong.

    Returns
    -------
    Reaction
        Written with the smallest integer coefficients.

    Raises
    ------
    DataError
        ``element`` missing from either species, or other elements that do
        not balance (named in the message).

    Notes
    -----
    Per atom of ``element``: ``ox/x_ox + m H+ + n e- -> red/x_red + w H2O``,
    with O balanced by water, H by H+ and charge by electrons (mass and
    charge conservation; Bard & Faulkner 2001, ch. 2). The result is scaled
    to integers.

    Examples
    --------
    >>> t = load_species()
    >>> balance_pair(t.get("Fe2O3"), t.get("Fe2+"), "Fe").text()
    'Fe2O3 + 6 H+ + 2 e- = 2 Fe^2+ + 3 H2O'
    """
    for role, sp in (("oxidised", ox), ("reduced", red)):
        if sp.composition.get(element, 0) == 0:
            raise DataError(
                f"cannot balance on {element!r}: the {role} species {sp} contains no {element}"
            )
    a = Fraction(1, ox.composition[element])
    b = Fraction(1, red.composition[element])
    extra = tuple(extra)
    # unknowns: coefficient of each extra species (on the reduced side), w, m, n
    others = sorted(
        ({*ox.composition, *red.composition} | {e for s in extra for e in s.composition})
        - {element, "H", "O"}
    )
    k = len(extra)
    rows: list[list[Fraction]] = []
    rhs: list[Fraction] = []
    for el in others:  # a*ox - b*red - sum c_k*extra_k = 0
        rows.append([Fraction(s.composition.get(el, 0)) for s in extra] + [Fraction(0)] * 3)
        rhs.append(a * ox.composition.get(el, 0) - b * red.composition.get(el, 0))
    # O: a*O_ox = b*O_red + sum c_k O_k + w
    rows.append([Fraction(s.composition.get("O", 0)) for s in extra] + [Fraction(1), 0, 0])
    rhs.append(a * ox.composition.get("O", 0) - b * red.composition.get("O", 0))
    # H: a*H_ox + m = b*H_red + sum c_k H_k + 2w
    rows.append([Fraction(s.composition.get("H", 0)) for s in extra] + [Fraction(2), -1, 0])
    rhs.append(a * ox.composition.get("H", 0) - b * red.composition.get("H", 0))
    # charge: a*z_ox + m - n = b*z_red + sum c_k z_k
    rows.append([Fraction(s.charge) for s in extra] + [Fraction(0), -1, 1])
    rhs.append(a * ox.charge - b * red.charge)

    sol = _solve_exact(rows, rhs)
    if sol is None:
        unbalanced = [
            el
            for el in others
            if a * ox.composition.get(el, 0) != b * red.composition.get(el, 0)
            and not any(el in s.composition for s in extra)
        ]
        what = ", ".join(unbalanced) if unbalanced else ", ".join(others)
        hint = (
            " (pass a species carrying it as extra=, e.g. the free ligand)"
            if unbalanced
            else " (the extra species do not give a unique balance)"
        )
        raise DataError(f"cannot balance {ox} -> {red} on {element}: {what} do not balance{hint}")
    coeffs, (w, m, n) = sol[:k], sol[k:]
    scale = math.lcm(*(f.denominator for f in (a, b, w, m, n, *coeffs)))
    oxidised = [(ox, float(a * scale))]
    reduced = [(red, float(b * scale))]
    for sp, c in zip(extra, coeffs, strict=True):
        if c > 0:
            reduced.append((sp, float(c * scale)))
        elif c < 0:
            oxidised.append((sp, float(-c * scale)))
    return Reaction(
        oxidised=tuple(oxidised),
        reduced=tuple(reduced),
        h_plus=float(m * scale),
        electrons=float(n * scale),
        water=float(w * scale),
    )


def _water_dgf(table: SpeciesTable | None, water_dgf: float | None) -> float:
    if water_dgf is not None:
        return float(water_dgf)
    table = table if table is not None else load_species()
    return table.get("H2O", "l").dgf_kj_mol


def reaction_gibbs_kj_mol(
    reaction: Reaction, table: SpeciesTable | None = None, water_dgf: float | None = None
) -> float:
    """Return the standard Gibbs energy of a reaction at 25 °C, products minus reactants.

    Parameters
    ----------
    reaction : Reaction
    table : SpeciesTable, optional
        Where to find liquid water (default: the default data set).
    water_dgf : float, optional
        ΔfG° of liquid water to use instead [kJ/mol].

    Returns
    -------
    float
        ΔrG° [kJ/mol]; H+ and e- count 0 (the SHE convention).
    """
    g = sum(c * sp.dgf_kj_mol for sp, c in reaction.reduced)
    g -= sum(c * sp.dgf_kj_mol for sp, c in reaction.oxidised)
    if reaction.water:
        g += reaction.water * _water_dgf(table, water_dgf)
    return g


def standard_potential(
    reaction: Reaction, table: SpeciesTable | None = None, water_dgf: float | None = None
) -> float:
    """Return the standard reduction potential of a reaction at 25 °C.

    Parameters
    ----------
    reaction : Reaction
        A reduction with ``electrons != 0``.
    table : SpeciesTable, optional
        Where to find liquid water (default: the default data set).
    water_dgf : float, optional
        ΔfG° of liquid water [kJ/mol].

    Returns
    -------
    float
        E° [V vs SHE].

    Raises
    ------
    DataError
        For an electron-free reaction (use :func:`log_k`).

    Notes
    -----
    E° = -ΔrG° / (n F)  (Bard & Faulkner 2001, eq. 2.1.22).
    """
    if math.isclose(reaction.electrons, 0.0, abs_tol=1e-12):
        raise DataError(
            f"reaction {reaction.text()} has no electrons, so no standard potential; use log_k"
        )
    dg = reaction_gibbs_kj_mol(reaction, table, water_dgf)
    return -dg * 1000.0 / (reaction.electrons * FARADAY)  # Bard & Faulkner 2001, eq. 2.1.22


def log_k(
    reaction: Reaction, table: SpeciesTable | None = None, water_dgf: float | None = None
) -> float:
    """Return log10 of the equilibrium constant at 25 °C of an electron-free reaction.

    Parameters
    ----------
    reaction : Reaction
        ``electrons == 0`` (acid-base, hydrolysis, solubility).
    table : SpeciesTable, optional
        Where to find liquid water (default: the default data set).
    water_dgf : float, optional
        ΔfG° of liquid water [kJ/mol].

    Returns
    -------
    float
        log10 K [-].

    Raises
    ------
    DataError
        For a reaction with electrons (use :func:`standard_potential`).

    Notes
    -----
    log10 K = -ΔrG° / (R T ln 10)  (van 't Hoff isotherm; Atkins, Physical
    Chemistry, ch. 6).
    """
    if not math.isclose(reaction.electrons, 0.0, abs_tol=1e-12):
        raise DataError(
            f"reaction {reaction.text()} transfers electrons; use standard_potential, not log_k"
        )
    dg = reaction_gibbs_kj_mol(reaction, table, water_dgf)
    return -dg * 1000.0 / (GAS_CONSTANT * T_REF_K * math.log(10.0))
