"""Shared helpers for the tests (job files from small dicts or inline YAML) and the hypothesis profiles.

CI (the default profile) runs enough property-based examples to matter and stays within about two
minutes; CALCDOC_FUZZ=long runs many more (a separate, longer run before a release).
"""
from __future__ import annotations

import os
import textwrap

import pytest
import yaml
from hypothesis import HealthCheck, settings

settings.register_profile("ci", max_examples=600, deadline=None, derandomize=True, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("long", max_examples=5000, deadline=None, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile("long" if os.environ.get("CALCDOC_FUZZ") == "long" else "ci")


@pytest.fixture(scope="session", autouse=True)
def _private_cache_dir(tmp_path_factory):
    """The tests keep calcdoc's cache (pint's definitions, saturation domes) in a folder of their own,
    inherited by the commands they start, never the user's."""
    old = os.environ.get("CALCDOC_CACHE_DIR")
    os.environ["CALCDOC_CACHE_DIR"] = str(tmp_path_factory.mktemp("calcdoc-cache"))
    yield
    if old is None:
        os.environ.pop("CALCDOC_CACHE_DIR", None)
    else:
        os.environ["CALCDOC_CACHE_DIR"] = old

TITLE = {"number": "TST-000-C-001", "title": "Test job", "project": "Tests", "revision": "A",
         "date": "2026-11-28"}


def job_text(gas: dict, start: dict, legs: list[dict], **extra) -> str:
    doc = {"calcdoc": 1, "calc": dict(TITLE), "gas": gas, "start": start, "legs": legs}
    doc.update(extra)
    return yaml.safe_dump(doc, sort_keys=False, allow_unicode=True)


@pytest.fixture
def make_job():
    from calcdoc.job import loads

    def _make(gas, start, legs, **extra):
        return loads(job_text(gas, start, legs, **extra), "test.yaml")

    return _make


def dedent(text: str) -> str:
    return textwrap.dedent(text).lstrip("\n")


def flow_job(gas: str, start: str, legs: str, extra: str = "") -> str:
    """A steady-flow job file: gas and start as YAML flow mappings, legs as an indented block."""
    return textwrap.dedent(f"""\
        calcdoc: 1
        calc: {{number: TEST-001, title: Test job, revision: A, date: 2026-01-01}}
        gas: {gas}
        system: flow
        start: {start}
        legs:
        """) + textwrap.indent(textwrap.dedent(legs), "  ") + extra


@pytest.fixture
def run_flow_text():
    def run(text: str):
        from calcdoc.engine import run
        from calcdoc.job import loads

        return run(loads(text, "job.yaml"))
    return run


def said(res, items=None) -> list[str]:
    """The warnings of results (or other findings: facts, notes) as the report words them, in the job's units."""
    from calcdoc.report.words import NOTES, note, say

    if items is None:
        items = res.warnings
    from calcdoc.errors import Finding

    return [say(w, res.job.units) if isinstance(w, Finding) and (w.code not in NOTES) else note(w, res.job.units)
            for w in items]
