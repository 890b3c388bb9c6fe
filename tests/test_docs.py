"""The documentation: worked examples agree with the code, and the site builds with no warning.

The full build (gallery included) is CI's docs step; here, the method pages' examples run
and a quick build (no gallery) checks every docstring and generated page, so a docstring
that numpydoc or Sphinx cannot read fails the suite before it reaches CI.
"""

import importlib.util
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DOCS = ROOT / "docs"


def _examples_module():
    spec = importlib.util.spec_from_file_location(
        "pourbaix_docs_examples", DOCS / "_ext" / "pourbaix_docs" / "examples.py"
    )
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_worked_examples_agree_with_the_code():
    # The expected numbers on each method page name their published source beside them.
    failures = _examples_module().check_all(DOCS)
    assert failures == []


def test_a_wrong_number_on_a_page_is_caught(tmp_path):
    page = tmp_path / "methods" / "x.rst"
    page.parent.mkdir()
    page.write_text(">>> from pourbaix.physics.thermo import nernst_factor\n"
                    ">>> print(f'{nernst_factor(25.0):.5f}')\n0.05917\n", encoding="utf-8")
    (tmp_path / "format.rst").write_text("no examples\n", encoding="utf-8")
    failures = _examples_module().check_all(tmp_path)
    assert len(failures) == 1 and "0.05916" in failures[0]


def test_a_method_page_without_an_example_is_caught(tmp_path):
    (tmp_path / "methods").mkdir()
    (tmp_path / "methods" / "y.rst").write_text("Equations only\n", encoding="utf-8")
    (tmp_path / "format.rst").write_text("", encoding="utf-8")
    failures = _examples_module().check_all(tmp_path)
    assert len(failures) == 1 and "needs a worked example" in failures[0]


def test_numbers_match_to_the_written_precision():
    checker = _examples_module()._Checker()
    assert checker.check_output("0.05916\n", "0.059159\n", 0)
    assert checker.check_output("-0.000\n", "0.000\n", 0)
    assert not checker.check_output("0.0592\n", "0.0590\n", 0)
    assert not checker.check_output("12\n", "13\n", 0)


def test_site_builds_without_warnings(tmp_path):
    pytest.importorskip("sphinx")
    pytest.importorskip("numpydoc")
    # A copy of docs/ without its generated pages and build, so the checkout is left untouched.
    source = tmp_path / "docs"
    shutil.copytree(DOCS, source, ignore=shutil.ignore_patterns("_build", "generated", "__pycache__"))
    env = dict(os.environ, POURBAIX_DOCS_QUICK="1", MPLBACKEND="Agg",
               PYTHONPATH=os.pathsep.join([str(ROOT), os.environ.get("PYTHONPATH", "")]))
    result = subprocess.run(
        [sys.executable, "-m", "sphinx", "-W", "--keep-going", "-q", "-b", "html",
         "-d", str(tmp_path / "doctrees"), str(source), str(tmp_path / "html")],
        capture_output=True, text=True, env=env, cwd=tmp_path, timeout=600,
    )
    assert result.returncode == 0, result.stderr[-4000:]
    assert (tmp_path / "html" / "generated" / "cli.html").exists()
