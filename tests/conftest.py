"""Shared helpers for the tests: job files written inline and loaded without touching the disk."""
from __future__ import annotations

import textwrap

import pytest


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
