"""Command-line pieces for mass balances: ``map --total ... --balance`` and ``speciation``."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from pourbaix.cli.files import save_figures
from pourbaix.cli.types import named_positive, positive_number
from pourbaix.errors import OptionError
from pourbaix.outputs import announce_written

__all__ = ["CAUTION", "add_balance_options", "compute_balanced_from_args", "register"]

CAUTION = (
    "Caution: cyanide releases toxic HCN gas below about pH 9-10 and ammonia solutions release "
    "NH3 vapour; leach and brine chemistries are for trained staff under local codes, the "
    "applicable standards and licensed practice. The results are thermodynamic predictions "
    "(equilibrium only) and say nothing about rates."
)


_total = named_positive("Cu=1e-3 or N=1", "total [mol/kg]")


def add_balance_options(parser):
    """Add ``--total`` and ``--balance`` to a map parser."""
    g = parser.add_argument_group("mass balance")
    g.add_argument(
        "--total",
        action="append",
        type=_total,
        default=[],
        metavar="NAME=M",
        help="total of the metal or of a ligand (N or NH3, CN, S, C, Cl) [mol/kg], with --balance; "
        "repeatable, e.g. --total Cu=1e-2 --total N=1",
    )
    g.add_argument(
        "--balance",
        action="store_true",
        help="conserve the totals (mass-balanced equilibrium at each point; boundaries traced as "
        "curves). Without --total the metal total is 1e-6 mol/kg",
    )


def _check_combination(a):
    if a.total and not getattr(a, "balance", False):
        raise OptionError("--total needs --balance (or give ligand activities with --ligand)")
    for opt, value in (
        ("--ligand", getattr(a, "ligand", None)),
        ("--activity", getattr(a, "activity", None)),
        ("--molality", getattr(a, "molality", None)),
        ("--ratio", getattr(a, "ratio", None)),
        ("--only", getattr(a, "only", None)),
        ("--solubility-lines", getattr(a, "solubility_lines", None)),
        ("--slider-temperature", getattr(a, "slider_temperature", None)),
        ("--slider-activity", getattr(a, "slider_activity", None)),
    ):
        if value:
            raise OptionError(
                f"{opt} does not go with --balance; give the metal and ligand totals with --total"
            )
    if getattr(a, "metastable", "exclude") == "only":
        raise OptionError("--metastable only does not go with --balance; use include or exclude")
    if len(a.element) != 1:
        raise OptionError("--balance maps one metal; give the ligands with --total")


def compute_balanced_from_args(a, kwargs):
    """A :class:`~pourbaix.maps.balanced.BalancedMap` from parsed map arguments."""
    from pourbaix.maps.balanced import compute_balanced_map

    _check_combination(a)
    keep = (
        "temperature_c",
        "pressure_bar",
        "ionic_strength",
        "background",
        "activity_model",
        "water_activity",
        "ph_range",
        "potential_range_v",
        "reference",
        "dataset",
        "data_files",
        "exclude",
        "metastable",
    )
    m = compute_balanced_map(a.element[0], tuple(a.total), **{k: kwargs[k] for k in keep})
    print(f"domain criterion: {m.criterion}")
    print(f"method: {m.method}")
    if {"CN", "NH3"} & set(m.totals):
        print(f"pourbaix: {CAUTION}", file=sys.stderr)
    return m


# ------------------------------------------------------------------ speciation command
def cmd_speciation(a):
    """Fractions or molalities of each species along pH (or E), with the mass balances."""
    from pourbaix.analyses.speciation import compute_speciation

    if (a.ph_at is None) == (a.potential_at is None):
        raise OptionError(
            "give exactly one of --potential E (a sweep over pH) or --at-ph X (a sweep over E)"
        )
    outs = [Path(o) for o in (a.out or [])]
    for o in outs:
        if o.suffix.lower() not in (".png", ".svg", ".pdf", ".json", ".csv"):
            raise OptionError(f"--out {o}: unknown file type; use .png .svg .pdf .json or .csv")
    from pourbaix.outputs import check_writable

    for o in outs + ([Path(a.report)] if a.report else []):
        check_writable(o)
    if len(a.element) != 1:
        raise OptionError("speciation takes one metal; give the ligands with --total")
    result = compute_speciation(
        a.element[0],
        tuple(a.total),
        potential_v=a.potential_at,
        ph=a.ph_at,
        ph_range=tuple(a.ph),
        potential_range_v=tuple(a.potential_range),
        points=a.points,
        temperature_c=a.temperature,
        pressure_bar=a.pressure,
        ionic_strength=a.ionic_strength,
        background=a.background,
        activity_model=a.activity_model,
        water_activity=a.water_activity,
        reference=a.reference,
        dataset=a.dataset,
        data_files=tuple(a.data),
        exclude=tuple(a.exclude),
    )
    for w in result.warnings:
        print(f"pourbaix: note: {w}", file=sys.stderr)
    for o in outs:
        kind = o.suffix.lower()
        if kind == ".json":
            result.to_json(o)
        elif kind == ".csv":
            result.to_csv(o)
    figures = [o for o in outs if o.suffix.lower() in (".png", ".svg", ".pdf")]
    axes = None
    if figures or a.report:
        from pourbaix.plot.speciation import draw_speciation

        axes = draw_speciation(result, molality=a.molality_axis)
    for o in outs:
        if o not in figures:
            announce_written(o)
    if figures:
        save_figures(axes[0].figure, figures)
    if a.report:
        from pourbaix.maps.balanced import compute_balanced_map
        from pourbaix.report.document import write_report

        # the report's map: the mass-balanced map of the same system around the sweep
        if result.axis == "ph":
            window = dict(
                ph_range=tuple(a.ph),
                potential_range_v=(a.potential_at - 1.0, a.potential_at + 1.0),
            )
        else:
            window = dict(
                ph_range=(a.ph_at - 2.0, a.ph_at + 2.0), potential_range_v=tuple(a.potential_range)
            )
        dmap = compute_balanced_map(
            a.element[0],
            tuple(a.total),
            temperature_c=a.temperature,
            pressure_bar=a.pressure,
            ionic_strength=a.ionic_strength,
            background=a.background,
            activity_model=a.activity_model,
            water_activity=a.water_activity,
            reference=a.reference,
            dataset=a.dataset,
            data_files=tuple(a.data),
            exclude=tuple(a.exclude),
            mesh=(16, 16),
            **window,
        )
        write_report(
            a.report,
            dmap,
            title=result.title,
            extra_sections=[*result.report_sections(), ("Caution", CAUTION)],
            figure=axes[0].figure,
        )
        announce_written(a.report)
    print(result.summary())
    return 0


def register(sub, add_conditions, map_kwargs):
    """Add the ``speciation`` command."""
    sp = sub.add_parser(
        "speciation",
        help="species fractions along pH or E, with the metal and ligand totals conserved",
        description=(
            "Solve the mass-balanced equilibrium along pH at a fixed potential (--potential E) or "
            "along the potential at a fixed pH (--at-ph X) and draw the share of the metal (and of "
            "the ligand) in each species, the solid phases present shaded, the free-ligand molality "
            "and the ligand bound by the metal."
        ),
        epilog="example: pourbaix speciation Cu --total Cu=1e-3 --total N=1 --potential 0.2 --out cu-spec.png\n\n"
        + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    sp.add_argument("element", nargs="+", help="the metal, e.g. Cu")
    sp.add_argument(
        "--total",
        action="append",
        type=_total,
        default=[],
        metavar="NAME=M",
        help="total of the metal (default 1e-6) or of a ligand (N or NH3, CN, S, C, Cl) [mol/kg]; repeatable",
    )
    sp.add_argument(
        "--potential",
        dest="potential_at",
        type=float,
        metavar="E",
        help="fixed potential [V vs --reference]: sweep over pH",
    )
    sp.add_argument(
        "--at-ph", dest="ph_at", type=float, metavar="X", help="fixed pH: sweep over the potential"
    )
    sp.add_argument(
        "--ph",
        nargs=2,
        type=float,
        default=(0.0, 14.0),
        metavar=("LO", "HI"),
        help="pH range of a pH sweep (default 0 14)",
    )
    sp.add_argument(
        "--potential-range",
        nargs=2,
        type=float,
        default=(-1.0, 1.2),
        metavar=("LO", "HI"),
        help="potential range of a potential sweep [V vs --reference] (default -1 1.2)",
    )
    sp.add_argument("--points", type=int, default=281, help="points along the sweep (default 281)")
    sp.add_argument(
        "--molality-axis", action="store_true", help="plot log molality instead of fractions"
    )
    sp.add_argument(
        "--reference", default="SHE", help="reference electrode (see `pourbaix references`)"
    )
    sp.add_argument(
        "--temperature", type=float, default=25.0, metavar="C", help="temperature [°C] (default 25)"
    )
    sp.add_argument(
        "--pressure",
        type=positive_number,
        metavar="BAR",
        help="pressure [bar], up to 5000 (default 1, or saturation above 100 °C)",
    )
    sp.add_argument(
        "--ionic-strength", type=float, metavar="I", help="background ionic strength [mol/kg]"
    )
    sp.add_argument(
        "--background", metavar="SALT=M,...", help="background electrolyte, e.g. NaCl=0.5"
    )
    sp.add_argument(
        "--activity-model",
        default="davies",
        help="activity model with a background (default davies)",
    )
    sp.add_argument(
        "--water-activity",
        type=positive_number,
        default=1.0,
        help="activity of water, 0.05 to 1 (below 1 for brines; noted below 0.5)",
    )
    sp.add_argument(
        "--exclude", nargs="+", default=[], metavar="SPECIES", help="species to leave out"
    )
    sp.add_argument("--dataset", default="default", help="data set (see `pourbaix datasets`)")
    sp.add_argument(
        "--data", action="append", default=[], metavar="FILE", help="user species table"
    )
    sp.add_argument(
        "--out",
        action="append",
        metavar="FILE",
        help="output (.png .svg .pdf .json .csv); repeatable",
    )
    sp.add_argument("--report", metavar="FILE", help="write a report (.html or .md)")
    sp.set_defaults(func=cmd_speciation)
