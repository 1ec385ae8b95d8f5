"""The equations a checker reads name only defined symbols; the flow engine uses public engine names."""
from __future__ import annotations

import re

import pytest
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.job import loads
from calcdoc.report.words import equation


@pytest.mark.parametrize("gas", ["{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}",
                                 "{fluid: Nitrogen, model: real}"])
def test_isentropic_enthalpy_is_written_with_defined_symbols(gas):
    text = flow_job(gas, "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}",
                    "- {name: C, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 400 kPa}}\n")
    calcs = run(loads(text, "job.yaml")).legs[0].calcs
    h2s = next(c for c in calcs if c.symbol == "h_2s")
    assert h2s.equation == "h(P_2, s_1)"
    # the start state and the end pressure are inputs of the leg; every other symbol is a calc of it
    defined = {c.symbol for c in calcs} | {"P_1", "T_1", "h_1", "s_1", "v_1", "P_2"}
    for c in calcs:
        shown = equation(c.equation)          # the equation as the report shows it (stated in words where so)
        for sym in re.findall(r"\b[PTshv]_\w+", re.sub(r"\{\w+\}", "", shown)):
            assert sym in defined, (c.symbol, shown)


def test_flow_uses_no_private_engine_names():
    from pathlib import Path

    import calcdoc.engine.flow as flow

    src = Path(flow.__file__).read_text(encoding="utf-8")
    imports = re.findall(r"from \.(?:common|diagnose) import ([^\n]+)", src)
    assert imports and not any(name.strip().startswith("_") for line in imports for name in line.split(","))
