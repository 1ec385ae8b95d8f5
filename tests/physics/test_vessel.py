"""Vessels that fill and empty over time (calcdoc.physics.vessel) against closed forms and an independent
integration written here."""
from __future__ import annotations

import math

import pytest

from calcdoc.errors import PhysicsError
from calcdoc.physics.gas import IdealGas, RealGas
from calcdoc.physics.vessel import VesselLeg, Wall, critical_ratio, ideal_mass_flux, real_mass_flux, run_leg

AIR = IdealGas("air", 1.4, 0.028965)
V, D, CD = 2.0, 0.010, 0.85
A = math.pi * D ** 2 / 4


def _gamma(k: float) -> float:
    return (2.0 / (k + 1.0)) ** ((k + 1.0) / (2.0 * (k - 1.0)))


def test_critical_ratio_and_choked_flux_of_air():
    # Çengel, Boles & Kanoğlu (2019), table of critical ratios: P*/P0 = 0.5283 for k = 1.4
    assert critical_ratio(1.4) == pytest.approx(0.5283, abs=5e-5)
    # choked flux: G = P0·√(k/(R·T0))·Γ (same source, ch. 17); Γ(1.4) = 0.5787 (printed to 4 figures)
    assert _gamma(1.4) == pytest.approx(0.5787, abs=5e-5)
    G, choked = ideal_mass_flux(1e6, 300.0, 1e5, 1.4, AIR.R)
    assert choked
    assert G == pytest.approx(1e6 * math.sqrt(1.4 / (AIR.R * 300.0)) * _gamma(1.4), rel=1e-12)


def test_subsonic_flux_meets_choked_flux_at_the_critical_ratio():
    """The subsonic formula at r = r* equals the choked one (continuity of the isentropic nozzle flow,
    Çengel et al. 2019 ch. 17); above r* the flux falls, to zero at r = 1."""
    k, P0, T0 = 1.4, 1e6, 300.0
    rc = critical_ratio(k)
    Gc, _ = ideal_mass_flux(P0, T0, rc * P0 * 0.999999, k, AIR.R)
    Gs, choked = ideal_mass_flux(P0, T0, rc * P0 * 1.000001, k, AIR.R)
    assert not choked
    assert Gs == pytest.approx(Gc, rel=1e-5)
    assert ideal_mass_flux(P0, T0, 0.9 * P0, k, AIR.R)[0] < Gs
    assert ideal_mass_flux(P0, T0, P0, k, AIR.R)[0] == 0.0


def test_adiabatic_choked_blowdown_matches_closed_form():
    """Adiabatic blowdown of an ideal gas through a choked orifice.

    The gas left in the vessel expands isentropically: ρ = ρ0·x, P = P0·x^k, c = c0·x^((k−1)/2). The mass
    balance V·dρ/dt = −C_d·A·Γ·ρ·c (choked flux G = Γ·ρ·c) gives dx/dt = −a·x^((k+1)/2), a = C_d·A·Γ·c0/V;
    integrating, x^(−(k−1)/2) − 1 = (k−1)/2·a·t, and with x = (P/P0)^(1/k):
        t = 2/(k − 1) · V/(C_d·A·Γ·c0) · [(P/P0)^(−(k−1)/(2k)) − 1]
    (the textbook result for a vessel discharging isentropically; Çengel et al. 2019, ch. 5 and 17).
    """
    k, P0, T0, P_end = AIR.k, 10e5, 293.15, 3e5       # P_end/P_back = 3 > 1/r*: choked throughout
    res = run_leg(AIR, "Blowdown", 1, AIR.state_PT(P0, T0), V,
                  VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=1e5, P_end=P_end))
    c0 = math.sqrt(k * AIR.R * T0)
    t = 2 / (k - 1) * V / (CD * A * _gamma(k) * c0) * ((P_end / P0) ** (-(k - 1) / (2 * k)) - 1)
    assert res.quantities["duration"].value == pytest.approx(t, rel=1e-7)   # closed form above
    # the end temperature of the isentropic expansion: T = T0·(P/P0)^((k−1)/k) (Çengel et al. 2019, ch. 7)
    assert res.end.T == pytest.approx(T0 * (P_end / P0) ** ((k - 1) / k), rel=1e-7)
    assert res.quantities["T_min"].value == pytest.approx(res.end.T, rel=1e-9)
    assert res.quantities["Q_to_gas"].value == 0.0
    assert res.series["P"][0] == P0 and res.series["P"][-1] == pytest.approx(P_end, rel=1e-9)


def test_isothermal_choked_blowdown_matches_closed_form():
    """Isothermal blowdown: c = c0 throughout, so V·dρ/dt = −C_d·A·Γ·c0·ρ and
        t = V/(C_d·A·Γ·c0) · ln(P0/P)
    (Çengel et al. 2019, ch. 5 and 17)."""
    k, P0, T0, P_end = AIR.k, 10e5, 293.15, 2e5
    res = run_leg(AIR, "Blowdown", 1, AIR.state_PT(P0, T0), V,
                  VesselLeg("discharge", "isothermal", A=A, Cd=CD, P_back=1e5, P_end=P_end))
    c0 = math.sqrt(k * AIR.R * T0)
    t = V / (CD * A * _gamma(k) * c0) * math.log(P0 / P_end)
    assert res.quantities["duration"].value == pytest.approx(t, rel=1e-7)   # closed form above
    assert res.end.T == pytest.approx(T0, rel=1e-9)
    # heat into the gas = the enthalpy carried out less the fall of internal energy: m_out·R·T0 (ideal gas)
    m_out = -res.quantities["mass_change"].value
    assert res.quantities["Q_to_gas"].value == pytest.approx(m_out * AIR.R * T0, rel=1e-6)


def test_fill_from_a_constant_pressure_supply_into_a_nearly_empty_vessel_ends_at_k_times_T_supply():
    """Adiabatic fill of a rigid vessel from a supply at h_s: m2·u2 − m1·u1 = (m2 − m1)·h_s (Çengel et al.
    2019, ch. 5, charging a rigid tank from a supply line). Ideal gas: m2·cv·T2 = m1·cv·T1 + (m2 − m1)·cp·Ts
    and m = P·V/(R·T), so m2 − m1 = (P2 − P1)·V/(k·R·Ts) and T2 = P2·V/(R·m2). From empty (m1 → 0): T2 = k·Ts."""
    k, Ts, P1, P2 = AIR.k, 293.15, 100.0, 5e5
    res = run_leg(AIR, "Fill", 1, AIR.state_PT(P1, Ts), V,
                  VesselLeg("fill", "adiabatic", A=A, Cd=CD, P_supply=10e5, T_supply=Ts, P_end=P2))
    m1 = P1 * V / (AIR.R * Ts)
    m2 = m1 + (P2 - P1) * V / (k * AIR.R * Ts)
    assert res.end.T == pytest.approx(P2 * V / (AIR.R * m2), rel=1e-7)     # exact closed form above
    assert res.end.T == pytest.approx(k * Ts, rel=2e-4)                     # the empty-vessel limit k·Ts


def test_fill_at_a_given_mass_flow_takes_mass_over_mass_flow():
    """A delivery at a fixed mass flow: the mass rises linearly, t = Δm/ṁ; the energy balance as in the test
    above with h_in = cp·T_in gives the same end state as the closed form m2·cv·T2 = m1·cv·T1 + Δm·cp·T_in."""
    T1, P1, m_dot, Tin = 293.15, 2e5, 0.05, 313.15
    res = run_leg(AIR, "Fill", 1, AIR.state_PT(P1, T1), V,
                  VesselLeg("fill", "adiabatic", m_dot=m_dot, T_supply=Tin, t_end=120.0))
    m1 = P1 * V / (AIR.R * T1)
    m2 = m1 + m_dot * 120.0
    T2 = (m1 * AIR.cv * T1 + (m2 - m1) * AIR.cp * Tin) / (m2 * AIR.cv)
    assert res.quantities["mass_change"].value == pytest.approx(m_dot * 120.0, rel=1e-9)
    assert res.end.T == pytest.approx(T2, rel=1e-8)


def test_wall_heat_lies_between_adiabatic_and_isothermal():
    """With a wall the blowdown takes longer than adiabatic and less than isothermal (the gas is warmed towards
    the wall, not held at T0; common practice); the wall cools, and heat flows into the gas."""
    s1 = AIR.state_PT(10e5, 293.15)
    legs = {h: VesselLeg("discharge", h, A=A, Cd=CD, P_back=1e5, P_end=2e5) for h in ("adiabatic", "isothermal", "wall")}
    t = {h: run_leg(AIR, "B", 1, s1, V, leg, Wall(800.0, 490.0, 9.0, 8.0)).quantities for h, leg in legs.items()}
    assert t["adiabatic"]["duration"].value < t["wall"]["duration"].value < t["isothermal"]["duration"].value
    assert t["wall"]["T_wall_min"].value < 293.15
    assert t["wall"]["Q_to_gas"].value > 0


def test_real_gas_blowdown_matches_a_fine_step_integration_written_here():
    """Real nitrogen, adiabatic: the gas left in the vessel keeps its entropy s0, so its state is fixed by its
    density ρ, and V·dρ/dt = −C_d·A·G(ρ) gives t = V/(C_d·A)·∫ dρ/G(ρ) from ρ_end to ρ0. G is the largest
    ρ_t·√(2(h_v − h_t)) along the isentrope from the vessel state (taken over a fine pressure grid and
    refined by golden-section search here), with properties from CoolProp called directly; the integral by
    Simpson's rule on 200 intervals."""
    import CoolProp

    AS = CoolProp.AbstractState("HEOS", "Nitrogen")
    P0, T0, P_end, Vv = 100e5, 293.15, 20e5, 0.05
    AS.update(CoolProp.PT_INPUTS, P0, T0)
    s0, rho0 = AS.smass(), AS.rhomass()
    AS.update(CoolProp.PSmass_INPUTS, P_end, s0)
    rho_end = AS.rhomass()

    def G(rho):
        AS.update(CoolProp.DmassSmass_INPUTS, rho, s0)
        Pv, hv = AS.p(), AS.hmass()

        def g(P):
            AS.update(CoolProp.PSmass_INPUTS, P, s0)
            return AS.rhomass() * math.sqrt(max(2 * (hv - AS.hmass()), 0.0))
        grid = [Pv * (0.3 + 0.6 * j / 60) for j in range(61)]
        j = max(range(61), key=lambda n: g(grid[n]))
        a, b = grid[max(j - 1, 0)], grid[min(j + 1, 60)]
        phi = (math.sqrt(5) - 1) / 2
        for _ in range(60):
            c, d = b - phi * (b - a), a + phi * (b - a)
            if g(c) > g(d):
                b = d
            else:
                a = c
        return g((a + b) / 2)

    n = 200
    h = (rho0 - rho_end) / n
    f = [1.0 / G(rho_end + i * h) for i in range(n + 1)]
    integral = h / 3 * (f[0] + f[-1] + 4 * sum(f[1:-1:2]) + 2 * sum(f[2:-1:2]))
    t_ref = Vv / (CD * A) * integral

    gas = RealGas("Nitrogen")
    res = run_leg(gas, "Blowdown", 1, gas.state_PT(P0, T0), Vv,
                  VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=1e5, P_end=P_end))
    assert res.quantities["duration"].value == pytest.approx(t_ref, rel=1e-5)   # integration written above
    AS.update(CoolProp.PSmass_INPUTS, P_end, s0)
    assert res.end.T == pytest.approx(AS.T(), rel=1e-6)                        # CoolProp called directly
    _, choked = real_mass_flux(gas, gas.state_PT(P0, T0), 1e5)
    assert choked


@pytest.mark.parametrize("leg, code", [
    (VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=1e5, P_end=11e5), "vessel.end_reached"),
    (VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=3e5, P_end=2e5), "vessel.end_unreachable"),
    (VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=11e5, t_end=60.0), "vessel.no_flow"),
])
def test_ends_that_cannot_be_reached_are_coded_errors_not_hangs(leg, code):
    with pytest.raises(PhysicsError) as exc:
        run_leg(AIR, "B", 1, AIR.state_PT(10e5, 293.15), V, leg)
    assert exc.value.code == code


@pytest.mark.parametrize("bound, value, code", [("MAX_TIME_FACTOR", 0.01, "vessel.too_long"),
                                                 ("MAX_EVALUATIONS", 50, "vessel.budget")])
def test_the_time_and_evaluation_bounds_stop_a_leg_with_a_code(monkeypatch, bound, value, code):
    """The bounds that keep a leg from running for ever, made small enough to bite on an ordinary leg."""
    from calcdoc.physics import vessel

    monkeypatch.setattr(vessel, bound, value)
    with pytest.raises(PhysicsError) as exc:
        run_leg(AIR, "B", 1, AIR.state_PT(10e5, 293.15), V,
                VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=1e5, P_end=2e5))
    assert exc.value.code == code


def test_a_real_gas_mixture_is_refused_rather_than_left_to_run_for_hours():
    gas = RealGas(None, (("Methane", 0.9), ("Ethane", 0.1)))
    with pytest.raises(PhysicsError) as exc:
        run_leg(gas, "B", 1, gas.state_PT(50e5, 300.0), 1.0,
                VesselLeg("discharge", "adiabatic", A=A, Cd=CD, P_back=1e5, P_end=10e5))
    assert exc.value.code == "vessel.mixture"
