"""Job texts shared by the tests of limits, revisions, batches, sweeps and tools (invented demo data)."""
from __future__ import annotations

IDEAL_JOB = """\
calcdoc: 1
calc:
  number: T-LIM-001
  title: Ideal-gas cylinder for the limit tests
  revision: {revision}
  date: 2026-01-05
gas:
  model: ideal
  k: 1.4
  molar_mass: 28.97 g/mol
system: closed
start:
  pressure: {P1}
  temperature: 300 K
  volume: 1 L
legs:
  - name: Compression
    process: polytropic
    n: 1.3
    end: {{volume: 0.5 L}}
  - name: Hold
    process: isochoric
    end: {{temperature: 320 K}}
{extra}"""


def ideal_job(extra: str = "", P1: str = "100 kPa", revision: str = "A") -> str:
    """A closed ideal-gas job: polytropic compression (n = 1.3, V halved) then an isochoric hold."""
    return IDEAL_JOB.format(extra=extra, P1=P1, revision=revision)


def write(tmp_path, name: str, text: str):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p
