"""The catalogue of broken job files (tests/bad_jobs/catalogue.yaml): every one ends in exit code 2
with a message naming file:line:column, the key path, and what is wrong; never a traceback.

Expected lines, columns and paths were read off each job file by hand (the line of the key at
fault); they are not copied from calcdoc's output.
"""
from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
import yaml

import calcdoc

HERE = Path(__file__).parent / "bad_jobs"
CATALOGUE = yaml.safe_load((HERE / "catalogue.yaml").read_text(encoding="utf-8"))
BY_FILE = {c["file"]: c for c in CATALOGUE}
ERRORS = [c for c in CATALOGUE if c["exit"] == 2]
WARNINGS = [c for c in CATALOGUE if c["exit"] == 0]
#: Problems only the gas model can find; `calcdoc check` (no computing) does not see them.
RUN_STAGE = {"unknown_fluid.yaml", "unknown_mixture_component.yaml", "start_outside_eos.yaml", "end_outside_eos.yaml",
             "polytropic_n1_temperature.yaml", "polytropic_n0_pressure.yaml", "polytropic_measured_same_pressure.yaml",
             # steady flow: the inlet of a later leg is known only once the legs before it are computed, and
             # these need the computed state (a first leg's wrong direction is caught by check)
             "flow_pressure_drop_too_large.yaml", "flow_compressor_liquid_suction.yaml",
             # a vessel leg's end is judged against the flow it computes; a solve's bracket by computing its ends
             "vessel_end_below_back_pressure.yaml", "solve_bracket_not_straddling.yaml"}


def _located(case: dict, path: Path) -> str:
    where = f"{path}:{case['line']}" + (f":{case['col']}:" if case["col"] is not None else ":")
    return where + (f" {case['path'] or '(job)'}:" if case["path"] is not None else "")


def test_catalogue_lists_every_file_and_covers_enough_cases():
    files = {p.name for p in HERE.glob("*.yaml")} - {"catalogue.yaml"}
    assert files == set(BY_FILE), "every broken job has exactly one catalogue entry"
    assert len(ERRORS) >= 40
    kinds = {c["kind"] for c in ERRORS}
    for kind in ("YAML syntax", "empty file", "not a mapping", "unknown key", "missing key", "wrong type",
                 "number without unit", "wrong dimension", "not positive", "gauge pressure", "degC as a difference",
                 "end targets", "polytropic", "target against process", "unknown fluid", "mole fractions",
                 "outside the EOS", "duplicate leg", "encoding", "YAML safety"):
        assert kind in kinds, kind
    assert any(c["kind"] == "two-phase" for c in WARNINGS)


@pytest.mark.parametrize("case", ERRORS, ids=[c["file"] for c in ERRORS])
def test_broken_job_exits_2_with_located_message(case, tmp_path, capsys):
    path = HERE / case["file"]
    out = tmp_path / "out"
    code = calcdoc.main(["run", str(path), "--out", str(out), "--no-pdf", "--quiet"])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.startswith("error: ")]
    hit = [ln for ln in lines if ln.startswith("error: " + _located(case, path)) and case["message"] in ln]
    assert hit, f"expected {_located(case, path)} … {case['message']!r} in:\n{err}"
    assert hit[0].count(";") >= 1 or "valid" in hit[0], "the message also says what would be valid"
    assert not out.exists() or not any(out.iterdir()), "a failing run writes nothing"


@pytest.mark.parametrize("case", WARNINGS, ids=[c["file"] for c in WARNINGS])
def test_two_phase_path_gives_a_warning_not_a_silent_number(case, tmp_path, capsys):
    import json

    out = tmp_path / "out"
    code = calcdoc.main(["run", str(HERE / case["file"]), "--out", str(out), "--no-pdf"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert case["warning"] in captured.out
    (result,) = out.glob("*.json")
    assert any(case["warning"] in w for w in json.loads(result.read_text())["warnings"])


def _cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "calcdoc", *args], capture_output=True, text=True, timeout=120,
                          cwd=cwd)


def test_every_catalogue_file_through_the_real_command_line(tmp_path):
    """All broken jobs in one `calcdoc run` (as a user would type it): each is reported with its location."""
    files = [str(HERE / c["file"]) for c in ERRORS]
    proc = _cli("run", *files, "--out", str(tmp_path / "out"), "--no-pdf", "--quiet")
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr and "internal error" not in proc.stderr
    for case in ERRORS:
        assert _located(case, HERE / case["file"]) in proc.stderr, case["file"]


@pytest.mark.parametrize("name", ["yaml_tab_indent.yaml", "unknown_top_key.yaml", "pressure_in_kelvin.yaml",
                                  "gauge_without_site.yaml", "polytropic_without_n.yaml", "isochoric_to_volume.yaml",
                                  "unknown_fluid.yaml", "start_outside_eos.yaml", "python_tag.yaml", "not_utf8.yaml"])
def test_single_broken_job_exit_code_as_a_user_sees_it(name, tmp_path):
    case = BY_FILE[name]
    proc = _cli("run", name, "--out", str(tmp_path / "out"), "--no-pdf", cwd=HERE)
    assert proc.returncode == 2, proc.stderr
    assert "Traceback" not in proc.stderr
    assert proc.stderr.startswith(f"error: {name}:{case['line']}:"), proc.stderr
    assert case["message"] in proc.stderr


def test_check_finds_every_load_stage_problem_without_computing(tmp_path):
    load_stage = [c for c in ERRORS if c["file"] not in RUN_STAGE]
    proc = _cli("check", *[c["file"] for c in load_stage], cwd=HERE)
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr
    for case in load_stage:
        assert f"error: {case['file']}:{case['line']}:" in proc.stderr, case["file"]
    assert " OK" not in proc.stdout


def test_several_independent_problems_are_reported_together(capsys, tmp_path):
    code = calcdoc.main(["check", str(HERE / "several_problems.yaml")])
    err = capsys.readouterr().err
    assert code == 2
    # gauge without atmosphere (line 12), misspelt key (13), volume without unit (14): all in one run
    assert ":12:3: start.pressure:" in err and ":13:3: start.temprature:" in err and ":14:3: start.volume:" in err
    assert "3 problems found." in err


def test_file_of_several_megabytes_is_refused_without_reading_it_all(tmp_path, capsys):
    big = tmp_path / "big.yaml"
    text = (HERE / "several_problems.yaml").read_text(encoding="utf-8")
    big.write_text(text + "# padding\n" * 400_000, encoding="utf-8")   # ~4 MB
    assert big.stat().st_size > 3_000_000
    code = calcdoc.main(["check", str(big)])
    err = capsys.readouterr().err
    assert code == 2
    assert "larger than 1,000,000 bytes" in err and "Traceback" not in err


def test_missing_file_and_folder_are_bad_input(tmp_path, capsys):
    assert calcdoc.main(["check", str(tmp_path / "nope.yaml")]) == 2
    assert calcdoc.main(["check", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "no such file" in err and "folder, not a job file" in err


def test_very_deep_nesting_is_refused_before_the_parser_recurses(tmp_path, capsys):
    deep = tmp_path / "deep.yaml"
    deep.write_text("calcdoc: 1\nassumptions: " + "[" * 50_000 + "]" * 50_000 + "\n", encoding="utf-8")
    assert calcdoc.main(["check", str(deep)]) == 2
    err = capsys.readouterr().err
    assert f"{deep}:2:" in err and "nested more than 40 levels" in err


def test_gauge_spellings_engineers_write_are_read_as_gauge():
    from calcdoc.units import parse_quantity

    atm = 100_000.0
    for text in ("7 barg", "7 bar g", "7 bar(g)", "7 bar gauge"):
        assert parse_quantity(text, "pressure", atmosphere=atm).si == pytest.approx(800_000.0)  # 7 bar = 700 kPa (SI definition of the bar)
        assert parse_quantity(text, "pressure", atmosphere=atm).gauge
    assert not parse_quantity("7 bara", "pressure").gauge
