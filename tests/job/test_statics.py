"""What `check` finds without computing: problems (exit 2, file:line of the key) and warnings (exit 0), and
`run` of the same job exits 2 the same way and writes nothing. Bad inputs are also in the catalogue
(tests/job/bad_jobs); the warnings and the `diff` warning are tested here."""
from __future__ import annotations

import calcdoc

FLOW = """calcdoc: 1
calc:
  number: S-001
  title: Static checks
  revision: {rev}
  date: 2026-11-30
  history:
    - {{revision: A, date: 2026-11-01, description: Issued for review}}
gas: {{fluid: Nitrogen, model: ideal}}
system: flow
start: {{pressure: 2 bar, temperature: 30 degC, mass_flow: 1 kg/s}}
legs:
  - {{name: Stage 1, process: compressor, efficiency: {{polytropic: 0.8}}, end: {{pressure: 6 bar}}}}
  - name: Intercooler
    process: cooler
    pressure_drop: {drop}
    end: {{temperature: 40 degC}}
  - {{name: Stage 2, process: compressor, efficiency: {{polytropic: 0.8}}, end: {{pressure: 12 bar}}}}
"""


def _write(tmp_path, name="job.yaml", **kw):
    path = tmp_path / name
    path.write_text(FLOW.format(**{"rev": "A", "drop": "0.1 bar", **kw}), encoding="utf-8")
    return path


def test_a_clean_job_has_no_warning(tmp_path, capsys):
    assert calcdoc.main(["check", str(_write(tmp_path))]) == 0
    captured = capsys.readouterr()
    assert "warning" not in captured.err and "OK" in captured.out


def test_a_large_intercooler_drop_is_a_warning_at_its_line(tmp_path, capsys):
    # 2 bar of 6 bar at the intercooler inlet is 33 %, above the 30 % that usual intercoolers never reach
    path = _write(tmp_path, drop="2 bar")
    assert calcdoc.main(["check", str(path)]) == 0
    err = capsys.readouterr().err
    assert f"warning: {path}:16:5: legs[1].pressure_drop:" in err and "more than 30 %" in err
    # just under 30 % (1.7 bar of 6 bar): no warning
    assert calcdoc.main(["check", str(_write(tmp_path, drop="1.7 bar"))]) == 0
    assert "warning" not in capsys.readouterr().err


def test_a_revision_missing_from_the_history_is_a_warning(tmp_path, capsys):
    path = _write(tmp_path, rev="B")
    assert calcdoc.main(["check", str(path)]) == 0
    err = capsys.readouterr().err
    assert f"warning: {path}:5:3: calc.revision: revision B is not in the history table" in err


def test_run_of_a_job_with_a_static_problem_exits_2_and_writes_nothing(tmp_path, capsys):
    path = tmp_path / "bad.yaml"
    path.write_text(FLOW.format(rev="A", drop="0.1 bar").replace("end: {pressure: 12 bar}", "end: {pressure: 5 bar}"),
                    encoding="utf-8")
    out = tmp_path / "out"
    assert calcdoc.main(["check", str(path)]) == 2
    check_err = capsys.readouterr().err
    assert calcdoc.main(["run", str(path), "--out", str(out)]) == 2
    run_err = capsys.readouterr().err
    line = f"error: {path}:18:"
    assert line in check_err and line in run_err and "is not above its start" in run_err
    assert not out.exists() or not any(out.iterdir())


def test_diff_of_different_calc_numbers_warns(tmp_path, capsys):
    a = _write(tmp_path, "a.yaml")
    b = tmp_path / "b.yaml"
    b.write_text(a.read_text(encoding="utf-8").replace("S-001", "S-002"), encoding="utf-8")
    assert calcdoc.main(["diff", str(a), str(b)]) == 0
    err = capsys.readouterr().err
    assert "warning:" in err and "S-001" in err and "S-002" in err and "different calculations" in err
    assert calcdoc.main(["diff", str(a), str(a)]) == 0
    assert "warning" not in capsys.readouterr().err


STD = """calcdoc: 1
calc: {{number: S-002, title: Standard flow, revision: A, date: 2026-11-30}}
gas: {{fluid: Nitrogen, model: ideal}}
system: flow
start:
  pressure: 2 bar
  temperature: 30 degC
  standard_volume_flow: 5000 {unit}
  standard_pressure: {P}
  standard_temperature: {T}
legs:
  - {{name: Stage 1, process: compressor, efficiency: {{polytropic: 0.8}}, end: {{pressure: 6 bar}}}}
"""


def test_standard_volume_units_and_their_reference_conditions():
    import pytest

    from calcdoc.errors import JobError
    from calcdoc.job import loads

    # normal cubic metres at 0 °C and 101.325 kPa, standard cubic metres at 15 °C, scf at 60 °F: consistent
    # (common practice of the gas trade)
    for unit, P, T in (("Nm3/h", "101.325 kPa", "0 degC"), ("Sm3/h", "101.325 kPa", "15 degC"),
                       ("scfm", "14.696 psia", "60 degF"), ("MMSCFD", "14.73 psia", "60 degF")):
        loads(STD.format(unit=unit, P=P, T=T), "s.yaml")
    for unit, P, T, line in (("Nm3/h", "101.325 kPa", "15 degC", 10), ("Nm3/h", "1 bar", "0 degC", 9),
                             ("Sm3/h", "101.325 kPa", "0 degC", 10), ("scfm", "50 psia", "60 degF", 9)):
        with pytest.raises(JobError) as exc:
            loads(STD.format(unit=unit, P=P, T=T), "s.yaml")
        assert f"s.yaml:{line}:3:" in str(exc.value), str(exc.value)


def test_a_staged_machine_with_a_large_fractional_intercooler_drop_warns():
    from calcdoc.job import loads

    text = FLOW.format(rev="A", drop="0.1 bar").replace(
        "  - {name: Stage 1, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 6 bar}}",
        "  - {name: Stage 1, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 6 bar},\n"
        "     staging: {stages: 2, intercooler: {temperature: 40 degC, pressure_drop: 35 %}}}")
    job = loads(text, "s.yaml")
    assert len(job.warnings) == 1 and "more than 30 %" in job.warnings[0].found
