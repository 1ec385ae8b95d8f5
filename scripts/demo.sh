#!/usr/bin/env bash
# Set up (if needed) and run the demo jobs into out/: results JSON and the PDF calc packages.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
.venv/bin/calcdoc run example_jobs/*.yaml --out out
echo "demo: open the PDFs in out/"
