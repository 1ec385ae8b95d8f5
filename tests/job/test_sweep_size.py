"""Sweeps are not capped at a few hundred points: only a sweep whose results would not fit in memory is
refused, with the limit named."""
from __future__ import annotations

import pytest

from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.job.sweep import MAX_POINTS

JOB = """\
calcdoc: 1
calc: {number: S-1, title: Sweep size, revision: A, date: 2026-11-28}
gas: {model: ideal, k: 1.4, molar_mass: 28.97 g/mol}
start: {pressure: 1 bar, temperature: 300 K, volume: 1 L}
legs:
  - {name: Squeeze, process: isentropic, end: {volume_ratio: 0.5}}
sweep:
  input: start.temperature
  range: {from: 280 K, to: 340 K, steps: N}
  follow: [W_by_gas]
"""


def test_a_thousand_points_are_read():
    job = loads(JOB.replace("N", "1000"), "s.yaml")
    assert len(job.sweep.points) == 1000
    assert job.sweep.entered[0] == "280 K" and job.sweep.entered[-1] == "340 K"


def test_beyond_memory_is_refused_with_the_limit():
    with pytest.raises(JobError) as e:
        loads(JOB.replace("N", str(MAX_POINTS + 1)), "s.yaml")
    text = str(e.value)
    assert "s.yaml:9:" in text and "steps" in text and f"{MAX_POINTS}" in text
