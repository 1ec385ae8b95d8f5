"""calcdoc benchmarks: each figure a ratio measured in one run (the machine is shared and noisy).

    .venv/bin/python bench/run.py            # prints every figure with its target; exit 1 if one is missed

Figures and targets (see bench/RESULTS.md for the last recorded run):
- start-up: `calcdoc --help` against a bare interpreter start                      ≤ 6×
- rendering: whole `calcdoc run` against WeasyPrint alone on the same final HTML  ≤ 1.5×
- engine share: engine time of a six-leg real-gas job within the whole run         ≤ 5 %
- memory: peak RSS of a run, and growth over 100 jobs in one process                no growth
Further figures are added by the modules they measure (flow stages, mixtures, sweeps, batches).
"""
from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PY = sys.executable
FIGURES: list[tuple[str, float, str, bool, str]] = []   # name, value, target text, ok, note

SIX_LEG_JOB = """\
calcdoc: 1
calc: {number: BENCH-6, title: Six-leg real-gas job, revision: A, date: 2026-11-28}
gas: {fluid: Nitrogen, model: real}
start: {pressure: 20 bar, temperature: 300 K, volume: 10 L}
legs:
  - {name: Compress, process: polytropic, n: 1.3, end: {volume_ratio: 0.4}}
  - {name: Cool, process: isochoric, end: {temperature: 300 K}}
  - {name: Relax, process: isothermal, end: {volume_ratio: 1.5}}
  - {name: Expand, process: isentropic, end: {volume_ratio: 1.2}}
  - {name: Heat, process: isobaric, end: {temperature: 320 K}}
  - {name: Squeeze, process: polytropic, n: 1.2, end: {temperature: 360 K}}
"""


def record(name: str, value: float, target: str, ok: bool, note: str = "") -> None:
    FIGURES.append((name, value, target, ok, note))
    print(f"{'ok  ' if ok else 'MISS'} {name:<58} {value:>10.3g}   target {target}   {note}", flush=True)


def wall(cmd: list[str], repeat: int = 5, **kw) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, capture_output=True, **kw)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def bench_startup() -> None:
    calcdoc = [PY, "-m", "calcdoc", "--help"]
    bare = [PY, "-c", "pass"]
    wall(calcdoc, 1)
    # interleave to share the machine's noise
    a = [wall(calcdoc, 1) for _ in range(9)]
    b = [wall(bare, 1) for _ in range(9)]
    ratio = statistics.median(a) / statistics.median(b)
    record("start-up: calcdoc --help / bare python", ratio, "<= 6", ratio <= 6.0,
           f"({statistics.median(a) * 1e3:.0f} ms vs {statistics.median(b) * 1e3:.0f} ms)")


_RENDER_ONLY = """
import sys
from weasyprint import HTML
from calcdoc.report.render import _Fetcher, templates_dir
html = open(sys.argv[1], encoding='utf-8').read()
HTML(string=html, base_url=templates_dir().as_uri() + '/', url_fetcher=_Fetcher.make()).write_pdf(sys.argv[2])
"""

_IN_PROCESS = """
import sys, time, json
import calcdoc, CoolProp, pint, matplotlib.pyplot, weasyprint, jinja2
from weasyprint import HTML
from calcdoc import jobfile, engine, output
from calcdoc.report import render_html
from calcdoc.report.render import _Fetcher, templates_dir
output.write(engine.run(jobfile.load(sys.argv[1])), sys.argv[2])      # warm: fonts, caches, fluid library
out = {"run": [], "alone": [], "engine": []}
for _ in range(3):
    t0 = time.perf_counter()
    job = jobfile.load(sys.argv[1])
    res = engine.run(job)
    t1 = time.perf_counter()
    output.write(res, sys.argv[2])
    t2 = time.perf_counter()
    html = render_html(res)
    t3 = time.perf_counter()
    HTML(string=html, base_url=templates_dir().as_uri() + '/', url_fetcher=_Fetcher.make()).write_pdf(sys.argv[2] + '/alone.pdf')
    t4 = time.perf_counter()
    out["run"].append(t2 - t0); out["engine"].append(t1 - t0); out["alone"].append(t4 - t3)
print(json.dumps(out))
"""

_IMPORTS = """
import time, json
t0 = time.perf_counter(); import CoolProp.CoolProp as CP; CP.get_global_param_string('fluids_list')
t1 = time.perf_counter(); import weasyprint
t2 = time.perf_counter(); import matplotlib.pyplot
t3 = time.perf_counter(); import pint; pint.UnitRegistry()
t4 = time.perf_counter()
print(json.dumps({"CoolProp": t1 - t0, "weasyprint": t2 - t1, "matplotlib": t3 - t2, "pint": t4 - t3}))
"""


def bench_render_and_engine(tmp: Path) -> None:
    """Rendering and engine share, in one warm process (imports excluded, reported separately), and the
    whole command for an ideal-gas job (which needs no CoolProp) against WeasyPrint alone."""
    job = tmp / "six.yaml"
    job.write_text(SIX_LEG_JOB)
    out = tmp / "out"
    out.mkdir()
    r = subprocess.run([PY, "-c", _IN_PROCESS, str(job), str(out)], check=True, capture_output=True, text=True)
    m = json.loads(r.stdout)
    run, alone, eng = (statistics.median(m[k]) for k in ("run", "alone", "engine"))
    ratio = run / alone
    record("rendering, warm: calcdoc run / WeasyPrint alone (same HTML)", ratio, "<= 1.5", ratio <= 1.5,
           f"({run:.2f} s vs {alone:.2f} s)")
    record("engine share of a six-leg real-gas run (imports excluded)", eng / run, "<= 0.05", eng / run <= 0.05,
           f"(engine {eng * 1e3:.0f} ms of {run:.2f} s)")
    # whole command, cold, ideal gas: no CoolProp to load
    ideal = tmp / "six_ideal.yaml"
    ideal.write_text(SIX_LEG_JOB.replace("{fluid: Nitrogen, model: real}", "{model: ideal, k: 1.4, molar_mass: 28.0134 g/mol}")
                     .replace("BENCH-6", "BENCH-6I"))
    from calcdoc import engine, jobfile
    from calcdoc.report import render_html

    html = tmp / "final.html"
    html.write_text(render_html(engine.run(jobfile.load(ideal))), encoding="utf-8")
    whole = [wall([PY, "-m", "calcdoc", "run", str(ideal), "--out", str(out), "-q"], 1) for _ in range(3)]
    bare = [wall([PY, "-c", _RENDER_ONLY, str(html), str(tmp / "alone.pdf")], 1) for _ in range(3)]
    ratio = statistics.median(whole) / statistics.median(bare)
    record("rendering, cold: calcdoc run (ideal gas) / WeasyPrint alone", ratio, "<= 1.5", ratio <= 1.5,
           f"({statistics.median(whole):.2f} s vs {statistics.median(bare):.2f} s)")
    r = subprocess.run([PY, "-c", _IMPORTS], check=True, capture_output=True, text=True)
    imp = json.loads(r.stdout)
    record("imports, cold [s]: " + ", ".join(f"{k} {v:.2f}" for k, v in imp.items()), sum(imp.values()),
           "recorded", True)


_MEMORY = """
import resource, sys, gc
from calcdoc import jobfile, engine, results
job = jobfile.load(sys.argv[1])
res = engine.run(job); results.dumps(res)
def rss():
    with open('/proc/self/status') as fh:
        for line in fh:
            if line.startswith('VmRSS:'):
                return int(line.split()[1])
gc.collect(); base = rss()
for _ in range(100):
    res = engine.run(jobfile.load(sys.argv[1])); results.dumps(res)
gc.collect(); after = rss()
print(base, after, resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)
"""


def bench_memory(tmp: Path) -> None:
    job = tmp / "six.yaml"
    job.write_text(SIX_LEG_JOB)
    out = tmp / "mem"
    r = subprocess.run(["/usr/bin/time", "-f", "%M", PY, "-m", "calcdoc", "run", str(job), "--out", str(out), "-q"],
                       capture_output=True, text=True)
    peak_kb = int(r.stderr.strip().splitlines()[-1]) if r.returncode == 0 and r.stderr.strip() else 0
    record("memory: peak RSS of one calcdoc run [MiB]", peak_kb / 1024, "recorded", True)
    r = subprocess.run([PY, "-c", _MEMORY, str(job)], check=True, capture_output=True, text=True)
    base, after, _ = map(int, r.stdout.split())
    growth = (after - base) / 1024
    record("memory: RSS growth over 100 jobs in one process [MiB]", growth, "<= 5", growth <= 5.0)


def main() -> int:
    os.chdir(ROOT)
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        bench_startup()
        bench_render_and_engine(tmp)
        bench_memory(tmp)
        for extra in EXTRA:
            extra(tmp)
    missed = [f for f in FIGURES if not f[3]]
    print(f"\n{len(FIGURES) - len(missed)} of {len(FIGURES)} figures on target")
    return 1 if missed else 0


EXTRA: list = []

if __name__ == "__main__":
    sys.exit(main())
