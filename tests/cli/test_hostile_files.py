"""Regression tests of issue 18: every input read as data, every failure one line with exit 2 (never 1,
never a traceback), user text literal, outputs safe against a kill. Each test holds the minimal input that
showed the fault."""
from __future__ import annotations

import importlib
import io
import json
import os
from pathlib import Path

import pytest
from pypdf import PdfReader, PdfWriter

import calcdoc
from calcdoc.report import charts
from calcdoc.report.output import JOURNAL_SUFFIX, clean_folder

verify_mod = importlib.import_module("calcdoc.cli.verify")

JOB = """calcdoc: 1
calc: {number: H-1, title: Hostile, revision: A, date: 2026-12-01}
gas: {fluid: Nitrogen, model: ideal}
start: {pressure: 1 bara, temperature: 20 degC, volume: 1 L}
legs:
  - {name: L1, process: isentropic, end: {pressure_ratio: 2}}
"""


def _main(capsys, *argv: str) -> tuple[int, str]:
    code = calcdoc.main(list(argv))
    err = capsys.readouterr().err
    assert "Traceback" not in err
    return code, err


@pytest.fixture
def job(tmp_path) -> Path:
    p = tmp_path / "job.yaml"
    p.write_text(JOB, encoding="utf-8")
    return p


@pytest.fixture
def report(tmp_path, job, capsys) -> Path:
    code, err = _main(capsys, "run", str(job), "--out", str(tmp_path / "out"), "--quiet")
    assert code == 0, err
    return tmp_path / "out" / "H-1_revA.pdf"


def _pdf(attachments: list[tuple[str, bytes]]) -> bytes:
    w = PdfWriter()
    w.add_blank_page(200, 200)
    for name, data in attachments:
        w.add_attachment(name, data)
    buf = io.BytesIO()
    w.write(buf)
    return buf.getvalue()


# ---------------------------------------------------------------- files that are not regular files
@pytest.mark.parametrize("command", ["check", "run", "diff", "verify"])
def test_named_pipe_is_refused_without_waiting(tmp_path, job, capsys, command):
    fifo = tmp_path / "pipe.yaml"
    os.mkfifo(fifo)
    argv = {"check": ["check", str(fifo)], "run": ["run", str(fifo), "--out", str(tmp_path / "o")],
            "diff": ["diff", str(fifo), str(job)], "verify": ["verify", str(fifo)]}[command]
    code, err = _main(capsys, *argv)
    assert code == 2 and "named pipe" in err and str(fifo) in err


def test_changes_since_a_named_pipe_is_refused(tmp_path, job, capsys):
    fifo = tmp_path / "old.yaml"
    os.mkfifo(fifo)
    code, err = _main(capsys, "run", str(job), "--out", str(tmp_path / "o"), "--no-pdf", "--changes-since", str(fifo))
    assert code == 2 and "named pipe" in err


def test_batch_list_with_a_named_pipe_runs_the_others(tmp_path, job, capsys):
    fifo = tmp_path / "pipe.yaml"
    os.mkfifo(fifo)
    other = tmp_path / "other.yaml"
    other.write_text(JOB.replace("H-1", "H-2"), encoding="utf-8")
    code = calcdoc.main(["run", str(fifo), str(job), str(other), "--out", str(tmp_path / "o"), "--no-pdf", "-j", "1"])
    err = capsys.readouterr().err
    assert code == 2 and "named pipe" in err and "Traceback" not in err
    assert sorted(p.name for p in (tmp_path / "o").iterdir()) == ["H-1_revA.json", "H-2_revA.json"]


def test_verify_dev_zero_is_refused_not_read(capsys):
    code, err = _main(capsys, "verify", "/dev/zero")
    assert code == 2 and "character device" in err


def test_check_a_folder_names_it(tmp_path, capsys):
    code, err = _main(capsys, "check", str(tmp_path))
    assert code == 2 and "this is a folder" in err


# ---------------------------------------------------------------- verify of crafted PDFs
def test_verify_decompression_bomb_is_exit_2(tmp_path, capsys):
    pdf = tmp_path / "bomb.pdf"
    pdf.write_bytes(_pdf([("job.yaml", b"calcdoc: 1\n"), ("r.json", b"\0" * (verify_mod.MAX_ATTACHMENT_BYTES + 1000))]))
    code, err = _main(capsys, "verify", str(pdf))
    assert code == 2 and err.count("\n") == 1 and "error:" in err


def test_verify_deeply_nested_json_attachment_is_exit_2(tmp_path, capsys):
    pdf = tmp_path / "nested.pdf"
    pdf.write_bytes(_pdf([("job.yaml", b"calcdoc: 1\n"), ("r.json", b"[" * 100_000 + b"]" * 100_000)]))
    code, err = _main(capsys, "verify", str(pdf))
    assert code == 2 and "expected two attachments" in err


def test_verify_rerun_of_an_attached_job_that_does_not_load_answers_as_run(tmp_path, capsys):
    bad = b"calcdoc: 1\ncalc: [\n"
    results = json.dumps({"schema": verify_mod.RESULTS_SCHEMA, "input_sha256": "0" * 64}).encode()
    pdf = tmp_path / "bad.pdf"
    pdf.write_bytes(_pdf([("job.yaml", bad), ("r.json", results)]))
    job = tmp_path / "job.yaml"
    job.write_bytes(bad)
    code, err = _main(capsys, "verify", str(pdf), "--rerun")
    run_code, run_err = _main(capsys, "run", str(job), "--out", str(tmp_path / "o"), "--no-pdf")
    assert code == run_code == 2
    assert err.split(": ", 2)[2] == run_err.split(": ", 2)[2]   # the same problem, named the same way


def test_verify_rerun_internal_error_is_one_line_exit_3(report, capsys, monkeypatch):
    def broken(job):
        raise ZeroDivisionError("boom")

    monkeypatch.setattr(verify_mod, "run", broken)
    code, err = _main(capsys, "verify", str(report), "--rerun")
    assert code == 3 and err.count("\n") == 1 and "internal error" in err


def test_verify_detects_a_mixed_pair(report, tmp_path, capsys, job):
    json_path = report.with_suffix(".json")
    json_path.write_text(json_path.read_text(encoding="utf-8").replace('"H-1"', '"H-1" ', 1), encoding="utf-8")
    code = calcdoc.main(["verify", str(report)])
    out = capsys.readouterr().out
    assert code == 1 and "is NOT the one attached" in out


def test_verify_says_the_json_beside_belongs(report, capsys):
    code = calcdoc.main(["verify", str(report)])
    assert code == 0 and "is the one attached to it" in capsys.readouterr().out


# ---------------------------------------------------------------- diff and selftest paths
def test_diff_where_a_parent_is_a_regular_file(tmp_path, job, capsys):
    (tmp_path / "afile").write_text("x", encoding="utf-8")
    code, err = _main(capsys, "diff", str(tmp_path / "afile" / "x.yaml"), str(job))
    assert code == 2 and "is a file, not a folder" in err


def test_diff_against_under_a_missing_folder_does_not_blame_git(tmp_path, capsys):
    code, err = _main(capsys, "diff", str(tmp_path / "missing" / "x.yaml"), "--against", "HEAD")
    assert code == 2 and "does not exist" in err and "git is not installed" not in err


def test_diff_whose_new_job_fails_to_load(tmp_path, job, capsys):
    bad = tmp_path / "bad.yaml"
    bad.write_text(JOB.replace("name: L1", "name: ''"), encoding="utf-8")
    code, err = _main(capsys, "diff", str(job), str(bad))
    assert code == 2 and "the leg name is empty" in err


def test_selftest_out_under_a_regular_file_is_exit_2(tmp_path, capsys):
    (tmp_path / "afile").write_text("x", encoding="utf-8")
    code, err = _main(capsys, "selftest", "--out", str(tmp_path / "afile" / "x"), "--no-pdf", "--quiet")
    assert code == 2 and "is a file" in err


# ---------------------------------------------------------------- user text literal
@pytest.mark.parametrize("name", ["$x$", "$\\frac{a}{$", "$\\foo$", "{" * 40 + "$" + "}" * 40])
def test_leg_names_are_drawn_as_written_not_as_mathtext(tmp_path, capsys, name):
    job = tmp_path / "job.yaml"
    job.write_text(JOB.replace("name: L1", "name: " + json.dumps(name)), encoding="utf-8")
    code, err = _main(capsys, "run", str(job), "--out", str(tmp_path / "o"), "--quiet")
    assert code == 0, err
    text = "".join(p.extract_text() for p in PdfReader(tmp_path / "o" / "H-1_revA.pdf").pages)
    assert name[:20] in text.replace("\u200b", "")


def test_charts_parse_no_mathtext():
    charts._pyplot()
    import matplotlib

    assert matplotlib.rcParams["text.parse_math"] is False


def test_long_unbroken_text_wraps_in_the_pdf(tmp_path, capsys):
    job = tmp_path / "job.yaml"
    long = "x" * 2000
    job.write_text(JOB.replace("title: Hostile", f"title: Hostile, purpose: {long}")
                   + f"assumptions:\n  - {'A' * 2000}\n", encoding="utf-8")
    code, err = _main(capsys, "run", str(job), "--out", str(tmp_path / "o"), "--quiet")
    assert code == 0, err
    text = "".join(p.extract_text() for p in PdfReader(tmp_path / "o" / "H-1_revA.pdf").pages)
    assert text.replace("\u200b", "").replace("\n", "").count("x" * 100) >= 10   # all of it is there, wrapped


def test_lone_surrogate_never_reaches_the_writers(tmp_path, capsys):
    job = tmp_path / "job.yaml"
    job.write_text(JOB.replace("name: L1", 'name: "L\\udc80"'), encoding="utf-8")
    code, err = _main(capsys, "run", str(job), "--out", str(tmp_path / "o"))
    assert code == 2 and "lone surrogate" in err and ":6:" in err
    assert not (tmp_path / "o").exists() or not list((tmp_path / "o").iterdir())


# ---------------------------------------------------------------- the output folder after a kill
def test_stale_part_files_of_a_killed_run_are_removed(tmp_path, job, capsys):
    out = tmp_path / "out"
    out.mkdir()
    (out / ".H-1_revA.pdf.abc123xy.part").write_bytes(b"partial")
    (out / "notes.part").write_text("a user's file, not ours", encoding="utf-8")
    code, _ = _main(capsys, "run", str(job), "--out", str(out), "--quiet")
    assert code == 0
    assert sorted(p.name for p in out.iterdir()) == ["H-1_revA.json", "H-1_revA.pdf", "notes.part"]


def test_a_pair_interrupted_between_its_renames_is_completed_by_the_next_write(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "X_revA.pdf").write_bytes(b"new pdf")              # the first rename happened
    (out / "X_revA.json").write_bytes(b"old json")            # the second did not
    (out / ".X_revA.json.k3j4h5g6.part").write_bytes(b"new json")
    (out / f".X_revA{JOURNAL_SUFFIX}").write_text(json.dumps(
        [[".X_revA.pdf.a1b2c3d4.part", "X_revA.pdf"], [".X_revA.json.k3j4h5g6.part", "X_revA.json"]]),
        encoding="utf-8")
    clean_folder(out)
    assert (out / "X_revA.json").read_bytes() == b"new json"
    assert sorted(p.name for p in out.iterdir()) == ["X_revA.json", "X_revA.pdf"]


def test_json_alone_removes_the_earlier_pdf_of_the_same_job(report, job, capsys):
    code, _ = _main(capsys, "run", str(job), "--out", str(report.parent), "--no-pdf", "--quiet")
    assert code == 0
    assert sorted(p.name for p in report.parent.iterdir()) == ["H-1_revA.json"]


def test_no_lock_or_temporary_file_is_left(report):
    assert sorted(p.name for p in report.parent.iterdir()) == ["H-1_revA.json", "H-1_revA.pdf"]
