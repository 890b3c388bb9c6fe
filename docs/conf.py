"""Sphinx configuration for the pourbaix documentation (built offline, warnings as errors)."""

import os
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(HERE / "_ext"))
if (ROOT / "pourbaix" / "__init__.py").exists():
    sys.path.insert(0, str(ROOT))  # the checkout's own package, never an older installed copy
os.environ.setdefault("MPLBACKEND", "Agg")

import pourbaix  # noqa: E402

project = "pourbaix"
author = "the pourbaix contributors"
copyright = "2026, the pourbaix contributors"  # noqa: A001
version = release = pourbaix.__version__

extensions = [
    "sphinx.ext.autodoc",
    "numpydoc",
    "pourbaix_docs.mathsvg",
    "pourbaix_docs.generate",
    "pourbaix_docs.examples",
]

# Everything is local: no intersphinx, no remote fonts or scripts (math is typeset to SVG
# at build time by pourbaix_docs.mathsvg).
templates_path = []
exclude_patterns = ["_build", "gallery/*.py", "gallery/data", "generated/activity_models.rst"]
html_theme = "alabaster"
html_static_path = ["_static"]
html_css_files = ["pourbaix.css"]
html_title = f"pourbaix {release}"
html_theme_options = {
    "description": "Exact potential–pH maps with traceable data",
    "fixed_sidebar": True,
    "show_powered_by": False,
    "sidebar_width": "240px",
    "page_width": "1100px",
}
html_sidebars = {"**": ["about.html", "navigation.html", "searchbox.html"]}
html_show_sourcelink = False

nitpicky = True
# Type words in numpydoc parameter lines that are prose, not objects to link.
nitpick_ignore_regex = [
    ("py:class", r"(optional|default.*|array.*|array_like|float|int|str|bool|dict|list|tuple"
     r"|sequence.*|callable|path|Path|None|mapping|iterable|of|or|and|\(.*|.*\)|\{.*|.*\}"
     r"|.*\.\.\..*|[A-Z][A-Za-z]*|numpy\..*|shapely\..*|matplotlib\..*|pathlib\..*|os\..*"
     r"|collections\..*|typing\..*|.*\[.*|.*\])"),
    ("py:.*", r"(numpy|shapely|matplotlib|scipy|pathlib|argparse|typing|collections)\..*"),
]

autodoc_default_options = {"members": True, "member-order": "bysource"}
autodoc_typehints = "none"
numpydoc_show_class_members = False
numpydoc_xref_param_type = False
numpydoc_validation_checks = set()

pygments_style = "default"
# Option names such as --ph must stay two hyphens (no typographic dashes or quotes).
smartquotes = False
html_math_renderer = "pourbaix-svg"
