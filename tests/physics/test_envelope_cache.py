"""The phase envelope of a mixture: traced once per composition, budgets and CoolProp version, then read
from the user's cache as the very same floats, with the model the first trace settled on; a damaged or
missing cache only costs the tracing, and a job's results do not depend on whether the cache was warm."""
from __future__ import annotations

import json

import pytest
from conftest import flow_job
from natural_gases import NATURAL_GASES

from calcdoc.engine import run
from calcdoc.job import loads
from calcdoc.physics import envelope
from calcdoc.report.jsonfile import dumps

LEAN = NATURAL_GASES["lean"]


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("CALCDOC_CACHE_DIR", str(tmp_path))
    monkeypatch.setattr(envelope, "_CACHE", {})      # this process's own memory of envelopes, empty
    return tmp_path


def _fields(env: envelope.Envelope):
    return env.points, env.source, [(m, o) for m, o, _ in env.tried], env.curve


def _forget(monkeypatch):
    monkeypatch.setattr(envelope, "_CACHE", {})


def test_second_envelope_comes_from_the_disk_bit_for_bit(cache, monkeypatch):
    n0 = envelope.traced
    first = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    _forget(monkeypatch)                           # as a new process would start
    second = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    assert envelope.traced == n0 + 1
    assert first.source == "heos" and len(first.curve) > 20
    assert _fields(second) == _fields(first)       # exact float equality, point by point
    files = list((cache / "envelope").glob("*.json"))
    assert len(files) == 1 and f"-v{envelope.FORMAT}.json" in files[0].name
    assert not list((cache / "envelope").glob(".*"))   # no temporary file left


def test_key_holds_the_composition_and_the_budgets(cache, monkeypatch):
    envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    other = dict(LEAN, Methane=LEAN["Methane"] - 0.001, Ethane=LEAN["Ethane"] + 0.001)
    envelope.phase_envelope(tuple(other), tuple(other.values()))
    envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()), heos_budget=envelope.HEOS_BUDGET_S + 1)
    assert len(list((cache / "envelope").glob("*.json"))) == 3


def test_fallback_is_kept_so_a_later_run_takes_the_same_model(cache, monkeypatch):
    c = NATURAL_GASES["known_slow"]
    first = envelope.phase_envelope(tuple(c), tuple(c.values()), heos_budget=1.0, pr_budget=5.0)
    assert [(m, o) for m, o, _ in first.tried] == [("heos", "timeout"), ("pr", "ok")]
    _forget(monkeypatch)
    n0 = envelope.traced
    second = envelope.phase_envelope(tuple(c), tuple(c.values()), heos_budget=1.0, pr_budget=5.0)
    assert envelope.traced == n0 and _fields(second) == _fields(first) and second.margin == first.margin


@pytest.mark.parametrize("damage", ["", "{not json", '{"source": "heos", "tried": [], "curve": [[1, 2]]}',
                                    '{"source": "gerg", "tried": [["heos", "ok", 0.1]], "curve": []}',
                                    '{"source": "heos", "tried": [["heos", "ok", 0.1]], "curve": []}',
                                    '{"source": "heos", "tried": [["heos", "ok", 0.1]], "curve": [[1, 2, 3, 4, NaN]]}'])
def test_damaged_cache_file_is_traced_again(cache, monkeypatch, damage):
    good = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    (f,) = (cache / "envelope").glob("*.json")
    f.write_text(damage)
    _forget(monkeypatch)
    n0 = envelope.traced
    again = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    assert envelope.traced == n0 + 1 and _fields(again) == _fields(good)
    assert json.loads(f.read_text())["source"] == "heos"       # rewritten whole


def test_results_of_a_job_are_the_same_with_the_cache_cold_or_warm(cache, monkeypatch):
    gas = "{mixture: {" + ", ".join(f"{k}: {v}" for k, v in LEAN.items()) + "}, model: real}"
    text = flow_job(gas, "{pressure: 30 bar, temperature: 30 degC, mass_flow: 2 kg/s}",
                    "- {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 70 bar}}\n")
    cold = dumps(run(loads(text, "job.yaml")))
    _forget(monkeypatch)
    n0 = envelope.traced
    warm = dumps(run(loads(text, "job.yaml")))
    assert envelope.traced == n0 and warm == cold


def test_caching_off_still_gives_the_envelope(monkeypatch):
    monkeypatch.setenv("CALCDOC_CACHE_DIR", "")
    n0 = envelope.traced
    _forget(monkeypatch)
    first = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    _forget(monkeypatch)
    second = envelope.phase_envelope(tuple(LEAN), tuple(LEAN.values()))
    assert envelope.traced == n0 + 2                # nothing kept: traced each time
    assert first.source == "heos" and _fields(second) == _fields(first)
