"""An installed (non-editable) copy finds its embedded tables (issue 2, "Done when").

Builds a wheel from a copy of the source tree, installs it with --no-deps into a
fresh virtual environment (which sees the system site-packages for numpy & co.),
then imports pourbaix from another working directory and loads the tables.
Without setuptools >= 68 and wheel in this interpreter, pip builds in an
isolated environment, which downloads them from the package index.
"""

from __future__ import annotations

import importlib.util
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

CHECK = """
import json
import pourbaix
import pourbaix.tables.species as d
t = d.load_species()
print(json.dumps({
    "file": pourbaix.__file__,
    "data_dir": str(d.data_dir()),
    "species": len(t.species),
    "unresolved": sorted({s.source for s in t.species if s.source not in t.sources}),
    "datasets": sorted(d.available_datasets()),
    "sets": {n: len(d.load_species(n).species) for n in d.available_datasets()},
}))
"""


def _run(cmd, cwd, env):
    proc = subprocess.run(cmd, cwd=cwd, env=env, capture_output=True, text=True, timeout=600)
    if proc.returncode != 0:
        pytest.fail(
            f"{' '.join(map(str, cmd))} failed:\n{proc.stdout[-3000:]}\n{proc.stderr[-3000:]}"
        )
    return proc.stdout


def _can_build_offline() -> bool:
    """setuptools >= 68 and wheel importable: then no build isolation (no download) is needed."""
    try:
        import setuptools
    except ImportError:
        return False
    major = int(setuptools.__version__.split(".")[0])
    return major >= 68 and importlib.util.find_spec("wheel") is not None


def test_installed_copy_finds_tables(tmp_path):
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME")}
    env["PIP_DISABLE_PIP_VERSION_CHECK"] = "1"

    # build from a copy so build/ and *.egg-info never land in the working tree
    src = tmp_path / "src"
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc", "build", "*.egg-info")
    src.mkdir()
    for name in ("pyproject.toml", "README.md", "LICENSE", "setup.cfg", "setup.py"):
        if (ROOT / name).is_file():
            shutil.copy2(ROOT / name, src / name)
    for name in ("pourbaix", "species_data"):
        shutil.copytree(ROOT / name, src / name, ignore=ignore)

    wheels = tmp_path / "wheels"
    build = [sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(wheels), str(src)]
    if _can_build_offline():
        build.insert(5, "--no-build-isolation")
    _run(build, tmp_path, env)
    (wheel,) = wheels.glob("pourbaix-*.whl")

    venv = tmp_path / "venv"
    _run(
        [sys.executable, "-m", "venv", "--system-site-packages", "--without-pip", str(venv)],
        tmp_path,
        env,
    )
    py = venv / ("Scripts/python.exe" if os.name == "nt" else "bin/python")
    _run(
        [
            sys.executable,
            "-m",
            "pip",
            "--python",
            str(py),
            "install",
            "-q",
            "--no-deps",
            "--no-index",
            str(wheel),
        ],
        tmp_path,
        env,
    )

    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    out = json.loads(_run([str(py), "-c", CHECK], elsewhere, env).strip().splitlines()[-1])

    venv_real = venv.resolve()
    assert Path(out["file"]).resolve().is_relative_to(venv_real), out["file"]
    assert not Path(out["file"]).resolve().is_relative_to(ROOT)
    assert Path(out["data_dir"]).resolve().is_relative_to(venv_real), out["data_dir"]
    assert out["species"] >= 1
    assert out["unresolved"] == []
    # every data set of the source tree is installed too
    source_sets = sorted(
        {"default"}
        | {
            p.name
            for p in (ROOT / "species_data" / "sets").iterdir()
            if p.is_dir() and any(p.glob("*.csv"))
        }
    )
    assert set(source_sets) <= set(out["datasets"])
    assert all(n >= 1 for n in out["sets"].values())
    assert (venv / "bin" / "pourbaix").exists() or os.name == "nt"  # the console command
