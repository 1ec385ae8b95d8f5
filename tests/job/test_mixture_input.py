"""Mixture input: the trade's short names, mole or mass basis, and normalisation of a sum within 1e-3."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.engine.common import gas_findings
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.physics.fluids import TRADE_NAMES, known_fluid

START = "{pressure: 30 bar, temperature: 40 degC, mass_flow: 1 kg/s}"
LEG = "- {name: Heat, process: heater, end: {temperature: 60 degC}}\n"


def _gas(mix: str, basis: str = "") -> str:
    return "{mixture: " + mix + (f", basis: {basis}" if basis else "") + ", model: real}"


def test_every_short_name_is_a_coolprop_fluid():
    # CoolProp called directly: each mapped name is a pure fluid it knows
    assert all(known_fluid(name) for name in TRADE_NAMES.values())
    assert len(TRADE_NAMES) == 15


def test_short_names_map_to_coolprop_names_and_mass_basis_converts():
    import CoolProp.CoolProp as CP

    job = loads(flow_job(_gas("{C1: 0.8, C2: 0.15, CO2: 0.05}", "mass"), START, LEG), "j.yaml")
    names = [c for c, _ in job.gas.mixture]
    assert names == ["Methane", "Ethane", "CarbonDioxide"]
    # hand conversion with the molar masses from CoolProp called directly: x_i = (w_i/M_i)/Σ(w_j/M_j)
    M = [CP.PropsSI("molar_mass", c) for c in names]
    n = [w / m for w, m in zip((0.8, 0.15, 0.05), M, strict=True)]
    for (_, x), ni in zip(job.gas.mixture, n, strict=True):
        assert x == pytest.approx(ni / sum(n), rel=1e-12)
    assert gas_findings(job) == []


def test_sum_within_1e3_is_normalised_with_a_warning_showing_the_sum():
    from calcdoc.report.words import say

    job = loads(flow_job(_gas("{C1: 0.9, C2: 0.0993, N2: 0.0015}"), START, LEG), "j.yaml")
    assert sum(x for _, x in job.gas.mixture) == pytest.approx(1.0, abs=1e-15)
    (f,) = gas_findings(job)
    assert "1.000800" in say(f) and "mole" in say(f)


def test_sum_off_by_more_than_1e3_is_bad_input_with_the_sum():
    with pytest.raises(JobError) as ei:
        loads(flow_job(_gas("{C1: 0.9, C2: 0.098}"), START, LEG), "j.yaml")
    (p,) = ei.value.problems
    assert "sum to 0.998" in p.found and p.path == "gas.mixture"


def test_the_same_component_twice_is_bad_input():
    with pytest.raises(JobError) as ei:
        loads(flow_job(_gas("{C1: 0.5, Methane: 0.5}"), START, LEG), "j.yaml")
    assert "given twice" in ei.value.problems[0].found
