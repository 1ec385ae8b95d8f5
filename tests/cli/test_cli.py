"""The command line run as a user would run it."""
import json
import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "example_jobs" / "press_gas_spring.yaml"


def calcdoc(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "calcdoc", *map(str, args)], capture_output=True, text=True,
                          cwd=cwd, env={**os.environ, "PYTHONWARNINGS": "ignore"})


def test_help():
    r = calcdoc("--help")
    assert r.returncode == 0 and "run" in r.stdout and "Exit codes" in r.stdout
    r = calcdoc("run", "--help")
    assert r.returncode == 0 and "--out" in r.stdout


def test_run_demo_writes_json_and_pdf(tmp_path):
    r = calcdoc("run", DEMO, "--out", tmp_path)
    assert r.returncode == 0, r.stderr
    js, pdf = tmp_path / "DEMO-210-C-004_revB.json", tmp_path / "DEMO-210-C-004_revB.pdf"
    assert js.is_file() and pdf.is_file()
    assert pdf.read_bytes().startswith(b"%PDF-")
    doc = json.loads(js.read_text())
    assert [leg["name"] for leg in doc["legs"]] == ["Compression stroke", "Dwell at bottom", "Return stroke"]
    assert "state" in r.stdout and "wrote" in r.stdout


def test_bad_input_exit_2_with_location(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text(DEMO.read_text().replace("  elevation: 320 m", "  elevation_m: 320 m"))
    r = calcdoc("run", bad, "--out", tmp_path / "o")
    assert r.returncode == 2
    assert "Traceback" not in r.stderr
    assert f"{bad}:" in r.stderr and "did you mean 'elevation'" in r.stderr
    assert not (tmp_path / "o").exists() or not any((tmp_path / "o").iterdir())


def test_check_command(tmp_path):
    assert calcdoc("check", DEMO).returncode == 0
