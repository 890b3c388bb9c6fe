"""All-or-nothing outputs: a failing command writes nothing and replaces nothing."""

import os
from pathlib import Path

import pytest
from cli_run import run

from pourbaix import outputs as export
from pourbaix.errors import ExportError
from pourbaix.outputs import all_or_nothing, atomic_write_text, check_writable


def test_a_failure_inside_the_block_leaves_no_file_and_keeps_the_old_one(tmp_path):
    old = tmp_path / "old.json"
    old.write_text("old", encoding="utf-8")
    new = tmp_path / "new.csv"
    with pytest.raises(RuntimeError, match="later step"):
        with all_or_nothing():
            atomic_write_text(old, "replaced")
            atomic_write_text(new, "new")
            assert old.read_text(encoding="utf-8") == "old"  # nothing moved yet
            raise RuntimeError("later step failed")
    assert old.read_text(encoding="utf-8") == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["old.json"]  # no temporary left


def test_files_appear_together_when_the_block_succeeds(tmp_path):
    with all_or_nothing():
        atomic_write_text(tmp_path / "a.txt", "a")
        with all_or_nothing():  # nested blocks join the outer one
            atomic_write_text(tmp_path / "b.txt", "b")
        assert not (tmp_path / "b.txt").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt", "b.txt"]


def test_a_late_option_failure_neither_leaves_nor_replaces_files(tmp_path, capsys):
    # issue 11: `map Fe --second-axis XYZ --out o.png --out o.json` left o.json behind
    existing = tmp_path / "o.json"
    existing.write_text("kept", encoding="utf-8")
    code, out, err = run(
        capsys,
        "map",
        "Fe",
        "--second-axis",
        "XYZ",
        "--out",
        str(tmp_path / "o.png"),
        "--out",
        str(existing),
    )
    assert code == 2 and "unknown reference electrode 'XYZ'" in err
    assert "Traceback" not in err and "wrote" not in out
    assert existing.read_text(encoding="utf-8") == "kept"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["o.json"]


def test_a_failing_report_keeps_the_map_files_from_appearing(tmp_path, capsys, monkeypatch):
    from pourbaix.report import document

    def broken(*_args, **_kwargs):
        raise ExportError("report could not be rendered")

    monkeypatch.setattr(document, "write_report", broken)
    code, out, err = run(
        capsys,
        "map",
        "Zn",
        "--out",
        str(tmp_path / "zn.json"),
        "--report",
        str(tmp_path / "zn.html"),
    )
    assert code == 2 and "report could not be rendered" in err
    # no line announced the map file that was then discarded
    assert "wrote" not in out and "wrote" not in err
    # the map file was finished before the report failed: the message says it was discarded
    assert "nothing was written: 1 finished file(s) discarded" in err
    assert len([line for line in err.splitlines() if "error:" in line]) == 1
    assert list(tmp_path.iterdir()) == []


def test_a_too_long_name_is_one_clear_message(tmp_path, capsys):
    name = "x" * 300 + ".json"
    code, out, err = run(capsys, "map", "Fe", "--out", str(tmp_path / name))
    assert code == 2
    assert "more than the" in err and "the file system allows" in err
    assert len(err.strip().splitlines()) == 1 and len(err) < 400  # the name is shortened
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize(
    "name, match",
    [("a\x00b.json", "null"), ("", "no file name")],
)
def test_bad_names_raise_export_error(tmp_path, name, match):
    with pytest.raises(ExportError, match=match):
        check_writable(str(tmp_path / name) if name else str(tmp_path) + os.sep)


def test_a_failed_move_puts_back_the_files_already_moved(tmp_path, monkeypatch):
    first = tmp_path / "first.json"
    first.write_text("old first", encoding="utf-8")
    real_replace = os.replace

    def failing_replace(src, dst):
        if str(dst).endswith("second.csv"):
            raise OSError(28, "No space left on device")
        return real_replace(src, dst)

    monkeypatch.setattr(os, "replace", failing_replace)
    with pytest.raises(ExportError, match="No space left"):
        with all_or_nothing():
            atomic_write_text(first, "new first")
            atomic_write_text(tmp_path / "second.csv", "new second")
    assert first.read_text(encoding="utf-8") == "old first"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["first.json"]


def test_no_file_is_announced_when_moving_the_files_into_place_fails(tmp_path, capsys, monkeypatch):
    # "wrote FILE" is said only once the file is in place: a command whose final move fails
    # (disk full, folder removed meanwhile) prints no such line for any of its files
    def refused(staged):
        from pourbaix.outputs import _discard

        _discard(staged)
        raise ExportError("cannot write zn.json: No space left on device")

    monkeypatch.setattr(export, "_commit", refused)
    code, out, err = run(capsys, "map", "Zn", "--out", str(tmp_path / "zn.json"))
    assert code == 2 and "No space left on device" in err
    assert "wrote" not in out and "wrote" not in err
    assert list(tmp_path.iterdir()) == []


def test_written_files_are_announced_after_they_are_in_place(tmp_path, capsys, monkeypatch):
    seen = []

    def announce(path, *, to_stderr=False):
        seen.append((Path(path).name, sorted(p.name for p in tmp_path.iterdir())))

    monkeypatch.setattr(export, "_announce_now", announce)
    code, _, _ = run(
        capsys, "map", "Zn", "--out", str(tmp_path / "zn.json"), "--out", str(tmp_path / "zn.csv")
    )
    assert code == 0
    assert seen == [("zn.json", ["zn.csv", "zn.json"]), ("zn.csv", ["zn.csv", "zn.json"])]
