"""Option types of the command line: NAME=VALUE pairs and ratios, read once for every command."""

import pytest
from cli_run import run

from pourbaix.cli.commands import main


@pytest.mark.parametrize(
    "value, words",
    [
        ("S1e-3", "expected NAME=VALUE such as S=1e-3"),
        ("=1e-3", "no name before '='"),
        ("S=abc", "'S': activity 'abc' is not a number"),
        ("S=0", "'S': activity must be > 0"),
        ("S=nan", "'S': activity must be > 0"),
        ("S=-1", "'S': activity must be > 0"),
    ],
)
def test_a_bad_ligand_names_the_option_and_the_fault(capsys, value, words):
    with pytest.raises(SystemExit) as exc:
        main(["map", "Cu", "--ligand", value])
    err = capsys.readouterr().err
    assert exc.value.code == 2 and "--ligand" in err and words in err
    assert "Traceback" not in err


def test_species_values_split_at_the_last_equals():
    # cell's --species-activity splits at the last '=' (NAME=VALUE with the value last)
    from pourbaix.cli.types import named_positive

    read = named_positive("Zn2+=0.01", "value", last_equals=True)
    assert read("Zn2+=0.01") == ("Zn2+", 0.01)
    assert read(" Cu+2 = 1e-3") == ("Cu+2", 1e-3)


@pytest.mark.parametrize("value", ["70:19:x", "70:0:11", "70:-1:11", "70:inf:11"])
def test_a_bad_ratio_is_refused(capsys, value):
    with pytest.raises(SystemExit) as exc:
        main(["map", "Fe", "Cr", "Ni", "--ratio", value])
    err = capsys.readouterr().err
    assert exc.value.code == 2 and "--ratio" in err


def test_a_ratio_may_use_commas(tmp_path, capsys):
    code, out, _ = run(
        capsys, "map", "Fe", "Cr", "--ratio", "70,30", "--out", str(tmp_path / "a.json")
    )
    assert code == 0 and "wrote" in out


@pytest.mark.parametrize(
    "value, words",
    [
        ("Cu1e-3", "expected NAME=VALUE such as Cu=1e-3"),
        ("N=-1", "'N': total [mol/kg] must be > 0"),
    ],
)
def test_a_bad_total_names_the_option_and_the_fault(capsys, value, words):
    with pytest.raises(SystemExit) as exc:
        main(["speciation", "Cu", "--total", value, "--potential", "0.2"])
    err = capsys.readouterr().err
    assert exc.value.code == 2 and "--total" in err and words in err
    assert "Traceback" not in err
