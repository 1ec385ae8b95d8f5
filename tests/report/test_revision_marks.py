"""Revision marks (``run --changes-since OLD.yaml``): changed inputs and results carry a mark in the margin,
and the changes section names them by the key path as the user wrote it and by their table label, with old
and new values in the job's units."""
from __future__ import annotations

import re

import pytest

from calcdoc.engine import run
from calcdoc.engine.revision import with_changes
from calcdoc.job import loads
from calcdoc.report import render

OLD = """calcdoc: 1
calc: {number: R-001, title: Revisions, revision: A, date: 2026-11-30,
       history: [{revision: A, date: 2026-11-30, description: Issued for review}]}
units: {system: SI, pressure: barg, power: kW}
site: {atmosphere: 100 kPa}
gas: {fluid: Air, model: ideal}
system: flow
start: {pressure: 0 barg, temperature: 20 degC, mass_flow: 1 kg/s}
legs:
  - {name: Stage 1, process: compressor, efficiency: {isentropic: 0.8}, end: {pressure: 3 barg}}
  - {name: Cooler, process: cooler, pressure_drop: 0.1 bar, end: {temperature: 40 degC}}
limits:
  - {name: Motor, quantity: total_power, max: 300 kW, basis: common practice}
"""
NEW = (OLD.replace("revision: A, date: 2026-11-30,\n", "revision: B, date: 2026-12-02,\n")
       .replace("description: Issued for review}]", "description: Issued for review},\n"
                "                 {revision: B, date: 2026-12-02, description: Discharge raised}]")
       .replace("end: {pressure: 3 barg}", "end: {pressure: 4 barg}"))


@pytest.fixture(scope="module")
def html():
    old, new = loads(OLD, "r.yaml"), loads(NEW, "r.yaml")
    return render.render_html(with_changes(run(new), old, run(old)))


def _row(html: str, text: str) -> str:
    i = html.index(text)
    return html[html.rindex("<tr", 0, i):html.index("</tr>", i)]


def test_changed_input_and_results_carry_the_mark_unchanged_do_not(html):
    inputs = html[html.index("<h2>3 Inputs</h2>"):html.index("<h2>4 Assumptions</h2>")]
    row = _row(inputs, "legs[0].end.pressure")
    assert 'class="changed"' in row and '<span class="revmark">B</span>' in row
    assert 'class="changed"' not in _row(inputs, "legs[1].end.temperature")
    results = html[html.index("<h2>6 Results</h2>"):html.index("<h2>7 Design checks</h2>")]
    states = results[:results.index("</table>")]
    rows = re.findall(r"<tr(?: class=\"changed\")?><td>(?:<span class=\"revmark\">B</span>)?(\d+)</td>", states)
    marked = re.findall(r"<tr class=\"changed\"><td><span class=\"revmark\">B</span>(\d+)</td>", states)
    assert rows == ["1", "2", "3"] and marked == ["2", "3"]        # state 1 (the inlet) did not change
    checks = html[html.index("<h2>7 Design checks</h2>"):]
    assert 'class="changed"' in _row(checks, ">Motor</td>")


def test_the_changes_section_names_keys_as_written_and_by_table_label(html):
    section = html[html.index("Changes since revision A"):html.index("<h2>2 Basis</h2>")]
    row = _row(section, "legs[0].end.pressure")
    assert "(Stage 1)" in row and "3 barg" in row and "4 barg" in row
    row = _row(section, "State 2, P (pressure)")
    assert "3.0000\u202fbarg" in row and "4.0000\u202fbarg" in row
    assert row.endswith("<td class=\"n\">—</td>")        # no percent of a gauge pressure
    row = _row(section, "State 2, T (temperature)")
    assert "°C" in row and "\u202fK</td>" in row and row.endswith("<td class=\"n\">—</td>")   # a difference in K, no %
    row = _row(section, "Leg Stage 1, P<sub>gas</sub> (gas power)")
    assert "kW" in row and not row.endswith("<td class=\"n\">—</td>")
    assert "leg 'Stage 1'" not in section and "state 2 P" not in section     # no internal key names
