"""``regimetrend demo``: the whole job on the invented demo series, from any folder.

The demo series is the monthly energy sold by "Lumen Grid", a fictional EV charging network
(invented data, see ``demo/make_demo.py``). The command runs the full analysis and writes the
report into ``--output`` (default ``regimetrend-demo`` in the current folder), then says where
everything went.
"""

from __future__ import annotations

import json
import textwrap
from pathlib import Path

from . import options


def register(sub) -> None:
    p = sub.add_parser("demo", help="run the whole analysis on the built-in demo series")
    p.add_argument("--output", metavar="DIR", default="regimetrend-demo",
                   help="folder for the demo's outputs (default ./regimetrend-demo)")
    p.set_defaults(run=run)


def run(args) -> int:
    from .. import demo_path
    from ..intake import load_series

    folder = options.check_output_folder(args.output)
    source = Path(str(demo_path()))
    series = load_series(source, name="Lumen Grid energy sold (MWh)")
    data_copy = folder / source.name
    from .report import produce_report

    written = produce_report(series, folder, shape="exponential", seasonality="dummies",
                             horizon=12, extra={source.name: source.read_bytes()})
    print("Demo: Lumen Grid, a fictional EV charging network; monthly energy sold (MWh), "
          f"{series.label(0)} to {series.label(series.n - 1)} (invented data).")
    report = json.loads(Path(written["json"]).read_text(encoding="utf-8")).get("report", {})
    print()
    for line in report.get("summary", []):
        print(textwrap.fill(line, width=96))
    print()
    print(f"input copied to {data_copy}")
    for key, path in written.items():
        if key != source.name:
            print(f"{key}: {path}")
    print(f"\nopen {written['html']} in a browser for the full report")
    return 0
