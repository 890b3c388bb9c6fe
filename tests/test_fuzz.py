"""Fuzzing the command line: any command line and any user table ends in exit 0 or 2.

Command lines are drawn by hypothesis from the real commands and options with
ordinary, absurd and malformed values (huge and tiny numbers, NaN, windows of
±100, unknown names, repeated ligands, very long and impossible file names)
and from user species tables and field files with good and bad rows. Every
run must end with exit status 0 or 2 and never a traceback; a run that fails
writes no file and leaves an existing file as it was.

Budget: ``max_examples`` below (a few seconds of CPU in CI); a maintainer
raises it with ``POURBAIX_PROPERTY_SCALE`` (see DEVELOPERS.md).
"""

import contextlib
import io
import os
import tempfile
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from pourbaix.cli.commands import main

PROPERTY_SCALE = int(os.environ.get("POURBAIX_PROPERTY_SCALE", "1"))

NUMBERS = st.sampled_from(
    ["1e-6", "0", "-1", "1e300", "1e-300", "nan", "inf", "-inf", "abc", "1,5", "7", "25", "-0.6"]
) | st.floats(allow_nan=True, allow_infinity=True).map(repr)
ELEMENTS = st.sampled_from(["Fe", "Cu", "Zn", "Xx", "Fe Cr", "H", "O", "Og", "fe", "Fe-Cu"])
LIGANDS = st.sampled_from(["S=1e-3", "S=1e300", "S=0", "Cl=0.1", "Br=1", "CN=1e-3", "S", "=1"])


def _option(name, values):
    return st.tuples(st.just(name), values).map(list)


def _window(name):
    return st.tuples(st.just(name), NUMBERS, NUMBERS).map(list)


CONDITION_OPTIONS = st.one_of(
    _option("--activity", NUMBERS),
    _option("--molality", NUMBERS),
    _window("--ph"),
    _window("--potential"),
    _option("--reference", st.sampled_from(["SCE", "RHE", "Cu/CuSO4", "XYZ", "ag/agcl", ""])),
    _option("--temperature", NUMBERS),
    _option("--pressure", NUMBERS),
    _option("--ionic-strength", NUMBERS),
    _option("--background", st.sampled_from(["NaCl=0.5", "KryptonCl=1", "NaCl=1e300", "x"])),
    _option("--activity-model", st.sampled_from(["davies", "b-dot", "sorcery", ""])),
    _option("--water-activity", NUMBERS),
    _option("--ligand", LIGANDS),
    _option("--ratio", st.sampled_from(["1:1", "3:1", "1e300:1", "0:1", "a:b", "1"])),
    _option("--exclude", st.sampled_from(["Fe2O3", "Qq2", "Cu^2+", "Fe^1000+"])),
    _option("--metastable", st.sampled_from(["include", "only", "sometimes"])),
    _option("--dataset", st.sampled_from(["default", "nosuch"])),
)

TABLE_ROWS = st.sampled_from(
    [
        "Fe^2+,aq,-78.9,-137.7,NBS82",
        "Fe^2+,aq,1e300,,NBS82",
        "Fe^1000+,aq,-1,,NBS82",
        "Fe(OH2,s,-1,,NBS82",
        "FeQ,s,-1,,NBS82",
        "Fe2O3,s,abc,87.4,NBS82",
        "Fe2O3,s,-742.2,87.4,NOSUCH",
        "Fe3O4,s,-1015.4,146.4,NBS82,extra",
        '"unclosed,s,-1,,NBS82',
        "Fe2O3,s,-742.2,-87.4,NBS82",
        "Fe2O3,s," + "9" * 5000 + ",,NBS82",
        "",
        "# a comment",
    ]
)
FIELD_ROWS = st.sampled_from(
    [
        "7.2,-0.65,SCE,V",
        "7.1,-650,SCE,mV",
        "7.0,-0.9,SCE,mV",
        "abc,-0.6,SCE,V",
        "7,-0.6,XYZ,V",
        "1e300,1e300,SHE,V",
        "7,nan,SCE,V",
        "7",
    ]
)


@st.composite
def command_lines(draw):
    """A command line (list of str) and the files it refers to (name -> text)."""
    files = {}
    command = draw(
        st.sampled_from(["map", "probe", "lines", "solubility", "field", "reading", "species"])
    )
    argv = [command, *draw(ELEMENTS).split()]
    if command != "species":
        for option in draw(st.lists(CONDITION_OPTIONS, max_size=4)):
            argv += option
    if draw(st.booleans()):
        files["user.csv"] = "\n".join(
            [
                "formula,phase,dgf_kj_mol,s_j_molk,source",
                *draw(st.lists(TABLE_ROWS, min_size=1, max_size=6)),
            ]
        )
        argv += ["--data", "user.csv"]
    if command == "probe" or command == "reading":
        argv += ["--ph", draw(NUMBERS), "--potential", draw(NUMBERS)]
    if command == "solubility":
        argv += draw(
            st.sampled_from(
                [["--potential", "0"], ["--along", "oxygen"], ["--potential", "0", "--step", "1e-300"]]
            )
        )
    if command == "field":
        files["field.csv"] = "\n".join(
            ["ph,potential_v,reference,unit", *draw(st.lists(FIELD_ROWS, max_size=4))]
        )
        argv += ["--readings", draw(st.sampled_from(["field.csv", "missing.csv"]))]
    if command in ("map", "solubility", "field"):
        for _ in range(draw(st.integers(0 if command != "map" else 1, 2))):
            name = draw(
                st.sampled_from(
                    [
                        "out.json",
                        "out.csv",
                        "old.json",  # exists before the run
                        "x" * 300 + ".json",
                        "missing/out.json",
                        "out.xls",
                        "out.svg",
                    ]
                )
            )
            if command == "solubility" and name.endswith(".svg"):
                name = "out.csv"
            argv += ["--out", name]
    if command == "map" and draw(st.booleans()):
        argv += ["--second-axis", draw(st.sampled_from(["SCE", "XYZ"]))]
    return argv, files


def _run(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(argv)
        except SystemExit as exc:  # argparse: usage errors (2) and --help (0)
            code = exc.code
    return code, out.getvalue(), err.getvalue()


@settings(max_examples=40 * PROPERTY_SCALE, deadline=None)
@given(command_lines())
def test_any_command_line_ends_in_0_or_2_without_a_trace(case):
    argv, files = case
    before = os.getcwd()
    with tempfile.TemporaryDirectory() as folder:
        os.chdir(folder)
        try:
            for name, text in files.items():
                Path(name).write_text(text, encoding="utf-8")
            Path("old.json").write_text("kept", encoding="utf-8")
            existing = set(os.listdir("."))
            code, out, err = _run(argv)  # an exception escaping here fails the test
            assert code in (0, 2), (argv, code, err)
            assert "Traceback" not in err
            if code == 2:
                assert err.strip(), "a failure must say why"
                assert set(os.listdir(".")) == existing, (argv, err)
                assert Path("old.json").read_text(encoding="utf-8") == "kept", (argv, err)
            assert not [n for n in os.listdir(".") if n.startswith(".pourbaix-")], argv
        finally:
            os.chdir(before)
