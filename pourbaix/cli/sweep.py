"""The ``pourbaix sweep`` command: screen a grid of conditions, locally or on a Dask cluster."""

from __future__ import annotations

import sys

from pourbaix.outputs import announce_written

__all__ = ["register", "cmd_sweep"]

_HELP = (
    "Screen many maps at once: for every combination of the values given (temperature, activity "
    "or molality, ionic strength, ligand totals, ratio, systems) the stable species, state and "
    "margins at the points given, the passive width at a pH, the solubility at a point and the "
    "domain areas. Values are LO:HI:N (N values from LO to HI; log-spaced for activities, "
    "molalities and ligand totals) or A,B,C. Results go to NetCDF (.nc), Parquet (.parquet) or "
    "CSV (.csv); chunks are kept in OUT.parts/ as they finish, so running the same command "
    "again after an interruption resumes where it stopped. Each value is a thermodynamic "
    "prediction at equilibrium (no rates, film quality, pitting or crevices); decisions on "
    "cathodic protection, drinking water and leach chemistries belong to local codes, the "
    "applicable standards and licensed practice."
)


def _point(text):
    import argparse

    parts = text.replace(" ", "").split(",")
    try:
        ph, e = (float(v) for v in parts)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected PH,E such as 7,-0.5, got {text!r}") from None
    return ph, e


def _count(text):
    import argparse

    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if v < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1, got {text!r}")
    return v


def register(sub, add_conditions, map_kwargs):
    """Add the ``sweep`` command to the main parser.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommands.
    add_conditions : callable
        The shared condition options (not used: a sweep takes ranges of values).
    map_kwargs : callable
        Not used (see ``add_conditions``).
    """
    p = sub.add_parser(
        "sweep",
        help="screen a grid of conditions (temperature, activity, ligands, ratio ...)",
        description=_HELP,
        epilog="example: pourbaix sweep Fe --temperature 25:300:10 --activity 1e-8:1e-4:9 "
        "--at 7,-0.5 --out sweep.nc",
    )
    g = p.add_argument_group("grid")
    g.add_argument(
        "element", nargs="+", help="element symbol(s) of one system; several metals need --ratio"
    )
    g.add_argument(
        "--system",
        action="append",
        default=[],
        metavar="ELEMENTS",
        help='a further system, e.g. --system "Fe Cr" (repeatable; the systems are a dimension)',
    )
    g.add_argument(
        "--temperature", default="25", metavar="VALUES", help="temperatures [°C] (default 25)"
    )
    amount = g.add_mutually_exclusive_group()
    amount.add_argument(
        "--activity", metavar="VALUES", help="activities of dissolved species (default 1e-6)"
    )
    amount.add_argument(
        "--molality", metavar="VALUES", help="molalities of dissolved species [mol/kg]"
    )
    g.add_argument("--ionic-strength", metavar="VALUES", help="ionic strengths [mol/kg]")
    g.add_argument(
        "--ligand",
        action="append",
        default=[],
        metavar="NAME=VALUES",
        help="ligand total activities, e.g. S=1e-4:1e-2:3 (repeatable, each ligand once)",
    )
    g.add_argument(
        "--ratio",
        action="append",
        default=[],
        metavar="A:B:...",
        help="amounts of the metals, e.g. 66:17:11:3:3 (repeatable: the ratios are a dimension)",
    )
    q = p.add_argument_group("answers")
    q.add_argument(
        "--at",
        action="append",
        type=_point,
        default=[],
        metavar="PH,E",
        help="a point to probe: stable species, state, margins (repeatable) [E in V vs --reference]",
    )
    q.add_argument(
        "--passive-at", type=float, metavar="PH", help="passive width in potential at this pH"
    )
    q.add_argument("--solubility-at", type=_point, metavar="PH,E", help="solubility at this point")
    q.add_argument("--no-areas", action="store_true", help="leave out the domain areas")
    c = p.add_argument_group("conditions (the same at every grid point)")
    c.add_argument("--reference", default="SHE", help="reference electrode of all potentials")
    c.add_argument(
        "--ph", nargs=2, type=float, metavar=("LO", "HI"), default=(-2.0, 16.0), help="pH window"
    )
    c.add_argument(
        "--potential",
        nargs=2,
        type=float,
        metavar=("LO", "HI"),
        default=(-2.0, 2.0),
        help="potential window [V vs --reference]",
    )
    c.add_argument(
        "--activity-model", default="davies", help="davies, extended-debye-huckel or b-dot"
    )
    c.add_argument(
        "--pressure",
        type=float,
        metavar="BAR",
        help="pressure [bar] (default 1, or saturation above 100 °C; needed above 350 °C)",
    )
    c.add_argument(
        "--water-activity", type=float, default=1.0, help="activity of water (below 1 for brines)"
    )
    c.add_argument("--dataset", default="default", help="data set (see `pourbaix datasets`)")
    c.add_argument("--data", action="append", default=[], metavar="FILE", help="user species table")
    c.add_argument(
        "--metastable",
        choices=("exclude", "include", "only"),
        default="exclude",
        help="metastable solids: leave out (default), include, or use instead of stable ones",
    )
    r = p.add_argument_group("running")
    r.add_argument(
        "--out", required=True, metavar="FILE", help="result file: .nc, .parquet or .csv"
    )
    r.add_argument(
        "--scheduler", metavar="ADDRESS", help="run on the Dask cluster at this scheduler address"
    )
    r.add_argument("--workers", type=_count, help="local processes (default: the number of CPUs)")
    r.add_argument("--chunk-size", type=_count, metavar="N", help="grid points per chunk")
    r.add_argument("--restart", action="store_true", help="discard chunks saved by an earlier run")
    r.add_argument("--no-progress", action="store_true", help="no progress bar")
    p.set_defaults(func=cmd_sweep)


def cmd_sweep(a):
    """Run ``pourbaix sweep``.

    Parameters
    ----------
    a : argparse.Namespace
        Parsed arguments.

    Returns
    -------
    int
        Exit status.
    """
    from pourbaix.analyses.sweep import sweep
    from pourbaix.errors import OptionError

    ligands = {}
    for text in a.ligand:
        name, sep, values = text.partition("=")
        if not sep:
            raise OptionError(f"--ligand: expected NAME=VALUES such as S=1e-4:1e-2:3, got {text!r}")
        if name.strip() in ligands:
            raise OptionError(f"--ligand: {name.strip()} is given twice")
        ligands[name.strip()] = values
    systems = [" ".join(a.element), *a.system]
    try:
        ds = _sweep(a, sweep, systems, ligands)
    except KeyboardInterrupt:
        print(
            f"pourbaix: sweep interrupted; the chunks finished so far are kept in {a.out}.parts/ - "
            "run the same command again to resume",
            file=sys.stderr,
        )
        return 130
    dims = [d for d in ds.dims if d not in ("point", "domain")]
    size = 1
    for d in dims:
        size *= ds.sizes[d]
    shape = " x ".join(f"{d} {ds.sizes[d]}" for d in dims)
    reused = ds.attrs.get("chunks_reused", 0)
    note = (
        f"; {reused} of {ds.attrs.get('chunks')} chunks reused from an earlier run"
        if reused
        else ""
    )
    announce_written(a.out, detail=f": {size} maps ({shape}){note}")
    print(
        "A sweep holds thermodynamic predictions at equilibrium; see the caution in the file.",
        file=sys.stderr,
    )
    return 0


def _sweep(a, sweep, systems, ligands):
    return sweep(
        systems=systems,
        temperature_c=a.temperature,
        activity=a.activity,
        molality=a.molality,
        ionic_strength=a.ionic_strength,
        ligands=ligands or None,
        ratio=list(a.ratio) or None,
        at=a.at,
        passive_ph=a.passive_at,
        solubility_at=a.solubility_at,
        areas=not a.no_areas,
        out=a.out,
        restart=a.restart,
        scheduler=a.scheduler,
        workers=a.workers,
        chunk_size=a.chunk_size,
        progress=not a.no_progress,
        reference=a.reference,
        ph_range=tuple(a.ph),
        potential_range_v=tuple(a.potential),
        activity_model=a.activity_model,
        pressure_bar=a.pressure,
        water_activity=a.water_activity,
        dataset=a.dataset,
        data_files=tuple(a.data),
        metastable=a.metastable,
    )
