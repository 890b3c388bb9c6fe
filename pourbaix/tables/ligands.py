"""Ligand families of the predominant-ligand method: which species carry sulfur, carbonate, chloride, ammonia or cyanide.

References
----------
Pourbaix, M. (1974). Atlas of Electrochemical Equilibria in Aqueous Solutions,
2nd English ed. NACE, Houston; ch. II and the S, C, Cl, N sections.
"""

from __future__ import annotations

from dataclasses import dataclass

from pourbaix.errors import OptionError

__all__ = ["LigandFamily", "LIGANDS", "LIGAND_ALIASES", "resolve_ligand"]


@dataclass(frozen=True)
class LigandFamily:
    """A ligand and the species that carry it.

    Attributes
    ----------
    name : str
        Our name for the family (``S``, ``C``, ``Cl``, ``NH3``, ``CN``).
    counted : str
        The element that counts one ligand unit.
    unit : tuple of (str, int)
        Composition of one ligand unit, e.g. ``(("C", 1), ("N", 1))`` for cyanide.
    species : tuple of (str, str) or None
        ``(formula, phase)`` of the ligand species admitted; None admits every
        aqueous species of the unit's elements with H and O, and their solids.
    description : str
        What the family covers.
    suppressed : str
        Reactions left out on purpose (kinetically inert at ordinary
        temperatures); stated in the map's method text.
    """

    name: str
    counted: str
    unit: tuple
    species: tuple | None
    description: str
    suppressed: str = ""

    @property
    def elements(self):
        """Elements the family brings into the metal species selection."""
        return frozenset(el for el, _ in self.unit)


LIGANDS = {
    "S": LigandFamily(
        "S",
        "S",
        (("S", 1),),
        None,
        "sulfur: sulfate, hydrogen sulfate, sulfite, thiosulfate, H2S, HS-, polysulfide and native sulfur "
        "(every aqueous S-H-O species in the tables, and S(s); no gases)",
    ),
    "C": LigandFamily(
        "C",
        "C",
        (("C", 1),),
        (("CO2", "aq"), ("HCO3^-", "aq"), ("CO3^2-", "aq")),
        "carbonate: CO2(aq), HCO3-, CO3^2-",
        "reduction of carbonate to methane, formate or graphite is left out as kinetically inert",
    ),
    "Cl": LigandFamily(
        "Cl",
        "Cl",
        (("Cl", 1),),
        None,
        "chlorine: chloride and the aqueous oxychlorine species (Cl2(aq), HClO, ClO-, chlorite, chlorate, "
        "perchlorate; no gases)",
    ),
    "NH3": LigandFamily(
        "NH3",
        "N",
        (("N", 1),),
        (("NH4^+", "aq"), ("NH3", "aq")),
        "ammonia: NH4+, NH3(aq)",
        "oxidation of ammonia to N2, nitrite or nitrate is left out as kinetically inert",
    ),
    "CN": LigandFamily(
        "CN",
        "C",
        (("C", 1), ("N", 1)),
        (("HCN", "aq"), ("CN^-", "aq")),
        "cyanide: HCN(aq), CN-",
        "oxidation of cyanide to cyanate is left out as kinetically slow",
    ),
    "P": LigandFamily(
        "P",
        "P",
        (("P", 1),),
        (("H3PO4", "aq"), ("H2PO4^-", "aq"), ("HPO4^2-", "aq"), ("PO4^3-", "aq")),
        "orthophosphate: H3PO4(aq), H2PO4-, HPO4^2-, PO4^3-",
        "reduction of phosphate to phosphite, hypophosphite or phosphine is left out as kinetically "
        "inert",
    ),
    "F": LigandFamily(
        "F",
        "F",
        (("F", 1),),
        (("HF", "aq"), ("F^-", "aq"), ("HF2^-", "aq")),
        "fluoride: HF(aq), F-, HF2-",
    ),
}
LIGAND_ALIASES = {"CO3": "C", "N": "NH3", "PO4": "P"}


def resolve_ligand(name):
    """Return the ligand family for a name or alias.

    Parameters
    ----------
    name : str
        ``S``, ``C`` (alias ``CO3``), ``Cl``, ``NH3`` (alias ``N``) or ``CN``.

    Returns
    -------
    LigandFamily

    Raises
    ------
    OptionError
        For an unknown name; the message lists the valid ones.

    Examples
    --------
    >>> resolve_ligand("CO3").name
    'C'
    """
    key = str(name).strip()
    key = LIGAND_ALIASES.get(key, key)
    if key not in LIGANDS:
        valid = ", ".join(list(LIGANDS) + [f"{a} (= {b})" for a, b in LIGAND_ALIASES.items()])
        raise OptionError(f"unknown ligand {name!r}; valid ligands: {valid}")
    return LIGANDS[key]
