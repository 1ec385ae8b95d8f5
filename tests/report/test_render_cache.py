"""The report's templates are compiled once per process and kept compiled in the user's cache: a rebuild
(``calcdoc watch``, a batch worker's next job) and a later cold run skip the compiling, and the HTML is the
same as from templates compiled afresh."""
from __future__ import annotations

from pathlib import Path

import jinja2
import pytest

from calcdoc.engine import run
from calcdoc.job import load
from calcdoc.report import render

DEMO = Path(__file__).resolve().parents[2] / "example_jobs" / "press_gas_spring.yaml"


@pytest.fixture
def fresh(tmp_path, monkeypatch):
    """An empty cache folder, and no environment made yet in this process."""
    monkeypatch.setenv("CALCDOC_CACHE_DIR", str(tmp_path))
    render._env.cache_clear()
    yield tmp_path
    render._env.cache_clear()


@pytest.fixture
def compiles(monkeypatch):
    """How many templates Jinja2 compiles from source."""
    count = [0]
    real = jinja2.Environment.compile

    def counting(self, *a, **kw):
        count[0] += 1
        return real(self, *a, **kw)

    monkeypatch.setattr(jinja2.Environment, "compile", counting)
    return count


def test_second_render_in_a_process_compiles_nothing(fresh, compiles):
    results = run(load(DEMO))
    first = render.render_html(results)
    n = compiles[0]
    assert n > 0                                  # report.html and the templates it includes
    assert render._env() is render._env()
    assert render.render_html(results) == first and compiles[0] == n


def test_a_new_process_loads_the_compiled_templates_from_the_cache(fresh, compiles):
    results = run(load(DEMO))
    first = render.render_html(results)
    assert list((fresh / "templates").iterdir())  # Jinja2's bytecode files
    render._env.cache_clear()                     # as a new process would start
    n = compiles[0]
    assert render.render_html(results) == first and compiles[0] == n


def test_without_a_cache_the_html_is_the_same(fresh, compiles, monkeypatch):
    results = run(load(DEMO))
    cached = render.render_html(results)
    monkeypatch.setenv("CALCDOC_CACHE_DIR", "")
    render._env.cache_clear()
    n = compiles[0]
    assert render.render_html(results) == cached and compiles[0] > n
