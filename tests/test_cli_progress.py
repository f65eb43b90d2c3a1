"""The progress bar: drawn only on a terminal and not with --quiet, rate and time left from the
clock, wiped at the end, never on standard output."""

import io

from regimetrend.cli.progress import StageBar, clock


class Tty(io.StringIO):
    def isatty(self):
        return True


class FakeClock:
    def __init__(self):
        self.t = 100.0

    def __call__(self):
        return self.t


def test_bar_on_a_terminal_shows_rate_and_time_left():
    tty, now = Tty(), FakeClock()
    bar = StageBar("rolling origin", "origins", stream=tty, clock_fn=now)
    bar(0, 20)  # the stage starts
    now.t += 10.0
    bar(5, 20)  # 5 origins in 10 s: 0.5 a second, 15 left take 30 s
    text = tty.getvalue()
    assert "rolling origin [######..................] 5/20 origins, 0.5/s, 0:30 left" in text
    now.t += 30.0
    bar(20, 20)
    assert tty.getvalue().endswith("\r\x1b[K")  # wiped when the stage ends


def test_bar_is_silent_on_a_pipe_and_when_quiet():
    pipe, tty = io.StringIO(), Tty()
    for bar in (StageBar("report", stream=pipe), StageBar("report", stream=tty, quiet=True)):
        for i in range(4):
            bar(i, 3)
    assert pipe.getvalue() == "" and tty.getvalue() == ""


def test_clock():
    assert clock(5) == "0:05" and clock(125) == "2:05" and clock(3725) == "1:02:05"


def test_compare_and_report_accept_quiet(tmp_path, capsys):
    from regimetrend.cli import build_parser

    parser = build_parser()
    for command in ("compare", "report"):
        extra = ["--output", str(tmp_path)] if command == "report" else []
        assert parser.parse_args([command, "x.csv", "--quiet", *extra]).quiet is True
