"""The conclusions section: generated from the results (where the gas goes, totals, the governing check and
its margin, how many checks pass), placed right after the title block, in the job's units."""
from __future__ import annotations

import re

from calcdoc.engine import run
from calcdoc.job import loads
from calcdoc.report import render
from calcdoc.report.conclusions import governing

JOB = """calcdoc: 1
calc: {{number: C-001, title: Conclusions, revision: A, date: 2026-11-30}}
units: {{system: SI, pressure: barg, power: kW}}
site: {{atmosphere: 100 kPa}}
gas: {{fluid: Air, model: ideal}}
system: flow
start: {{pressure: 0 barg, temperature: 20 degC, mass_flow: 1 kg/s}}
legs:
  - {{name: Stage 1, process: compressor, efficiency: {{isentropic: 0.8}}, end: {{pressure: 3 barg}}}}
  - {{name: Cooler, process: cooler, pressure_drop: 0.1 bar, end: {{temperature: 40 degC}}}}
limits:
  - {{name: Motor, quantity: total_power, max: {pmax}, margin: 10 %, basis: common practice}}
  - {{name: Discharge, quantity: temperature, at: [Stage 1], max: 250 degC, basis: common practice}}
"""


def _section(html: str) -> str:
    return html[html.index("<h2>Conclusions</h2>"):html.index("1 Summary")]


def test_conclusions_follow_the_title_block_and_state_the_results():
    res = run(loads(JOB.format(pmax="500 kW"), "c.yaml"))
    html = render.render_html(res)
    assert html.index("Calculation package") < html.index("<h2>Conclusions</h2>") < html.index("1 Summary")
    text = _section(html)
    assert "All 2 design checks pass" in text
    # the governing check is the one with the least margin beyond its requirement, relative to its limit:
    # the discharge (a few tens of K under 523 K) rather than the motor (over half of 500 kW spare)
    g = governing(res.checks)
    assert g.name == "Discharge"
    assert "The governing check is Discharge at Stage 1" in text
    assert re.search(r"max 250\.00\u202f°C", text)
    P = sum(leg.quantities["power"].value for leg in res.legs if leg.process == "compressor")
    assert f"{P / 1e3:.2f}\u202fkW" in text.replace("\u2009", "")
    assert "barg" in text and "kPa" not in text


def test_a_failing_check_governs_and_the_count_says_so():
    res = run(loads(JOB.format(pmax="150 kW"), "c.yaml"))
    assert [c.status for c in res.checks] == ["fail", "pass"]
    text = _section(render.render_html(res))
    assert "1 of 2 design checks pass; this calculation does not pass" in text
    assert "The governing check is Motor at train" in text and "against a required 10 %" in text


def test_reference_numbers_are_cited_as_ranges_and_numbers_do_not_split():
    from calcdoc.report import format as fmt

    assert fmt.refs([3, 9, 10, 11, 12, 13, 14]) == "3, 9–14"
    assert fmt.refs([2, 1, 4, 5]) == "1, 2, 4, 5"
    # a number with a thousands separator is kept on one line (the separator is a breaking thin space)
    assert str(fmt.num(3436.13, 6)) == '<span class="nw">3\u2009436.13</span>'
    assert str(fmt.num(12.5)) == "12.500"
