"""Where computed dissolved amounts stop describing any real solution."""

from __future__ import annotations

import math

__all__ = [
    "REAL_SOLUTION_LIMIT_MOL_KG",
    "REAL_SOLUTION_PH_MAX",
    "beyond_real_solution",
    "amount_text",
]

#: Dissolved amount above which no real solution exists [mol/kg]: more than the most soluble
#: salts hold at saturation (lithium chloride near 20 mol/kg at 25 °C; from memory).
REAL_SOLUTION_LIMIT_MOL_KG = 20.0
#: pH above which a solution would need more than 1 mol/kg hydroxide (common practice: the pH
#: scale of dilute solutions ends near 14; beyond it activities, not pH, describe the liquor).
REAL_SOLUTION_PH_MAX = 14.0
_BEYOND = "beyond any real solution"


def beyond_real_solution(total_mol_kg):
    """Whether a dissolved amount exceeds :data:`REAL_SOLUTION_LIMIT_MOL_KG` (or is infinite).

    Parameters
    ----------
    total_mol_kg : float
        Computed dissolved amount [mol/kg].

    Returns
    -------
    bool

    Examples
    --------
    >>> beyond_real_solution(41.8), beyond_real_solution(0.84)
    (True, False)
    """
    v = float(total_mol_kg)
    return not math.isfinite(v) or v > REAL_SOLUTION_LIMIT_MOL_KG


def amount_text(total_mol_kg, spec=".3g"):
    """A dissolved amount as text, or the mark that it lies beyond any real solution.

    Parameters
    ----------
    total_mol_kg : float
        Computed dissolved amount [mol/kg].
    spec : str
        Format of the number.

    Returns
    -------
    str

    Examples
    --------
    >>> amount_text(0.841)
    '0.841 mol/kg'
    >>> amount_text(1.45e11)
    'beyond any real solution (over 20 mol/kg)'
    """
    if beyond_real_solution(total_mol_kg):
        return f"{_BEYOND} (over {REAL_SOLUTION_LIMIT_MOL_KG:g} mol/kg)"
    return f"{float(total_mol_kg):{spec}} mol/kg"
