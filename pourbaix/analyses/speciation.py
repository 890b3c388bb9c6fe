"""Speciation along pH (at fixed E) or along E (at fixed pH) with the totals conserved.

At each point of the sweep the mass-balanced equilibrium is solved
(:mod:`pourbaix.solve.equilibrium`); the result gives the share of the metal
in each species, the share of each ligand in each species, the free-ligand
molality (ligand not bound to the metal) and the ligand bound by the metal,
and the solid phases present. Computing only; :mod:`pourbaix.plot.speciation`
draws it.
"""

from __future__ import annotations

import json
import math
import warnings
from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError, OptionError

__all__ = ["SpeciationResult", "compute_speciation"]


@dataclass(frozen=True)
class SpeciationResult:
    """Amounts of every species along a sweep.

    Attributes
    ----------
    system : MassBalanceSystem
        Species, component counts, planes and totals.
    axis : str
        ``"ph"`` (sweep over pH at fixed potential) or ``"potential"``.
    x : numpy.ndarray
        The sweep: pH values, or potentials [V vs ``reference``].
    fixed : float
        The potential [V vs ``reference``] or the pH held fixed.
    reference : str
        Reference electrode of the potentials.
    temperature_c : float
        Temperature [°C].
    amounts : numpy.ndarray, shape (N, S)
        Molality of each dissolved species, amount of each solid [mol/kg].
    present : numpy.ndarray of bool, shape (N, S)
        Solids present.
    ionic_strength : numpy.ndarray, shape (N,)
        Ionic strength of each equilibrium [mol/kg].
    warnings : tuple of str
        Things the user must know.
    pressure_bar : float
        Pressure [bar] (1 bar, or the saturation pressure above 100 °C, unless given).
    water_activity : float
        Activity of water [-].
    """

    system: object
    axis: str
    x: np.ndarray
    fixed: float
    reference: str
    temperature_c: float
    amounts: np.ndarray
    present: np.ndarray
    ionic_strength: np.ndarray
    warnings: tuple = ()
    pressure_bar: float = 1.0
    water_activity: float = 1.0

    @property
    def state_text(self):
        """Temperature, pressure and (below 1) the water activity, as text."""
        parts = [f"{self.temperature_c:g} °C", f"{self.pressure_bar:.4g} bar"]
        if self.water_activity != 1.0:
            parts.append(f"water activity {self.water_activity:g}")
        return "  ·  ".join(parts)

    # -------------------------------------------------------------- derived
    def metal_fraction(self):
        """Share of the metal (principal element) in each species, (N, S) [-]."""
        s = self.system
        return self.amounts * s.counts[:, 0] / s.totals[0]

    def ligand_fraction(self, ligand):
        """Share of a ligand in each species, (N, S) [-]."""
        j = self._ligand_column(ligand)
        return self.amounts * self.system.counts[:, j] / self.system.totals[j]

    def free_ligand(self, ligand):
        """Molality of the ligand not bound to the metal (all its own species), (N,) [mol/kg]."""
        j = self._ligand_column(ligand)
        s = self.system
        own = (s.counts[:, : len(s.metals)].sum(axis=1) == 0) & s.aqueous
        return (self.amounts[:, own] * s.counts[own, j]).sum(axis=1)

    def bound_ligand(self, ligand):
        """Ligand bound by the metal (dissolved complexes and solids), (N,) [mol/kg]."""
        j = self._ligand_column(ligand)
        s = self.system
        held = s.counts[:, : len(s.metals)].sum(axis=1) > 0
        return (self.amounts[:, held] * s.counts[held, j]).sum(axis=1)

    def _ligand_column(self, ligand):
        s = self.system
        if ligand not in s.ligands:
            raise OptionError(
                f"ligand {ligand!r} is not in this system ({', '.join(s.ligands) or 'none'})"
            )
        return len(s.metals) + s.ligands.index(ligand)

    @property
    def title(self):
        """Short title of the sweep."""
        s = self.system
        what = "-".join(s.components)
        if self.axis == "ph":
            return f"Speciation of {what} vs pH at {self.fixed:+.3f} V vs {self.reference}"
        return f"Speciation of {what} vs potential at pH {self.fixed:g}"

    # -------------------------------------------------------------- output
    def rows(self):
        """One dict per sweep point: x, ionic strength, every species' amount, ligand free/bound."""
        s = self.system
        key = "ph" if self.axis == "ph" else f"potential_v_vs_{self.reference}"
        out = []
        for n in range(len(self.x)):
            row = {key: float(self.x[n]), "ionic_strength_mol_kg": float(self.ionic_strength[n])}
            for i, name in enumerate(s.names):
                row[f"{name} [mol/kg]"] = float(self.amounts[n, i])
            for lig in s.ligands:
                row[f"free {lig} [mol/kg]"] = float(self.free_ligand(lig)[n])
                row[f"bound {lig} [mol/kg]"] = float(self.bound_ligand(lig)[n])
            out.append(row)
        return out

    def to_csv(self, path=None):
        """The rows as CSV text; written atomically when ``path`` is given."""
        import csv
        import io

        rows = self.rows()
        buf = io.StringIO()
        w = csv.DictWriter(buf, fieldnames=list(rows[0]), lineterminator="\n")
        w.writeheader()
        for r in rows:
            w.writerow({k: f"{v:.6g}" for k, v in r.items()})
        text = buf.getvalue()
        if path is None:
            return text
        from pourbaix.outputs import atomic_write_text

        atomic_write_text(path, text)
        return path

    def to_json(self, path=None):
        """The sweep as JSON (totals, species, rows); written atomically when ``path`` is given."""
        s = self.system
        doc = {
            "format": "pourbaix.speciation",
            "version": 1,
            "axis": self.axis,
            "fixed": self.fixed,
            "reference": self.reference,
            "temperature_c": self.temperature_c,
            "pressure_bar": self.pressure_bar,
            "water_activity": self.water_activity,
            "totals_mol_kg": dict(zip(s.components, map(float, s.totals), strict=True)),
            "species": [
                {"name": n, "phase": sp.phase, "source": sp.source}
                for n, sp in zip(s.names, s.species, strict=True)
            ],
            "rows": self.rows(),
            "warnings": list(self.warnings),
        }
        text = json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
        if path is None:
            return text
        from pourbaix.outputs import atomic_write_text

        atomic_write_text(path, text)
        return path

    def summary(self):
        """A few lines naming where each solid is present and the largest ligand consumption."""
        s = self.system
        unit = "pH" if self.axis == "ph" else "V"
        lines = [f"{self.title} ({self.state_text.replace('  ·  ', ', ')})"]
        for i in np.flatnonzero(self.present.any(axis=0)):
            where = self.x[self.present[:, i]]
            lines.append(f"  {s.names[i]} present from {where.min():g} to {where.max():g} {unit}")
        frac = self.metal_fraction()
        top = {s.names[i] for i in np.argmax(frac, axis=1)}
        lines.append("  largest share of the metal held by: " + ", ".join(sorted(top)))
        for lig in s.ligands:
            j = self._ligand_column(lig)
            bound = self.bound_ligand(lig) / s.totals[j]
            k = int(np.argmax(bound))
            lines.append(
                f"  {lig}: at most {bound[k]:.1%} bound by the metal (at {self.x[k]:g} {unit})"
            )
        return "\n".join(lines)

    def report_sections(self):
        """Report sections: the method, the summary and a thinned table of the sweep."""
        step = max(1, len(self.x) // 30)
        rows = []
        s = self.system
        frac = self.metal_fraction()
        for n in range(0, len(self.x), step):
            row = {
                ("pH" if self.axis == "ph" else f"E / V vs {self.reference}"): f"{self.x[n]:.3g}"
            }
            for i in np.flatnonzero(frac.max(axis=0) > 0.01):
                row[s.names[i]] = f"{frac[n, i]:.3f}"
            rows.append(row)
        return [
            (
                "Method",
                "Mass-balanced equilibrium at each point (Gibbs minimisation under the mass "
                "balances of the metal and ligand totals, solids at unit activity; Smith & Missen "
                "1982). Shares are of the metal total. A thermodynamic prediction: it says nothing "
                "about rates. Cyanide, ammonia and strong acids are hazardous: follow local codes, "
                "the applicable standards and licensed practice.",
            ),
            ("Summary", self.summary()),
            ("Share of the metal in each species", rows),
        ]


def compute_speciation(
    element,
    totals,
    *,
    potential_v=None,
    ph=None,
    ph_range=(0.0, 14.0),
    potential_range_v=(-1.0, 1.2),
    points=281,
    temperature_c=25.0,
    pressure_bar=None,
    ionic_strength=None,
    background=None,
    activity_model="davies",
    water_activity=1.0,
    reference="SHE",
    dataset="default",
    data_files=(),
    exclude=(),
    table=None,
):
    """Speciation of a metal and its ligands along pH or along the potential.

    Parameters
    ----------
    element : str
        The metal.
    totals : dict or sequence of (str, float)
        Totals [mol/kg] of the metal (default 1e-6) and ligands, e.g. ``{"N": 1.0}``.
    potential_v : float, optional
        Fixed potential [V vs ``reference``]: the sweep runs over pH.
    ph : float, optional
        Fixed pH: the sweep runs over the potential.
    ph_range : (float, float)
        pH range of a pH sweep.
    potential_range_v : (float, float)
        Potential range of a potential sweep [V vs ``reference``].
    points : int
        Number of points, 3 to 5001.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar]; default 1 bar, or the saturation pressure above 100 °C
        (an autoclave leach under an oxygen or steam overpressure gives it).
    ionic_strength, background : optional
        Background electrolyte (ionic strength [mol/kg] or salts); with
        either, activity coefficients follow each equilibrium's ionic strength.
    activity_model : str
        Activity-coefficient model.
    water_activity : float
        Activity of water [-], 0.05 to 1 (below 1 in brines and concentrated
        liquors): it shifts every equilibrium that takes up or gives off water,
        e.g. ``Cu²⁺ + H₂O = CuOH⁺ + H⁺``.
    reference : str
        Reference electrode.
    dataset : str
        Data set.
    data_files : sequence of path
        User species tables.
    exclude : sequence of str
        Species to leave out.
    table : SpeciesTable, optional
        Pre-loaded tables.

    Returns
    -------
    SpeciationResult

    Raises
    ------
    OptionError
        Neither or both of ``potential_v`` and ``ph``; unknown ligand.
    ConditionsError
        Totals, ranges or points out of range.

    References
    ----------
    Smith, W. R. & Missen, R. W. (1982). *Chemical Reaction Equilibrium
    Analysis*. Wiley.

    Examples
    --------
    >>> r = compute_speciation("Cu", {"Cu": 1e-3, "N": 1.0}, potential_v=0.3, points=21)
    >>> r.system.names[int(r.metal_fraction()[15].argmax())]  # at pH 10.5
    'Cu(NH3)4^2+'
    """
    from pourbaix.conditions import check_range, make_conditions
    from pourbaix.physics.components import build_system, parse_totals
    from pourbaix.solve.equilibrium import solve_at, solve_many
    from pourbaix.tables.species import load_species

    if (potential_v is None) == (ph is None):
        raise OptionError("give exactly one of potential_v (sweep over pH) or ph (sweep over E)")
    points = int(points)
    if not 3 <= points <= 5001:
        raise ConditionsError(f"points must be 3 to 5001, got {points}")
    metal_totals, families = parse_totals(totals, (element,))
    totals = {element: metal_totals.get(element, 1e-6), **{f.name: v for f, v in families}}
    axis = "ph" if potential_v is not None else "potential"
    if axis == "ph":
        lo, hi = check_range("pH range", ph_range)
        fixed = float(potential_v)
        window = dict(ph_range=(lo, hi), potential_range_v=(fixed - 1.0, fixed + 1.0))
    else:
        lo, hi = check_range("potential range", potential_range_v, " V")
        fixed = float(ph)
        window = dict(ph_range=(fixed - 1.0, fixed + 1.0), potential_range_v=(lo, hi))
    if not math.isfinite(fixed):
        raise ConditionsError(f"the fixed {'potential' if axis == 'ph' else 'pH'} must be finite")
    conditions = make_conditions(
        (element,),
        molality=totals[element],
        temperature_c=temperature_c,
        pressure_bar=pressure_bar,
        ionic_strength=ionic_strength,
        background=background,
        activity_model=activity_model,
        water_activity=water_activity,
        ligands={f.name: v for f, v in families} or None,
        reference=reference,
        dataset=dataset,
        data_files=data_files,
        **window,
    )
    if table is None:
        table = load_species(conditions.dataset, conditions.data_files)
    system = build_system(
        element,
        totals,
        table=table,
        temperature_c=conditions.temperature_c,
        pressure_bar=conditions.pressure_bar,
        water_activity=conditions.water_activity,
        exclude=exclude,
    )
    model = conditions.activity_model if conditions.ionic_strength > 0 else None
    notes = list(conditions.notes)
    specific = None
    if model == "sit" and background is not None:
        from pourbaix.physics.sit import system_medium_terms

        specific, missing = system_medium_terms(system, background)
        if missing:
            notes.append("SIT: no epsilon tabulated (taken as 0) for " + ", ".join(missing))
    if model == "pitzer":
        from pourbaix.physics.pitzer import system_note

        notes.append(system_note(system))
    x = np.linspace(lo, hi, points)
    amounts = np.zeros((points, len(system.names)))
    present = np.zeros((points, len(system.names)), dtype=bool)
    ionic = np.zeros(points)
    r = None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        if model is None:  # ideal solution: every point in one batch of Newton steps
            ph_all = x if axis == "ph" else np.full(points, fixed)
            e_all = np.full(points, fixed) if axis == "ph" else x
            for n, r in enumerate(solve_many(system, ph_all, conditions.to_she(ph_all, e_all))):
                amounts[n], present[n], ionic[n] = r.amounts, r.present, r.ionic_strength
        for n, v in enumerate(x if model is not None else ()):
            p, e = (v, fixed) if axis == "ph" else (fixed, v)
            r = solve_at(
                system,
                p,
                float(conditions.to_she(p, e)),
                activity_model=model,
                background_ionic_strength=conditions.ionic_strength,
                start=r,
                specific_log_gamma=specific,
                background=background if model == "pitzer" else None,
            )
            amounts[n], present[n], ionic[n] = r.amounts, r.present, r.ionic_strength
    if model is None:
        notes.append("ideal solution (activity = molality); give a background to apply a model")
    else:
        from pourbaix.physics.solution import model_validity

        warn_above, _, text = model_validity(model)
        if ionic.max() > warn_above:
            notes.append(
                f"ionic strength reaches {ionic.max():.3g} mol/kg, past the {model} model's range ({text})"
            )
    notes += [f.suppressed for f in (fam for fam, _ in families) if f.suppressed]
    return SpeciationResult(
        system=system,
        axis=axis,
        x=x,
        fixed=fixed,
        reference=conditions.reference,
        temperature_c=conditions.temperature_c,
        amounts=amounts,
        present=present,
        ionic_strength=ionic,
        warnings=tuple(notes),
        pressure_bar=conditions.pressure_bar,
        water_activity=conditions.water_activity,
    )
