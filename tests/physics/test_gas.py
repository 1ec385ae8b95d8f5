"""gas.py: the ideal-gas model against its definition, the real gas against CoolProp called directly."""
import math

import pytest

from calcdoc.physics.gas import R_U, IdealGas, RealGas


def test_molar_gas_constant():
    # CODATA 2018: R = 8.314 462 618 J/(mol K), exact since the 2019 SI redefinition
    assert R_U == 8.314462618


def test_ideal_gas_state_functions_agree():
    g = IdealGas("test", 1.4, 0.0280134)
    s = g.state_PT(5e5, 350.0)
    assert s.P * s.v == pytest.approx(g.R * s.T, rel=1e-14)          # P v = R T (definition)
    assert s.h - s.u == pytest.approx(s.P * s.v, rel=1e-12)           # h = u + P v (definition)
    for other in (g.state_Pv(s.P, s.v), g.state_Tv(s.T, s.v), g.state_Ps(s.P, s.s),
                  g.state_vs(s.v, s.s), g.state_Ph(s.P, s.h)):
        assert other.T == pytest.approx(s.T, rel=1e-12)
        assert other.P == pytest.approx(s.P, rel=1e-12)


def test_ideal_gas_isentropic_relation():
    # T2/T1 = (P2/P1)^((k-1)/k) for an ideal gas with constant k (Cengel & Boles, ch. 7)
    g = IdealGas("test", 1.3, 0.016)
    s1 = g.state_PT(1e5, 300.0)
    s2 = g.state_Ps(8e5, s1.s)
    assert s2.T == pytest.approx(300.0 * 8 ** (0.3 / 1.3), rel=1e-12)


def test_real_gas_matches_coolprop_direct():
    import CoolProp.CoolProp as CP

    g = RealGas("Nitrogen")
    s = g.state_PT(20e6, 300.0)
    # reference: CoolProp's high-level interface called directly
    assert s.h == pytest.approx(CP.PropsSI("H", "P", 20e6, "T", 300.0, "Nitrogen"), rel=1e-10)
    assert s.Z == pytest.approx(CP.PropsSI("Z", "P", 20e6, "T", 300.0, "Nitrogen"), rel=1e-10)
    s2 = g.state_vs(s.v * 2, s.s)
    assert s2.T == pytest.approx(CP.PropsSI("T", "D", 1 / (2 * s.v), "S", s.s, "Nitrogen"), rel=1e-8)


def test_real_gas_unknown_fluid():
    from calcdoc.errors import PhysicsError

    with pytest.raises(PhysicsError) as err:
        RealGas("Nitrogenn")
    assert err.value.code == "gas.unknown_fluid" and err.value.values["fluid"] == "Nitrogenn"


def test_real_gas_out_of_range():
    from calcdoc.errors import PhysicsError

    g = RealGas("Nitrogen")
    with pytest.raises(PhysicsError, match="eos.range"):
        g.state_PT(1e5, 5000.0)


def test_real_gas_two_phase_is_labelled():
    g = RealGas("CarbonDioxide")
    import CoolProp.CoolProp as CP

    Tsat = CP.PropsSI("T", "P", 3e6, "Q", 1, "CO2")   # CoolProp called directly
    vl = 1 / CP.PropsSI("D", "P", 3e6, "Q", 0, "CO2")
    vv = 1 / CP.PropsSI("D", "P", 3e6, "Q", 1, "CO2")
    s = g.state_Pv(3e6, math.sqrt(vl * vv))
    assert s.phase == "two-phase" and 0 < s.quality < 1
    assert g.dew_temperature(3e6) == pytest.approx(Tsat, rel=1e-9)


def test_expansion_below_the_triple_point_is_named():
    # CO2's triple-point pressure is 517.96 kPa (Span & Wagner 1996, via CoolProp): an isentrope from
    # 60 bar, 30 °C ends in solid + vapour at 5 bar, which the equation of state does not cover
    from calcdoc.errors import PhysicsError

    g = RealGas("CO2")
    s1 = g.state_PT(60e5, 303.15)
    with pytest.raises(PhysicsError, match="eos.below_triple_pressure"):
        g.state_Ps(5e5, s1.s)
