"""Typeset :math: roles and math directives to SVG at build time with matplotlib's mathtext.

The pages then need no script or font from the network (the site is built and read
offline). mathtext understands a subset of TeX: fractions, sub- and superscripts,
Greek letters, ``\\ln``, ``\\log``, ``\\sum``, ``\\sqrt``, ``\\left( \\right)``, ``\\mathrm``;
an expression it cannot parse is reported as a build warning naming the page.
"""

import hashlib
import html
import io
import posixpath
import re
from pathlib import Path

from docutils import nodes
from sphinx.util import logging

logger = logging.getLogger(__name__)

_INLINE_PT = 12.0  # [pt] inline formulas, close to the body text's x-height
_BLOCK_PT = 13.5  # [pt] displayed equations


def _render(latex, size_pt):
    """Return (svg text, depth [pt]) of one formula."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import mathtext, rc_context
    from matplotlib.font_manager import FontProperties

    buffer = io.BytesIO()
    with rc_context({"mathtext.fontset": "cm", "svg.fonttype": "path", "svg.hashsalt": "pourbaix"}):
        depth = mathtext.math_to_image(
            f"${latex}$", buffer, prop=FontProperties(size=size_pt), format="svg"
        )
    svg = buffer.getvalue().decode("utf-8")
    svg = re.sub(r"<metadata>.*?</metadata>", "", svg, flags=re.S)  # no date: same bytes each build
    svg = re.sub(r"<!-- Created with .*? -->", "", svg)
    return svg, depth


def _write(translator, latex, size_pt, node):
    """Render ``latex`` once into the output's image folder; return (url, depth) or None."""
    key = hashlib.sha1(f"{size_pt}|{latex}".encode()).hexdigest()[:16]
    name = f"math-{key}.svg"
    out = Path(translator.builder.outdir) / translator.builder.imagedir / "math"
    target = out / name
    depth = None
    cache = translator.builder.env.__dict__.setdefault("_pourbaix_math_depth", {})
    if target.exists() and key in cache:
        depth = cache[key]
    else:
        try:
            svg, depth = _render(latex, size_pt)
        except Exception as exc:  # mathtext's parse errors are plain ValueErrors
            logger.warning("cannot typeset %r: %s", latex, str(exc).splitlines()[0], location=node)
            return None
        out.mkdir(parents=True, exist_ok=True)
        target.write_text(svg, encoding="utf-8")
        cache[key] = depth
    return posixpath.join(translator.builder.imgpath, "math", name), depth


def visit_inline(translator, node):
    latex = node.astext().strip()
    made = _write(translator, latex, _INLINE_PT, node)
    if made is None:
        translator.body.append(f'<code class="math">{html.escape(latex)}</code>')
    else:
        url, depth = made
        translator.body.append(
            f'<img class="math" src="{url}" alt="{html.escape(latex, quote=True)}" '
            f'style="vertical-align: -{depth:.2f}pt"/>'
        )
    raise nodes.SkipNode


def visit_block(translator, node):
    # One equation per paragraph of the directive's content (as the math directive means it).
    parts = [p.strip() for p in re.split(r"\n\s*\n", node.astext()) if p.strip()]
    translator.body.append(translator.starttag(node, "div", CLASS="math-block"))
    for latex in parts:
        latex = " ".join(line.strip() for line in latex.splitlines())
        made = _write(translator, latex, _BLOCK_PT, node)
        if made is None:
            translator.body.append(f"<pre>{html.escape(latex)}</pre>")
        else:
            url, _ = made
            translator.body.append(
                f'<p class="math-line"><img class="math" src="{url}" '
                f'alt="{html.escape(latex, quote=True)}"/>'
            )
            if node.get("number"):
                translator.body.append(f'<span class="eqno">({node["number"]})</span>')
            translator.body.append("</p>")
    translator.body.append("</div>\n")
    raise nodes.SkipNode


def setup(app):
    app.add_html_math_renderer("pourbaix-svg", (visit_inline, None), (visit_block, None))
    return {"version": "1", "parallel_read_safe": True, "parallel_write_safe": False}
