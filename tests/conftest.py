"""Shared helpers for the tests: build job files from small dicts."""
from __future__ import annotations

import textwrap

import pytest
import yaml

TITLE = {"number": "TST-000-C-001", "title": "Test job", "project": "Tests", "revision": "A",
         "date": "2026-11-28"}


def job_text(gas: dict, start: dict, legs: list[dict], **extra) -> str:
    doc = {"calcdoc": 1, "calc": dict(TITLE), "gas": gas, "start": start, "legs": legs}
    doc.update(extra)
    return yaml.safe_dump(doc, sort_keys=False, allow_unicode=True)


@pytest.fixture
def make_job():
    from calcdoc.jobfile import loads

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
        from calcdoc.jobfile import loads

        return run(loads(text, "job.yaml"))
    return run
