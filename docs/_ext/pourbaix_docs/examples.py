"""Run the worked examples of the method pages (and the export-format page) during the build.

Every ``>>>`` example in ``methods/*.rst`` is executed with :mod:`doctest` (a number
matches when it agrees to the decimals the page writes, as pytest's ``NUMBER`` option
does for the test suite's doctests) when the
documentation is built; a result that differs, an example that raises, or a method
page without a worked example is a build warning, so a build with ``-W`` fails.
The same check runs outside Sphinx: ``python docs/_ext/pourbaix_docs/examples.py``.
"""

import doctest
import os
import re
import sys
from pathlib import Path

OPTIONS = doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE
_NUMBER = re.compile(r"[+-]?(?:\d+\.\d*|\.\d+|\d+)(?:[eE][+-]?\d+)?")


class _Checker(doctest.OutputChecker):
    """Numbers with a decimal point match to the precision the page writes them with."""

    def check_output(self, want, got, optionflags):
        if super().check_output(want, got, optionflags):
            return True
        wants, gots = _NUMBER.findall(want), _NUMBER.findall(got)
        if len(wants) != len(gots) or _NUMBER.sub("#", want).split() != _NUMBER.sub("#", got).split():
            return False
        for w, g in zip(wants, gots, strict=True):
            mantissa = w.lower().split("e")[0]
            if "." not in mantissa:
                if float(w) != float(g):
                    return False
                continue
            decimals = len(mantissa.split(".")[1])
            exponent = int(w.lower().split("e")[1]) if "e" in w.lower() else 0
            if abs(float(w) - float(g)) > 0.5 * 10.0 ** (exponent - decimals) * (1 + 1e-9):
                return False
        return True


def check_page(path):
    """Run one page's examples; return (number of examples, list of failure texts)."""
    text = Path(path).read_text(encoding="utf-8")
    parser = doctest.DocTestParser()
    test = parser.get_doctest(text, {"__name__": "__docs__"}, Path(path).name, str(path), 0)
    report = []

    class _Runner(doctest.DocTestRunner):
        def report_failure(self, out, test, example, got):
            report.append(
                f"{path}:{example.lineno + 1}: {example.source.strip()!r} gave "
                f"{got.strip()!r}, the page says {example.want.strip()!r}"
            )

        def report_unexpected_exception(self, out, test, example, exc_info):
            report.append(
                f"{path}:{example.lineno + 1}: {example.source.strip()!r} raised "
                f"{exc_info[0].__name__}: {exc_info[1]}"
            )

    runner = _Runner(checker=_Checker(), optionflags=OPTIONS, verbose=False)
    runner.run(test, out=lambda s: None)
    return len(test.examples), report


#: Pages outside ``methods/`` whose examples are checked too.
OTHER_PAGES = ("format.rst",)


def check_all(source_dir):
    """Check every method page and :data:`OTHER_PAGES`; return the failures (empty when all pass)."""
    source_dir = Path(source_dir)
    failures = []
    for page in sorted((source_dir / "methods").glob("*.rst")):
        if page.name == "index.rst":
            continue
        count, report = check_page(page)
        if count == 0:
            failures.append(f"{page}: a method page needs a worked example (>>> lines)")
        failures += report
    for name in OTHER_PAGES:
        failures += check_page(source_dir / name)[1]
    return failures


def _on_builder_inited(app):
    from sphinx.util import logging

    logger = logging.getLogger(__name__)
    if os.environ.get("POURBAIX_DOCS_QUICK"):
        return  # the quick build of the test suite; tests/test_docs.py runs the examples itself
    os.environ.setdefault("MPLBACKEND", "Agg")
    for text in check_all(app.srcdir):
        logger.warning("worked example: %s", text)


def setup(app):
    app.connect("builder-inited", _on_builder_inited)
    return {"version": "1", "parallel_read_safe": True, "parallel_write_safe": True}


if __name__ == "__main__":
    here = Path(__file__).resolve().parents[2]
    sys.path.insert(0, str(here.parent))
    problems = check_all(here)
    print("\n".join(problems) or "all worked examples agree")
    sys.exit(1 if problems else 0)
