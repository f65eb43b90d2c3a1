"""The report: files written, numbers that match the JSON, escaping and inert spreadsheet cells.

The demo analysis uses the invented demo series (it is an input here, never a check value). The
checks compare the report's outputs with each other (HTML and CSV against the JSON) and with the
formats' own readers: Python's ``csv`` and ``html.parser``, and ``openpyxl`` for the workbook.
"""

import csv
import io
import json
import math
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import openpyxl
import pytest

from regimetrend import load_series
from regimetrend.cli import main
from regimetrend.report import write_report
from regimetrend.cautions import STANDING
from regimetrend.report.html import page
from regimetrend.report.safety import cell, esc, inert_text
from regimetrend.report.tables import Column, Table, fmt
from regimetrend.report.writer import table_csv, workbook_bytes
from regimetrend.report.content import Content

DEMO = Path(__file__).resolve().parents[1] / "demo" / "lumen_grid_energy.csv"
HOSTILE = '<img src=x onerror=alert(1)><script>alert("owned")</script> & "Co"'
CHARTS = ("series_regimes", "forecast_errors", "cusum", "history_sweep", "accuracy_by_horizon",
          "growth_by_regime")
TABLES = ("growth_by_regime", "candidate_ranking", "forecast")


def demo_analysis(name=None):
    from regimetrend.analysis import analyze

    series = load_series(DEMO, name=name)
    return analyze(series, shape="exponential", seasonality="dummies", horizon=12, step=3)


@pytest.fixture(scope="module")
def hostile_analysis():
    return demo_analysis(HOSTILE)


@pytest.fixture(scope="module")
def demo_report(tmp_path_factory, hostile_analysis):
    folder = tmp_path_factory.mktemp("demo_report")
    written = write_report(hostile_analysis, folder, source_name="=cmd|' /C calc'!A0.csv")
    return folder, written


def plain_analysis():
    """An analysis with no break search and no rolling-origin evaluation (a stand-in object)."""
    from types import SimpleNamespace

    from regimetrend import resolve_spec, trend_forecast
    from regimetrend.breaks.cusum import recursive_cusum
    from regimetrend.forecast import fit_history
    from regimetrend.growth import regime_growth

    series = load_series(DEMO, name="plain")
    spec = resolve_spec(series, shape="exponential")
    forecast = trend_forecast(series, spec, 6)
    growth = regime_growth(series, spec)
    fit = fit_history(series, spec)
    cusum = recursive_cusum(fit.fit.X @ fit.fit.beta + fit.fit.residuals, fit.fit.X).to_dict()
    return SimpleNamespace(series=series, spec=spec, breaks=None, evaluation=None,
                           growth=growth, forecast=forecast, global_forecast=forecast,
                           global_fitted=fit.fitted(), global_trend=fit.trend(), cusum=cusum,
                           cautions=("the series is short",),
                           to_dict=lambda: {"growth": growth.to_dict(),
                                            "forecast": forecast.to_dict()})


def _snapshot(folder: Path) -> dict:
    """Every file under ``folder`` with its bytes and modification time."""
    return {p.relative_to(folder).as_posix(): (p.read_bytes(), p.stat().st_mtime_ns)
            for p in sorted(folder.rglob("*")) if p.is_file()}


class _Cells(HTMLParser):
    """Collects every table cell of the page by table id and column key, and all text."""

    def __init__(self):
        super().__init__()
        self.tables, self.text, self._table, self._key, self._buf = {}, [], None, None, None
        self.tags = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append((tag, a))
        if tag == "section" and a.get("id", "").startswith("table-"):
            self._table = a["id"][6:]
            self.tables[self._table] = []
        if tag == "tr" and self._table is not None:
            self.tables[self._table].append({})
        if tag == "span" and self._table is not None and "data-key" in a:
            self._key, self._buf = a["data-key"], []

    def handle_endtag(self, tag):
        if tag == "span" and self._key is not None:
            self.tables[self._table][-1][self._key] = "".join(self._buf)
            self._key = None
        if tag == "section" and self._table is not None:
            self._table = None

    def handle_data(self, data):
        self.text.append(data)
        if self._key is not None:
            self._buf.append(data)


def _parse(html_text):
    p = _Cells()
    p.feed(html_text)
    for name in p.tables:
        p.tables[name] = [r for r in p.tables[name] if r]
    return p


def _shown(text):
    """A number as the page shows it (thousands commas, a sign, or an exponent)."""
    return float(text.replace(",", "").replace("+", ""))


def _close_to_shown(shown_text, value, kind):
    if value is None:
        return shown_text == fmt(None, kind)
    if kind == "pvalue" and shown_text.startswith("<"):
        return value < 1e-4
    shown = _shown(shown_text)
    # half a unit in the last digit shown
    decimals = len(shown_text.split(".")[1].split("e")[0]) if "." in shown_text else 0
    if "e" in shown_text:
        return math.isclose(shown, value, rel_tol=5e-4)
    return abs(shown - value) <= 0.5 * 10 ** (-decimals) + 1e-12


# ------------------------------------------------------------------------------------------ units


def test_formula_like_text_is_made_inert_and_numbers_stay_numbers():
    # the four formula starts named in the issue, and tab / carriage return (common practice)
    for text in ("=1+2", "+1", "-2", "@SUM(A1)", "\t=1", "\r=1"):
        assert cell(text) == "'" + text
    assert cell("Lumen Grid") == "Lumen Grid"
    assert cell(-3.5) == -3.5 and cell(7) == 7 and cell(np.float64(-1.25)) == -1.25
    assert cell(float("nan")) is None and cell(None) is None
    assert inert_text("2021-04") == "2021-04"


def test_csv_and_workbook_cells_are_inert_text_or_plain_numbers():
    table = Table("t", "T", (Column("a", "A", "text"), Column("b", "B", "num")),
                  ({"a": "=HYPERLINK(\"http://x\")", "b": -3.5}, {"a": "@cmd", "b": 2},
                   {"a": "-1+1", "b": None}))
    rows = list(csv.reader(io.StringIO(table_csv(table))))
    assert rows[1] == ["'=HYPERLINK(\"http://x\")", "-3.5"]
    assert rows[2] == ["'@cmd", "2"] and rows[3] == ["'-1+1", ""]
    content = Content("=title", "sub", [], ["+sentence"], [], [table], ["-caution"], [])
    wb = openpyxl.load_workbook(io.BytesIO(workbook_bytes(content)))
    ws = wb["t"]
    assert ws["A2"].value == "'=HYPERLINK(\"http://x\")" and ws["A2"].data_type == "s"
    assert ws["B2"].value == -3.5 and ws["B2"].data_type == "n"
    assert all(c.data_type != "f" for sheet in wb for row in sheet.iter_rows() for c in row)
    assert wb["summary"]["A1"].value == "'=title"


def test_page_escapes_every_user_string():
    table = Table("x", HOSTILE, (Column("a", HOSTILE, "text"),), ({"a": HOSTILE},), HOSTILE)
    text = page(title=HOSTILE, subtitle=HOSTILE, facts=[], summary=[HOSTILE], charts=[],
                tables=[table], cautions=[HOSTILE], missing=[HOSTILE], footer=HOSTILE)
    assert "<script" not in text and "<img src=x" not in text
    assert esc(HOSTILE) in text
    parsed = _parse(text)
    assert not any(tag == "script" for tag, _ in parsed.tags)
    assert HOSTILE in "".join(parsed.text)  # shown as text


def test_fmt_rounds_for_reading():
    """Table cells follow the one rounding rule of regimetrend.numformat."""
    assert fmt(1234.5678, "num") == "1,235"
    assert fmt(0.012345, "num") == "0.0123"
    assert fmt(14.1946, "pct") == "14.2"
    assert fmt(-0.00001, "pct") == "0"
    assert fmt(3.2e-7, "pvalue") == "< 0.001"
    assert fmt(31.567, "stat") == "31.57"
    assert fmt(None, "num") == "\u2013"


# ------------------------------------------------------------------------------ the demo report


def test_every_output_is_written(demo_report):
    folder, written = demo_report
    for name in CHARTS:
        png = folder / "charts" / f"{name}.png"
        assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    for name in TABLES:
        assert (folder / "tables" / f"{name}.csv").stat().st_size > 0
    for name in ("report.html", "report.json", "report.xlsx"):
        assert (folder / name).exists()
    assert set(Path(p) for p in written.values()) >= {folder / "report.html"}
    assert not list(folder.rglob(".*"))  # no temporary files left behind


def test_html_is_self_contained(demo_report):
    folder, _ = demo_report
    text = (folder / "report.html").read_text(encoding="utf-8")
    parsed = _parse(text)
    imgs = [a for tag, a in parsed.tags if tag == "img"]
    assert len(imgs) == len(CHARTS)
    assert all(a["src"].startswith("data:image/png;base64,") for a in imgs)
    for tag, a in parsed.tags:  # nothing that would fetch: no scripts, links or remote sources
        assert tag not in ("script", "link", "iframe", "object", "embed")
        for attr in ("src", "href"):
            assert not a.get(attr, "data:").lower().startswith(("http", "//", "file"))
    assert "Content-Security-Policy" in text and "default-src 'none'" in text
    assert (folder / "report.html").stat().st_size < 5_000_000


def test_summary_is_the_verdicts_sentences_with_the_required_content(demo_report):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    summary = result["report"]["summary"]
    assert summary == result["verdict"]["sentences"]
    text = " ".join(summary)
    assert "95% interval" in text and "% a year" in text and "forecast" in text.lower()
    assert "history" in text.lower()


def test_growth_numbers_in_html_and_csv_match_the_json(demo_report):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    segments = result["growth"]["segments"]
    html_rows = _parse((folder / "report.html").read_text())
    rows = html_rows.tables["growth_by_regime"]
    csv_rows = list(csv.DictReader(open(folder / "tables" / "growth_by_regime.csv")))
    assert len(rows) == len(segments) == len(csv_rows)
    for seg, row, crow in zip(segments, rows, csv_rows):
        g = seg["growth"]
        for key in ("per_period_pct", "annualised_pct"):
            assert _close_to_shown(row[key], g[key], "pct")
            assert _close_to_shown(row[f"{key}_low"], g[f"{key}_ci95"][0], "pct")
            assert _close_to_shown(row[f"{key}_high"], g[f"{key}_ci95"][1], "pct")
        assert float(crow["Growth a year, %"]) == g["annualised_pct"]  # full precision
        assert row["from"] == seg["start_label"] and row["to"] == seg["end_label"]


def test_forecast_and_ranking_tables_match_the_json(demo_report, hostile_analysis):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    parsed = _parse((folder / "report.html").read_text())
    fc = result["forecast"]["rows"]
    shown = parsed.tables["forecast"]
    assert len(shown) == len(fc) == 12
    for a, b in zip(fc, shown):
        for key in ("mean", "lower80", "upper80", "lower95", "upper95"):
            assert _close_to_shown(b[key], a[key], "num")
    with open(folder / "tables" / "forecast.csv") as fh:
        for a, b in zip(fc, csv.DictReader(fh)):
            assert float(b["Forecast (mean)"]) == a["mean"]
            assert float(b["95% high"]) == a["upper95"]
    cands = result["evaluation"]["candidates"]
    ranking = parsed.tables["candidate_ranking"]
    # every candidate appears (the leading five, the rest folded in <details>), in rank order,
    # with its readable name on the page; the CSV adds its key in report.json
    with open(folder / "tables" / "candidate_ranking.csv") as fh:
        csv_rows = list(csv.DictReader(fh))
    assert [r["Name in report.json"] for r in csv_rows] == [c["name"] for c in cands]
    assert [r["candidate"] for r in ranking] == [r["Candidate"] for r in csv_rows]
    assert len(ranking) > 5
    page = (folder / "report.html").read_text()
    section = page[page.index('id="table-candidate_ranking"'):]
    assert f"<summary>The other {len(cands) - 5} candidates</summary>" in section
    for c, r in zip(cands, ranking):
        assert _close_to_shown(r["rmse"], c["metrics"]["rmse"], "num")
        assert r["candidate"] and r["candidate"] != c["name"]  # words, not the key
        assert " before the end" not in r["candidate"]
    assert [r["Name in report.json"] for r in csv_rows if r["Verdict"] == "chosen"] == [
        hostile_analysis.verdict.model.name]


def test_hostile_names_show_as_text_and_stay_inert_in_spreadsheets(demo_report):
    folder, _ = demo_report
    text = (folder / "report.html").read_text()
    assert "<script" not in text and "<img src=x" not in text
    parsed = _parse(text)
    assert HOSTILE in "".join(parsed.text)
    wb = openpyxl.load_workbook(folder / "report.xlsx")
    assert all(c.data_type != "f" for sheet in wb for row in sheet.iter_rows() for c in row)
    subtitle = wb["summary"]["A2"].value
    assert subtitle.startswith("'=cmd")  # the file name starts with '=' and stays text


def test_cautions_include_the_standing_three(demo_report):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    for caution in STANDING:
        assert caution in result["report"]["cautions"]
    text = "".join(_parse((folder / "report.html").read_text()).text)
    assert "Extrapolation assumes the last regime holds" in text
    assert "do not replace, business judgement" in text


def test_report_command_writes_the_folder(tmp_path, capsys):
    out = tmp_path / "rep"
    code = main(["report", str(DEMO), "--shape", "exponential", "--horizon", "6", "--step", "6",
                 "--output", str(out)])
    assert code == 0
    assert (out / "report.html").exists() and (out / "report.xlsx").exists()
    assert "report.html" in capsys.readouterr().out


def test_report_command_refuses_a_file_as_output_folder(tmp_path, capsys):
    target = tmp_path / "taken"
    target.write_text("x")
    assert main(["report", str(DEMO), "--output", str(target)]) == 2
    assert "--output" in capsys.readouterr().err


def test_a_report_without_evaluation_or_breaks_says_what_is_missing(tmp_path):
    write_report(plain_analysis(), tmp_path)
    result = json.loads((tmp_path / "report.json").read_text())
    assert set(result["report"]["charts"]) == {"series_regimes", "cusum", "growth_by_regime"}
    assert len(result["report"]["not_shown"]) == 3
    assert "The series is short." in result["report"]["cautions"]
    assert result["report"]["summary"][0].startswith("No change of growth regime was found")
    text = (tmp_path / "report.html").read_text()
    assert "is not shown" in text


# ------------------------------------------------------------- writing: all or nothing, stale files


@pytest.mark.parametrize("where", ["chart", "workbook", "html", "json"])
def test_a_failure_while_building_leaves_the_folder_untouched(tmp_path, monkeypatch, where):
    from regimetrend.report import charts, html, writer

    folder = tmp_path / "rep"
    write_report(plain_analysis(), folder)  # an earlier report in the folder
    before = _snapshot(folder)
    fresh = tmp_path / "never-made"

    def fail(*args, **kwargs):
        raise RuntimeError("forced failure while building")

    target = {"chart": (charts, "growth_chart"), "workbook": (writer, "workbook_bytes"),
              "html": (html, "page"), "json": (writer, "dumps")}[where]
    monkeypatch.setattr(*target, fail)
    for out in (folder, fresh):
        with pytest.raises(RuntimeError, match="forced failure"):
            write_report(plain_analysis(), out)
    assert _snapshot(folder) == before  # nothing replaced, added or removed
    assert not fresh.exists()  # not even the folder


def test_a_target_in_the_way_is_refused_before_anything_is_written(tmp_path):
    from regimetrend.errors import InputError

    (tmp_path / "report.html").mkdir()  # a folder where the page would go
    (tmp_path / "mine.txt").write_text("the analyst's")
    before = _snapshot(tmp_path)
    with pytest.raises(InputError, match="report.html"):
        write_report(plain_analysis(), tmp_path)
    assert _snapshot(tmp_path) == before


def test_the_analysts_own_files_survive(tmp_path):
    (tmp_path / "charts").mkdir()
    (tmp_path / "tables").mkdir()
    own = {"charts/x.png": b"the analyst's chart", "tables/y.csv": b"a,b\n1,2\n",
           # same names as report files this run does not write, but no earlier run wrote them
           "charts/forecast_errors.png": b"not ours", "tables/candidate_ranking.csv": b"mine"}
    for rel, data in own.items():
        (tmp_path / rel).write_bytes(data)
    write_report(plain_analysis(), tmp_path)
    write_report(plain_analysis(), tmp_path)  # a second run reads the first run's manifest
    for rel, data in own.items():
        assert (tmp_path / rel).read_bytes() == data, rel
    files = json.loads((tmp_path / "report.json").read_text())["report"]["files"]
    assert "charts/x.png" not in files and "charts/forecast_errors.png" not in files
    assert all((tmp_path / f).is_file() for f in files)


def test_an_earlier_runs_files_that_are_no_longer_made_are_removed(tmp_path, hostile_analysis):
    write_report(hostile_analysis, tmp_path)
    earlier = set(json.loads((tmp_path / "report.json").read_text())["report"]["files"])
    assert {"charts/forecast_errors.png", "tables/candidate_ranking.csv"} <= earlier
    (tmp_path / "charts" / "x.png").write_bytes(b"the analyst's chart")
    write_report(plain_analysis(), tmp_path)  # makes fewer charts and tables
    now = set(json.loads((tmp_path / "report.json").read_text())["report"]["files"])
    for rel in earlier - now:
        assert not (tmp_path / rel).exists(), rel
    assert {"charts/forecast_errors.png", "charts/history_sweep.png",
            "tables/candidate_ranking.csv"} <= earlier - now
    assert all((tmp_path / rel).is_file() for rel in now)
    assert (tmp_path / "charts" / "x.png").read_bytes() == b"the analyst's chart"


def test_a_manifest_never_reaches_outside_the_reports_own_files(tmp_path):
    inside = tmp_path / "rep"
    write_report(plain_analysis(), inside)
    planted = {"outside.png": tmp_path / "outside.png", "data.csv": inside / "data.csv",
               "charts/sub/deep.png": inside / "charts" / "sub" / "deep.png",
               "charts/notes.txt": inside / "charts" / "notes.txt"}
    for path in planted.values():
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(b"keep")
    manifest = json.loads((inside / "report.json").read_text())
    manifest["report"]["files"] += ["../outside.png", str(tmp_path / "outside.png"), "data.csv",
                                    "charts/../../outside.png", "charts/sub/deep.png",
                                    "charts/notes.txt", "tables/..", 7, None]
    (inside / "report.json").write_text(json.dumps(manifest))
    write_report(plain_analysis(), inside)
    for path in planted.values():
        assert path.read_bytes() == b"keep", path


# --------------------------------------------------------------------- what the summary says


def test_summary_names_the_one_model_behind_growth_and_forecast(demo_report):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    summary = result["report"]["summary"]
    v = result["verdict"]
    growth = next(s for s in summary if s.startswith("Growth now ("))
    forecast = next(s for s in summary if s.startswith("Forecast ("))
    assert v["growth_now"]["model"]["shape"] == v["model"]["shape"] == result["growth"]["shape"]
    assert f"{v['model']['shape']} trend" in growth and f"{v['model']['shape']} trend" in forecast
    assert result["evaluation"]["recommended"]["shape"] == v["forecast_model"]["shape"]
    history = next(s for s in summary if s.startswith("Keep "))
    assert history == result["evaluation"]["history"]["sentence"]


def test_summary_warns_when_growth_and_forecast_shapes_differ(hostile_analysis):
    # the reviewer's case: growth table with the linear shape, forecast from separate
    # exponential trends
    from dataclasses import replace

    from regimetrend.report.extract import gather
    from regimetrend.report.summary import summary_sentences

    data = gather(hostile_analysis)
    rec = {"name": "separate exponential", "strategy": "separate", "shape": "exponential"}
    evaluation = dict(data.evaluation, recommended=rec,
                      candidates=[dict(rec, last_shape=None, start=None)])
    data = replace(data, verdict=None)  # a result without a verdict: the figure-by-figure path
    mixed = replace(data, growth=dict(data.growth, shape="linear"), evaluation=evaluation)
    text = summary_sentences(mixed)
    assert 5 <= len(text) <= 6
    growth = next(t for t in text if t.startswith("Growth by regime ("))
    assert growth.startswith("Growth by regime (linear trend per regime")
    assert text[-1].startswith("The recommended forecast (separate exponential trends per "
                               "regime, forecast from the last regime) is ")
    assert "growth figures above come from a linear trend and this forecast from an " \
           "exponential one" in text[-1]
    same = replace(data, evaluation=evaluation)  # exponential growth table, exponential forecast
    assert "need not agree" not in " ".join(summary_sentences(same))


def test_history_sentence_names_the_strategies_it_judged(hostile_analysis):
    from dataclasses import replace

    from regimetrend.report.extract import gather
    from regimetrend.report.summary import summary_sentences

    data = replace(gather(hostile_analysis), verdict=None)  # the path without a verdict

    def history(keep, breaks, p):
        ev = dict(data.evaluation, model=dict(data.evaluation["model"], shape="quadratic"),
                  history={"keep_from_label": keep,
                           "evidence": {"breaks": breaks, "sup_f_p_value": p}})
        return next(t for t in summary_sentences(replace(data, evaluation=ev))
                    if t.startswith("Keep "))

    cut = history("2021-04", [{"label": "2021-04"}], 0.001)
    assert "a quadratic trend refitted at each forecast origin from the latest break" in cut
    assert "than the global quadratic trend on all history" in cut
    assert "no truncated quadratic trend" in history(None, [{"label": "2021-04"}], 0.001)
    weak = history(None, [{"label": "2021-04"}], 0.4)
    assert "global quadratic trend" in weak and "0.400" in weak
    assert "no break was found" in history(None, [], None)


def test_an_explicit_shape_gives_every_figure_of_that_shape(tmp_path):
    from regimetrend.analysis import analyze

    analysis = analyze(load_series(DEMO), shape="linear", seasonality="dummies", horizon=12,
                       step=6)
    write_report(analysis, tmp_path)
    result = json.loads((tmp_path / "report.json").read_text())
    summary = result["report"]["summary"]
    v = result["verdict"]
    assert v["model"]["shape"] == v["forecast_model"]["shape"] == "linear"
    assert result["growth"]["shape"] == "linear" and result["forecast"]["spec"]["shape"] == "linear"
    growth = next(s for s in summary if s.startswith("Growth now ("))
    assert "linear trend" in growth and growth.index("units a year") < growth.index("% a year")
    assert "need not agree" not in " ".join(summary)


def test_cautions_section_shows_the_analysis_cautions_as_given(demo_report, hostile_analysis):
    folder, _ = demo_report
    result = json.loads((folder / "report.json").read_text())
    assert result["report"]["cautions"] == list(hostile_analysis.cautions)

    class Items(HTMLParser):
        def __init__(self):
            super().__init__()
            self.inside, self.items = False, []

        def handle_starttag(self, tag, attrs):
            if tag == "ul" and ("class", "cautions") in attrs:
                self.inside = True
            elif tag == "li" and self.inside:
                self.items.append("")

        def handle_endtag(self, tag):
            if tag == "ul":
                self.inside = False

        def handle_data(self, data):
            if self.inside and self.items:
                self.items[-1] += data

    items = Items()
    items.feed((folder / "report.html").read_text())
    assert items.items == list(hostile_analysis.cautions)


def test_the_report_package_imports_no_fitting_or_statistics_code():
    # the report reads the analysis; it must not refit or test anything itself (imports for
    # type annotations only, under ``if TYPE_CHECKING:``, run nothing and are allowed)
    import ast

    forbidden = ("scipy", "statsmodels", "sklearn", "ruptures", "regimetrend.ols",
                 "regimetrend.trendfit", "regimetrend.growth", "regimetrend.regimes",
                 "regimetrend.breaks", "regimetrend.forecast", "regimetrend.design",
                 "regimetrend.holdout", "regimetrend.metrics", "regimetrend.analysis")
    relative = {"ols", "trendfit", "growth", "regimes", "breaks", "forecast", "design",
                "holdout", "metrics", "analysis"}
    package = Path(__file__).resolve().parents[1] / "regimetrend" / "report"
    for path in package.glob("*.py"):
        tree = ast.parse(path.read_text())
        typing_only = {id(n) for block in ast.walk(tree) if isinstance(block, ast.If)
                       and ast.unparse(block.test) in ("TYPE_CHECKING", "typing.TYPE_CHECKING")
                       for n in ast.walk(block)}
        for node in ast.walk(tree):
            if id(node) in typing_only:
                continue
            names = []
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                mod = node.module or ""
                if node.level >= 2:  # from ..x import y
                    assert mod.split(".")[0] not in relative, (path.name, mod)
                    mod = "regimetrend." + mod
                names = [mod]
            for name in names:
                assert not name.startswith(forbidden), (path.name, name)


def test_dollar_signs_in_names_are_drawn_as_text():
    # matplotlib reads text between two dollar signs as mathematical markup (its mathtext);
    # a name like this one must neither fail nor lose its signs
    from regimetrend.report import charts

    name = "Sales $x^$ net (USD $)"
    png = charts.series_chart(np.array(["2020-01-01", "2020-02-01", "2020-03-01"],
                                       dtype="datetime64[D]"), [1.0, 2.0, 3.0], units=name,
                              frequency="monthly", title=name)
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    assert charts._plain(name).count(r"\$") == 3


def test_report_command_json_has_growth_segments_and_outputs(tmp_path, capsys):
    out = tmp_path / "rep"
    code = main(["report", str(DEMO), "--shape", "exponential", "--horizon", "4", "--step", "8",
                 "--output", str(out), "--json"])
    assert code == 0
    result = json.loads(capsys.readouterr().out)
    for seg in result["growth"]["segments"]:
        assert {"per_period_pct", "annualised_pct", "annualised_pct_ci95"} <= set(seg["growth"])
    assert Path(result["outputs"]["html"]) == out / "report.html"
