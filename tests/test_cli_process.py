"""The ``pourbaix`` program as a process of its own (pourbaix.cli.process).

Its start-up settings must not change what it writes, and its quick exit
must lose nothing: output, exit status, exit handlers. Each check runs a
fresh interpreter, since the settings act on imports.
"""

import os
import subprocess
import sys
import textwrap
from pathlib import Path

from cli_run import run

REPO = Path(__file__).resolve().parents[1]


def _interpreter(args, tmp_path, env=None):
    """Run ``python ARGS`` with this checkout importable, in ``tmp_path``; the CompletedProcess.

    ``env`` adds to the environment; a value None removes the variable.
    """
    full_env = {**os.environ, **(env or {})}
    full_env = {k: v for k, v in full_env.items() if v is not None}
    full_env["PYTHONPATH"] = str(REPO) + os.pathsep + full_env.get("PYTHONPATH", "")
    return subprocess.run(
        [sys.executable, *args],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        env=full_env,
        check=False,
    )


def _python(code, tmp_path, env=None):
    """Run ``code`` in a fresh interpreter (see :func:`_interpreter`)."""
    return _interpreter(["-c", textwrap.dedent(code)], tmp_path, env)


def _program(args, tmp_path):
    """Run ``python -m pourbaix.cli ARGS`` (what the console script runs) in ``tmp_path``."""
    return _interpreter(["-m", "pourbaix.cli", *args], tmp_path)


def test_the_program_draws_the_same_figure_as_main_in_process(tmp_path, capsys):
    # the lean start (matplotlib without its setter docstrings) changes no pixel and no byte;
    # the program's one visible choice is unhinted text
    import matplotlib

    res = _program(["map", "Cu", "--reading", "--second-axis", "SCE", "--out", "lean.png"], tmp_path)
    assert res.returncode == 0, res.stderr
    with matplotlib.rc_context({"text.hinting": "none"}):
        code, out, _ = run(
            capsys, "map", "Cu", "--reading", "--second-axis", "SCE", "--out", tmp_path / "plain.png"
        )
    assert code == 0
    assert (tmp_path / "lean.png").read_bytes() == (tmp_path / "plain.png").read_bytes()
    # and all of standard output arrives through a pipe before the quick exit
    assert res.stdout.splitlines() == out.replace(str(tmp_path / "plain.png"), "lean.png").splitlines()
    lines = res.stdout.splitlines()
    assert any(" domains: " in ln for ln in lines)
    assert lines[-1] == "wrote lean.png"  # said last, once the file is in place


def test_the_program_keeps_its_exit_status_and_error_line(tmp_path):
    res = _program(["map", "Fe", "--ratio", "1:2", "--out", "x.png"], tmp_path)
    assert res.returncode == 2
    assert res.stderr.count("pourbaix: error:") == 1
    assert not (tmp_path / "x.png").exists()
    usage = _program(["map", "--no-such-option"], tmp_path)  # argparse's own exit
    assert usage.returncode == 2
    assert "usage:" in usage.stderr


def test_lean_matplotlib_keeps_set_working_without_its_docstring(tmp_path):
    res = _python(
        """
        from pourbaix.cli.process import prepare_process
        prepare_process()
        from matplotlib.lines import Line2D
        from matplotlib.text import Text
        line = Line2D([0, 1], [0, 1])
        line.set(color="red", linewidth=2.5)
        assert line.get_color() == "red" and line.get_linewidth() == 2.5
        Text(0, 0, "x").set(fontsize=7)
        assert Line2D.set.__doc__ is None, "setter docstrings were built"
        print("ok")
        """,
        tmp_path,
    )
    assert res.returncode == 0, res.stderr
    assert res.stdout.strip() == "ok"
    # without the lean start, matplotlib documents its setters as usual
    plain = _python(
        "from matplotlib.lines import Line2D; assert 'linewidth' in Line2D.set.__doc__", tmp_path
    )
    assert plain.returncode == 0, plain.stderr


def test_one_blas_thread_unless_the_user_chose(tmp_path):
    code = """
        import os
        from pourbaix.cli.process import prepare_process
        prepare_process()
        print(os.environ.get("OPENBLAS_NUM_THREADS"), os.environ.get("OMP_NUM_THREADS"))
        """
    unset = {k: None for k in os.environ if k.endswith("_NUM_THREADS")}
    assert _python(code, tmp_path, env=unset).stdout.split() == ["1", "None"]
    chosen = _python(code, tmp_path, env={**unset, "OMP_NUM_THREADS": "2"})
    assert chosen.stdout.split() == ["None", "2"]  # the user's choice stands


def test_the_quick_exit_runs_the_exit_handlers_and_keeps_the_status(tmp_path):
    res = _python(
        """
        import atexit, tempfile, pathlib, sys
        from pourbaix.cli.process import finish_process
        folder = tempfile.TemporaryDirectory()          # removed by its exit handler
        pathlib.Path("folder.txt").write_text(folder.name)
        atexit.register(lambda: pathlib.Path("handler-ran").write_text("yes"))
        sys.stdout.write("no newline at the end")        # still buffered
        finish_process(3)
        raise SystemExit("finish_process returned")
        """,
        tmp_path,
    )
    assert res.returncode == 3, res.stderr
    assert res.stdout == "no newline at the end"
    assert (tmp_path / "handler-ran").read_text() == "yes"
    assert not Path((tmp_path / "folder.txt").read_text()).exists()


def test_the_quick_exit_waits_for_a_running_thread():
    import threading

    from pourbaix.cli.process import finish_process

    go = threading.Event()
    worker = threading.Thread(target=go.wait)
    worker.start()
    try:
        # another thread alive (a Dask client, a pool): the interpreter ends as usual
        assert finish_process(5) == 5
    finally:
        go.set()
        worker.join()


def test_text_is_unhinted_unless_the_user_chose_a_hinting(tmp_path):
    code = """
        from pourbaix.cli.process import prepare_process
        prepare_process()
        import matplotlib
        print(matplotlib.rcParams["text.hinting"])
        """
    # (a configuration folder of its own: no matplotlibrc of the machine's user counts)
    own = {"MATPLOTLIBRC": None, "MPLCONFIGDIR": str(tmp_path / "config")}
    assert _python(code, tmp_path, env=own).stdout.strip() == "none"
    rc = tmp_path / "matplotlibrc"
    rc.write_text("text.hinting: native\n", encoding="utf-8")
    chosen = _python(code, tmp_path, env={"MATPLOTLIBRC": str(rc)})
    assert chosen.stdout.strip() == "native", chosen.stderr


def test_unhinted_text_widths_scale_with_the_dpi():
    # what lets labels placed at one dpi fit when drawn at another (pourbaix.cli.process)
    import matplotlib
    from matplotlib.backends.backend_agg import RendererAgg
    from matplotlib.font_manager import FontProperties

    texts = ("Fe₂O₃ + Cr(OH)₄⁻ + Ni(OH)₃⁻ + MoO₄²⁻ + Mn₃O₄", "E / V vs SHE", "immunity")
    with matplotlib.rc_context({"text.hinting": "none"}):
        for size in (7.0, 8.5, 10.0):
            prop = FontProperties(size=size)
            for text in texts:
                w100 = RendererAgg(10, 10, 100).get_text_width_height_descent(text, prop, False)[0]
                w200 = RendererAgg(10, 10, 200).get_text_width_height_descent(text, prop, False)[0]
                assert abs(w200 / (2 * w100) - 1) < 1e-3, (text, size)
