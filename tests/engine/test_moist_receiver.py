"""Moist air in a closed receiver cooled below its dew point: the condensate against a hand balance of water
(Dalton's law with ideal gases, CoolProp's Water for the saturation pressure), the heat against a first-law
balance from CoolProp's Air and Water called directly, and closed processes on moist air other than a receiver
refused with the leg named (exit 2)."""
from __future__ import annotations

import textwrap

import pytest

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads

JOB = textwrap.dedent("""\
    calcdoc: 1
    calc: {number: RC-1, title: Receiver, revision: A, date: 2026-12-01}
    gas: {fluid: Air, model: real}
    system: closed
    start: {pressure: 9 bar, temperature: 60 degC, dew_point: 35 degC, volume: 2 m3}
    legs:
      - {name: Overnight cooling, process: isochoric, end: {temperature: 10 degC}}
    """)
R_U = 8.314462618   # CODATA 2018
M_A, M_W = 0.02896546, 0.018015268   # molar masses of air (Lemmon et al. 2000) and water (IAPWS-95), as in CoolProp


def test_receiver_condensate_against_a_dalton_hand_balance():
    import CoolProp.CoolProp as CP

    res = run(loads(JOB, "rc.yaml"))
    leg = res.legs[0]
    # hand balance, ideal gases (Dalton): water vapour and dry air each fill the 2 m³
    pws = lambda T: CP.PropsSI("P", "T", T, "Q", 0, "Water")   # noqa: E731  CoolProp Water called directly
    pv1 = pws(308.15)
    m_w = pv1 * 2.0 / (R_U / M_W * 333.15)
    m_v2 = pws(283.15) * 2.0 / (R_U / M_W * 283.15)
    # the model differs from the hand balance by the non-ideality of air at 9 bar (Z ≈ 0.998) in m_da
    assert leg.quantities["condensate"].value == pytest.approx(m_w - m_v2, rel=1e-2)
    assert res.states[1].humidity.phi == pytest.approx(1.0, abs=1e-9)
    assert res.states[1].state.P < 9e5 * 283.15 / 333.15   # the vapour's pressure is gone from the gas


def test_receiver_heat_and_volume_balance_from_coolprop_directly():
    import CoolProp.CoolProp as CP

    res = run(loads(JOB, "rc.yaml"))
    leg = res.legs[0]
    m = res.mass.value
    W1 = res.states[0].humidity.W
    W2 = res.states[1].humidity.W
    P2, T2 = res.states[1].state.P, 283.15
    m_da = m / (1 + W1)
    m_c = leg.quantities["condensate"].value
    assert m_c == pytest.approx(m_da * (W1 - W2), rel=1e-12)
    # volume: dry air at P2 (CoolProp Air), vapour ideal at its partial volume, liquid (CoolProp Water)
    R_v = R_U / M_W
    v_air = 1 / CP.PropsSI("D", "P", P2, "T", T2, "Air")
    V2 = m_da * v_air + m_da * W2 * R_v * T2 / P2 + m_c / CP.PropsSI("D", "P", P2, "T", T2, "Water")
    assert V2 == pytest.approx(2.0, rel=1e-8)
    # first law at constant volume: Q = ΔU of the air, the vapour (ideal) and the liquid
    u_air = lambda P, T: CP.PropsSI("U", "P", P, "T", T, "Air")   # noqa: E731
    u_vap = lambda T: CP.PropsSI("H", "D", 1e-6, "T", T, "Water") - R_v * T   # noqa: E731
    U1 = m_da * (u_air(9e5, 333.15) + W1 * u_vap(333.15))
    U2 = m_da * (u_air(P2, T2) + W2 * u_vap(T2)) + m_c * CP.PropsSI("U", "P", P2, "T", T2, "Water")
    assert leg.quantities["Q_to_gas"].value == pytest.approx(U2 - U1, rel=1e-6)
    assert leg.quantities["W_by_gas"].value == 0.0


def test_other_closed_process_on_moist_air_is_refused():
    text = JOB.replace("process: isochoric, end: {temperature: 10 degC}", "process: isothermal, end: {volume: 1 m3}")
    with pytest.raises(JobError) as ei:
        run(loads(text, "rc.yaml"))
    (p,) = ei.value.problems
    assert "Overnight cooling" in p.found and "isochoric" in p.valid and p.path == "legs[0]"
