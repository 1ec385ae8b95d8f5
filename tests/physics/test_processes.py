"""Closed-system legs held to the outside world: textbook special cases, quadrature, CoolProp."""
import math
from decimal import Decimal, getcontext

import pytest
from scipy.integrate import quad

from calcdoc.physics.closed import Target, closed_leg, polytropic_work
from calcdoc.physics.gas import IdealGas, RealGas

K, M = 1.4, 0.0280134          # demo ideal gas (nitrogen-like)
P1, T1, M_GAS = 5e5, 300.0, 0.2


@pytest.fixture(scope="module")
def ideal():
    return IdealGas("test", K, M)


@pytest.fixture(scope="module")
def nitrogen():
    return RealGas("Nitrogen")


def leg(gas, process, targets, n=None, s1=None, m=M_GAS):
    s1 = s1 or gas.state_PT(P1, T1)
    return closed_leg(gas, "leg", process, 1, s1, m, targets, n)


def q(res, key):
    return res.quantities[key].value


# --- textbook special cases of P v^n = C (common practice: n = 0 isobaric, 1 isothermal, k isentropic,
#     n -> infinity isochoric, for an ideal gas)
def test_n0_is_isobaric(ideal):
    v2 = ideal.state_PT(P1, T1).v * 1.7
    a, b = leg(ideal, "polytropic", [Target("v", v2)], n=0.0), leg(ideal, "isobaric", [Target("v", v2)])
    assert a.end.T == pytest.approx(b.end.T, rel=1e-12)
    assert q(a, "W_by_gas") == pytest.approx(q(b, "W_by_gas"), rel=1e-12)
    assert q(a, "Q_to_gas") == pytest.approx(q(b, "Q_to_gas"), rel=1e-12)


def test_n1_is_isothermal_for_ideal_gas(ideal):
    a, b = leg(ideal, "polytropic", [Target("P", 2e6)], n=1.0), leg(ideal, "isothermal", [Target("P", 2e6)])
    assert a.end.T == pytest.approx(T1, rel=1e-12)
    assert q(a, "W_by_gas") == pytest.approx(q(b, "W_by_gas"), rel=1e-12)
    # W = P1 V1 ln(V2/V1) = m R T ln(P1/P2) for an ideal gas (Cengel & Boles, ch. 4)
    assert q(a, "W_by_gas") == pytest.approx(M_GAS * ideal.R * T1 * math.log(P1 / 2e6), rel=1e-12)


def test_nk_is_isentropic_for_ideal_gas(ideal):
    a, b = leg(ideal, "polytropic", [Target("P", 3e6)], n=K), leg(ideal, "isentropic", [Target("P", 3e6)])
    assert a.end.T == pytest.approx(b.end.T, rel=1e-10)
    assert q(a, "W_by_gas") == pytest.approx(q(b, "W_by_gas"), rel=1e-10)
    assert q(a, "Q_to_gas") == pytest.approx(0.0, abs=1e-8 * abs(q(a, "W_by_gas")))
    assert q(b, "dS") == pytest.approx(0.0, abs=1e-12)


def test_large_n_approaches_isochoric(ideal):
    a = leg(ideal, "polytropic", [Target("P", 1e6)], n=1e7)
    b = leg(ideal, "isochoric", [Target("P", 1e6)])
    assert a.end.T == pytest.approx(b.end.T, rel=1e-6)
    assert abs(q(a, "W_by_gas")) < 1e-6 * abs(q(b, "Q_to_gas"))
    assert q(a, "Q_to_gas") == pytest.approx(q(b, "Q_to_gas"), rel=1e-6)


# --- boundary work against numerical quadrature of the integral of P dV (SciPy quad)
@pytest.mark.parametrize("n", [1.25, 1.0, 0.7, 1.0 + 1e-9, 2.2])
def test_polytropic_work_against_quadrature(ideal, n):
    s1 = ideal.state_PT(P1, T1)
    V1 = s1.v * M_GAS
    V2 = V1 / 3.3
    res = leg(ideal, "polytropic", [Target("v", V2 / M_GAS)], n=n, s1=s1)
    ref, _ = quad(lambda V: P1 * (V1 / V) ** n, V1, V2, epsabs=0, epsrel=1e-13)   # SciPy quad
    assert q(res, "W_by_gas") == pytest.approx(ref, rel=1e-10)


def test_polytropic_work_near_one_is_accurate():
    # exact value in 50-digit decimal arithmetic of P1V1 (r^(1-n) - 1)/(1 - n) (mathematical identity)
    getcontext().prec = 50
    P1V1, r = 1.0e5, 0.25
    for n in (1 + 1e-13, 1 - 1e-10, 1 + 3e-7):
        dn = Decimal(1) - Decimal(n)
        exact = Decimal(P1V1) * ((Decimal(r).ln() * dn).exp() - 1) / dn
        assert polytropic_work(P1V1, r, n) == pytest.approx(float(exact), rel=1e-13)


def test_real_gas_polytropic_end_state_and_work(nitrogen):
    import CoolProp.CoolProp as CP

    s1 = nitrogen.state_PT(15e6, 303.15)
    V1 = s1.v * 0.3
    res = closed_leg(nitrogen, "leg", "polytropic", 1, s1, 0.3, [Target("v", s1.v * 0.6)], 1.45)
    P2 = 15e6 * (1 / 0.6) ** 1.45                                                    # P V^n = C
    assert res.end.P == pytest.approx(P2, rel=1e-9)   # CoolProp's (rho, P) flash iterates to ~1e-10
    # end temperature from CoolProp called directly at (P2, rho2)
    assert res.end.T == pytest.approx(CP.PropsSI("T", "P", P2, "D", 1 / (s1.v * 0.6), "Nitrogen"), rel=1e-8)
    ref, _ = quad(lambda V: 15e6 * (V1 / V) ** 1.45, V1, V1 * 0.6, epsrel=1e-13)     # SciPy quad
    # CoolProp's PT flash echoes P to ~3e-10 relative (its density iteration), hence 1e-9 here
    assert q(res, "W_by_gas") == pytest.approx(ref, rel=1e-9)


def test_real_gas_isothermal_work_against_quadrature(nitrogen):
    # the integral of P dV along the 300 K isotherm with P(T, v) from CoolProp called directly
    import CoolProp.CoolProp as CP

    m = 0.5
    s1 = nitrogen.state_PT(2e7, 300.0)
    res = closed_leg(nitrogen, "leg", "isothermal", 1, s1, m, [Target("P", 2e6)], None)
    ref, _ = quad(lambda v: m * CP.PropsSI("P", "T", 300.0, "D", 1 / v, "Nitrogen"), s1.v, res.end.v,
                  epsrel=1e-10, limit=200)
    assert q(res, "W_by_gas") == pytest.approx(ref, rel=1e-7)
    # and it is not the ideal-gas value P1 V1 ln(V2/V1) at this pressure
    assert abs(q(res, "W_by_gas") - m * s1.P * s1.v * math.log(res.end.v / s1.v)) > 1e-3 * abs(ref)


def test_real_gas_isentropic_work_against_quadrature(nitrogen):
    # W = -dU must equal the integral of P dV along s = const, P(s, v) from CoolProp directly
    import CoolProp.CoolProp as CP

    s1 = nitrogen.state_PT(3e7, 320.0)
    res = closed_leg(nitrogen, "leg", "isentropic", 1, s1, 1.0, [Target("v", s1.v * 2.5)], None)
    ref, _ = quad(lambda v: CP.PropsSI("P", "S", s1.s, "D", 1 / v, "Nitrogen"), s1.v, s1.v * 2.5,
                  epsrel=1e-10, limit=200)
    assert q(res, "W_by_gas") == pytest.approx(ref, rel=1e-7)
    assert res.end.s == pytest.approx(s1.s, rel=1e-10)


def test_temperature_target_on_real_polytropic(nitrogen):
    s1 = nitrogen.state_PT(5e6, 290.0)
    res = closed_leg(nitrogen, "leg", "polytropic", 1, s1, 1.0, [Target("T", 350.0)], 1.3)
    assert res.end.T == pytest.approx(350.0, rel=1e-9)
    assert res.end.P * res.end.v ** 1.3 == pytest.approx(s1.P * s1.v ** 1.3, rel=1e-9)


def test_unreachable_temperature_on_real_polytropic(nitrogen):
    # along P v^1.3 = C from 5 MPa, 290 K nitrogen peaks near 377 K (CoolProp, real-gas behaviour at
    # liquid-like density): 400 K is not on the path and must be refused, not approximated
    from calcdoc.errors import PhysicsError

    s1 = nitrogen.state_PT(5e6, 290.0)
    with pytest.raises(PhysicsError, match="path.no_target"):
        closed_leg(nitrogen, "leg", "polytropic", 1, s1, 1.0, [Target("T", 400.0)], 1.3)


def test_n_derived_from_measured_end_state(ideal):
    s1 = ideal.state_PT(P1, T1)
    res = leg(ideal, "polytropic", [Target("P", 2.4e6), Target("T", 410.0)], n=None, s1=s1)
    s2 = ideal.state_PT(2.4e6, 410.0)
    assert q(res, "n") == pytest.approx(math.log(2.4e6 / P1) / math.log(s1.v / s2.v), rel=1e-12)  # definition


@pytest.mark.parametrize("process, target", [("isobaric", "P"), ("isochoric", "v"), ("isothermal", "T")])
def test_target_that_contradicts_the_process(ideal, process, target):
    from calcdoc.errors import PhysicsError

    s1 = ideal.state_PT(P1, T1)
    with pytest.raises(PhysicsError, match="leg.target_not_reachable"):
        leg(ideal, process, [Target(target, 1.0)], s1=s1)


def test_first_law_closes_on_every_leg(ideal, nitrogen):
    for gas in (ideal, nitrogen):
        s1 = gas.state_PT(2e6, 320.0)
        for process, t, n in [("polytropic", Target("v", s1.v / 2), 1.3), ("isentropic", Target("P", 5e6), None),
                              ("isothermal", Target("v", s1.v * 2), None), ("isobaric", Target("T", 400.0), None),
                              ("isochoric", Target("T", 280.0), None)]:
            res = closed_leg(gas, "leg", process, 1, s1, 0.7, [t], n)
            Qv, Wv, dU = q(res, "Q_to_gas"), q(res, "W_by_gas"), q(res, "dU")
            assert Qv - Wv == pytest.approx(dU, abs=1e-9 * max(abs(Qv), abs(Wv), 1.0))   # first law
            assert dU == pytest.approx(0.7 * (res.end.u - s1.u), rel=1e-12)


def test_mixture_polytropic_leg_end_state():
    # CoolProp has no (density, pressure) flash for mixtures: the end state is found by iterating on T;
    # reference: CoolProp's high-level interface called directly at the end state found
    import CoolProp.CoolProp as CP

    mix = RealGas(mixture=(("Methane", 0.9), ("Ethane", 0.07), ("Propane", 0.03)))
    s1 = mix.state_PT(50e5, 300.0)
    res = closed_leg(mix, "leg", "polytropic", 1, s1, 1.0, [Target("v", s1.v / 2)], 1.25)
    P2 = 50e5 * 2 ** 1.25                                                            # P v^n = C
    assert res.end.P == pytest.approx(P2, rel=1e-9)
    fluid = "HEOS::Methane[0.9]&Ethane[0.07]&Propane[0.03]"
    assert CP.PropsSI("P", "Dmass", 2 / s1.v, "T", res.end.T, fluid) == pytest.approx(P2, rel=1e-9)
