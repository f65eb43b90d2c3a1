"""Write the corpus of odd inputs into a folder, from the case definitions below.

Each case is an odd input file (or none) and the command line to run on it. Every case must end
with exit code 0 or 2, and with exit 2 print one line on standard error and no traceback; some
cases say more about the result (``expect``). ``owner`` names the part of the work that makes a
case pass while it is still open (the tests mark those cases as expected to fail, not strictly).

    python tools/make_odd_inputs.py DIR     # writes the files and DIR/cases.json

The tests call ``write_corpus(folder)`` directly. The series are invented for the cases.
"""

from __future__ import annotations

import json
import math
import sys
from dataclasses import asdict, dataclass, field
from pathlib import Path

CHEAP = ["--horizon", "3", "--step", "12", "--max-breaks", "1"]  # keeps report/compare quick


@dataclass(frozen=True)
class Case:
    name: str
    argv: tuple[str, ...]  # {dir} is the corpus folder, {file} the case's input file
    file: str | None = None  # file name of the input, written by ``content``
    codes: tuple[int, ...] = (0, 2)  # allowed exit codes
    owner: str | None = None  # who fixes it while open (None: fixed)
    expect: dict = field(default_factory=dict)  # stdout_has / stdout_lacks / error_has
    skip_as_root: bool = False


def monthly(values, start=(2015, 1), header=("month", "sales"), sep=",", decimal=".") -> bytes:
    y, m = start
    lines = [sep.join(header)]
    for v in values:
        text = repr(float(v)) if isinstance(v, float) else str(v)
        lines.append(f"{y:04d}-{m:02d}{sep}{text.replace('.', decimal)}")
        m += 1
        if m > 12:
            y, m = y + 1, 1
    return ("\n".join(lines) + "\n").encode("utf-8")


def trend(n=72, slope=2.0, level=100.0, season=5.0):
    return [round(level + slope * t + season * math.sin(2 * math.pi * t / 12) + 3 * math.sin(t * 1.7), 3)
            for t in range(n)]


def rise_then_flat(n=60):
    return [round(10.0 + 5 * t if t < 30 else 160.0 + 0.01 * math.sin(t), 4) for t in range(n)]


ESC = "\x1b[2J\x1b[H"  # clear the screen, cursor home
CONTENT: dict[str, bytes] = {
    "plain.csv": monthly(trend()),
    "escape_column.csv": monthly(trend(), header=("month", f"sales{ESC}\x07")),
    "bidi_column.csv": monthly(trend(), header=("month", "sales\u202eevil")),
    f"file{ESC}name.csv": monthly(trend()),
    "rise_then_flat.csv": monthly(rise_then_flat()),
    "two_flat_levels.csv": monthly([100.0] * 30 + [150.0] * 30),
    "constant.csv": monthly([42.0] * 60),
    "huge_value.csv": monthly(trend()[:-1] + [1e308]),
    "tiny_values.csv": monthly([v * 1e-300 for v in [10 + (t if t < 30 else 30 + 4 * (t - 30))
                                                     for t in range(60)]]),
    "decimal_comma.csv": monthly([200.002 + t for t in range(48)], sep=";", decimal=","),
    "utf16.csv": monthly(trend()).decode().encode("utf-16"),
    "cr_only.csv": monthly(trend()).replace(b"\n", b"\r"),
    "unterminated_quote.csv": monthly(trend()).replace(b"2016-01,", b'"2016-01,', 1),
    "far_future.csv": monthly(trend(48), start=(9995, 1)),  # forecasts run past 9999-12
}


def cases() -> list[Case]:
    f = "{dir}/{file}"
    return [
        Case("plain scan", ("scan", f), "plain.csv", codes=(0,)),
        Case("escape in column name, scan", ("scan", f), "escape_column.csv", codes=(0,),
             expect={"stdout_lacks": "\x1b", "stdout_has": "\\x1b"}),
        Case("bidi override in column name, scan", ("scan", f), "bidi_column.csv", codes=(0,),
             expect={"stdout_lacks": "\u202e", "stdout_has": "\\u202e"}),
        Case("escape in column name, report", ("report", f, "--output", "{dir}/out_col", *CHEAP),
             "escape_column.csv", codes=(0,), expect={"stdout_lacks": "\x1b"}),
        Case("escape in --name, report", ("report", f, "--name", f"a{ESC}b\x00c", "--output",
                                          "{dir}/out_name", *CHEAP), "plain.csv", codes=(0,)),
        Case("escape in file name, report", ("report", f, "--output", "{dir}/out_file", *CHEAP),
             f"file{ESC}name.csv", codes=(0,)),
        Case("escape in a missing file's name", ("scan", "{dir}/no" + ESC + ".csv"),
             codes=(2,), expect={"stderr_lacks": "\x1b"}),
        Case("two dollars in --name, forecast chart",
             ("forecast", f, "--name", "$cost$ in $", "--output", "{dir}/out_dollar"),
             "plain.csv", codes=(0,)),
        Case("report into a folder under a file", ("report", f, "--output",
                                                   "{dir}/plain.csv/sub", *CHEAP),
             "plain.csv", codes=(2,), expect={"error_has": "--output"}),
        Case("demo into a folder under a file", ("demo", "--output", "{dir}/plain.csv/sub"),
             codes=(2,), expect={"error_has": "--output"}),
        Case("report into a folder that cannot be made", ("report", f, "--output",
                                                          "/proc/regimetrend-cannot", *CHEAP),
             "plain.csv", codes=(2,), expect={"error_has": "--output"}),
        Case("chart dates past year 9999, forecast", ("forecast", f, "--horizon", "24",
                                                      "--output", "{dir}/out_far"),
             "far_future.csv"),
        Case("chart dates past year 9999, report", ("report", f, "--output", "{dir}/out_far2",
                                                    *CHEAP[2:], "--horizon", "24"),
             "far_future.csv"),
        Case("rise then flat, scan", ("scan", f), "rise_then_flat.csv"),
        Case("two flat levels with an event, exponential",
             ("scan", f, "--shape", "exponential", "--event", "2017-07"), "two_flat_levels.csv"),
        Case("constant series does not drift", ("scan", f), "constant.csv",
             expect={"stdout_lacks": "started to drift"}),
        Case("one value of 1e308", ("scan", f), "huge_value.csv",
             expect={"stdout_lacks": "0000000000000000000000"}),
        Case("values near 1e-300 keep their break", ("scan", f, "--seasonality", "none"),
             "tiny_values.csv", expect={"stdout_has": "breaks found: 1"}),
        Case("decimal comma with ';'", ("scan", f, "--json"), "decimal_comma.csv", expect={"stdout_lacks": "200002"}),
        Case("UTF-16 file", ("scan", f), "utf16.csv"),
        Case("CR-only line ends", ("scan", f), "cr_only.csv"),
        Case("unterminated quote", ("scan", f), "unterminated_quote.csv",
             expect={"error_has": "quote"}),
        Case("a folder as input", ("scan", "{dir}"), codes=(2,),
             expect={"error_has": "folder"}),
        Case("/dev/null as input", ("scan", "/dev/null"), codes=(2,)),
        Case("--trim inf", ("scan", f, "--trim", "inf"), "plain.csv", codes=(2,), expect={"error_has": "--trim"}),
        Case("--trim 1e400", ("scan", f, "--trim", "1e400"), "plain.csv", codes=(2,), expect={"error_has": "--trim"}),
        Case("--trim 31", ("scan", f, "--trim", "31"), "plain.csv", codes=(0,)),  # 31 periods of 72
        Case("huge --season-length", ("scan", f, "--season-length", "9" * 30), "plain.csv",
             codes=(2,), expect={"error_has": "--season-length"}),
        Case("huge --frequency", ("scan", f, "--frequency", "9" * 30 + " months"), "plain.csv",
             codes=(2,), expect={"error_has": "--frequency"}),
        Case("--horizon 10^9", ("forecast", f, "--horizon", "1000000000"), "plain.csv",
             codes=(2,), expect={"error_has": "--horizon"}),
    ]


def write_corpus(folder) -> list[Case]:
    """Write every case's input file into ``folder``; returns the cases."""
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    for name, data in CONTENT.items():
        (folder / name).write_bytes(data)
    return cases()


def argv_of(case: Case, folder) -> list[str]:
    return [a.replace("{dir}", str(folder)).replace("{file}", case.file or "")
            for a in case.argv]


if __name__ == "__main__":
    out = Path(sys.argv[1] if len(sys.argv) > 1 else "odd-inputs")
    made = write_corpus(out)
    (out / "cases.json").write_text(json.dumps([dict(asdict(c), argv=argv_of(c, out))
                                                for c in made], indent=2))
    print(f"{len(made)} cases written to {out}")
