"""Kill-safe output (issue 18): a real-gas run stopped by SIGTERM or SIGKILL at several moments leaves the
earlier complete pair or the new one (never a mix, never a partial file), and the next run writes a correct
pair; a batch stopped by SIGTERM ends its workers, starts no queued job and says what it did not write."""
from __future__ import annotations

import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

import calcdoc

ROOT = Path(__file__).resolve().parents[2]
JOB = ROOT / "example_jobs" / "gas_booster_two_stage.yaml"   # a real-gas flow job: a few seconds of work
CALCDOC = [sys.executable, "-m", "calcdoc"]


def _pair_is_sound(out: Path, capsys) -> str:
    """'none' (no pair), or 'pair' after checking that the PDF verifies with the JSON beside it; fails on a
    single file of the pair, a temporary file or a journal left beside it."""
    names = sorted(p.name for p in out.iterdir()) if out.exists() else []
    reports = [n for n in names if not n.startswith(".")]
    if not reports:
        return "none"
    assert len(reports) == 2, names
    pdf = out / next(n for n in reports if n.endswith(".pdf"))
    code = calcdoc.main(["verify", str(pdf)])
    text = capsys.readouterr().out
    assert code == 0, text
    assert "is the one attached to it" in text
    return "pair"


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGKILL], ids=["SIGTERM", "SIGKILL"])
def test_run_killed_at_several_moments_leaves_a_whole_pair(tmp_path, capsys, sig):
    out = tmp_path / "out"
    seen = set()
    for delay in (0.3, 1.0, 2.0, 3.0, 4.5, 6.0):
        proc = subprocess.Popen([*CALCDOC, "run", str(JOB), "--out", str(out), "--quiet"], cwd=ROOT,
                                stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
        time.sleep(delay)
        proc.send_signal(sig)
        _, err = proc.communicate(timeout=120)
        assert b"Traceback" not in err
        if sig == signal.SIGTERM:
            # SIGTERM is met as Ctrl-C: the run cleans up after itself (no temporary file outlives it)
            assert not [p for p in out.glob(".*")] if out.exists() else True
        seen.add(_pair_is_sound(out, capsys))
    # the next run completes what a SIGKILL left (journal, temporary files) and writes a correct pair
    code = subprocess.run([*CALCDOC, "run", str(JOB), "--out", str(out), "--quiet"], cwd=ROOT, timeout=300).returncode
    assert code in (0, 1)
    assert _pair_is_sound(out, capsys) == "pair"
    assert not list(out.glob(".*")), "no temporary file, journal or lock left"


def test_two_runs_into_one_folder_leave_one_whole_pair(tmp_path, capsys):
    out = tmp_path / "out"
    job_b = tmp_path / "b.yaml"
    shutil.copy(JOB, job_b)   # the same calc number and revision, another file: the same output names
    procs = [subprocess.Popen([*CALCDOC, "run", str(j), "--out", str(out), "--quiet"], cwd=ROOT)
             for j in (JOB, job_b)]
    assert all(p.wait(timeout=300) in (0, 1) for p in procs)
    assert _pair_is_sound(out, capsys) == "pair"


def _children(pid: int) -> list[int]:
    try:
        text = Path(f"/proc/{pid}/task/{pid}/children").read_text()
    except OSError:
        return []
    return [int(x) for x in text.split()]


def test_batch_stopped_by_sigterm_ends_its_workers_and_starts_no_queued_job(tmp_path):
    jobs = tmp_path / "jobs"
    jobs.mkdir()
    text = JOB.read_text(encoding="utf-8")
    for i in range(6):
        (jobs / f"j{i}.yaml").write_text(text.replace("number: DEMO-330-C-012", f"number: B-{i}"), encoding="utf-8")
    out = tmp_path / "out"
    proc = subprocess.Popen([*CALCDOC, "run", str(jobs), "--out", str(out), "-j", "2"], cwd=ROOT,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.monotonic() + 60
    while len(_children(proc.pid)) < 2 and time.monotonic() < deadline:
        time.sleep(0.1)
    workers = _children(proc.pid)
    assert workers, "the batch started its workers"
    time.sleep(1.0)
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    text = err.decode()
    assert proc.returncode == 130 and "Traceback" not in text
    assert "stopped by SIGTERM" in text and "NOT STARTED" in text
    for w in workers:   # every worker ended with the batch (none orphaned, still writing)
        assert not Path(f"/proc/{w}").exists() or "zombie" in Path(f"/proc/{w}/status").read_text()
    before = sorted(p.name for p in out.iterdir()) if out.exists() else []
    time.sleep(2.0)
    after = sorted(p.name for p in out.iterdir()) if out.exists() else []
    assert before == after, "nothing is written after the batch stopped"
    started = {ln.split()[1] for ln in text.splitlines() if ln.strip().startswith(("ok", "STOPPED", "CHECK"))}
    assert len(started) < 6, "queued jobs did not start"
    assert not [n for n in after if n.startswith(".")]
