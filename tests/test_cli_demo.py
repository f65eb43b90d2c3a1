"""The demo command runs the whole job from any folder, on the invented demo series."""

import importlib.util
from pathlib import Path

import pandas as pd

from regimetrend import demo_path
from regimetrend.cli import main

ROOT = Path(__file__).resolve().parents[1]


def test_demo_writes_the_report_and_prints_the_summary(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)  # any folder: the data ship with the package
    assert main(["demo", "--output", "out"]) == 0
    text = capsys.readouterr().out
    assert "invented data" in text
    # the planted change (2021-04) lies in the printed 95% interval of the break date
    import re

    lo, hi = re.search(r"changed in \d{4}-\d{2} \(95% interval (\d{4}-\d{2}) to "
                       r"(\d{4}-\d{2})\)", text).groups()
    assert lo <= "2021-04" <= hi
    for name in ("report.html", "report.json", "report.xlsx", "lumen_grid_energy.csv"):
        assert (tmp_path / "out" / name).is_file()
    assert "open " in text and "report.html" in text


def test_packaged_demo_data_is_the_generators_output():
    spec = importlib.util.spec_from_file_location("make_demo", ROOT / "demo" / "make_demo.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    made = module.make()
    for path in (ROOT / "demo" / "lumen_grid_energy.csv", Path(str(demo_path()))):
        shipped = pd.read_csv(path)
        pd.testing.assert_frame_equal(shipped, made, check_dtype=False)
