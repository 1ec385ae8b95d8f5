"""calcdoc benchmarks: each figure a ratio measured in one run (the machine is shared and noisy).

    .venv/bin/python bench/run.py            # prints every figure with its target; exit 1 if one is missed

Figures and targets (see bench/RESULTS.md for the last recorded run):
- start-up: `calcdoc --help` against a bare interpreter start                      ≤ 6×
- rendering: whole `calcdoc run` against WeasyPrint alone on the same final HTML  ≤ 1.5×
- engine share: engine time of a six-leg real-gas job within the whole run         ≤ 5 %
- memory: peak RSS of a run, and growth over 100 jobs in one process                no growth
- flow stage (methane, nitrogen, CO2 80→250 bar): error of work and T2 vs a converged
  reference integration ≤ 1e-6, with ≤ 50 equation-of-state calls
- mixtures: two-stage train of a 5-component natural gas against methane (engine)   ≤ 20×
- sweeps: 200 separate runs against one 200-point sweep                             ≥ 20×
- batches: 20 jobs one after another against over the cores                         ≥ 1.7× on 2 cores
- mixtures finish: 8 natural gases (lean to rich, N2, CO2), one stage and a two-stage train, each a cold
  `calcdoc run --no-pdf`: slowest job against 10 s ≤ 1×; flashes per stage and peak memory recorded

    .venv/bin/python bench/run.py mixtures_finish   # only the figures whose function names contain the words
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
from calcdoc import engine
from calcdoc import job as jobfile
from calcdoc.report import output
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
    from calcdoc import engine, job as jobfile
    from calcdoc.report import render_html

    html = tmp / "final.html"
    html.write_text(render_html(engine.run(jobfile.load(ideal))), encoding="utf-8")
    whole, bare = [], []
    for _ in range(7):          # interleaved, so that both share the machine's noise
        whole.append(wall([PY, "-m", "calcdoc", "run", str(ideal), "--out", str(out), "-q"], 1))
        bare.append(wall([PY, "-c", _RENDER_ONLY, str(html), str(tmp / "alone.pdf")], 1))
    ratio = statistics.median(whole) / statistics.median(bare)
    record("rendering, cold: calcdoc run (ideal gas) / WeasyPrint alone", ratio, "<= 1.5", ratio <= 1.5,
           f"({statistics.median(whole):.2f} s vs {statistics.median(bare):.2f} s)")
    r = subprocess.run([PY, "-c", _IMPORTS], check=True, capture_output=True, text=True)
    imp = json.loads(r.stdout)
    record("imports, cold [s]: " + ", ".join(f"{k} {v:.2f}" for k, v in imp.items()), sum(imp.values()),
           "recorded", True)


_MEMORY = """
import resource, sys, gc
from calcdoc import engine, job as jobfile
from calcdoc.report import jsonfile as results
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
    only = sys.argv[1:]
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        for fn in [bench_startup, bench_render_and_engine, bench_memory] + EXTRA:
            if only and not any(w in fn.__name__ for w in only):
                continue
            if fn is bench_startup:
                fn()
            else:
                fn(tmp)
    missed = [f for f in FIGURES if not f[3]]
    print(f"\n{len(FIGURES) - len(missed)} of {len(FIGURES)} figures on target")
    return 1 if missed else 0


def _flow_job(gas: str, start: str, legs: str, number: str = "BENCH-F") -> str:
    return (f"calcdoc: 1\ncalc: {{number: {number}, title: Bench, revision: A, date: 2026-11-28}}\n"
            f"gas: {gas}\nsystem: flow\nstart: {start}\nlegs:\n{legs}")


def _reference_stage(fluid: str, P1: float, T1: float, P2: float, eta: float, steps: int = 1600):
    """Converged reference: RK4 in ln P on h, dh/dlnP = P·v(P, h)/η, v from CoolProp HmassP flashes called
    directly (independent of calcdoc's formulation in P and T). Returns (work per kg, T2)."""
    import math

    import CoolProp
    import CoolProp.CoolProp as CP

    AS = CoolProp.AbstractState("HEOS", fluid)
    AS.update(CP.PT_INPUTS, P1, T1)
    h = h1 = AS.hmass()

    def f(x, hh):
        P = math.exp(x)
        AS.update(CP.HmassP_INPUTS, hh, P)
        return P / AS.rhomass() / eta

    x, dx = math.log(P1), (math.log(P2) - math.log(P1)) / steps
    for _ in range(steps):
        k1 = f(x, h)
        k2 = f(x + dx / 2, h + dx / 2 * k1)
        k3 = f(x + dx / 2, h + dx / 2 * k2)
        k4 = f(x + dx, h + dx * k3)
        h += dx / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        x += dx
    AS.update(CP.HmassP_INPUTS, h, P2)
    return h - h1, AS.T()


def bench_flash_efficiency(tmp: Path) -> None:
    """Real-gas stage: relative error of work and discharge temperature against a converged reference
    integration, and the equation-of-state calls it took."""
    from calcdoc import engine, job as jobfile

    cases = [("Methane", 30e5, 300.0, 90e5), ("Nitrogen", 10e5, 300.0, 40e5), ("CO2", 80e5, 313.15, 250e5)]
    for fluid, P1, T1, P2 in cases:
        name = {"CO2": "CarbonDioxide"}.get(fluid, fluid)
        text = _flow_job(f"{{fluid: {name}, model: real}}",
                         f"{{pressure: {P1 / 1e5:g} bar, temperature: {T1:g} K, mass_flow: 1 kg/s}}",
                         f"  - {{name: Stage, process: compressor, efficiency: {{polytropic: 0.8}}, "
                         f"end: {{pressure: {P2 / 1e5:g} bar}}}}\n")
        res = engine.run(jobfile.loads(text, "bench.yaml"))
        w = res.legs[0].quantities["work_in"].value
        w_ref, T_ref = _reference_stage(name, P1, T1, P2, 0.8)
        err = max(abs(w / w_ref - 1), abs(res.legs[0].end.T / T_ref - 1))
        calls = res.gas.flashes
        record(f"flow stage {fluid} {P1 / 1e5:g}->{P2 / 1e5:g} bar: rel. error of work and T2", err, "<= 1e-6",
               err <= 1e-6, f"({calls} equation-of-state calls, target <= 50)")
        record(f"flow stage {fluid}: equation-of-state calls", calls, "<= 50", calls <= 50)


NG = "{mixture: {Methane: 0.874, Ethane: 0.062, Propane: 0.024, Nitrogen: 0.018, CarbonDioxide: 0.022}, model: real}"
TRAIN = ("  - {name: Stage 1, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 40 bar}}\n"
         "  - {name: Intercooler, process: cooler, pressure_drop: 0.4 bar, end: {temperature: 40 degC}}\n"
         "  - {name: Stage 2, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 75 bar}}\n")


def bench_mixture(tmp: Path) -> None:
    from calcdoc import engine, job as jobfile

    start = "{pressure: 16 bar, temperature: 30 degC, mass_flow: 10 kg/s}"
    times = {}
    for label, gas in (("mixture", NG), ("methane", "{fluid: Methane, model: real}")):
        job = jobfile.loads(_flow_job(gas, start, TRAIN), "bench.yaml")
        engine.run(job)                                  # warm: CoolProp's library and the phase envelope
        samples = []
        for _ in range(5):
            t0 = time.perf_counter()
            engine.run(job)
            samples.append(time.perf_counter() - t0)
        times[label] = statistics.median(samples)
    ratio = times["mixture"] / times["methane"]
    record("two-stage train: 5-component natural gas / methane (engine)", ratio, "<= 20", ratio <= 20,
           f"({times['mixture'] * 1e3:.0f} ms vs {times['methane'] * 1e3:.0f} ms)")


def bench_sweep(tmp: Path) -> None:
    """A 200-point sweep of a real-gas stage, engine only, against 200 separate runs (measured on 5 runs
    of `calcdoc run --no-pdf` and scaled to 200)."""
    from calcdoc import engine, job as jobfile

    stage = "  - {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 60 bar}}\n"
    base = _flow_job("{fluid: Methane, model: real}", "{pressure: 20 bar, temperature: 300 K, mass_flow: 5 kg/s}", stage)
    swept = base + ("sweep:\n  input: start.temperature\n  range: {from: 280 K, to: 340 K, steps: 200}\n"
                    "  follow: [work_in, {quantity: temperature, at: Stage}]\n")
    job = jobfile.loads(swept, "bench.yaml")
    engine.run(jobfile.loads(base, "bench.yaml"))        # warm
    t0 = time.perf_counter()
    res = engine.run(job)
    t_sweep = time.perf_counter() - t0
    points = len(res.extra.get("sweep", {}).get("points", [])) or 200
    one = tmp / "one.yaml"
    one.write_text(base)
    t_one = wall([PY, "-m", "calcdoc", "run", str(one), "--out", str(tmp / "sw"), "--no-pdf", "-q"], 5)
    ratio = t_one * 200 / t_sweep
    record("sweep: 200 separate runs / one 200-point sweep (engine)", ratio, ">= 20", ratio >= 20,
           f"(sweep {t_sweep:.2f} s for {points} points; one run {t_one:.2f} s)")


def bench_batch(tmp: Path) -> None:
    folder = tmp / "batch"
    folder.mkdir()
    for k in range(20):
        (folder / f"job{k:02d}.yaml").write_text(SIX_LEG_JOB.replace("BENCH-6", f"BENCH-B{k:02d}")
                                                 .replace("volume: 10 L", f"volume: {10 + k} L"))
    cmd = [PY, "-m", "calcdoc", "run", str(folder), "--out", str(tmp / "bout"), "-q"]
    cores = os.cpu_count() or 1
    par = wall(cmd + ["--jobs", str(cores)], 1)
    seq = wall(cmd + ["--jobs", "1"], 1)
    ratio = seq / par
    record(f"batch: 20 jobs one after another / over {cores} cores", ratio, ">= 1.7", ratio >= 1.7,
           f"({seq:.1f} s vs {par:.1f} s)")


_NG_RUN = """
import json, resource, sys, time
import CoolProp.CoolProp
from calcdoc import engine, job as jobfile
job = jobfile.load(sys.argv[1])
t0 = time.perf_counter()
res = engine.run(job)
t = time.perf_counter() - t0
codes = [getattr(w, "code", "") for w in res.warnings]
src = [w.values["source"] for w in res.warnings if getattr(w, "code", "") == "mixture.envelope_fallback"]
print(json.dumps({"t": t, "flashes": res.extra["eos_flashes"], "envelope": src[0] if src else "heos",
                  "rss": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                  "rss_children": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss}))
"""


def bench_mixtures_finish(tmp: Path) -> None:
    """Eight natural gases, one stage and a two-stage train, each job in a fresh process (the envelope cache
    cold; the time counted from after the imports, which on a loaded machine take longer than the job). The
    slowest job against 10 s; flashes per compressor stage; peak memory of a run and of the envelope
    processes it started (and killed where their budget ran out)."""
    sys.path.insert(0, str(ROOT / "tests"))
    from natural_gases import NATURAL_GASES

    stage = "  - {name: Stage, process: compressor, efficiency: {polytropic: 0.78}, end: {pressure: 55 bar}}\n"
    train = ("  - name: Train\n    process: compressor\n    efficiency: {polytropic: 0.78}\n"
             "    staging: {stages: 2, intercooler: {temperature: 40 degC}}\n    end: {pressure: 100 bar}\n")
    start = "{pressure: 25 bar, temperature: 40 degC, mass_flow: 5 kg/s}"
    slowest, per_stage, rss, rss_child = 0.0, [], 0, 0
    for name, comp in NATURAL_GASES.items():
        gas = "{mixture: {" + ", ".join(f"{c}: {x}" for c, x in comp.items()) + "}, model: real}"
        for kind, legs, stages in (("1 stage", stage, 1), ("2 stages", train, 2)):
            job = tmp / f"ng_{name}_{stages}.yaml"
            job.write_text(_flow_job(gas, start, legs, f"BENCH-NG-{name}-{stages}"))
            out = subprocess.run([PY, "-c", _NG_RUN, str(job)], check=True, capture_output=True, text=True,
                                 timeout=300)
            r = json.loads(out.stdout.strip().splitlines()[-1])
            slowest = max(slowest, r["t"])
            per_stage.append(r["flashes"] / stages)
            rss, rss_child = max(rss, r["rss"]), max(rss_child, r["rss_children"])
            print(f"     {name:<11} {kind:<8}: {r['t']:5.2f} s, {r['flashes']:3d} flashes, envelope {r['envelope']}")
    record("mixtures finish: slowest of 16 natural-gas jobs / 10 s", slowest / 10.0, "<= 1", slowest <= 10.0,
           f"(slowest {slowest:.2f} s after imports)")
    record("mixtures finish: equation-of-state flashes per stage (max)", max(per_stage), "recorded", True,
           f"(min {min(per_stage):.0f})")
    record("mixtures finish: peak RSS of a run [MiB]", rss / 1024, "recorded", True,
           f"(envelope processes: {rss_child / 1024:.0f} MiB)")


EXTRA: list = [bench_flash_efficiency, bench_mixture, bench_sweep, bench_batch, bench_mixtures_finish]

if __name__ == "__main__":
    sys.exit(main())
