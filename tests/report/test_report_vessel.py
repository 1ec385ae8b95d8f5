"""The calc package of a vessel job and of a solved job, read back with pypdf: the P and T over time chart, the
vessel cautions, the time series, the "Solved input" section; reproducible bytes."""
from __future__ import annotations

import io
import re
from pathlib import Path

import pytest
from pypdf import PdfReader

import calcdoc
from calcdoc.job import load
from calcdoc.report import methods

ROOT = Path(__file__).resolve().parents[2]
BLOWDOWN = ROOT / "example_jobs" / "receiver_blowdown.yaml"
HOLDUP = ROOT / "example_jobs" / "receiver_holdup_sizing.yaml"


def _text(pdf: bytes) -> str:
    return re.sub(r"\s+", " ", "\n".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages))


@pytest.fixture(scope="module")
def blowdown():
    res = calcdoc.run(load(BLOWDOWN))
    return res, calcdoc.render(res), calcdoc.render(res, pdf=False)


@pytest.fixture(scope="module")
def holdup():
    res = calcdoc.run(load(HOLDUP))
    return res, calcdoc.render(res)


def test_vessel_report_has_the_time_chart_series_and_cautions(blowdown):
    res, pdf, html = blowdown
    text = _text(pdf)
    assert 'alt="Pressure and temperature against time"' in html
    assert "Time series: Vent-down" in text and "Time series: Pump-up" in text
    assert "not a relief-device sizing" in text
    assert "brittle-fracture" in text
    assert "minimum design metal temperature" in text
    # the legs' durations as the results hold them, in the summary (s, 4 figures)
    for leg in res.legs:
        assert f"{leg.quantities['duration'].value:.1f}" in text


def test_vessel_methods_are_cited_without_recollection(blowdown):
    res, _, _ = blowdown
    used = res.methods_used()
    for mid in ("vessel.balance", "nozzle.real", "orifice.area"):
        assert mid in used
        for key in methods.method(mid).refs:
            assert "from memory" not in methods.reference(key).lower()


def test_vessel_report_is_byte_for_byte_reproducible(blowdown):
    res, pdf, _ = blowdown
    assert calcdoc.render(calcdoc.run(load(BLOWDOWN))) == pdf


def test_solved_job_report_shows_the_solved_input(holdup):
    res, pdf = holdup
    text = _text(pdf)
    sv = res.extra["solve"]
    assert "Solved input" in text
    assert "vessel.volume" in text
    assert "0.5 m3:" in text and "30 m3:" in text                     # the achieved values at the bracket ends
    assert f"{sv['value']['value']:.6f}".rstrip("0")[:6] in text       # the solved volume, in m³
    assert sv["achieved"]["value"] == pytest.approx(600.0, rel=1e-9)    # the target: 10 min
    # every table is at the solved value: the vessel volume of the summary
    assert res.extra["vessel"]["volume"]["value"] == sv["value"]["value"]
