"""Nothing lost, internal errors and the safety of the inputs.

- a failing run leaves an earlier report of the same job byte-identical and writes no partial file;
- calcdoc never overwrites a job file and never writes outside the chosen output folder;
- an internal error is one line for the user, its traceback only in a log with --debug;
- YAML builds plain data only; job text reaching the report is escaped and cannot fetch files.
"""
from __future__ import annotations

import re
from pathlib import Path

import pytest

import calcdoc

JOB = """calcdoc: 1
calc:
  number: {number}
  title: {title}
  revision: {revision}
  date: 2026-03-02
gas:
  model: ideal
  k: 1.4
  molar_mass: 28.97 g/mol
start:
  pressure: 1 bara
  temperature: 20 degC
  volume: 0.5 m3
legs:
  - name: Fill stroke
    process: polytropic
    n: {n}
    end: {{pressure: 8 bara}}
"""


#: WeasyPrint 70 warns at import when the HarfBuzz subsetting library is missing (a system package);
#: the PDF is still complete, so tests that render one let that one warning pass.
PDF = pytest.mark.filterwarnings("ignore:HarfBuzz-Subset:DeprecationWarning")


def _job(tmp_path: Path, name="job.yaml", number="DEMO-101-C-001", title="Receiver fill", revision="A", n="1.3") -> Path:
    p = tmp_path / name
    p.write_text(JOB.format(number=number, title=title, revision=revision, n=n), encoding="utf-8")
    return p


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


@pytest.fixture(scope="module")
def earlier_report(tmp_path_factory):
    """A job run once with its PDF: the earlier report a later failing run must not touch."""
    base = tmp_path_factory.mktemp("earlier")
    job = _job(base)
    out = base / "out"
    assert calcdoc.main(["run", str(job), "--out", str(out), "--quiet"]) == 0
    assert sorted(p.name for p in out.iterdir()) == ["DEMO-101-C-001_revA.json", "DEMO-101-C-001_revA.pdf"]
    return base, out, _snapshot(out)


def _fresh_copy(earlier, tmp_path) -> Path:
    _, out, snap = earlier
    copy = tmp_path / "out"
    copy.mkdir()
    for name, data in snap.items():
        (copy / name).write_bytes(data)
    return copy


@PDF
def test_bad_revision_of_the_same_job_leaves_the_earlier_report_untouched(earlier_report, tmp_path, capsys):
    out = _fresh_copy(earlier_report, tmp_path)
    bad = _job(tmp_path, n="0")          # n = 0 cannot reach an end pressure: fails in the engine
    assert calcdoc.main(["run", str(bad), "--out", str(out)]) == 2
    assert _snapshot(out) == earlier_report[2]
    assert "legs[0].end.pressure" in capsys.readouterr().err


@PDF
def test_failure_while_rendering_the_pdf_leaves_both_files_untouched(earlier_report, tmp_path, monkeypatch, capsys):
    out = _fresh_copy(earlier_report, tmp_path)

    def broken_render(*args, **kwargs):
        raise RuntimeError("renderer crashed")

    monkeypatch.setattr("calcdoc.report.output.render_pdf", broken_render)
    job = _job(tmp_path, title="Receiver fill, revised")
    assert calcdoc.main(["run", str(job), "--out", str(out)]) == 3
    assert _snapshot(out) == earlier_report[2], "the new JSON must not be written beside the old PDF"
    capsys.readouterr()


@PDF
def test_disk_full_while_writing_leaves_no_partial_file_and_old_outputs(earlier_report, tmp_path, monkeypatch, capsys):
    import os

    out = _fresh_copy(earlier_report, tmp_path)
    real_fsync, calls = os.fsync, []

    def fsync_fails_second_time(fd):
        calls.append(fd)
        if len(calls) == 2:
            raise OSError(28, "No space left on device")
        return real_fsync(fd)

    monkeypatch.setattr(os, "fsync", fsync_fails_second_time)
    job = _job(tmp_path, title="Receiver fill, revised")
    code = calcdoc.main(["run", str(job), "--out", str(out)])
    err = capsys.readouterr().err
    assert code == 2 and "No space left on device" in err and "Traceback" not in err
    assert _snapshot(out) == earlier_report[2]       # no .part files, old JSON and PDF as they were


def test_a_job_file_is_never_overwritten(tmp_path, capsys):
    out = tmp_path / "out"
    out.mkdir()
    # a job written in JSON (which is YAML) and saved under the name its results would take
    job = _job(out, name="DEMO-101-C-001_revA.json")
    before = job.read_bytes()
    assert calcdoc.main(["run", str(job), "--out", str(out), "--no-pdf"]) == 2
    assert job.read_bytes() == before
    assert "refusing to overwrite the job file" in capsys.readouterr().err
    assert [p.name for p in out.iterdir()] == [job.name]


@pytest.mark.parametrize("number,revision", [("../../etc/x", "A"), ("/tmp/abs", "B"), ("PRJ/7\\C-01", "1/2"),
                                             ("..", ".."), ("CON:\x00?*", "A")])
def test_names_from_calc_numbers_stay_inside_the_output_folder(tmp_path, number, revision, capsys):
    root = tmp_path / "root"
    work = root / "a" / "b"
    work.mkdir(parents=True)
    job = work / "job.yaml"
    job.write_text(JOB.format(number=f"'{number}'", title="x", revision=f"'{revision}'", n="1.3")
                   .replace("\x00", "\\0").replace("'CON:\\0?*'", '"CON:\\0?*"'), encoding="utf-8")
    out = work / "out"
    code = calcdoc.main(["run", str(job), "--out", str(out), "--no-pdf", "--quiet"])
    assert code == 0, capsys.readouterr().err
    written = [p for p in root.rglob("*") if p.is_file() and p != job]
    assert written and all(p.parent == out for p in written)
    assert all(re.fullmatch(r"[A-Za-z0-9._-]+", p.name) and not p.name.startswith(".") for p in written)


def test_internal_error_is_one_line_and_the_traceback_goes_to_the_log_only_with_debug(tmp_path, monkeypatch, capsys):
    def broken_leg(*args, **kwargs):
        raise ZeroDivisionError("float division by zero")

    monkeypatch.setattr("calcdoc.engine.closed.closed_leg", broken_leg)
    job = _job(tmp_path)
    out = tmp_path / "out"
    assert calcdoc.main(["run", str(job), "--out", str(out)]) == 3
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "internal error" in err and "please report it" in err
    assert "Traceback" not in err and "ZeroDivisionError" not in err
    assert not (out / "calcdoc-debug.log").exists()

    assert calcdoc.main(["run", str(job), "--out", str(out), "--debug"]) == 3
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err
    log = (out / "calcdoc-debug.log").read_text(encoding="utf-8")
    assert "Traceback" in log and "ZeroDivisionError" in log and "broken_leg" in log
    assert sorted(p.name for p in out.iterdir()) == ["calcdoc-debug.log"], "no results written"


def test_internal_error_while_checking_is_one_line(tmp_path, monkeypatch, capsys):
    def broken(*args, **kwargs):
        raise KeyError("oops")

    monkeypatch.setattr("calcdoc.job.jobfile._Validator.job", broken)
    assert calcdoc.main(["check", str(_job(tmp_path))]) == 3
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "internal error" in err and "Traceback" not in err


# -- safety of the inputs -----------------------------------------------------------------------------
def test_yaml_builds_plain_data_only(tmp_path, capsys):
    from calcdoc.errors import JobError
    from calcdoc.job import loads

    marker = tmp_path / "pwned"
    for text in (f"calcdoc: !!python/object/apply:os.mkdir ['{marker}']\n",
                 f"calcdoc: !!python/object/new:os.mkdir ['{marker}']\n",
                 "calcdoc: !!python/name:os.system\n",
                 "calcdoc: !!binary aGVsbG8=\n",
                 "calcdoc: !custom {a: 1}\n",
                 "calcdoc: !!set {a, b}\n"):
        with pytest.raises(JobError) as info:
            loads(text, "t.yaml")
        assert "asks for an object to be built" in str(info.value), text
    assert not marker.exists()


def test_no_eval_exec_or_template_from_job_text_in_the_source():
    src = Path(__file__).parents[2] / "calcdoc"
    for py in src.rglob("*.py"):
        text = py.read_text(encoding="utf-8")
        for bad in (r"\beval\(", r"\bexec\(", r"from_string\(", r"yaml\.load\(", r"unsafe_load", r"yaml\.Loader\b",
                    r"FullLoader", r"UnsafeLoader"):
            assert not re.search(bad, text), f"{py.name}: {bad}"


@PDF
def test_the_pdf_fetcher_serves_only_our_own_files():
    from weasyprint.urls import FatalURLFetchingError

    from calcdoc.report.render import _Fetcher, templates_dir

    fetcher = _Fetcher.make()
    for url in ("file:///etc/passwd", "https://example.com/x.css", "http://127.0.0.1/",
                (templates_dir() / ".." / ".." / "pyproject.toml").as_uri()):
        with pytest.raises(FatalURLFetchingError):
            fetcher.fetch(url)


@PDF
def test_job_text_in_the_report_is_escaped_and_embeds_no_local_file(tmp_path):
    """A title carrying HTML that would attach a local file to the PDF; the report shows it as text."""
    import io

    import pypdf

    import calcdoc
    from calcdoc.report.render import render_html

    secret = tmp_path / "secret.txt"
    secret.write_text("TOP-SECRET-CONTENT", encoding="utf-8")
    title = f'"<link rel=attachment href={secret.as_uri()}><img src=file:///etc/hostname><script>x()</script>"'
    job = _job(tmp_path, title=title)
    results = calcdoc.run(calcdoc.load(job))
    html = render_html(results)
    assert "<link rel=attachment" not in html and "<script>x()" not in html
    assert "&lt;link rel=attachment" in html
    out = tmp_path / "out"
    calcdoc.write(results, out)
    (pdf_path,) = out.glob("*.pdf")
    data = pdf_path.read_bytes()
    reader = pypdf.PdfReader(io.BytesIO(data))
    assert sorted(reader.attachments) == ["DEMO-101-C-001_revA.json", "job.yaml"]
    assert b"TOP-SECRET-CONTENT" not in data
