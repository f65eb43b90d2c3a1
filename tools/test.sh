#!/usr/bin/env bash
# Set up a fresh virtual environment from this checkout and run the whole test suite.
# Used as-is by README.md and by .ci/run, so the two can never drift apart.
set -euo pipefail
cd "$(dirname "$0")/.."
PY=${PYTHON:-python3}
if [ ! -x .venv/bin/python ]; then
  "$PY" -m venv .venv
fi
.venv/bin/python -m pip install --quiet --upgrade pip
.venv/bin/python -m pip install --quiet -e '.[test]'
# The report's browser test renders the HTML in headless Chromium (Debian's package).
if ! command -v chromium >/dev/null 2>&1 && command -v apt-get >/dev/null 2>&1 && [ "$(id -u)" = 0 ]; then
  echo "installing chromium for the browser test ..."
  (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null) \
    || echo "could not install chromium; the browser test will say so"
fi
.venv/bin/python -m ipykernel install --sys-prefix --name regimetrend-test >/dev/null 2>&1 || true
# Lint and types first (settings in pyproject.toml): a failure stops the run.
.venv/bin/ruff check regimetrend tests benchmarks tools
.venv/bin/mypy
exec .venv/bin/python -m pytest -q "$@"
