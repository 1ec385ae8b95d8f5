"""The reciprocating cylinder against the outside world: closed forms, SciPy quadrature of the P–V loop,
a rod-load hand calculation, and interstage pressures by a hand iteration written here."""
from __future__ import annotations

import math

import pytest

from calcdoc.physics.cylinder import (
    Cylinder,
    cycle,
    displacement,
    face_areas,
    indicated_work,
    isentropic_exponent,
    rod_loads,
    settle,
    volumetric_efficiency,
)
from calcdoc.physics.gas import IdealGas

AIR = IdealGas("Air", 1.4, 0.0289647)


def test_displacement_single_and_double_acting():
    # closed form: swept volume per revolution π/4·D²·S (head end), π/4·(D² − d²)·S (crank end)
    D, S, d, N = 0.2, 0.12, 0.04, 500 / 60
    single = Cylinder(D, S, d, N, 0.15, False, count=1)
    double = Cylinder(D, S, d, N, 0.15, True, count=2)
    assert displacement(single) == pytest.approx(math.pi / 4 * D**2 * S * N, rel=1e-14)
    assert displacement(double) == pytest.approx(2 * math.pi / 4 * (2 * D**2 - d**2) * S * N, rel=1e-14)
    # hand arithmetic: π/4·(2·0.04 − 0.0016)·0.12·8.3333 = 0.0615752 m³/s per double-acting cylinder
    assert displacement(double) / 2 == pytest.approx(0.0615752, rel=1e-6)


def test_volumetric_efficiency_closed_form_and_cycle_geometry():
    # closed form η_v = 1 − L − c·(r^(1/n) − 1); hand value: 1 − 0.15·(3^(1/1.3) − 1) = 0.80077
    assert volumetric_efficiency(0.15, 0.0, 3.0, 1.3) == pytest.approx(1 - 0.15 * (3 ** (1 / 1.3) - 1), rel=1e-14)
    assert volumetric_efficiency(0.15, 0.0, 3.0, 1.3) == pytest.approx(0.80077, abs=5e-6)
    # the same from the corners of the ideal diagram: the stroke that draws gas in is V_1 − V_4
    cy = cycle(1e5, 3e5, 1e-3, 0.15, 1.4, 1.3)
    V1, _, _, V4 = cy.V
    assert (V1 - V4) / 1e-3 == pytest.approx(volumetric_efficiency(0.15, 0.0, 3.0, 1.3), rel=1e-12)
    # loss L and Z ratio enter linearly and inside the bracket (closed form)
    assert volumetric_efficiency(0.1, 0.04, 4.0, 1.25, 1.05) == pytest.approx(
        1 - 0.04 - 0.1 * (1.05 * 4 ** (1 / 1.25) - 1), rel=1e-14)
    # no clearance: the whole stroke draws gas in
    assert volumetric_efficiency(0.0, 0.0, 10.0, 1.3) == 1.0


@pytest.mark.parametrize("n_c,n_e,c", [(1.4, 1.4, 0.1), (1.35, 1.25, 0.15), (1.2, 1.0, 0.08), (1.0, 1.3, 0.2)])
def test_indicated_work_against_scipy_quadrature(n_c, n_e, c):
    from scipy.integrate import quad

    Ps, Pd, Vs = 2e5, 7e5, 2.5e-3
    V1 = Vs * (1 + c)
    V2 = V1 * (Ps / Pd) ** (1 / n_c)
    V3 = c * Vs
    V4 = V3 * (Pd / Ps) ** (1 / n_e)
    # work done on the gas around the loop, −∮P·dV, each process integrated by SciPy quad
    comp = -quad(lambda V: Ps * (V1 / V) ** n_c, V1, V2, epsabs=0, epsrel=1e-12)[0]
    disch = -quad(lambda V: Pd, V2, V3)[0]
    reexp = -quad(lambda V: Pd * (V3 / V) ** n_e, V3, V4, epsabs=0, epsrel=1e-12)[0]
    suct = -quad(lambda V: Ps, V4, V1)[0]
    W_quad = comp + disch + reexp + suct
    assert indicated_work(Ps, Pd, Vs, c, n_c, n_e) == pytest.approx(W_quad, rel=1e-9)   # SciPy quad
    assert cycle(Ps, Pd, Vs, c, n_c, n_e).W == pytest.approx(W_quad, rel=1e-9)


def test_indicated_work_equal_exponents_closed_form():
    # with n_c = n_e = n the loop is n/(n − 1)·P_s·(V_1 − V_4)·(r^((n−1)/n) − 1) (the flow work of the gas drawn in)
    Ps, Pd, Vs, c, n = 1e5, 3e5, 1e-3, 0.0, 1.4
    assert indicated_work(Ps, Pd, Vs, c, n, n) == pytest.approx(3.5 * 100.0 * (3 ** (0.4 / 1.4) - 1), rel=1e-12)


def test_cycle_points_follow_each_process():
    cy = cycle(1e5, 4e5, 1e-3, 0.1, 1.3, 1.2)
    names = [p[0] for p in cy.processes]
    assert names == ["compression", "discharge", "re_expansion", "suction"]
    _, V, P = cy.processes[0]
    assert all(p * v**1.3 == pytest.approx(P[0] * V[0] ** 1.3, rel=1e-12) for v, p in zip(V, P, strict=True))
    assert P[-1] == pytest.approx(4e5, rel=1e-12)


def test_rod_loads_hand_calculation():
    # hand calculation: D = 200 mm, d = 40 mm; A_he = π/4·0.2² = 0.0314159 m², A_rod = π/4·0.04² = 0.00125664 m²,
    # A_ce = 0.0301593 m²; P_s = 3 bar, P_d = 9 bar, atmosphere 101 325 Pa on the rod outside the packing
    A_he, A_ce, A_rod = 0.0314159265, 0.0301592895, 0.0012566371
    assert face_areas(0.2, 0.04) == pytest.approx((A_he, A_ce, A_rod), rel=1e-7)
    F_c = 9e5 * A_he - 3e5 * A_ce - 101325 * A_rod      # = 28274.33 − 9047.79 − 127.33 = 19099.2 N
    F_t = 9e5 * A_ce - 3e5 * A_he + 101325 * A_rod      # = 27143.36 − 9424.78 + 127.33 = 17845.9 N
    c, t = rod_loads(0.2, 0.04, 3e5, 9e5, 101325.0, True)
    assert c == pytest.approx(19099.2, abs=0.1) and c == pytest.approx(F_c, rel=1e-7)
    assert t == pytest.approx(17845.9, abs=0.1) and t == pytest.approx(F_t, rel=1e-7)
    # single acting, crank end at suction throughout: no tension while suction is above the atmosphere
    c1, t1 = rod_loads(0.2, 0.04, 3e5, 9e5, 101325.0, False)
    assert c1 == pytest.approx(F_c, rel=1e-7)
    assert t1 == pytest.approx((101325 - 3e5) * A_rod, rel=1e-6) and t1 < 0


def test_isentropic_exponent_of_an_ideal_gas_is_k():
    s = AIR.state_PT(3e5, 300.0)
    assert isentropic_exponent(AIR, s) == pytest.approx(1.4, rel=1e-8)   # P·v^k = const (ideal gas, closed form)


def _stage_flow(cyl: Cylinder, Ps: float, Ts: float, Pd: float, n_e: float) -> float:
    """Mass flow of an ideal-gas cylinder, written out here: η_v·V̇_d·P_s/(R·T_s)."""
    R = 8.314462618 / 0.0289647
    A = math.pi / 4 * cyl.D**2
    Vd = (2 * A - math.pi / 4 * cyl.d**2 if cyl.double else A) * cyl.S * cyl.N * cyl.count
    eta = 1 - cyl.L - cyl.c * ((Pd / Ps) ** (1 / n_e) - 1)
    return eta * Vd * Ps / (R * Ts)


def test_two_stage_interstage_pressure_equal_flows_and_hand_iteration():
    c1 = Cylinder(0.25, 0.15, 0.045, 10.0, 0.12, True)
    c2 = Cylinder(0.15, 0.15, 0.045, 10.0, 0.14, True)
    P_in, P_out, T_in, T_ic, drop = 1e5, 10e5, 298.15, 308.15, 0.02

    def flow(k, Ps, Pd):
        return _stage_flow(c1, Ps, T_in, Pd, 1.4) if k == 0 else _stage_flow(c2, Ps, T_ic, Pd, 1.4)

    pressures, evaluations = settle(P_in, P_out, 2, flow, lambda k, Pd: Pd * (1 - drop))
    Pi = pressures[0]
    m1, m2 = flow(0, P_in, Pi), flow(1, Pi * (1 - drop), P_out)
    assert abs(m1 - m2) / m1 < 1e-6                      # equal mass flows through both cylinders
    assert pressures[1] == P_out and evaluations > 0
    # hand iteration: bisection on the interstage pressure until the flows agree (written here, 200 halvings)
    lo, hi = P_in * 1.0001, P_out / (1 - drop) * 0.9999
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if _stage_flow(c2, mid * (1 - drop), T_ic, P_out, 1.4) > _stage_flow(c1, P_in, T_in, mid, 1.4):
            hi = mid
        else:
            lo = mid
    assert Pi == pytest.approx(0.5 * (lo + hi), rel=1e-9)


def test_three_stage_series_passes_one_flow():
    cyls = [Cylinder(0.3, 0.15, 0.05, 10.0, 0.12, True), Cylinder(0.2, 0.15, 0.05, 10.0, 0.12, True),
            Cylinder(0.12, 0.15, 0.05, 10.0, 0.12, True)]

    def flow(k, Ps, Pd):
        return _stage_flow(cyls[k], Ps, 300.0, Pd, 1.35)

    pressures, _ = settle(1e5, 25e5, 3, flow, lambda k, Pd: Pd)
    suctions = [1e5] + pressures[:-1]
    flows = [flow(k, suctions[k], pressures[k]) for k in range(3)]
    assert max(flows) / min(flows) - 1 < 1e-6
    assert pressures[0] < pressures[1] < pressures[2] == 25e5
