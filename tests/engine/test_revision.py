"""Comparing two revisions: exactly the inputs changed, and the results that moved."""
from __future__ import annotations

import subprocess

import pytest
from _limits_helpers import ideal_job, write

import calcdoc
from calcdoc.engine import run
from calcdoc.engine.revision import compare, with_changes
from calcdoc.job import loads
from calcdoc.report.terminal import diff_text

LIMITS = "limits:\n  - {name: Peak, quantity: pressure, at: Compression, max: 270 kPa, basis: common practice}\n"


def both(old_text: str, new_text: str):
    a, b = loads(old_text, "old.yaml"), loads(new_text, "new.yaml")
    ra, rb = run(a), run(b)
    return compare(a, b, ra, rb), ra, rb


def test_diff_lists_exactly_the_inputs_changed_and_the_results_that_moved():
    d, ra, rb = both(ideal_job(LIMITS), ideal_job(LIMITS, P1="110 kPa", revision="B"))
    assert [(c.path, c.old, c.new) for c in d.inputs] == [("calc.revision", "A", "B"),
                                                          ("start.pressure", "100 kPa", "110 kPa")]
    moved = {c.key: c for c in d.moved}
    # Ideal gas, fixed start volume and temperature: every pressure and the mass scale with P1 (+10 %),
    # temperatures and specific volumes along a path fixed by volume ratios do not (P·v = R·T;
    # T2/T1 = (V1/V2)^(n−1), Çengel, Boles & Kanoğlu 2019, ch. 4).
    for key in ("state 1 P", "state 2 P", "state 3 P", "mass m"):
        assert moved[key].percent == pytest.approx(10.0, rel=1e-9), key
    # the work done by the gas is negative (compression) and 10 % larger in size: change / |old| = −10 %
    assert moved["leg 'Compression' W_by_gas"].percent == pytest.approx(-10.0, rel=1e-9)
    for key in ("state 1 T", "state 2 T", "state 3 T", "leg 'Compression' n"):
        assert key not in moved
    # specific volume scales with 1/P1: −1/11 = −9.09 %
    assert moved["state 1 v"].percent == pytest.approx(-100 / 11, rel=1e-9)
    # the check went from pass to fail and is listed first (a change of status)
    assert d.moved[0].key == "check 'Peak' max at Compression (end, state 2) status"
    assert (d.moved[0].old, d.moved[0].new) == ("pass", "fail")
    # old and new are the values of the two runs
    assert moved["state 2 P"].old == ra.states[1].state.P and moved["state 2 P"].new == rb.states[1].state.P
    # ordered by relative change, largest first, after the status changes
    pcts = [abs(c.percent) for c in d.moved if c.percent is not None]
    assert pcts == sorted(pcts, reverse=True)
    assert d.unchanged > 0
    text = diff_text(d)
    assert "start.pressure: 100 kPa → 110 kPa" in text and f"{d.unchanged} results unchanged" in text


def test_identical_revisions_have_no_changes():
    d, _, _ = both(ideal_job(LIMITS), ideal_job(LIMITS))
    assert d.inputs == () and d.moved == ()


def test_a_leg_added_is_listed_by_name_not_as_renumbered_legs():
    extra = "  - {name: Vent, process: isothermal, end: {volume: 1 L}}\n"
    old = ideal_job()
    new = old.replace("    end: {temperature: 320 K}\n", "    end: {temperature: 320 K}\n" + extra)
    d, _, _ = both(old, new)
    assert {c.path for c in d.inputs} == {"legs[Vent].name", "legs[Vent].process", "legs[Vent].end.volume"}
    assert all(c.old is None for c in d.inputs)


def test_changes_since_section_in_the_report_html():
    from calcdoc.report.render import render_html

    a, b = loads(ideal_job(), "old.yaml"), loads(ideal_job(P1="110 kPa", revision="B"), "new.yaml")
    res = with_changes(run(b), a, run(a))
    html = render_html(res)
    assert "Changes since revision A" in html and "110 kPa" in html
    assert res.extra["changes_since"]["inputs"][1]["path"] == "start.pressure"


def test_diff_against_a_git_revision(tmp_path, capsys):
    git = ["git", "-c", "user.name=T", "-c", "user.email=t@example.invalid", "-c", "commit.gpgsign=false"]
    subprocess.run(["git", "init", "-q", str(tmp_path)], check=True)
    job = write(tmp_path, "job.yaml", ideal_job())
    subprocess.run([*git, "-C", str(tmp_path), "add", "job.yaml"], check=True)
    subprocess.run([*git, "-C", str(tmp_path), "commit", "-qm", "rev A"], check=True)
    job.write_text(ideal_job(P1="120 kPa", revision="B"), encoding="utf-8")
    assert calcdoc.main(["diff", str(job), "--against", "HEAD"]) == 0
    out = capsys.readouterr().out
    assert "start.pressure: 100 kPa → 120 kPa" in out and "calc.revision: A → B" in out
    assert calcdoc.main(["diff", str(job), "--against", "no-such-rev"]) == 2


def test_run_changes_since_writes_the_comparison(tmp_path):
    import json

    old = write(tmp_path, "old.yaml", ideal_job())
    new = write(tmp_path, "new.yaml", ideal_job(P1="110 kPa", revision="B"))
    out = tmp_path / "out"
    assert calcdoc.main(["run", str(new), "--changes-since", str(old), "--no-pdf", "-o", str(out), "-q"]) == 0
    ch = json.loads((out / "T-LIM-001_revB.json").read_text())["changes_since"]
    assert ch["revision"] == "A" and [c["path"] for c in ch["inputs"]] == ["calc.revision", "start.pressure"]
