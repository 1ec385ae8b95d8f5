"""Batches: several jobs in parallel; a broken job is reported and the others finish."""
from __future__ import annotations

import json
import os

from _limits_helpers import ideal_job, write

import calcdoc


def test_a_folder_with_one_broken_job_finishes_the_rest(tmp_path, capsys):
    jobs = tmp_path / "jobs"
    jobs.mkdir()
    write(jobs, "a.yaml", ideal_job())
    write(jobs, "b.yaml", ideal_job(P1="120 kPa", revision="B"))
    write(jobs, "c_broken.yaml", ideal_job().replace("process: polytropic", "process: politropic"))
    write(jobs, "notes.txt", "not a job")
    out = tmp_path / "out"
    code = calcdoc.main(["run", str(jobs), "--no-pdf", "-o", str(out)])
    assert code == 2                                   # the worst of 0, 0, 2
    captured = capsys.readouterr()
    assert json.loads((out / "T-LIM-001_revA.json").read_text())["passed"] is True
    assert json.loads((out / "T-LIM-001_revB.json").read_text())["states"][0]["P"]["value"] == 120e3
    assert "c_broken.yaml:" in captured.err and "did you mean 'polytropic'" in captured.err
    table = captured.out.splitlines()
    assert table[0] == "3 jobs:"
    expected = [("ok", "a.yaml"), ("ok", "b.yaml"), ("BAD INPUT", "c_broken.yaml")]   # in file order
    for line, (status, name) in zip(table[1:4], expected, strict=True):
        assert line.strip().startswith(status) and f"{jobs / name} " in line + " "
    assert "2 ok, 1 not ok." in captured.out


def test_exit_code_is_the_worst_of_the_jobs(tmp_path, capsys):
    failing = "limits:\n  - {quantity: pressure, max: 200 kPa, basis: common practice}\n"
    a = write(tmp_path, "a.yaml", ideal_job())
    b = write(tmp_path, "b.yaml", ideal_job(failing, revision="B"))
    assert calcdoc.main(["run", str(a), str(b), "--no-pdf", "-o", str(tmp_path / "out")]) == 1
    assert "1 of 1 check FAILS" in capsys.readouterr().out


def test_an_empty_folder_is_bad_input(tmp_path, capsys):
    assert calcdoc.main(["run", str(tmp_path), "--no-pdf", "-o", str(tmp_path / "out")]) == 2
    assert "no job files" in capsys.readouterr().err


def test_two_jobs_with_the_same_calc_number_and_revision_are_not_both_written(tmp_path, capsys):
    a = write(tmp_path, "a.yaml", ideal_job())
    b = write(tmp_path, "b.yaml", ideal_job(P1="120 kPa"))          # same calc number and revision as a
    out = tmp_path / "out"
    assert calcdoc.main(["run", str(a), str(b), "--no-pdf", "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert f"{b}: calc T-LIM-001 rev A is also {a}" in err      # the later job in file order is refused
    # the report of a stands, not overwritten by b
    assert json.loads((out / "T-LIM-001_revA.json").read_text())["states"][0]["P"]["value"] != 120e3


def test_no_font_files_are_left_in_the_temporary_folder(tmp_path):
    """WeasyPrint copies the report's fonts into a temporary folder per process; a run and a batch (whose
    workers end by os._exit) remove it before they end."""
    import subprocess
    import sys

    temp = tmp_path / "temp"
    temp.mkdir()
    env = dict(os.environ, TMPDIR=str(temp))
    a = write(tmp_path, "a.yaml", ideal_job())
    b = write(tmp_path, "b.yaml", ideal_job(revision="B"))
    for jobs in ([a], [a, b]):
        r = subprocess.run([sys.executable, "-m", "calcdoc", "run", *map(str, jobs), "-o", str(tmp_path / "out"),
                            "-q", "--jobs", "2"], env=env, capture_output=True, text=True, timeout=300)
        assert r.returncode == 0, r.stderr
        assert (tmp_path / "out" / "T-LIM-001_revA.pdf").is_file()
        assert not list(temp.glob("weasyprint-*")), jobs
