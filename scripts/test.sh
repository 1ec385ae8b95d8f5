#!/usr/bin/env bash
# Set up (if needed), check the code (ruff, mypy) and run the whole test suite.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
.venv/bin/ruff check calcdoc tests bench
.venv/bin/mypy
exec .venv/bin/python -m pytest "$@"
