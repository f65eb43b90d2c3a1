"""Outputs never replace the input, refuse folders and missing folders, and fail whole."""

import hashlib

import pytest

from regimetrend import demo_path
from regimetrend.cli import main
from regimetrend.errors import InputError
from regimetrend.output import protecting, write_atomic


@pytest.fixture
def source(tmp_path):
    path = tmp_path / "bookings.csv"
    path.write_bytes(demo_path().read_bytes())
    return path


def digest(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.mark.parametrize("argv, words", [
    (lambda s: ["compare", str(s), "--errors", str(s), "--horizon", "3"], "is the input file"),
    (lambda s: ["compare", str(s), "--errors", str(s.parent), "--horizon", "3"], "is a folder"),
    (lambda s: ["compare", str(s), "--errors", str(s.parent / "no" / "e.csv")], "does not exist"),
    (lambda s: ["forecast", str(s), "--output", str(s)], "not a folder"),
])
def test_bad_targets_are_refused_before_any_work(source, capsys, argv, words):
    before = digest(source)
    assert main(argv(source)) == 2
    err = capsys.readouterr().err
    assert words in err and len(err.strip().splitlines()) == 1
    assert digest(source) == before
    assert sorted(p.name for p in source.parent.iterdir()) == ["bookings.csv"]


def test_forecast_into_the_inputs_own_name_is_refused(tmp_path, capsys):
    src = tmp_path / "forecast.csv"  # the name the forecast command writes
    src.write_bytes(demo_path().read_bytes())
    before = digest(src)
    assert main(["forecast", str(src), "--output", str(tmp_path)]) == 2
    assert "input file" in capsys.readouterr().err
    assert digest(src) == before and not (tmp_path / "forecast.png").exists()


def test_write_atomic_guard_and_cleanup(tmp_path):
    target = tmp_path / "a.txt"
    target.write_text("keep")
    with protecting(target):
        with pytest.raises(InputError, match="input file"):
            write_atomic(target, "new")
    assert target.read_text() == "keep"
    write_atomic(target, "new")  # outside the block it is an ordinary output
    assert target.read_text() == "new"
    assert [p.name for p in tmp_path.iterdir()] == ["a.txt"]  # no temporary file left
