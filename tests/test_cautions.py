"""The cautions: standing ones always, a late break flagged, no repeats."""

import numpy as np

from regimetrend.cautions import JUDGEMENT, STANDING, assemble, near_end
from regimetrend.series import Frequency, Series


def _monthly(n):
    starts = (np.datetime64("2015-01", "M") + np.arange(n)).astype("datetime64[D]")
    return Series("bookings", starts, np.arange(1.0, n + 1), Frequency("month"))


def test_standing_cautions_come_first_and_repeat_nothing():
    got = assemble(["the series is short", JUDGEMENT.lower()], ["The series is short."])
    assert got[:3] == STANDING
    assert got[3] == "The series is short." and len(got) == 4


def test_a_late_break_is_flagged_and_an_early_one_is_not():
    s = _monthly(120)
    late = near_end(s, 110, 115)
    assert late is not None and "2024-03" in late and "10 monthly periods" in late
    assert near_end(s, 60, 70) is None
    # an early break whose date interval still reaches the end of the data is flagged too
    assert near_end(s, 60, 118) is not None
    assert near_end(s, None, None) is None
