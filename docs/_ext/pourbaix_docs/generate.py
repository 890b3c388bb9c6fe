"""Pages written at build time from the code and the tables, so that they cannot drift.

- ``generated/cli.rst``: every command and option from ``pourbaix.cli.commands.build_parser``;
- ``generated/data/``: every element's species with values, sources and temperature
  routes, every data set, every source with its full citation, the reference electrodes;
- ``generated/api/``: one page per module of the package (autodoc + numpydoc);
- ``generated/gallery/``: each script in ``gallery/`` run, its figures saved and shown.

Nothing here is committed: ``docs/generated/`` is rebuilt on every build.
"""

import argparse
import contextlib
import io
import math
import os
import pkgutil
import runpy
import sys
import textwrap
import time
from collections import defaultdict
from pathlib import Path

from sphinx.util import logging

logger = logging.getLogger(__name__)

_NOT_ELEMENTS = {"H", "O"}
#: Set this environment variable to skip the gallery scripts and the worked examples (the test
#: suite's quick check of the docstrings and generated pages; the full build runs everything).
QUICK_ENV = "POURBAIX_DOCS_QUICK"  # every species has them; water gets its own page


def _write(path, text):
    """Write only when the content changed (Sphinx then re-reads only what moved)."""
    path.parent.mkdir(parents=True, exist_ok=True)
    if not path.exists() or path.read_text(encoding="utf-8") != text:
        path.write_text(text, encoding="utf-8")


def _title(text, char="="):
    return f"{text}\n{char * max(len(text), 3)}\n"


def _cell(text):
    """One cell of a list-table: no line breaks, pipes or stray markup."""
    text = " ".join(str(text).split())
    for ch in ("*", "`", "|", "_"):
        text = text.replace(ch, "\\" + ch)
    return text or "—"


def _cell_or_literal(value):
    text = str(value)
    if text.startswith("``") and text.endswith("``") and "``" not in text[2:-2]:
        return text  # an inline literal, kept as written
    return _cell(text)


def _list_table(header, rows, widths=None, title=""):
    out = [f".. list-table:: {title}".rstrip(), "   :header-rows: 1"]
    if widths:
        out.append("   :widths: " + " ".join(str(w) for w in widths))
    out.append("")
    for row in [header, *rows]:
        first = True
        for value in row:
            out.append(("   * - " if first else "     - ") + _cell_or_literal(value))
            first = False
    return "\n".join(out) + "\n"


# --------------------------------------------------------------------------- command reference


def _subcommands(parser):
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            helps = {a.dest: a.help for a in action._choices_actions}
            for name, sub in action.choices.items():
                yield name, helps.get(name, ""), sub


def _option_rows(parser):
    rows = []
    for action in parser._actions:
        if isinstance(action, argparse._HelpAction):
            continue
        names = ", ".join(action.option_strings) or action.dest
        if action.option_strings and action.nargs != 0:
            metavar = action.metavar or action.dest.upper()
            if isinstance(metavar, tuple):
                metavar = " ".join(metavar)
            names += f" {metavar}"
        extra = []
        if action.choices is not None:
            extra.append("choices: " + ", ".join(map(str, action.choices)))
        if action.required and action.option_strings:
            extra.append("required")
        said = "default" in (action.help or "")
        if action.default not in (None, False, argparse.SUPPRESS, []) and action.nargs != 0 and not said:
            default = action.default
            if isinstance(default, (list, tuple)):
                default = " ".join(map(str, default))
            extra.append(f"default: {default}")
        help_text = (action.help or "") % {"default": action.default, "prog": parser.prog} if action.help else ""
        rows.append((f"``{names}``", " ".join([help_text, *(f"({e})" for e in extra)]).strip()))
    return rows


def _help_text(parser):
    old = os.environ.get("COLUMNS")
    os.environ["COLUMNS"] = "84"
    try:
        return parser.format_help()
    finally:
        if old is None:
            del os.environ["COLUMNS"]
        else:
            os.environ["COLUMNS"] = old


def _literal(text):
    return "::\n\n" + textwrap.indent(text.rstrip() + "\n", "    ", lambda line: True) + "\n"


def write_cli(out):
    from pourbaix.cli.commands import build_parser

    parser = build_parser()
    parts = [
        ".. This page is generated from pourbaix.cli.commands.build_parser at build time.\n\n",
        _title("Command reference"),
        "\nEvery command, option and example below is read from the command line's own "
        "parser when the documentation is built, so this page and ``pourbaix COMMAND --help`` "
        "say the same.\n\n",
        _title("pourbaix", "-"),
        "\n",
        _literal(_help_text(parser)),
    ]
    for name, short, sub in _subcommands(parser):
        parts += [f".. _cli-{name}:\n\n", _title(f"pourbaix {name}", "-"), "\n"]
        if short:
            parts.append(f"*{_cell(short)}.*\n\n")
        if sub.description:
            parts.append(_cell(sub.description) + "\n\n")
        rows = _option_rows(sub)
        if rows:
            parts.append(_list_table(("argument", "meaning"), rows, widths=(30, 70)) + "\n")
        parts += ["Output of ``--help``:\n\n", _literal(_help_text(sub))]
    _write(out / "cli.rst", "".join(parts))


# --------------------------------------------------------------------------- data pages


def _fmt(value, digits=None):
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return ""
    if isinstance(value, float) and digits is not None:
        return f"{value:.{digits}f}"
    return f"{value:g}" if isinstance(value, float) else str(value)


def _route(sp):
    from pourbaix.physics.thermo import species_gibbs

    result = species_gibbs(sp, 100.0)
    limit = "no stated limit" if math.isinf(result.valid_to_c) else f"to {result.valid_to_c:g} °C"
    return f"{result.route} ({limit})"


def _elements_of(sp):
    return sorted(e for e in sp.formula.composition if e not in _NOT_ELEMENTS) or ["H2O"]


def write_data(out):
    from pourbaix.physics.electrodes import list_references
    from pourbaix.tables.species import available_datasets, load_species

    base = load_species("default")
    sets = available_datasets()
    others = {name: load_species(name) for name in sets if name != "default"}
    by_element = defaultdict(list)
    for sp in base.species:
        for element in _elements_of(sp):
            by_element[element].append(sp)
    alternatives = defaultdict(list)  # element -> (set, species) where the set's row differs
    base_rows = {(sp.name, sp.phase): sp for sp in base.species}
    for set_name, table in others.items():
        for sp in table.species:
            old = base_rows.get((sp.name, sp.phase))
            if old is None or old.dgf_kj_mol != sp.dgf_kj_mol or old.source != sp.source:
                for element in _elements_of(sp):
                    alternatives[element].append((set_name, sp, old))

    data = out / "data"
    index = [
        ".. This page is generated from species_data/ at build time.\n\n",
        _title("Data"),
        "\nThe species tables in ``species_data/`` are read when the documentation is built; "
        "these pages show every row as the program loads it, with its source and the route "
        "by which its Gibbs energy is carried to other temperatures (the route is the one "
        ":func:`pourbaix.physics.thermo.species_gibbs` takes at 100 °C; its stated limit "
        "follows in brackets). Values typed from a publication rather than read by a script "
        "say so in their note. See :doc:`/methods/temperature` for the routes.\n\n",
        ".. toctree::\n   :maxdepth: 1\n   :caption: Elements\n\n",
    ]
    for element in sorted(by_element, key=lambda e: (e == "H2O", e)):
        slug = "water" if element == "H2O" else element.lower()
        index.append(f"   elements/{slug}\n")
        _write(data / "elements" / f"{slug}.rst", _element_page(element, by_element[element],
                                                              alternatives.get(element, []), base))
    index.append("\n.. toctree::\n   :maxdepth: 1\n   :caption: Sources and sets\n\n")
    index += ["   sources\n", "   datasets\n", "   references\n"]
    _write(data / "index.rst", "".join(index))

    rows = []
    all_sources = dict(base.sources)
    for table in others.values():
        all_sources.update(table.sources)
    used = defaultdict(int)
    for table in [base, *others.values()]:
        for sp in table.species:
            used[sp.source] += 1
    for key in sorted(all_sources, key=str.lower):
        rows.append((key, all_sources[key], used.get(key, 0)))
    _write(data / "sources.rst", "".join([
        _title("Sources"),
        "\nEvery source key used by a row, with the full citation as the tables give it "
        "(``species_data/sources*.csv``), and how many rows in all data sets cite it.\n\n",
        _list_table(("key", "citation", "rows"), rows, widths=(12, 80, 8)),
    ]))

    set_rows = [(name, text, len(others[name].dataset_changes) if name in others else "base")
                for name, text in sets.items()]
    _write(data / "datasets.rst", "".join([
        _title("Data sets"),
        "\nA data set replaces or adds rows of the base tables; choose one with ``--dataset`` "
        "(command line) or ``dataset=`` (Python). The last column counts the base rows it "
        "replaces.\n\n",
        _list_table(("name", "description", "rows replaced"), set_rows, widths=(12, 76, 12)),
    ]))

    ref_rows = []
    for r in list_references():
        low, high = r["valid_range_c"]
        ref_rows.append((
            ", ".join([r["name"], *r.get("aliases", [])]),
            r["description"],
            "−k_T·pH (depends on pH)" if r["offset_v"] is None else f"{float(r['offset_v']):+.4f}",
            "" if r["dE_dT_v_per_k"] is None else f"{float(r['dE_dT_v_per_k']) * 1000:+.3f}",
            f"{low:g}–{high:g} °C; {r['temperature_model']}",
            r["source"],
        ))
    _write(data / "references.rst", "".join([
        _title("Reference electrodes"),
        "\nPotentials are computed against the SHE and shown against any of these. "
        "E(vs SHE) = E(vs reference) + offset. Read from "
        ":func:`pourbaix.physics.electrodes.list_references`; see :doc:`/methods/nernst`.\n\n",
        _list_table(("name", "electrode", "offset at 25 °C [V vs SHE]", "dE/dT [mV/K]",
                     "temperature", "source"), ref_rows, widths=(12, 22, 10, 8, 18, 30)),
    ]))


def _element_page(element, species, alternatives, table):
    title = "Water" if element == "H2O" else f"{element}"
    rows = []
    for sp in species:
        rows.append((
            sp.name + (" (metastable)" if sp.metastable else ""),
            sp.phase,
            _fmt(sp.dgf_kj_mol, 3)
            + (f" (u {sp.dgf_unc_kj_mol:g})" if sp.dgf_unc_kj_mol is not None else ""),
            _fmt(sp.dhf_kj_mol, 3),
            _fmt(sp.s_j_molk, 2),
            _fmt(sp.cp_j_molk, 2) or ("Maier–Kelley" if sp.mk_a_j_molk is not None else ""),
            _route(sp),
            sp.source,
            sp.note,
        ))
    parts = [
        ".. This page is generated from species_data/ at build time.\n\n",
        _title(title),
        f"\n{len(species)} species in the base tables (data set ``default``). "
        "ΔfG° and ΔfH° in kJ/mol, S° and Cp° in J/(mol K), at 298.15 K and 1 bar "
        "(u: the standard uncertainty of ΔfG° where the row's source states one); "
        "source keys are cited in full on :doc:`../sources`.\n\n",
        _list_table(("species", "phase", "ΔfG°", "ΔfH°", "S°", "Cp°", "route to T", "source", "note"),
                    rows, widths=(12, 5, 8, 8, 7, 7, 14, 8, 31)),
    ]
    mk = [sp for sp in species if sp.mk_a_j_molk is not None]
    if mk:
        parts += ["\nMaier–Kelley heat capacities, Cp = a + bT + c/T² [J/(mol K)]:\n\n",
                  _list_table(("species", "a", "b", "c", "T max [K]"),
                              [(sp.name, _fmt(sp.mk_a_j_molk), _fmt(sp.mk_b_j_molk2),
                                _fmt(sp.mk_c_jk_mol), _fmt(sp.mk_tmax_k)) for sp in mk])]
    if alternatives:
        parts += ["\n", _title("Rows other data sets change", "-"), "\n",
                  _list_table(("data set", "species", "ΔfG° there", "ΔfG° in default", "source", "note"),
                              [(s, sp.name, _fmt(sp.dgf_kj_mol, 3),
                                _fmt(old.dgf_kj_mol, 3) if old else "(added)", sp.source, sp.note)
                               for s, sp, old in alternatives], widths=(8, 12, 10, 10, 10, 50))]
    used = sorted({sp.source for sp in species})
    parts += ["\n", _title("Sources on this page", "-"), "\n"]
    parts += [f"- **{_cell(key)}**: {_cell(table.sources.get(key, key))}\n" for key in used]
    return "".join(parts)


# --------------------------------------------------------------------------- activity models


def write_activity_models(out):
    """The activity models' limits and sources, for methods/activity.rst to include."""
    from pourbaix.physics.solution import ACTIVITY_MODELS

    rows = [(m.name, f"{m.warn_above:g}", f"{m.refuse_above:g}", m.text, m.reference)
            for m in ACTIVITY_MODELS.values()]
    _write(out / "activity_models.rst", _list_table(
        ("model", "warns above [mol/kg]", "refuses above [mol/kg]", "where it holds", "source"),
        rows, widths=(10, 9, 9, 44, 28)))


# --------------------------------------------------------------------------- API pages


def write_api(out):
    import pourbaix

    names = ["pourbaix"]
    for info in pkgutil.walk_packages(pourbaix.__path__, "pourbaix."):
        leaf = info.name.rsplit(".", 1)[-1]
        if leaf.startswith("_") or info.name.startswith("pourbaix.species_data"):
            continue
        names.append(info.name)
    names.sort()
    api = out / "api"
    index = [
        ".. This page is generated from the package at build time.\n\n",
        _title("API reference"),
        "\nOne page per module, generated from the docstrings (numpy style). Potentials are "
        "in volts against the reference named in each function, energies in kJ/mol, "
        "temperatures in °C unless the name says otherwise.\n\n",
        ".. toctree::\n   :maxdepth: 1\n\n",
    ]
    packages = {info.name for info in pkgutil.walk_packages(pourbaix.__path__, "pourbaix.")
                if info.ispkg} | {"pourbaix"}
    for name in names:
        index.append(f"   {name}\n")
        if name in packages:
            # a package page: its docstring and its modules (their members are on their own
            # pages; the package's lazy re-exports would describe each object twice)
            inside = [n for n in names if n.startswith(name + ".") and n.count(".") == name.count(".") + 1]
            body = f".. automodule:: {name}\n   :no-members:\n\n"
            if inside:
                body += "Modules: " + ", ".join(f":doc:`{n}`" for n in inside) + ".\n"
        else:
            body = f".. automodule:: {name}\n   :members:\n   :undoc-members:\n\n"
        _write(api / f"{name}.rst", "".join([_title(f"``{name}``"), "\n", body]))
    _write(api / "index.rst", "".join(index))


# --------------------------------------------------------------------------- gallery


def _split_script(text):
    """(docstring, code) of a gallery script."""
    import ast

    tree = ast.parse(text)
    doc = ast.get_docstring(tree, clean=True) or ""
    body = tree.body
    start = body[1].lineno if doc and len(body) > 1 else (1 if not doc else len(text.splitlines()) + 1)
    code = "\n".join(text.splitlines()[start - 1:]).strip("\n")
    return doc, code


def _run_script(path, images, stem):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.figure
    import matplotlib.pyplot as plt

    plt.close("all")
    stdout = io.StringIO()
    old_cwd = os.getcwd()
    os.chdir(path.parent)
    start = time.perf_counter()
    try:
        with contextlib.redirect_stdout(stdout):
            namespace = runpy.run_path(str(path), run_name="__main__")
        # figures made through pyplot, then any Figure or Axes the script keeps in a variable
        # (some drawing functions make a bare matplotlib Figure, outside pyplot)
        figures = [plt.figure(number) for number in plt.get_fignums()]
        for value in namespace.values():
            fig = value if isinstance(value, matplotlib.figure.Figure) else getattr(value, "figure", None)
            if isinstance(fig, matplotlib.figure.Figure) and fig not in figures:
                figures.append(fig)
        saved = []
        for k, fig in enumerate(figures, 1):
            name = f"{stem}_{k}.png"
            images.mkdir(parents=True, exist_ok=True)
            fig.savefig(images / name, dpi=110, facecolor="white", bbox_inches="tight", pad_inches=0.12)
            saved.append(name)
    finally:
        os.chdir(old_cwd)
        plt.close("all")
    return saved, stdout.getvalue(), time.perf_counter() - start


def write_gallery(source_dir, out):
    scripts = sorted((source_dir / "gallery").glob("plot_*.py"))
    gallery = out / "gallery"
    images = gallery / "images"
    cards = []
    timings = []
    for script in scripts:
        stem = script.stem
        text = script.read_text(encoding="utf-8")
        doc, code = _split_script(text)
        if not doc:
            logger.warning("gallery script %s has no docstring (title and story)", script.name)
            continue
        try:
            saved, printed, seconds = _run_script(script, images, stem)
        except Exception as exc:  # any failure of a worked example fails the build
            logger.warning("gallery script %s failed: %s: %s", script.name, type(exc).__name__, exc)
            continue
        timings.append((script.name, seconds))
        if not saved:
            logger.warning("gallery script %s drew no figure", script.name)
        title = doc.splitlines()[0].strip()
        parts = [f".. This page is generated from gallery/{script.name} at build time.\n\n",
                 f".. _gallery-{stem}:\n\n", doc, "\n\n"]
        for name in saved:
            parts.append(f".. image:: images/{name}\n   :alt: {title}\n   :width: 100%\n\n")
        if printed.strip():
            parts += ["The script prints:\n\n", _literal(printed)]
        parts += [f"The script (``docs/gallery/{script.name}``):\n\n",
                  ".. code-block:: python\n\n", textwrap.indent(code + "\n", "    ",
                                                                 lambda line: True), "\n"]
        _write(gallery / f"{stem}.rst", "".join(parts))
        cards.append((stem, title, saved[0] if saved else None))
    index = [
        ".. This page is generated from docs/gallery/ at build time.\n\n",
        _title("Gallery"),
        "\nWorked maps, each a scenario of our own, each a short script you can copy. "
        "The documentation build runs every script and shows the figures it draws, "
        "so each picture is what the code on this version produces. A map is a "
        "thermodynamic prediction at equilibrium; where the work can hurt someone "
        "the example says so and defers to local codes, the applicable standards and "
        "licensed practice.\n\n",
        ".. toctree::\n   :hidden:\n\n",
        *[f"   {stem}\n" for stem, _, _ in cards],
        "\n.. list-table::\n   :class: gallery-grid\n\n",
    ]
    per_row = 3
    padded = cards + [None] * (-len(cards) % per_row)
    for i in range(0, len(padded), per_row):
        first = True
        for card in padded[i:i + per_row]:
            lead = "   * - " if first else "     - "
            first = False
            if card is None:
                index.append(lead + "\n")
                continue
            stem, title, image = card
            picture = (f".. image:: images/{image}\n          :target: {stem}.html\n"
                       f"          :alt: {title}\n\n       ") if image else ""
            index.append(f"{lead}{picture}:doc:`{stem}`\n")
    _write(gallery / "index.rst", "".join(index))
    for name, seconds in timings:
        logger.info("gallery: %s ran in %.1f s", name, seconds)


# --------------------------------------------------------------------------- hook


def generate(app):
    source = Path(app.srcdir)
    out = source / "generated"
    sys.path.insert(0, str(source.parent))
    started = time.perf_counter()
    write_cli(out)
    write_data(out)
    write_activity_models(out)
    write_api(out)
    if os.environ.get(QUICK_ENV):
        _write(out / "gallery" / "index.rst", _title("Gallery") + "\n(Not run in a quick build.)\n")
    else:
        write_gallery(source, out)
    logger.info("pourbaix_docs: generated pages in %.1f s", time.perf_counter() - started)


def setup(app):
    app.connect("builder-inited", generate)
    return {"version": "1", "parallel_read_safe": True, "parallel_write_safe": True}
