"""The walkthrough notebook runs from top to bottom, in this environment's Python, so it never rots.

The kernel is pinned to the interpreter running the tests (a kernel spec written into a
temporary Jupyter path), so the notebook sees the same regimetrend as the test suite.
"""

import json
import sys
from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOK = Path(__file__).resolve().parents[1] / "notebooks" / "walkthrough.ipynb"
ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def kernel_name(tmp_path, monkeypatch):
    spec_dir = tmp_path / "jupyter" / "kernels" / "regimetrend-tests"
    spec_dir.mkdir(parents=True)
    (spec_dir / "kernel.json").write_text(json.dumps({
        "argv": [sys.executable, "-m", "ipykernel_launcher", "-f", "{connection_file}"],
        "display_name": "regimetrend tests", "language": "python"}))
    monkeypatch.setenv("JUPYTER_PATH", str(tmp_path / "jupyter"))
    monkeypatch.setenv("PYTHONPATH", str(ROOT) + ":" + __import__("os").environ.get(
        "PYTHONPATH", ""))
    monkeypatch.setenv("MPLBACKEND", "Agg")
    return "regimetrend-tests"


def test_walkthrough_runs_top_to_bottom(tmp_path, kernel_name):
    nb = nbformat.read(NOTEBOOK, as_version=4)
    assert nb.cells, "empty notebook"
    # a last cell, added only for the test, tells which Python ran the notebook
    nb.cells.append(nbformat.v4.new_code_cell("import sys; print(sys.executable)"))
    client = NotebookClient(nb, timeout=300, kernel_name=kernel_name,
                            resources={"metadata": {"path": str(tmp_path)}})
    client.execute()
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", [])
              if o.get("output_type") == "error"]
    assert not errors
    ran_with = "".join(o.get("text", "") for o in nb.cells[-1].outputs).strip()
    assert Path(ran_with).resolve() == Path(sys.executable).resolve()
    # the walkthrough's last step writes the report next to the notebook's working folder
    assert (tmp_path / "walkthrough-report" / "report.html").exists()
    assert (tmp_path / "walkthrough-report" / "report.xlsx").exists()
