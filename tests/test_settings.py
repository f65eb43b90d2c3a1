"""Settings: one table of allowed values, checked once, messages that name the caller's words.

From Python a message names the parameter (``max_breaks``); from the command line the flag
(``--max-breaks``), through the one table in ``cli/names.py``.
"""

import pickle

import numpy as np
import pandas as pd
import pytest

from regimetrend import InputError, Settings, analyze, compare, detect_breaks
from regimetrend.cli import main
from regimetrend.cli.names import FLAGS
from regimetrend.series import Frequency, Series
from regimetrend.settings import (RULES, BreakSettings, EvaluationSettings, ModelSettings,
                                  resolve_spec)


def _annual(values, start=1950):
    starts = np.array([f"{start + i}-01-01" for i in range(len(values))], dtype="datetime64[D]")
    return Series("planted", starts, np.asarray(values, dtype=float), Frequency("year"))


def _monthly(values, start="2015-01"):
    starts = pd.date_range(start, periods=len(values), freq="MS").values.astype("datetime64[D]")
    return Series("planted", starts, np.asarray(values, dtype=float), Frequency("month"))


def _csv(tmp_path, values, name="s.csv", start="2015-01"):
    months = pd.period_range(start, periods=len(values), freq="M").astype(str)
    path = tmp_path / name
    path.write_text("month,value\n" + "".join(f"{m},{v:.6g}\n" for m, v in zip(months, values)))
    return path


BAD = [  # (keywords, the parameter the message must name); cases from the hardening probe
    ({"horizon": 0}, "horizon"),
    ({"horizon": "12"}, "horizon"),
    ({"horizon": 3 + 1j}, "horizon"),
    ({"horizon": 10**9}, "horizon"),
    ({"max_breaks": 1.5}, "max_breaks"),
    ({"max_breaks": -1}, "max_breaks"),
    ({"max_breaks": True}, "max_breaks"),
    ({"season_length": 1.5}, "season_length"),
    ({"season_length": 10**30}, "season_length"),
    ({"trim": float("inf")}, "trim"),
    ({"trim": 10**400}, "trim"),
    ({"trim": float("nan")}, "trim"),
    ({"trim": 0.7}, "trim"),
    ({"trim": 2.5}, "trim"),
    ({"kind": "jump"}, "kind"),
    ({"shape": 3}, "shape"),
    ({"criterion": "aic"}, "criterion"),
    ({"step": 0}, "step"),
    ({"reuse_breaks": "yes"}, "reuse_breaks"),
    ({"events": 2.5}, "events"),
    ({"events": [{"a": 1}]}, "events"),
    ({"shap": "linear"}, "shap"),
]


@pytest.mark.parametrize("choices,name", BAD)
def test_bad_settings_are_one_line_errors_naming_the_parameter(choices, name):
    with pytest.raises(InputError) as info:
        Settings(**choices)
    message = str(info.value)
    assert message.startswith(f"parameter {name}:") and "\n" not in message
    assert "--" not in message  # Python callers are not told about command-line flags


def test_flat_keywords_build_the_parts_and_read_through():
    s = Settings(shape=" Exponential", horizon=12, max_breaks=2.0, trim=0.15)
    assert s.model == ModelSettings(shape="exponential")
    assert s.breaks == BreakSettings(max_breaks=2, trim=0.15)
    assert s.evaluation == EvaluationSettings(horizon=12)
    assert (s.shape, s.horizon, s.max_breaks) == ("exponential", 12, 2)
    assert isinstance(s.max_breaks, int)
    assert Settings(model=ModelSettings("quadratic"), horizon=3).shape == "quadratic"
    assert pickle.loads(pickle.dumps(s)) == s
    assert Settings.coerce(s, {"horizon": 6}).horizon == 6 and s.horizon == 12
    assert set(s.to_dict()) == set(RULES)


def test_a_single_event_string_is_one_event_not_its_characters():
    assert Settings(events="2019-01").events == ("2019-01",)
    assert Settings(events=["2019-01", 40]).events == ("2019-01", 40)
    assert Settings(events=pd.Timestamp("2019-03-05")).events == ("2019-03-05",)
    assert Settings(events=np.datetime64("2019-03-05")).events == ("2019-03-05",)


def test_the_table_matches_the_stages_that_use_the_values():
    from regimetrend.breaks.problem import KINDS
    from regimetrend.breaks.select import CRITERIA
    from regimetrend.design import SEASONALITIES, SHAPES

    assert RULES["kind"].choices == ("auto",) + KINDS
    assert set(RULES["criterion"].choices) == set(CRITERIA)
    assert RULES["shape"].choices == ("auto",) + SHAPES  # auto: the verdict chooses
    assert RULES["seasonality"].choices == ("auto",) + SEASONALITIES
    assert set(RULES) <= set(FLAGS)  # every setting has its one flag


def test_functions_refuse_settings_they_do_not_use():
    s = _annual(np.arange(30.0))
    with pytest.raises(InputError, match="parameter horizon: detect_breaks does not use"):
        detect_breaks(s, horizon=4)


def test_advice_names_python_words_and_never_repeats_the_current_setting():
    s = _annual(np.arange(20, dtype=float) + np.random.default_rng(1).normal(0, 1, 20))
    with pytest.raises(InputError) as info:
        detect_breaks(s, max_breaks=3)
    assert "parameter max_breaks" in str(info.value) and "max_breaks=2" in str(info.value)
    with pytest.raises(InputError) as info:
        detect_breaks(s, max_breaks=0, trim=11)
    message = str(info.value)
    assert message.startswith("parameter trim:") and "max_breaks=0" not in message


def test_compare_has_the_same_defaults_as_analyze_on_a_short_annual_series():
    # 20 annual points hold at most two regimes of the default length: the default number of
    # breaks is capped for compare exactly as for analyze
    y = 100 + 2.0 * np.arange(20) + np.random.default_rng(3).normal(0, 1, 20)
    s = _annual(y)
    ev = compare(s, step=2)
    a = analyze(s, step=2)
    assert ev.recommended.name == a.evaluation.recommended.name
    assert ev.to_dict()["model"] == a.evaluation.to_dict()["model"]


def test_horizon_is_bounded_by_the_length_of_the_series():
    s = _annual(np.arange(30.0))
    assert Settings(horizon=30).horizon_for(s) == 30
    with pytest.raises(InputError, match="parameter horizon: 31 periods ahead.*use at most 30"):
        Settings(horizon=31).horizon_for(s)


def test_a_given_season_length_must_fit_twice():
    s = _monthly(np.arange(40.0))
    with pytest.raises(InputError, match="parameter season_length"):
        resolve_spec(s, season_length=24)


CLI_BAD = [  # (extra arguments, flag named) on a 40-month series, each an exit-2 one-liner
    (["--trim", "inf"], "--trim"),
    (["--trim", "1e400"], "--trim"),
    (["--trim", "31"], "--trim"),
    (["--trim", "0.7"], "--trim"),
    (["--max-breaks", "1.5"], "--max-breaks"),
    (["--season-length", "1e30"], "--season-length"),
    (["--season-length", "99999999999999999999"], "--season-length"),
    (["--event", "not a date"], "--event"),
]


@pytest.mark.parametrize("extra,flag", CLI_BAD)
def test_command_line_errors_name_the_flag(tmp_path, capsys, extra, flag):
    path = _csv(tmp_path, 100 + np.arange(40) + np.random.default_rng(0).normal(0, 1, 40))
    assert main(["scan", str(path)] + extra) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and f"option {flag}" in err and "parameter" not in err


def test_command_line_horizon_above_the_series_length_names_the_flag(tmp_path, capsys):
    path = _csv(tmp_path, 100 + np.arange(40.0))
    assert main(["forecast", str(path), "--horizon", "41"]) == 2
    err = capsys.readouterr().err
    assert "option --horizon" in err and "at most 40" in err
    assert main(["forecast", str(path), "--horizon", "1000000000"]) == 2


@pytest.mark.parametrize("months,extra", [(52, ["--season-length", "13"]),
                                          (30, ["--trim", "0.15"])])
def test_dependent_design_columns_say_which_option_to_change(tmp_path, capsys, months, extra):
    # the hardening probe's cases: regimes too short to tell the trend from the seasons
    y = 100 + np.arange(months) + np.random.default_rng(0).normal(0, 2, months)
    path = _csv(tmp_path, y)
    code = main(["scan", str(path)] + extra)
    err = capsys.readouterr().err.strip()
    if code == 2 and "linearly dependent" in err:
        assert "--trim" in err or "--max-breaks" in err
        assert "--seasonality none" in err
    else:
        assert code == 0
