"""engine.py and results.py: whole jobs, the results contract, cycles, ideal gas from a fluid."""
import json

import pytest
from conftest import said

from calcdoc import engine
from calcdoc.engine.results import to_json
from calcdoc.report import methods
from calcdoc.report.jsonfile import dumps

IDEAL_N2 = {"model": "ideal", "k": 1.4, "molar_mass": "28.0134 g/mol"}


def cycle_legs():
    # isothermal compression to half volume, isobaric expansion back to V1, isochoric cooling to T1
    return [
        {"name": "Compress", "process": "isothermal", "end": {"volume_ratio": 0.5}},
        {"name": "Expand", "process": "isobaric", "end": {"volume_ratio": 2.0}},
        {"name": "Cool", "process": "isochoric", "end": {"temperature": "300 K"}},
    ]


@pytest.mark.parametrize("gas", [IDEAL_N2, {"model": "real", "fluid": "Nitrogen"}])
def test_cycle_returns_to_start(make_job, gas):
    job = make_job(gas, {"pressure": "20 bar", "temperature": "300 K", "volume": "10 L"}, cycle_legs())
    res = engine.run(job)
    first, last = res.states[0].state, res.states[-1].state
    assert last.P == pytest.approx(first.P, rel=1e-8)
    assert last.T == pytest.approx(first.T, rel=1e-10)
    dU = sum(leg.quantities["dU"].value for leg in res.legs)
    W = sum(leg.quantities["W_by_gas"].value for leg in res.legs)
    Q = sum(leg.quantities["Q_to_gas"].value for leg in res.legs)
    assert dU == pytest.approx(0.0, abs=1e-9 * abs(W))       # a cycle: the net change of U is zero
    assert Q == pytest.approx(W, rel=1e-9)                    # and the net heat equals the net work
    assert W > 0                                              # this cycle runs clockwise on P-V: net work out


def test_mass_from_volume_and_given_mass_agree(make_job):
    start = {"pressure": "10 bar", "temperature": "20 degC"}
    a = engine.run(make_job(IDEAL_N2, {**start, "volume": "50 L"}, [{"name": "a", "process": "isochoric",
                                                                        "end": {"temperature": "80 degC"}}]))
    # m = P V / (R T) for an ideal gas (definition)
    m = 10e5 * 0.05 / (8.314462618 / 0.0280134 * 293.15)
    assert a.mass.value == pytest.approx(m, rel=1e-12)
    b = engine.run(make_job(IDEAL_N2, {**start, "mass": f"{m} kg"}, [{"name": "a", "process": "isochoric",
                                                                         "end": {"temperature": "80 degC"}}]))
    assert b.legs[0].quantities["Q_to_gas"].value == pytest.approx(a.legs[0].quantities["Q_to_gas"].value, rel=1e-12)


def test_ideal_air_from_fluid(make_job):
    job = make_job({"model": "ideal", "fluid": "Air"}, {"pressure": "1 atm", "temperature": "300 K", "volume": "1 m3"},
                   [{"name": "a", "process": "isentropic", "end": {"volume_ratio": 0.5}}])
    res = engine.run(job)
    # air: M = 28.9647 g/mol (CRC Handbook, composition of dry air; from memory), so R = 287.05 J/(kg K)
    assert res.gas.M == pytest.approx(0.0289647, rel=3e-4)
    assert res.gas.R == pytest.approx(287.05, rel=3e-4)
    # k of air at 300 K is 1.400 (Cengel & Boles, table A-2a, ideal-gas specific heats of air; from memory)
    assert res.gas.k == pytest.approx(1.400, abs=2e-3)


def test_results_contract_and_determinism(make_job):
    job = make_job({"model": "real", "fluid": "Nitrogen"},
                   {"pressure": "150 barg", "temperature": "30 degC", "volume": "1.85 L"},
                   [{"name": "Stroke", "process": "polytropic", "n": 1.5, "end": {"volume": "1.1 L"}}],
                   site={"atmosphere": "98 kPa"})
    a, b = dumps(engine.run(job)), dumps(engine.run(job))
    assert a == b                                           # same job, same bytes
    doc = json.loads(a)
    for key in ("schema", "calc", "input_sha256", "software", "states", "legs", "checks", "warnings"):
        assert key in doc
    assert doc["input_sha256"] == job.sha256
    for st in doc["states"]:
        for key in ("label", "P", "T", "v", "u", "h", "s", "Z", "phase"):
            assert key in st
        assert st["P"]["unit"] == "Pa" and st["T"]["unit"] == "K"
    leg = doc["legs"][0]
    for key in ("name", "process", "from", "to", "n", "W_by_gas", "Q_to_gas", "dU", "dH", "dS"):
        assert key in leg
    assert leg["W_by_gas"]["unit"] == "J" and leg["dS"]["unit"] == "J/K"
    assert doc["states"][0]["P"]["value"] == pytest.approx(150e5 + 98e3, rel=1e-9)   # gauge + atmosphere


def test_every_method_used_is_cited(make_job):
    job = make_job({"model": "ideal", "fluid": "Nitrogen"},
                   {"pressure": "5 bar", "temperature": "300 K", "volume": "10 L"},
                   [{"name": "a", "process": "polytropic", "n": 1.02, "end": {"pressure": "20 bar"}},
                    {"name": "b", "process": "isothermal", "end": {"pressure": "5 bar"}},
                    {"name": "c", "process": "isentropic", "end": {"volume": "10 L"}}],
                   site={"elevation": "300 m"})
    res = engine.run(job)
    for mid in res.methods_used():
        m = methods.method(mid)
        if mid != "input":
            assert m.refs, mid
        for ref in m.refs:
            assert len(methods.reference(ref)) > 40


def test_isochoric_n_is_null_in_json(make_job):
    job = make_job(IDEAL_N2, {"pressure": "5 bar", "temperature": "300 K", "volume": "10 L"},
                   [{"name": "a", "process": "isochoric", "end": {"pressure": "7 bar"}}])
    doc = to_json(engine.run(job))
    assert doc["legs"][0]["n"]["value"] is None          # n -> infinity has no finite value


def test_condensation_warns(make_job):
    # CO2 compressed isothermally at 280 K past its saturation pressure (about 4.16 MPa, CoolProp)
    job = make_job({"model": "real", "fluid": "CarbonDioxide"},
                   {"pressure": "30 bar", "temperature": "280 K", "volume": "10 L"},
                   [{"name": "Squeeze", "process": "isothermal", "end": {"volume_ratio": 0.3}}])
    res = engine.run(job)
    assert any("two-phase" in w and "Squeeze" in w for w in said(res))


def test_ideal_model_of_a_dense_fluid_warns(make_job):
    import CoolProp.CoolProp as CP

    job = make_job({"model": "ideal", "fluid": "CarbonDioxide"},
                   {"pressure": "30 bar", "temperature": "40 degC", "volume": "1 m3"},
                   [{"name": "Squeeze", "process": "isothermal", "end": {"pressure": "60 bar"}}])
    res = engine.run(job)
    Z = CP.PropsSI("Z", "P", 60e5, "T", 313.15, "CO2")          # CoolProp called directly: about 0.68
    assert any(f"Z = {Z:.4g}" in w and "Squeeze" in w for w in said(res))
    quiet = engine.run(make_job({"model": "ideal", "fluid": "Nitrogen"},
                                {"pressure": "5 bar", "temperature": "300 K", "volume": "1 m3"},
                                [{"name": "a", "process": "isothermal", "end": {"pressure": "8 bar"}}]))
    assert not quiet.warnings            # nitrogen near ambient: Z within 0.2 % of 1 (CoolProp)


def test_plain_psi_is_absolute_and_flagged(make_job):
    job = make_job({"model": "ideal", "k": 1.4, "molar_mass": "28.97 g/mol"},
                   {"pressure": "100 psi", "temperature": "80 degF", "volume": "1 ft3"},
                   [{"name": "a", "process": "isochoric", "end": {"pressure": "120 psia"}}])
    res = engine.run(job)
    assert res.states[0].state.P == pytest.approx(100 * 6894.757293168, rel=1e-12)   # psia (NIST SP 811)
    assert any("start.pressure = 100 psi" in w and "absolute" in w for w in said(res))
    assert not any("120 psia" in w for w in said(res))


def test_choices_are_read_whatever_their_case(make_job):
    a = make_job({"model": "Ideal", "k": 1.4, "molar_mass": "28 g/mol"},
                 {"pressure": "5 bar", "temperature": "300 K", "volume": "1 m3"},
                 [{"name": "a", "process": "Isothermal", "end": {"pressure": "8 bar"}}], units="si")
    assert a.gas.model == "ideal" and a.legs[0].process == "isothermal" and a.units == "SI"


def test_condensation_warning_reports_the_closest_approach(make_job):
    # CO2 cooled at constant volume from 50 bar, 25 °C to 10 °C: the end state is nearest its saturation
    # temperature; reference: CoolProp called directly at the end pressure
    import CoolProp.CoolProp as CP

    res = engine.run(make_job({"model": "real", "fluid": "CO2"},
                              {"pressure": "50 bar", "temperature": "25 degC", "mass": "1 kg"},
                              [{"name": "Cool", "process": "isochoric", "end": {"temperature": "10 degC"}}]))
    end = res.states[-1].state
    gap = end.T - CP.PropsSI("T", "P", end.P, "Q", 1, "CO2")
    assert 0 < gap < 1.0
    assert any(f"within {gap:.2g} K" in w for w in said(res))
