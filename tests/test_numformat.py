"""The one rounding rule for numbers people read (regimetrend.numformat).

Expected strings are worked out by hand from the rule in the module docstring; Python's own
``format`` (the reference for rounding half-way cases) is used where a digit could go either way.
"""

import math

import pytest

from regimetrend import numformat as nf
from regimetrend.cli.text import fmt as terminal_fmt
from regimetrend.report.tables import fmt as table_fmt


@pytest.mark.parametrize("value, text", [
    (14683.2, "14,683"), (629.8, "630"), (62.98, "63.0"), (6.298, "6.30"),
    (0.6298, "0.630"), (0.002264, "0.00226"), (-1234.4, "-1,234"),
    (99.96, "100"), (9.996, "10.0"), (0.9996, "1.00"),
    (1.468e9, "1.47 billion"), (-2.5e12, "-2.50 trillion"), (999.996e9, "1.00 trillion"),
])
def test_plain_numbers_by_magnitude(value, text):
    assert nf.number(value) == text


@pytest.mark.parametrize("value", [0.0, -0.0, -1e-13, 1e-13])
def test_zero_is_written_without_sign(value):
    assert nf.number(value) == "0"
    assert nf.signed(value) == "0"
    assert nf.percent(value) == "0%"
    assert nf.points(value) == "0"


def test_tiny_values_keep_their_figures_not_plus_zero():
    assert nf.signed(0.002264) == "+0.00226"
    assert nf.signed(-1e-7) == "-0.000000100"
    assert nf.percent(-0.03) == "-0.030%"
    assert nf.percent(-0.0004) == "0%"  # below half of the smallest shown figure


def test_percentages_and_pvalues():
    assert nf.percent(12.5) == "12.5%"
    assert nf.percent(-7.44) == "-7.4%"
    assert nf.percent(0.42, sign=True) == "+0.42%"
    assert nf.percent(14.19, symbol=False) == "14.2"
    assert nf.pvalue(0.0004) == "< 0.001"
    assert nf.pvalue(0.04561) == "0.046"
    assert nf.statistic(31.567) == "31.57" and nf.statistic(1234.5) == "1,234"


@pytest.mark.parametrize("value", [None, math.nan, math.inf, "x"])
def test_missing_values(value):
    assert nf.number(value) == nf.MISSING
    assert nf.number(value, missing="-") == "-"
    assert nf.interval(value, 1.0) == nf.MISSING


def test_no_exponent_anywhere():
    for e in range(-9, 16):
        for mant in (1.0, 1.468, 9.9996):
            for sign in (1, -1):
                v = sign * mant * 10.0 ** e
                for text in (nf.number(v), nf.signed(v), nf.percent(v)):
                    assert "e+" not in text and "e-" not in text, (v, text)


def test_terminal_and_report_share_the_rule():
    for v in (14683.2, 0.6298, 0.002264, -0.0, 62.98):
        assert terminal_fmt(v) == table_fmt(v, "num") == nf.number(v)
    assert terminal_fmt(None) == "-"
