"""Output files of the command groups: checked paths, ``--out``/``--json``/``--report``, writing.

Every command writes through these helpers, so that each one checks its paths
before computing, writes atomically (inside the command's
:func:`pourbaix.outputs.all_or_nothing` block) and says ``wrote FILE`` only
once the file is in place.
"""

from __future__ import annotations

import argparse
import csv
import io
from pathlib import Path

from pourbaix.errors import OptionError

__all__ = [
    "FIGURE_SUFFIXES",
    "add_outputs",
    "add_report_option",
    "checked_outputs",
    "csv_text",
    "report_target",
    "save_figures",
    "write_report_from_args",
    "write_text",
]

FIGURE_SUFFIXES = (".png", ".svg", ".pdf")


def checked_outputs(paths, allowed, option="--out"):
    """Paths of an output option, each with a known suffix and a writable folder.

    Parameters
    ----------
    paths : sequence of str or None
        The option's values.
    allowed : sequence of str
        Accepted suffixes, lower case with the dot.
    option : str
        The option's name, for the message.

    Returns
    -------
    list of Path

    Raises
    ------
    OptionError
        For an unknown suffix.
    ExportError
        If a folder is missing or not writable.
    """
    from pourbaix.outputs import check_writable

    outs = [Path(p) for p in paths or ()]
    for o in outs:
        if o.suffix.lower() not in allowed:
            raise OptionError(
                f"{option} {o}: unknown file type {o.suffix or '(none)'}; use one of {', '.join(allowed)}"
            )
        check_writable(o)
    return outs


def report_target(args):
    """Check ``--report`` before any computation: its folder exists and is writable.

    The extension (.html, .htm, .md) is already checked when the arguments are parsed.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed arguments.

    Returns
    -------
    Path or None
        The report's path, or None without ``--report``.

    Raises
    ------
    OptionError
        Naming ``--report`` when its folder cannot be written.
    """
    from pourbaix.errors import ExportError
    from pourbaix.outputs import check_writable

    if not getattr(args, "report", None):
        return None
    p = Path(args.report)
    try:
        check_writable(p)
    except ExportError as exc:
        raise OptionError(f"--report: {exc}") from None
    return p


def write_text(path, text, to_stderr=False):
    """Write a text file atomically and announce it.

    Parameters
    ----------
    path : Path
        Destination.
    text : str
        Content.
    to_stderr : bool
        Announce on standard error (standard output carries JSON).
    """
    from pourbaix.outputs import announce_written, atomic_write_text

    atomic_write_text(path, text)
    announce_written(path, to_stderr=to_stderr)


def save_figures(figure, paths, to_stderr=False):
    """Save one figure to every path (format from the suffix) and announce each.

    Parameters
    ----------
    figure : matplotlib Figure or Axes
        The figure.
    paths : sequence of Path
        Destinations (.png, .svg, .pdf).
    to_stderr : bool
        Announce on standard error.
    """
    from pourbaix.outputs import announce_written
    from pourbaix.plot.draw import save_figure

    for p in paths:
        save_figure(figure, p)
        announce_written(p, to_stderr=to_stderr)


def csv_text(rows):
    """CSV text of a list of dicts: the union of their keys, blanks for None, lists joined by " | ".

    Parameters
    ----------
    rows : list of dict

    Returns
    -------
    str
    """
    if not rows:
        return ""
    buf = io.StringIO()
    keys = list(rows[0])
    for r in rows[1:]:
        keys += [k for k in r if k not in keys]
    w = csv.DictWriter(buf, fieldnames=keys, lineterminator="\n")
    w.writeheader()
    for r in rows:
        w.writerow({k: _cell(r.get(k)) for k in keys})
    return buf.getvalue()


def _cell(value):
    if value is None:
        return ""
    if isinstance(value, list | tuple):
        return " | ".join(str(v) for v in value)
    return value


def _report_path(text):
    from pourbaix.report.document import report_kind

    try:
        report_kind(text)
    except OptionError as exc:
        raise argparse.ArgumentTypeError(str(exc)) from None
    return text


def add_report_option(parser):
    """Add ``--report FILE.html|.md`` to a command's parser.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser.

    Returns
    -------
    argparse.Action
    """
    return parser.add_argument(
        "--report",
        type=_report_path,
        metavar="FILE",
        help="write a report: FILE.html (one self-contained page, figures inline) or FILE.md (figures as "
        "sibling .svg files) with conditions, boundaries, species, sources, warnings and cautions",
    )


def add_outputs(parser, out_help=None):
    """The options a command's output ends with: ``--out`` (when given help), ``--json``, ``--report``.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser.
    out_help : str, optional
        Help of ``--out`` (repeatable); None leaves ``--out`` out.
    """
    if out_help is not None:
        parser.add_argument("--out", action="append", default=[], metavar="FILE", help=out_help)
    parser.add_argument("--json", action="store_true", help="print JSON")
    add_report_option(parser)


def write_report_from_args(args, dmap, extra=None, figure=None, to_stderr=False):
    """Write the report asked for with ``--report`` (does nothing without it).

    Parameters
    ----------
    args : argparse.Namespace
        Parsed arguments of a command that called :func:`add_report_option`;
        ``args.second_axis`` is honoured when present.
    dmap : DomainMap
        The command's map.
    extra : object or sequence, optional
        Analysis result(s) to add (see :func:`pourbaix.report.document.write_report`,
        ``analyses``).
    figure : matplotlib Figure or Axes, optional
        The figure the command already drew, used as the report's main figure;
        None draws the map.
    to_stderr : bool
        Announce the file on standard error (standard output carries JSON).

    Returns
    -------
    Path or None
        The report's path, or None when ``--report`` was not given.

    Raises
    ------
    ExportError
        If the report cannot be written.
    """
    path = getattr(args, "report", None)
    if not path:
        return None
    from pourbaix.outputs import announce_written
    from pourbaix.report.document import write_report

    if extra is None:
        analyses = []
    elif isinstance(extra, list | tuple):
        analyses = list(extra)
    else:
        analyses = [extra]
    out = write_report(
        path,
        dmap,
        analyses=analyses,
        figure=figure,
        second_reference=getattr(args, "second_axis", None),
    )
    announce_written(out, to_stderr=to_stderr)
    return out

