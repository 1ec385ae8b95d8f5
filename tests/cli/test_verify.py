"""`calcdoc verify`: a calc package checked against its attachments, a job file and a rerun.

One PDF is rendered for the module; tampered copies are made from it with pypdf (no new render).
"""
from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from pypdf import PdfReader, PdfWriter

import calcdoc
from calcdoc import main
from calcdoc.cli.verify import RERUN_RTOL, VerifyError, _compare, read_package, verify

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "example_jobs" / "press_gas_spring.yaml"


@pytest.fixture(scope="module")
def package(tmp_path_factory):
    d = tmp_path_factory.mktemp("verify")
    job = d / DEMO.name
    shutil.copyfile(DEMO, job)
    json_path, pdf_path = calcdoc.write(calcdoc.run(calcdoc.load(job)), d / "out")
    return {"dir": d, "job": job, "pdf": pdf_path, "json": json_path}


def _repack(src: Path, dst: Path, job_bytes: bytes | None = None, results_bytes: bytes | None = None,
            drop: bool = False) -> Path:
    """A copy of a PDF with the same pages and the attachments replaced (or none when drop)."""
    reader = PdfReader(src)
    att = {name: blobs[0] for name, blobs in reader.attachments.items()}
    writer = PdfWriter()
    for page in reader.pages:
        writer.add_page(page)
    if not drop:
        for name, blob in att.items():
            if name.endswith(".json"):
                writer.add_attachment(name, results_bytes if results_bytes is not None else blob)
            else:
                writer.add_attachment(name, job_bytes if job_bytes is not None else blob)
    with open(dst, "wb") as fh:
        writer.write(fh)
    return dst


def _cli(*args: str) -> tuple[int, str, str]:
    proc = subprocess.run([sys.executable, "-m", "calcdoc", "verify", *args], capture_output=True, text=True,
                          timeout=120)
    return proc.returncode, proc.stdout, proc.stderr


def test_untouched_report_verifies_against_its_job_and_a_rerun(package, capsys):
    assert main(["verify", str(package["pdf"]), str(package["job"]), "--rerun"]) == 0
    out = capsys.readouterr().out
    assert "verified:" in out and "MISMATCH" not in out
    assert "(2 places)" in out                          # cover and appendix both print the hash
    assert "identical to the attached results, byte for byte" in out
    assert f"made from {package['job']}" in out


def test_package_reads_back_job_and_results(package):
    pkg = read_package(package["pdf"])
    assert pkg.job_name == DEMO.name and pkg.job_data == DEMO.read_bytes()
    assert pkg.results_text == package["json"].read_text(encoding="utf-8")
    assert set(pkg.printed_hashes) == {calcdoc.load(DEMO).sha256}


def test_edited_job_file_is_not_the_one_the_report_came_from(package, tmp_path):
    edited = tmp_path / "edited.yaml"
    edited.write_bytes(DEMO.read_bytes().replace(b"n: 1.55", b"n: 1.56"))
    code, out, _ = _cli(str(package["pdf"]), str(edited))
    assert code == 1
    assert "NOT made from" in out and "n: 1.56" in out and "NOT VERIFIED" in out


def test_job_file_differing_only_in_line_endings_is_caught(package, tmp_path):
    crlf = tmp_path / "crlf.yaml"
    crlf.write_bytes(DEMO.read_bytes().replace(b"\n", b"\r\n"))
    result = verify(package["pdf"], crlf)
    assert not result.ok
    assert any("bytes differ" in f.text for f in result.findings)


def test_tampered_attachment_breaks_the_printed_hash(package, tmp_path):
    forged = _repack(package["pdf"], tmp_path / "forged.pdf",
                     job_bytes=DEMO.read_bytes().replace(b"n: 1.55", b"n: 1.45"))
    code, out, _ = _cli(str(forged))
    assert code == 1
    assert "differs from the hash printed" in out and "differs from input_sha256" in out


def test_altered_results_are_caught_by_a_rerun(package, tmp_path):
    data = json.loads(package["json"].read_text(encoding="utf-8"))
    data["legs"][0]["W_by_gas"]["value"] *= 1.01
    altered = (json.dumps(data, indent=2, ensure_ascii=False) + "\n").encode("utf-8")
    pdf = _repack(package["pdf"], tmp_path / "altered.pdf", results_bytes=altered)
    assert verify(pdf).ok                                  # hashes alone cannot see it ...
    result = verify(pdf, rerun=True)                       # ... the rerun does
    assert not result.ok
    assert any("legs[0].W_by_gas.value" in f.text for f in result.findings)


def test_bad_input_exits_2(package, tmp_path):
    assert _cli(str(tmp_path / "missing.pdf"))[0] == 2
    not_pdf = tmp_path / "job.pdf"
    shutil.copyfile(DEMO, not_pdf)
    code, _, err = _cli(str(not_pdf))
    assert code == 2 and "not a PDF" in err
    bare = _repack(package["pdf"], tmp_path / "bare.pdf", drop=True)
    code, _, err = _cli(str(bare))
    assert code == 2 and "no attached files" in err
    code, _, err = _cli(str(package["pdf"]), str(tmp_path / "no-such-job.yaml"))
    assert code == 2 and "no such file" in err


def test_verify_error_is_raised_not_printed(tmp_path):
    with pytest.raises(VerifyError):
        verify(tmp_path / "nothing.pdf")


def test_compare_ignores_versions_and_tiny_float_noise():
    old = {"software": {"CoolProp": "8.0.0"}, "legs": [{"W": {"value": 1000.0, "unit": "J"}}], "phase": "gas"}
    same = {"software": {"CoolProp": "8.0.1"}, "legs": [{"W": {"value": 1000.0 * (1 + RERUN_RTOL / 10), "unit": "J"}}],
            "phase": "gas"}
    assert _compare(old, same) == []
    moved = {"software": {}, "legs": [{"W": {"value": 1000.0 * (1 + 100 * RERUN_RTOL), "unit": "J"}}], "phase": "gas"}
    assert _compare(old, moved) == [f"legs[0].W.value: attached 1000.0, recomputed {1000.0 * (1 + 100 * RERUN_RTOL)!r}"]
    assert _compare(old, {**same, "phase": "liquid"}) == ["phase: attached 'gas', recomputed 'liquid'"]
    assert _compare(old, {**same, "legs": []}) == ["legs: 1 items attached, 0 recomputed"]


def test_rerun_of_a_report_with_changes_since_an_older_revision(tmp_path):
    new = tmp_path / "new.yaml"
    new.write_text(DEMO.read_text(encoding="utf-8").replace("n: 1.55 ", "n: 1.50 ").replace("revision: B", "revision: C"),
                   encoding="utf-8")
    out = tmp_path / "out"
    assert main(["run", str(new), "--changes-since", str(DEMO), "--out", str(out), "-q"]) == 0
    report = out / "DEMO-210-C-004_revC.pdf"
    v = verify(report, new, rerun=True)
    assert v.ok
    tampered = tmp_path / "t.pdf"
    pkg = read_package(report)
    results = json.loads(pkg.results_text)
    results["legs"][0]["W_by_gas"]["value"] *= 1.01
    _repack(report, tampered, results_bytes=json.dumps(results, indent=2).encode())
    assert not verify(tampered, rerun=True).ok          # the job's own results are still compared
