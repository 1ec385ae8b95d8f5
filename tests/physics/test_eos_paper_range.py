"""The validity range of each shipped fluid's reference equation of state (physics/eos_range.py), and the
warning beyond it."""
from __future__ import annotations

import pytest

from calcdoc.engine import run
from calcdoc.physics.eos_range import PAPER_RANGE
from calcdoc.report.words import WARNINGS

#: The fluids the example jobs and the reference cases use.
SHIPPED = ("Nitrogen", "Methane", "CarbonDioxide", "Air")


@pytest.mark.parametrize("fluid", sorted(PAPER_RANGE))
def test_each_range_names_the_paper_coolprop_uses_and_is_within_what_coolprop_accepts(fluid):
    import CoolProp.CoolProp as CP

    rng = PAPER_RANGE[fluid]
    assert CP.get_BibTeXKey(fluid, "EOS") == rng.bibkey   # CoolProp's own key for the fluid's EOS
    assert rng.Tmax <= CP.PropsSI("Tmax", fluid) and rng.pmax <= CP.PropsSI("pmax", fluid)


@pytest.mark.parametrize("fluid", SHIPPED)
def test_every_shipped_fluid_has_its_range(fluid):
    assert fluid in PAPER_RANGE


def test_range_is_the_one_stated_in_the_paper_title():
    from calcdoc.report.methods import fluid_reference

    # the title of each reference paper states its range (CoolProp's bibliography, printed in the report)
    for fluid, rng in PAPER_RANGE.items():
        title = fluid_reference(rng.bibkey)
        assert f"{rng.Tmax:g} K" in title, (fluid, title)
        assert f"{rng.pmax / 1e6:g} MPa" in title, (fluid, title)


def _closed(make_job, T: str):
    return make_job({"fluid": "Nitrogen", "model": "real"}, {"pressure": "10 bara", "temperature": T, "volume": "1 L"},
                    [{"name": "Heat", "process": "isochoric", "end": {"temperature": "1150 K"}}])


def test_nitrogen_beyond_1000_K_is_warned(make_job):
    # Span et al. (2000) validate nitrogen to 1000 K; CoolProp accepts 2000 K
    res = run(_closed(make_job, "300 K"))
    codes = [w.code for w in res.warnings]
    assert "eos.beyond_paper_T" in codes
    w = next(w for w in res.warnings if w.code == "eos.beyond_paper_T")
    assert w.values["Tmax"] == 1000.0 and w.values["T"] == pytest.approx(1150.0)
    assert "eos.beyond_paper_T" in WARNINGS


def test_nitrogen_within_its_range_is_not_warned(make_job):
    job = make_job({"fluid": "Nitrogen", "model": "real"}, {"pressure": "10 bara", "temperature": "300 K", "volume": "1 L"},
                   [{"name": "Heat", "process": "isochoric", "end": {"temperature": "950 K"}}])
    assert not [w for w in run(job).warnings if w.code.startswith("eos.beyond_paper")]
