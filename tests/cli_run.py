"""Running the command line inside a test: exit code, standard output and standard error."""

from pourbaix.cli.commands import main

__all__ = ["one_error_line", "run"]


def run(capsys, *args):
    """Run ``pourbaix ARGS`` in this process and return (exit code, stdout, stderr).

    Parameters
    ----------
    capsys : pytest.CaptureFixture
        pytest's capture of the standard streams.
    *args : object
        The command line (each turned into a string).

    Returns
    -------
    tuple of (int, str, str)
    """
    try:
        code = main([str(a) for a in args])
    except SystemExit as exc:  # argparse usage errors (2) and --help (0)
        code = exc.code
    out, err = capsys.readouterr()
    return code, out, err


def one_error_line(err):
    """Whether standard error holds exactly one ``pourbaix: error:`` line."""
    return len([ln for ln in err.splitlines() if ln.startswith("pourbaix: error:")]) == 1
