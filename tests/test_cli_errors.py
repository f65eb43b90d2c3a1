"""Command-line mistakes caught by argparse: one line on standard error with one
"regimetrend: error: " prefix, nothing on standard output, exit code 2.

Outside check: the wording after the prefix is argparse's own (Python's standard library:
"unrecognized arguments: ...", "the following arguments are required: ...", "invalid choice").
"""

import pytest

from regimetrend.cli import main

PREFIX = "regimetrend: error: "


@pytest.mark.parametrize("argv, says", [
    (["scan", "data.csv", "--bogus"], "unrecognized arguments: --bogus"),
    (["scan"], "scan: the following arguments are required: FILE"),
    (["bogus"], "invalid choice: 'bogus'"),
    (["report", "data.csv", "--output", "out", "--shape", "round"],
     "report: argument --shape: invalid choice: 'round'"),
])
def test_argument_errors_are_one_line_with_one_prefix(argv, says, capsys):
    code = main(argv)
    out, err = capsys.readouterr()
    lines = err.strip().splitlines()
    assert code == 2 and out == ""
    assert len(lines) == 1 and lines[0].startswith(PREFIX)
    assert lines[0].count("regimetrend") == 1  # never "regimetrend: error: regimetrend: ..."
    assert says in lines[0]
