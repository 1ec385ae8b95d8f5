#!/usr/bin/env bash
# Set up calcdoc on a fresh Debian machine with Python 3.11: system libraries for PDF rendering
# (Pango, via apt when missing), a virtual environment in .venv, and calcdoc with its test tools.
# Safe to run again: it reinstalls only when pyproject.toml has changed.
set -euo pipefail
cd "$(dirname "$0")/.."

PY=${PYTHON:-}
if [ -z "$PY" ]; then
  for cand in python3.11 python3; do
    if command -v "$cand" >/dev/null 2>&1; then PY=$cand; break; fi
  done
fi
[ -n "$PY" ] || { echo "setup: Python 3.11 is needed (python3.11 or python3 on PATH)" >&2; exit 1; }

# WeasyPrint renders with Pango and subsets fonts with HarfBuzz; install them from Debian's packages
# when they are not there.
if ! "$PY" -c "import ctypes.util as u, sys; sys.exit(0 if all(u.find_library(n) for n in ('pango-1.0', 'pangoft2-1.0', 'harfbuzz-subset')) else 1)"; then
  pkgs="libpango-1.0-0 libpangoft2-1.0-0 libharfbuzz0b libharfbuzz-subset0"
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
    echo "setup: installing Pango and HarfBuzz (Debian packages) for PDF rendering"
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $pkgs >/dev/null
  else
    echo "setup: PDF rendering needs: sudo apt-get install $pkgs" >&2
    exit 1
  fi
fi

if [ ! -x .venv/bin/python ]; then
  echo "setup: creating .venv"
  "$PY" -m venv .venv
fi
stamp=.venv/.calcdoc-installed
want=$(cat pyproject.toml | sha256sum | cut -d' ' -f1)
if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
  echo "setup: installing calcdoc and its dependencies into .venv"
  log=.venv/pip-install.log
  if ! { .venv/bin/python -m pip install --quiet --disable-pip-version-check --upgrade pip &&
         .venv/bin/python -m pip install --quiet --disable-pip-version-check -e ".[test]"; } > "$log" 2>&1; then
    cat "$log" >&2
    echo "setup: installing into .venv failed (log above, also in $log)" >&2
    exit 1
  fi
  echo "$want" > "$stamp"
fi

# calcdoc's own modules compiled to bytecode, as pip does for a package it installs (an editable install
# does not; and where PYTHONDONTWRITEBYTECODE is set, Python would compile every module from source at
# each start, ~60 ms of every command). Only modules changed since the last run are compiled again.
.venv/bin/python -m compileall -q -j 0 calcdoc > /dev/null
