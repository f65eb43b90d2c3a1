"""``--help`` and ``--version`` load no numerical library (their speed is measured in
benchmarks/bench_startup.py; here only what gets imported is checked)."""

import json
import subprocess
import sys

import pytest

HEAVY = ("numpy", "pandas", "scipy", "matplotlib", "statsmodels", "openpyxl")
PROBE = """
import json, sys
from regimetrend.cli import main
try:
    main([{flag!r}])
except SystemExit:
    pass
print(json.dumps(sorted(m for m in sys.modules if m.split('.')[0] in {heavy!r})))
"""


@pytest.mark.parametrize("flag", ["--help", "--version"])
def test_help_and_version_import_no_heavy_library(flag):
    out = subprocess.run([sys.executable, "-c", PROBE.format(flag=flag, heavy=HEAVY)],
                         capture_output=True, text=True, check=True).stdout
    assert json.loads(out.strip().splitlines()[-1]) == []


def test_public_names_still_load_on_first_use():
    import regimetrend

    assert regimetrend.Series.__name__ == "Series"
    assert regimetrend.Settings().shape
    with pytest.raises(AttributeError):
        regimetrend.not_a_name  # noqa: B018
