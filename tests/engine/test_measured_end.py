"""A compressor or expander with a measured end temperature outside what an adiabatic machine can
reach is refused, pointing at the measured temperature, with the bounds right for the machine."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
START = "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}"
HOT = "{pressure: 800 kPa, temperature: 600 K, mass_flow: 1 kg/s}"
# isentropic end temperature of an ideal gas, T2s = T1·r^((k−1)/k) (Çengel & Boles 2019, ch. 7)
T2S_COMP = 300.0 * 8 ** (0.4 / 1.4)          # 543.4 K for r = 8
T2S_EXP = 600.0 * (1 / 8) ** (0.4 / 1.4)     # 331.3 K for r = 1/8


def _problem(text):
    with pytest.raises(JobError) as ei:
        run(loads(text, "job.yaml"))
    (p,) = ei.value.problems
    return p


def _line(text, needle):
    return next(k + 1 for k, line in enumerate(text.splitlines()) if line.strip() == needle)


@pytest.mark.parametrize("T2", ["500 K", "300 K"])
def test_ideal_compressor_below_isentropic_end_is_refused(T2):
    text = flow_job(AIR_IDEAL, START, f"- name: C\n  process: compressor\n  end:\n    pressure: 800 kPa\n"
                                      f"    temperature: {T2}\n")
    p = _problem(text)
    assert p.line == _line(text, "temperature: " + T2) and p.path.endswith("end.temperature")
    assert "above the isentropic" in p.valid and f"{T2S_COMP - 273.15:.4g}" in p.valid


@pytest.mark.parametrize("T2", ["320 K", "650 K"])
def test_ideal_expander_outside_isentropic_and_inlet_is_refused(T2):
    text = flow_job(AIR_IDEAL, HOT, f"- name: E\n  process: expander\n  end:\n    pressure: 100 kPa\n"
                                    f"    temperature: {T2}\n")
    p = _problem(text)
    assert p.line == _line(text, "temperature: " + T2)
    assert "T2s ≤ T2 ≤ T1" in p.valid and f"{T2S_EXP - 273.15:.4g}" in p.valid
    assert "at or below the isentropic" not in p.found


def test_ideal_expander_inside_bounds_gives_efficiency():
    text = flow_job(AIR_IDEAL, HOT, "- name: E\n  process: expander\n  end:\n    pressure: 100 kPa\n"
                                    "    temperature: 400 K\n")
    q = run(loads(text, "job.yaml")).legs[0].quantities
    # η_s = (T1 − T2)/(T1 − T2s) for an ideal gas with constant cp (Çengel & Boles ch. 7)
    assert q["eta_s"].value == pytest.approx((600 - 400) / (600 - T2S_EXP), rel=1e-12)


def test_real_gas_expander_below_isentropic_end_has_expander_wording():
    import CoolProp.CoolProp as CP

    # isentropic end of nitrogen 20 bar, 300 K → 5 bar, CoolProp called directly
    s1 = CP.PropsSI("S", "P", 20e5, "T", 300.0, "Nitrogen")
    T2s = CP.PropsSI("T", "P", 5e5, "S", s1, "Nitrogen")
    T2 = T2s - 10.0
    text = flow_job("{fluid: Nitrogen, model: real}", "{pressure: 20 bar, temperature: 300 K, mass_flow: 1 kg/s}",
                    f"- name: E\n  process: expander\n  end:\n    pressure: 5 bar\n    temperature: {T2:.3f} K\n")
    p = _problem(text)
    assert p.line == _line(text, f"temperature: {T2:.3f} K") and "T2s ≤ T2 ≤ T1" in p.valid
    assert f"{T2s - 273.15:.4g}" in p.valid
