"""calcdoc benchmarks: each figure a ratio measured in one run (the machine is shared and noisy).

    .venv/bin/python bench/run.py            # prints every figure with its target; exit 1 if one is missed
    .venv/bin/python bench/run.py --quick    # the table of issue #17 only

First the table of issue #17 ("speed where the user waits"), each row with the figure the issue
measured before the work ("was") beside today's and the target; then the older figures of #9. Paired
timings are interleaved (A, B, A, B, ...) and their medians compared, so that both sides share the
machine's load; the load average is printed at the start and the end. The last recorded run is in
bench/README.md.
Also (#13) the mixtures that must finish: 8 natural gases (lean to rich, N2, CO2), one stage and a two-stage
train, each a cold `calcdoc run --no-pdf`: slowest job against 10 s; flashes per stage and peak memory recorded.

    .venv/bin/python bench/run.py mixtures_finish   # only the figures whose function names contain the words
    .venv/bin/python bench/run.py --quick           # only the table of #17
"""
from __future__ import annotations

import json
import math
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


def record(name: str, value: float, target: str, ok: bool, note: str = "", was: str = "") -> None:
    FIGURES.append((name, value, target, ok, note))
    was = f"   (was {was})" if was else ""
    print(f"{'ok  ' if ok else 'MISS'} {name:<58} {value:>10.3g}   target {target}{was}   {note}", flush=True)


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
    quick = "--quick" in sys.argv
    only = [w for w in sys.argv[1:] if not w.startswith("--")]
    print(f"cores: {os.cpu_count()}; load average at start: {', '.join(f'{x:.2f}' for x in os.getloadavg())}",
          flush=True)
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        # calcdoc's cache (pint's definitions, saturation domes) in a folder of this run, so that
        # "cold" means a fresh process with the cache a user has after the first run
        os.environ["CALCDOC_CACHE_DIR"] = str(tmp / "cache")
        print("\n== issue #17: speed where the user waits", flush=True)
        for bench in ISSUE_17:
            if only and not any(w in bench.__name__ for w in only):
                continue
            try:
                bench(tmp)
            except Exception as exc:       # one broken figure must not hide the others
                record(f"{bench.__name__}: did not complete", math.nan, "-", False, f"({type(exc).__name__}: {exc})"[:300])
        if not quick:
            earlier = [fn for fn in [bench_startup, bench_render_and_engine, bench_memory] + EXTRA
                       if not only or any(w in fn.__name__ for w in only)]
            print("\n== earlier figures (#9)", flush=True)
            for fn in earlier:
                fn() if fn is bench_startup else fn(tmp)
    print(f"\nload average at end: {', '.join(f'{x:.2f}' for x in os.getloadavg())}")
    missed = [f for f in FIGURES if not f[3]]
    print(f"{len(FIGURES) - len(missed)} of {len(FIGURES)} figures on target")
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


# ---------------------------------------------------------------------------------------------------
# Issue #17: speed where the user waits. "was" is the figure the issue measured before the work.

REAL_JOB = """\
calcdoc: 1
calc: {number: BENCH-R, title: CO2 stage near the critical region, revision: A, date: 2026-11-28}
gas: {fluid: CarbonDioxide, model: real}
system: flow
start: {pressure: 80 bar, temperature: 40 degC, mass_flow: 1 kg/s}
legs:
  - {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 250 bar}}
  - {name: Cooler, process: cooler, pressure_drop: 1 bar, end: {temperature: 45 degC}}
"""

# WeasyPrint as it comes (its own import, its own URL fetcher), on the HTML calcdoc wrote
_WEASY_ALONE = """
import sys
{coolprop}
from weasyprint import HTML
html = open(sys.argv[1], encoding='utf-8').read()
HTML(string=html, base_url=sys.argv[3]).write_pdf(sys.argv[2])
"""
_COOLPROP = ("import CoolProp, CoolProp.CoolProp as CP\n"
             "CoolProp.AbstractState('HEOS', 'CarbonDioxide').update(CP.PT_INPUTS, 8e6, 313.15)")


def _once(cmd: list[str], timeout: float = 900, **kw) -> float:
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True, timeout=timeout, **kw)
    return time.perf_counter() - t0


def _paired(a: list[str], b: list[str], n: int) -> tuple[float, float]:
    """Medians of n interleaved runs of a and b (after one untimed run of each)."""
    _once(a)
    _once(b)
    ta, tb = [], []
    for _ in range(n):
        ta.append(_once(a))
        tb.append(_once(b))
    return statistics.median(ta), statistics.median(tb)


def _final_html(job_text: str, tmp: Path, name: str) -> Path:
    from calcdoc import engine, job as jobfile
    from calcdoc.report import render_html

    html = tmp / f"{name}.html"
    html.write_text(render_html(engine.run(jobfile.loads(job_text, f"{name}.yaml"))), encoding="utf-8")
    return html


def i17_cold_runs(tmp: Path) -> None:
    from calcdoc.report.render import templates_dir

    base = templates_dir().as_uri() + "/"
    real = tmp / "real.yaml"
    real.write_text(REAL_JOB)
    html = _final_html(REAL_JOB, tmp, "real")
    run = [PY, "-m", "calcdoc", "run", str(real), "--out", str(tmp / "r17"), "-q"]
    alone = [PY, "-c", _WEASY_ALONE.format(coolprop=_COOLPROP), str(html), str(tmp / "alone.pdf"), base]
    a, b = _paired(run, alone, 5)
    record("cold real-gas run with PDF / (CoolProp + WeasyPrint alone)", a / b, "<= 1.3", a / b <= 1.3,
           f"({a:.2f} s vs {b:.2f} s)", was="~1.6")
    ideal_text = SIX_LEG_JOB.replace("{fluid: Nitrogen, model: real}",
                                     "{model: ideal, k: 1.4, molar_mass: 28.0134 g/mol}").replace("BENCH-6", "BENCH-6I")
    ideal = tmp / "ideal.yaml"
    ideal.write_text(ideal_text)
    html = _final_html(ideal_text, tmp, "ideal")
    run = [PY, "-m", "calcdoc", "run", str(ideal), "--out", str(tmp / "i17"), "-q"]
    alone = [PY, "-c", _WEASY_ALONE.format(coolprop=""), str(html), str(tmp / "alone.pdf"), base]
    a, b = _paired(run, alone, 5)
    record("cold ideal-gas run with PDF / WeasyPrint alone (same HTML)", a / b, "<= 1.5", a / b <= 1.5,
           f"({a:.2f} s vs {b:.2f} s)", was="2.97")


def i17_check(tmp: Path) -> None:
    job = tmp / "six.yaml"
    job.write_text(SIX_LEG_JOB)
    a, b = _paired([PY, "-m", "calcdoc", "check", str(job)], [PY, "-c", "pass"], 9)
    record("calcdoc check / bare python -c pass", a / b, "<= 4", a / b <= 4, f"({a * 1e3:.0f} ms vs {b * 1e3:.0f} ms)",
           was="18")


def i17_flashes(tmp: Path) -> None:
    """CO2 80 → 250 bar at 40 °C, η_p = 0.8: flashes of the path integration at the default tolerance,
    the error in head against the converged reference, and whether the count rises as the tolerance
    tightens."""
    from calcdoc import engine, job as jobfile
    from calcdoc.physics.flowpath import STEP_RTOL, Eos, polytropic_path
    from calcdoc.physics.gas import RealGas

    def path(rtol):
        gas = RealGas("CarbonDioxide")
        eos = Eos(gas)
        p1 = eos.pt(80e5, 313.15)
        f0 = gas.flashes
        end, _, _ = polytropic_path(eos, p1, 250e5, 0.8, rtol)
        return gas.flashes - f0, end.state.h - p1.state.h

    n, dh = path(STEP_RTOL)
    w_ref, _ = _reference_stage("CarbonDioxide", 80e5, 313.15, 250e5, 0.8)
    err = abs(dh / w_ref - 1)
    tols = [1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6, 1e-6, 3e-7, 1e-7]
    counts = [path(t)[0] for t in tols]
    monotone = counts == sorted(counts)
    res = engine.run(jobfile.loads(REAL_JOB, "real.yaml"))
    stage = res.extra.get("eos_flashes", res.gas.flashes)
    record("flashes of the path, CO2 80->250 bar stage (1e-6 in head)", n, "<= 25, monotone",
           n <= 25 and monotone and err <= 1e-6,
           f"(head error {err:.1e}; whole job {stage} incl. start, isentropic end, cooler; counts over tolerances "
           f"{tols[0]:g}..{tols[-1]:g}: {counts}, {'monotone' if monotone else 'NOT monotone'})", was="41")


_DOME_PROBE = """
import sys
from calcdoc import engine, job as jobfile
from calcdoc.physics import dome
engine.run(jobfile.load(sys.argv[1]))
print(dome.computed)
"""


def i17_dome(tmp: Path) -> None:
    real = tmp / "real.yaml"
    real.write_text(REAL_JOB)
    env = dict(os.environ, CALCDOC_CACHE_DIR=str(tmp / "dome-cache"))
    counts = []
    for _ in range(2):
        r = subprocess.run([PY, "-c", _DOME_PROBE, str(real)], check=True, capture_output=True, text=True, env=env)
        counts.append(int(r.stdout.split()[-1]) * 120)      # 60 temperatures, liquid and vapour
    record("saturation-dome flashes in a second run of a fluid", counts[1], "0 (cached on disk)", counts[1] == 0,
           f"(first run {counts[0]}; cache {tmp.name}/dome-cache/dome)", was="120 per run")


NG_SET = {   # demo compositions (mole fractions), from lean to rich, with inerts and sour gas
    "lean": {"Methane": 0.95, "Ethane": 0.03, "Propane": 0.005, "Nitrogen": 0.01, "CarbonDioxide": 0.005},
    "pipeline": {"Methane": 0.874, "Ethane": 0.062, "Propane": 0.024, "Nitrogen": 0.018, "CarbonDioxide": 0.022},
    "butane": {"Methane": 0.87, "Ethane": 0.06, "Propane": 0.03, "n-Butane": 0.01, "Nitrogen": 0.03},
    "rich": {"Methane": 0.80, "Ethane": 0.10, "Propane": 0.05, "n-Butane": 0.02, "IsoButane": 0.01,
             "Nitrogen": 0.01, "CarbonDioxide": 0.01},
    "high CO2": {"Methane": 0.80, "Ethane": 0.04, "CarbonDioxide": 0.14, "Nitrogen": 0.02},
    "high N2": {"Methane": 0.82, "Ethane": 0.03, "Nitrogen": 0.14, "CarbonDioxide": 0.01},
    "pentane": {"Methane": 0.85, "Ethane": 0.07, "Propane": 0.04, "n-Butane": 0.015, "n-Pentane": 0.005,
                "Nitrogen": 0.01, "CarbonDioxide": 0.01},
    "sour": {"Methane": 0.90, "Ethane": 0.04, "Propane": 0.01, "HydrogenSulfide": 0.02, "CarbonDioxide": 0.02,
             "Nitrogen": 0.01},
}
MIX_TIMEOUT = 60.0
_MIX_PROBE = """
import sys, time
import CoolProp.CoolProp                  # the library's own load is not the mixture's cost
from calcdoc import engine, job as jobfile
job = jobfile.load(sys.argv[1])
t0 = time.perf_counter()
engine.run(job)
print(time.perf_counter() - t0)
"""


def i17_mixtures(tmp: Path) -> None:
    """One stage (30 → 70 bar from 30 °C) for each composition, each run in its own process bounded by
    MIX_TIMEOUT (a composition that does not finish is reported as such), engine time only (the
    process's imports, CoolProp's included, excluded). Each gas runs twice against a cache folder of its
    own: first with it empty (the phase envelope traced, as on a job's first run on a machine), then again
    (the envelope read from the user's cache, as on every later run and in ``calcdoc watch``)."""
    stage = "  - {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 70 bar}}\n"
    start = "{pressure: 30 bar, temperature: 30 degC, mass_flow: 10 kg/s}"
    gases = {"methane": "{fluid: Methane, model: real}"}
    for name, comp in NG_SET.items():
        assert abs(sum(comp.values()) - 1.0) < 1e-12, name
        gases[name] = "{mixture: {" + ", ".join(f"{c}: {x}" for c, x in comp.items()) + "}, model: real}"
    runs: dict[str, dict[str, float | None]] = {"cold": {}, "warm": {}}
    for name, gas in gases.items():
        slug = name.replace(" ", "_")
        f = tmp / f"mix_{slug}.yaml"
        f.write_text(_flow_job(gas, start, stage, number=f"BENCH-M-{name.replace(' ', '')}"))
        env = dict(os.environ, CALCDOC_CACHE_DIR=str(tmp / f"mix-cache-{slug}"))
        for kind in ("cold", "warm"):
            try:
                r = subprocess.run([PY, "-c", _MIX_PROBE, str(f)], capture_output=True, text=True,
                                   timeout=MIX_TIMEOUT, env=env)
                runs[kind][name] = float(r.stdout.split()[-1]) if r.returncode == 0 else None
                if r.returncode != 0:
                    print(f"     {name}: {r.stderr.strip().splitlines()[-1][:160] if r.stderr.strip() else 'failed'}")
            except subprocess.TimeoutExpired:
                runs[kind][name] = math.inf
    for kind, label in (("warm", "envelope cached"), ("cold", "first run, cache empty")):
        times = dict(runs[kind])
        ref = times.pop("methane")
        done = {k: v for k, v in times.items() if v is not None and math.isfinite(v)}
        hung = [k for k, v in times.items() if v is not None and not math.isfinite(v)]
        failed = [k for k, v in times.items() if v is None]
        slowest = max(done, key=lambda k: done[k]) if done else None
        ratio = math.inf if hung or slowest is None or not ref else done[slowest] / ref
        detail = ", ".join(f"{k} {v * 1e3:.0f} ms" for k, v in done.items())
        note = (f"(methane {ref * 1e3:.0f} ms; {detail}" if ref else "(methane failed; ") + \
               (f"; not finished within {MIX_TIMEOUT:.0f} s: {', '.join(hung)}" if hung else "") + \
               (f"; failed: {', '.join(failed)}" if failed else "") + ")"
        record(f"slowest of 8 natural gases, one stage / methane ({label})", ratio, "<= 20",
               ratio <= 20 and not failed, note, was="never finishes")


def i17_batch(tmp: Path) -> None:
    folder = tmp / "batch"
    folder.mkdir(exist_ok=True)
    for k in range(20):
        (folder / f"job{k:02d}.yaml").write_text(SIX_LEG_JOB.replace("BENCH-6", f"BENCH-B{k:02d}")
                                                 .replace("volume: 10 L", f"volume: {10 + k} L"))
    cmd = [PY, "-m", "calcdoc", "run", str(folder), "--out", str(tmp / "bout"), "-q"]
    seq, par = [], []
    for _ in range(2):
        seq.append(_once(cmd + ["--jobs", "1"]))
        par.append(_once(cmd + ["--jobs", "2"]))
    a, b = statistics.median(seq), statistics.median(par)
    record("batch of 20 jobs: serial / over 2 cores", a / b, ">= 1.8", a / b >= 1.8,
           f"({a:.1f} s vs {b:.1f} s; {os.cpu_count()} cores)", was="1.59")


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
            empty = tmp / f"ng-cache-{name}-{stages}"       # the envelope traced, not read from the cache
            out = subprocess.run([PY, "-c", _NG_RUN, str(job)], check=True, capture_output=True, text=True,
                                 timeout=300, env=dict(os.environ, CALCDOC_CACHE_DIR=str(empty)))
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


EXTRA: list = [bench_flash_efficiency, bench_mixture, bench_mixtures_finish]


def hundred_legs() -> str:
    kinds = ["  - {{name: Compress {k}, process: polytropic, n: 1.3, end: {{volume_ratio: 0.8}}}}",
             "  - {{name: Cool {k}, process: isochoric, end: {{temperature: 300 K}}}}",
             "  - {{name: Open {k}, process: isothermal, end: {{volume_ratio: 1.25}}}}"]
    legs = [kinds[i % 3].format(k=i // 3 + 1) for i in range(100)]
    return ("calcdoc: 1\ncalc: {number: BENCH-100, title: Hundred-leg job, revision: A, date: 2026-11-28}\n"
            "gas: {fluid: Nitrogen, model: real}\nstart: {pressure: 20 bar, temperature: 300 K, volume: 10 L}\n"
            "legs:\n" + "\n".join(legs) + "\n")


def i17_memory(tmp: Path) -> None:
    job = tmp / "hundred.yaml"
    job.write_text(hundred_legs())
    r = subprocess.run(["/usr/bin/time", "-f", "%M", PY, "-m", "calcdoc", "run", str(job), "--out", str(tmp / "h"),
                        "-q"], capture_output=True, text=True)
    peak = int(r.stderr.strip().splitlines()[-1]) / 1024 if r.returncode == 0 else math.inf
    record("100-leg job with PDF: peak memory [MiB]", peak, "<= 200", peak <= 200, was="454")


def i17_sweep(tmp: Path) -> None:
    stage = "  - {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 60 bar}}\n"
    base = _flow_job("{fluid: Methane, model: real}", "{pressure: 20 bar, temperature: 300 K, mass_flow: 5 kg/s}",
                     stage, number="BENCH-S")
    swept = base + ("sweep:\n  input: start.temperature\n  range: {from: 280 K, to: 340 K, steps: 1000}\n"
                    "  follow: [work_in, {quantity: temperature, at: Stage}]\n")
    one, many = tmp / "one.yaml", tmp / "many.yaml"
    one.write_text(base)
    many.write_text(swept.replace("BENCH-S", "BENCH-S1000"))
    cmd = [PY, "-m", "calcdoc", "run", "--out", str(tmp / "sw"), "--no-pdf", "-q"]
    t_one = [_once(cmd + [str(one)])]
    t_many = []
    for _ in range(2):
        t_many.append(_once(cmd + [str(many)]))
        t_one.append(_once(cmd + [str(one)]))
    a, b = statistics.median(t_many), statistics.median(t_one)
    record("sweep of 1000 points, results only / 1 point", a / b, "<= 50", a / b <= 50,
           f"({a:.1f} s vs {b:.2f} s)", was="capped at 200")


def i17_watch(tmp: Path) -> None:
    """`calcdoc watch` on the real-gas job: each rebuild after a save against a cold `calcdoc run`."""
    import re
    import signal

    job = tmp / "watched.yaml"
    job.write_text(REAL_JOB)
    out = tmp / "w"
    err = open(tmp / "watch-stderr.txt", "w")   # read back should the watcher not end
    # SIGINT as from a terminal, even when this bench runs in the background (where the shell ignores it)
    p = subprocess.Popen([PY, "-m", "calcdoc", "watch", str(job), "--out", str(out), "--interval", "0.1"],
                         stdout=subprocess.PIPE, stderr=err, text=True,
                         preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))

    def built() -> float:
        for line in p.stdout:
            m = re.search(r"built in ([0-9.]+) s", line)
            if m:
                return float(m.group(1))
        raise RuntimeError("watch ended")

    rebuild, cold = [], []
    try:
        built()
        for k in range(4):
            time.sleep(0.3)
            job.write_text(REAL_JOB.replace("polytropic: 0.8", f"polytropic: {0.79 - 0.01 * k:.2f}"))
            rebuild.append(built())
            cold.append(_once([PY, "-m", "calcdoc", "run", str(job), "--out", str(tmp / "wc"), "-q"]))
    finally:
        p.send_signal(signal.SIGINT)
        try:
            code = p.wait(timeout=60)
        except subprocess.TimeoutExpired:
            p.kill()
            err.close()
            print("     watch did not end on Ctrl-C; its stderr:\n" + (tmp / "watch-stderr.txt").read_text()[-2000:])
            raise
        err.close()
    a, b = statistics.median(rebuild), statistics.median(cold)
    record("calcdoc watch: real-gas rebuild / cold run", a / b, "<= 0.25", a / b <= 0.25 and code == 130,
           f"({a:.2f} s vs {b:.2f} s; Ctrl-C exit code {code})", was="new")


ISSUE_17: list = [i17_flashes, i17_dome, i17_check, i17_cold_runs, i17_watch, i17_memory, i17_sweep, i17_batch,
                  i17_mixtures]


if __name__ == "__main__":
    sys.exit(main())
