"""The job layer's reading of reciprocating cylinders and of the wider staging block: each mistake is a
located problem naming the key, found and valid."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.errors import JobError
from calcdoc.job import loads

AIR = "{fluid: Air, model: ideal}"
START = "{pressure: 1 bar, temperature: 25 degC, mass_flow: 0.1 kg/s}"


def _stage(cylinder: str, more: str = "", end: str = "  end: {pressure: 3 bar}\n") -> str:
    return ("- name: Stage 1\n  process: compressor\n  machine: reciprocating\n"
            f"  cylinder: {cylinder}\n  efficiency: {{isentropic: 0.8}}\n{more}{end}")


CYL = "{bore: 200 mm, stroke: 120 mm, rod: 40 mm, speed: 500 rpm, clearance: 15 %, action: double}"


def _problems(text: str) -> list:
    with pytest.raises(JobError) as e:
        loads(text, "job.yaml")
    return e.value.problems


def test_a_sound_cylinder_reads_into_si():
    job = loads(flow_job(AIR, START, _stage(CYL.replace("15 %", "0.15"))), "job.yaml")
    c = job.legs[0].options.cylinder
    assert (c.bore.si, c.stroke.si, c.rod.si, c.clearance.si, c.double, c.count) == (0.2, 0.12, 0.04, 0.15, True, 1)
    assert c.speed.si == pytest.approx(500 / 60, rel=1e-15)       # rev/s


@pytest.mark.parametrize("cyl,path,words", [
    (CYL.replace("rod: 40 mm, ", ""), "legs[0].cylinder.rod", "needs its piston-rod diameter"),
    (CYL.replace("clearance: 15 %", "clearance: 120 %"), "legs[0].cylinder.clearance", "is not possible"),
    (CYL.replace("speed: 500 rpm", "speed: 500 m/s"), "legs[0].cylinder.speed", "expected a speed"),
    (CYL.replace("stroke: 120 mm", "stroke: 0 mm"), "legs[0].cylinder.stroke", "is not positive"),
    (CYL.replace("action: double", "action: triple"), "legs[0].cylinder.action", "not one of the choices"),
    (CYL.replace("}", ", re_expansion_exponent: 0.8}"), "legs[0].cylinder.re_expansion_exponent", "out of range"),
    (CYL.replace("}", ", volumetric_loss: -3 %}"), "legs[0].cylinder.volumetric_loss", "is not possible"),
    (CYL.replace("}", ", cylinders: 0}"), "legs[0].cylinder.cylinders", "whole number"),
    (CYL.replace("bore", "bour"), "legs[0].cylinder.bour", "unknown key"),
])
def test_cylinder_mistakes_are_located(cyl, path, words):
    probs = _problems(flow_job(AIR, START, _stage(cyl)))
    assert any(p.path == path and words in p.found for p in probs), [(p.path, p.found) for p in probs]


def test_machine_and_cylinder_belong_together_and_to_compressors():
    text = flow_job(AIR, START, "- name: C\n  process: compressor\n  machine: reciprocating\n"
                    "  efficiency: {isentropic: 0.8}\n  end: {pressure: 3 bar}\n")
    assert any("without its cylinder" in p.found for p in _problems(text))
    text = flow_job(AIR, START, f"- name: C\n  process: compressor\n  cylinder: {CYL}\n"
                    "  efficiency: {isentropic: 0.8}\n  end: {pressure: 3 bar}\n")
    assert any("add machine: reciprocating" in p.valid for p in _problems(text))
    text = flow_job(AIR, START, "- name: K\n  process: cooler\n  machine: reciprocating\n  end: {temperature: 20 degC}\n")
    assert any("machine does not apply to a cooler leg" in p.found for p in _problems(text))


def test_a_lone_reciprocating_stage_needs_its_end():
    probs = _problems(flow_job(AIR, START, _stage(CYL, end="")))
    assert any(p.path == "legs[0].end" and "no end pressure" in p.found for p in probs)


def test_a_reciprocating_leg_is_not_staged_inside_itself():
    more = "  staging: {stages: 2, intercooler: {temperature: 35 degC}}\n"
    assert any("cannot be staged inside one leg" in p.found for p in _problems(flow_job(AIR, START, _stage(CYL, more))))


def _train(staging: str, eff: str = "{polytropic: 0.8}") -> str:
    return flow_job(AIR, START, f"- name: T\n  process: compressor\n  efficiency: {eff}\n  staging: {staging}\n"
                    "  end: {pressure: 20 bar}\n")


@pytest.mark.parametrize("staging,eff,words", [
    ("{ratios: [3.0, 0.9], intercooler: {temperature: 35 degC}}", "{polytropic: 0.8}", "out of range"),
    ("{interstage_pressures: [5 bar, 4 bar], intercooler: {temperature: 35 degC}}", "{polytropic: 0.8}",
     "is not above the one before"),
    ("{ratios: [3.0], stages: 2, intercooler: {temperature: 35 degC}}", "{polytropic: 0.8}", "exactly one of"),
    ("{max_discharge_temperature: 150 degC, intercooler: {temperature: 35 degC}}", "{polytropic: [0.8, 0.78]}",
     "the number of stages is searched for"),
    ("{ratios: [], intercooler: {temperature: 35 degC}}", "{polytropic: 0.8}", "0 ratios are given"),
])
def test_staging_mistakes_are_located(staging, eff, words):
    probs = _problems(_train(staging, eff))
    assert any(words in p.found for p in probs), [(p.path, p.found) for p in probs]


def test_a_list_of_efficiencies_needs_a_staged_leg():
    text = flow_job(AIR, START, "- name: C\n  process: compressor\n  efficiency: {polytropic: [0.8, 0.78]}\n"
                    "  end: {pressure: 3 bar}\n")
    assert any("not staged" in p.found for p in _problems(text))
