"""Make the invented demo series: monthly energy sold by a fictional EV charging network.

"Lumen Grid" runs public fast chargers in a mid-sized region. From 2016 its monthly energy sold
grew steadily (about 1.1% a month, with a summer peak from holiday driving). In April 2021 a
regional delivery-fleet contract moved its charging onto the network and growth jumped to about
2.3% a month. The series is invented for the demo; it is not real data and is never used as a
check value in the tests.

Run: python demo/make_demo.py  (writes demo/lumen_grid_energy.csv and the packaged copy)
"""

from pathlib import Path

import numpy as np
import pandas as pd

SEED = 20261202


def make() -> pd.DataFrame:
    rng = np.random.default_rng(SEED)
    months = pd.date_range("2016-01-01", "2025-12-01", freq="MS")
    t = np.arange(len(months))
    brk = int(np.flatnonzero(months == "2021-04-01")[0])
    log_level = np.log(410.0) + 0.011 * t
    log_level[brk:] = log_level[brk] + 0.05 + 0.023 * (t[brk:] - brk)
    season = 0.09 * np.cos(2 * np.pi * (months.month.values - 7.5) / 12)  # summer peak
    noise = np.zeros(len(t))
    for i in range(len(t)):  # mildly persistent month-to-month noise
        noise[i] = (0.3 * noise[i - 1] if i else 0.0) + rng.normal(0, 0.025)
    mwh = np.exp(log_level + season + noise)
    return pd.DataFrame({"month": months.strftime("%Y-%m"), "energy_mwh": np.round(mwh, 1)})


if __name__ == "__main__":
    here = Path(__file__).resolve().parent
    frame = make()
    for target in (here / "lumen_grid_energy.csv",
                   here.parent / "regimetrend" / "data" / "lumen_grid_energy.csv"):
        frame.to_csv(target, index=False)
        print(f"wrote {target} ({len(frame)} months)")
