"""`calcdoc schema`, `calcdoc new`, and Results shown as tables in a notebook."""
from __future__ import annotations

import datetime as _dt
import json
from pathlib import Path

import jsonschema
import pytest
import yaml
from _limits_helpers import ideal_job

import calcdoc
from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import jobfile, loads
from calcdoc.job.schema import CLOSED_START_KEYS, FLOW_START_KEYS, job_schema
from calcdoc.job.starter import STARTERS

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "example_jobs").glob("*.yaml"))


def as_json_data(text: str):
    """YAML as an editor's schema validation sees it (dates as text)."""
    def fix(x):
        if isinstance(x, dict):
            return {k: fix(v) for k, v in x.items()}
        if isinstance(x, list):
            return [fix(v) for v in x]
        return x.isoformat() if isinstance(x, _dt.date) else x
    return fix(yaml.safe_load(text))


@pytest.fixture(scope="module")
def validator():
    schema = job_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


def test_schema_command_prints_the_schema(capsys):
    assert calcdoc.main(["schema"]) == 0
    assert json.loads(capsys.readouterr().out) == job_schema()


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_example_job_is_valid_against_the_schema(validator, path):
    assert EXAMPLES
    validator.validate(as_json_data(path.read_text(encoding="utf-8")))


@pytest.mark.parametrize("system", sorted(STARTERS))
def test_starters_are_valid_against_the_schema(validator, system):
    validator.validate(as_json_data(STARTERS[system]))


def test_schema_rejects_what_the_validator_rejects(validator):
    data = as_json_data(ideal_job())
    data["legs"][0]["proces"] = "polytropic"
    assert not validator.is_valid(data)
    data = as_json_data(ideal_job())
    data["start"]["mass_flow"] = "1 kg/s"          # a flow key in a closed job
    assert not validator.is_valid(data)


def test_schema_keys_follow_the_validator():
    schema = job_schema()
    assert list(schema["properties"]) == list(jobfile._TOP_KEYS)
    assert all(schema["properties"][k] for k in jobfile._TOP_KEYS)
    # the start keys mirrored in schema.py are those the validator lists in its message
    for system, keys in (("closed", CLOSED_START_KEYS), ("flow", FLOW_START_KEYS)):
        text = ideal_job().replace("system: closed", f"system: {system}").replace("  volume: 1 L\n", "  bogus: 1\n")
        with pytest.raises(JobError) as ei:
            loads(text, "job.yaml")
        msg = next(p.valid for p in ei.value.problems if "bogus" in p.found)
        assert msg.endswith("valid keys here: " + ", ".join(keys))


@pytest.mark.parametrize("system", ["closed", "flow", "vessel", "reciprocating"])
def test_new_writes_a_starter_that_passes_check(tmp_path, capsys, system):
    path = tmp_path / f"{system}.yaml"
    assert calcdoc.main(["new", "--system", system, str(path)]) == 0
    assert calcdoc.main(["check", str(path)]) == 0
    assert calcdoc.main(["new", "--system", system, str(path)]) == 2        # no silent overwrite
    assert "exists" in capsys.readouterr().err
    assert path.read_text(encoding="utf-8").count("#") > 10             # it is commented


def test_closed_starter_runs_and_passes(tmp_path):
    res = run(loads(STARTERS["closed"], "starter.yaml"))
    assert res.checks and res.passed


def test_vessel_starter_runs_and_passes():
    res = run(loads(STARTERS["vessel"], "starter.yaml"))
    assert res.system == "vessel" and res.checks and res.passed
    assert [leg.process for leg in res.legs] == ["discharge", "fill"]


def test_schema_knows_the_vessel_and_solve_keys(validator):
    data = as_json_data(STARTERS["vessel"])
    assert validator.is_valid(data)
    data["legs"][0]["orifise"] = data["legs"][0].pop("orifice")       # a misspelt vessel-leg key
    assert not validator.is_valid(data)
    data = as_json_data(STARTERS["vessel"])
    del data["vessel"]                                              # a vessel job needs its vessel
    assert not validator.is_valid(data)
    data = as_json_data(ideal_job())
    data["solve"] = {"vary": "start.volume", "between": ["1 L", "5 L"],
                     "so_that": {"quantity": "volume_change", "at": "Compression", "equals": "-0.5 L"}}
    assert validator.is_valid(data)
    data["solve"]["so_that"]["equal"] = data["solve"]["so_that"].pop("equals")
    assert not validator.is_valid(data)


def test_results_show_as_tables_in_a_notebook():
    import calcdoc

    failing = "limits:\n  - {name: Peak, quantity: pressure, max: 200 kPa, basis: common practice}\n"
    html = calcdoc.run(loads(ideal_job(failing), "job.yaml"))._repr_html_()   # the public API of a notebook
    assert html.count("<table>") == 3
    assert "1→2 Compression" in html and "2→3 Hold" in html and "<td>3</td>" in html
    assert "FAIL" in html and "does not pass" in html


def test_library_render_gives_the_report_html():
    import calcdoc

    html = calcdoc.render(calcdoc.run(loads(ideal_job(), "job.yaml")), pdf=False)
    assert "T-LIM-001" in html and "<h2>7 Design checks</h2>" in html


def test_reciprocating_starter_runs_with_its_cylinder_checks():
    res = run(loads(STARTERS["reciprocating"], "starter.yaml"))
    names = {c.quantity for c in res.checks}
    assert {"capacity", "rod_load_compression", "rod_load_tension"} <= names
    assert res.extra["interstage"] and res.extra["cylinders"]
