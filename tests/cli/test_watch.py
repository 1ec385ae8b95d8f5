"""`calcdoc watch`: builds at start and on each saved change, keeps the last good report when the file
goes bad and says why, ignores a save that changes nothing, and ends on Ctrl-C with exit code 130."""
from __future__ import annotations

import json
import os
import queue
import signal
import subprocess
import sys
import threading
import time

import pytest

JOB = """\
calcdoc: 1
calc: {number: W-1, title: Watch, revision: A, date: 2026-11-28}
gas: {model: ideal, k: 1.4, molar_mass: 28.97 g/mol}
start: {pressure: 1 bar, temperature: 300 K, volume: 1 L}
legs:
  - {name: Squeeze, process: isentropic, end: {volume_ratio: VR}}
"""


def _lines(stream, q):
    for line in stream:
        q.put(line)


def _wait_for(q, text, timeout=90.0):
    seen = []
    end = time.monotonic() + timeout
    while time.monotonic() < end:
        try:
            line = q.get(timeout=0.2)
        except queue.Empty:
            continue
        seen.append(line)
        if text in line:
            return seen
    raise AssertionError(f"no line with {text!r} within {timeout} s; got {seen}")


def test_watch_rebuilds_on_change_and_ends_on_ctrl_c(tmp_path):
    job = tmp_path / "w.yaml"
    job.write_text(JOB.replace("VR", "0.5"))
    out = tmp_path / "out"
    p = subprocess.Popen([sys.executable, "-m", "calcdoc", "watch", str(job), "-o", str(out), "--no-pdf",
                          "--interval", "0.1"], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                         preexec_fn=_ctrl_c_as_from_a_terminal)
    qo, qe = queue.Queue(), queue.Queue()
    readers = [threading.Thread(target=_lines, args=(p.stdout, qo), daemon=True),
               threading.Thread(target=_lines, args=(p.stderr, qe), daemon=True)]
    for t in readers:
        t.start()
    try:
        _wait_for(qo, "built in")
        result = out / "W-1_revA.json"
        first = result.read_bytes()
        time.sleep(0.3)
        # a save that changes the volume ratio: rebuilt, with the new end state
        job.write_text(JOB.replace("VR", "0.25"))
        _wait_for(qo, "built in")
        second = result.read_bytes()
        assert second != first
        P1 = json.loads(first)["states"][1]["P"]["value"]
        P2 = json.loads(second)["states"][1]["P"]["value"]
        # isentropic ideal gas: P2/P1 = (V1/V2)^k (Çengel & Boles 2019, eq. 7-42), from ratio 0.5 to 0.25
        assert P2 / P1 == pytest.approx(2 ** 1.4, rel=1e-9)
        # touched but unchanged: no rebuild
        os.utime(job)
        time.sleep(0.8)
        assert all("built in" not in line for line in _drain(qo))
        # broken: the message with file:line:column, the last good results kept, still watching
        job.write_text(JOB.replace("VR", "0.25") + "  - {name: Bad, process: isentropic, end: {volume_ratio: -2}}\n")
        errs = _wait_for(qe, "error:")
        assert any("w.yaml:" in line for line in errs)
        assert result.read_bytes() == second
        assert p.poll() is None
    finally:
        code = _stop(p, signal.SIGINT)
        for t in readers:
            t.join(timeout=10)
        p.stdout.close()
        p.stderr.close()
    assert code == 130
    assert any("stopped watching" in line for line in _drain(qe))


def _stop(p, sig) -> int:
    """Send ``sig`` to the watcher; its exit code (killed, and the test failed, if it does not end)."""
    p.send_signal(sig)
    try:
        return p.wait(timeout=30)
    except subprocess.TimeoutExpired:
        p.kill()
        raise


def _ctrl_c_as_from_a_terminal():
    # a shell running the suite in the background ignores SIGINT for its children, and Python then keeps it so
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def test_watch_ends_on_sigterm_as_on_ctrl_c(tmp_path):
    job = tmp_path / "w.yaml"
    job.write_text(JOB.replace("VR", "0.5"))
    p = subprocess.Popen([sys.executable, "-m", "calcdoc", "watch", str(job), "-o", str(tmp_path / "out"),
                          "--no-pdf", "--interval", "0.1"], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    qo = queue.Queue()
    reader = threading.Thread(target=_lines, args=(p.stdout, qo), daemon=True)
    reader.start()
    try:
        _wait_for(qo, "built in")
    finally:
        code = _stop(p, signal.SIGTERM)
        reader.join(timeout=10)
        err = p.stderr.read()
        p.stdout.close()
        p.stderr.close()
    assert code == 130 and "stopped watching" in err
    assert (tmp_path / "out" / "W-1_revA.json").is_file()


def _drain(q):
    out = []
    while True:
        try:
            out.append(q.get(timeout=0.1))
        except queue.Empty:
            return out


def test_watch_refuses_a_bad_interval(tmp_path):
    job = tmp_path / "w.yaml"
    job.write_text(JOB.replace("VR", "0.5"))
    r = subprocess.run([sys.executable, "-m", "calcdoc", "watch", str(job), "--interval", "0"],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 2
    assert "--interval" in r.stderr and "above 0" in r.stderr
