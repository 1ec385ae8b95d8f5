"""Software verification on the user's own installation: run every shipped reference case.

``calcdoc selftest --out DIR`` runs each case of ``calcdoc/verification/*.yaml`` through the installed
calcdoc (a job fragment through load → run → results JSON, or a direct call), compares each computed
value with its expected value and tolerance, and writes a verification report (JSON and PDF).

Expected values come from the case file: a published number, or a formula or library call that
:mod:`calcdoc.selftest.reference` evaluates with ``math``, CoolProp and SciPy called directly, never through
calcdoc's own physics. The same cases drive ``tests/test_verification.py``.
"""
from __future__ import annotations

import importlib
import json
import math
import platform
import re
from dataclasses import dataclass, field
from typing import Any

from .. import __version__
from ..engine import run
from ..job import CLOSED_PROCESSES, FLOW_PROCESSES, loads
from ..job.source import dump as dump_yaml
from ..report.jsonfile import to_contract as results_json
from ..report.methods import METHODS
from ..report.output import output_folder, write_all
from ..report.verification import render_pdf
from . import reference as _reference
from .cases import SOURCE_KINDS, Case, Expected, TopicFile, case_files, load_all

__all__ = ["CaseResult", "Outcome", "Report", "environment", "run_all", "run_case", "to_json", "dumps", "write"]

SCHEMA = "calcdoc-selftest/1"
STEM = "calcdoc-selftest"

#: Statements the report always makes about the limits of this verification.
NOT_VERIFIED = (
    "Real-gas properties are compared with CoolProp called directly: the same library and the same "
    "equations of state that calcdoc uses. This verifies that calcdoc asks the library for the right "
    "states, integrates the paths and keeps the first-law books correctly; it does not verify the "
    "equations of state themselves against measurements (their uncertainty is stated in each fluid's "
    "reference).",
    "Mixtures are verified against CoolProp's mixture model only, not against measured data.",
    "Only the numbers in the results are compared. The layout and wording of calc packages (PDF), the "
    "charts, and the messages for bad input are not verified by this report.",
    "Values marked 'unconfirmed' were written by the case author without the cited document at hand: they "
    "show consistency with that value, not agreement with the source; confirm them against the cited "
    "document before relying on them.",
)

_ENV_DISTS = (("CoolProp", "CoolProp"), ("pint", "pint"), ("WeasyPrint", "weasyprint"),
              ("matplotlib", "matplotlib"), ("SciPy", "scipy"), ("NumPy", "numpy"), ("PyYAML", "PyYAML"),
              ("Jinja2", "Jinja2"))


@dataclass(frozen=True)
class Outcome:
    """One expected value of a case against what calcdoc computed."""

    expected: Expected
    expected_value: Any            # the evaluated expected value (number, text, boolean) or None on error
    computed: Any
    computed_unit: str
    deviation: float | None        # computed − expected, in the unit
    rel_deviation: float | None    # deviation / |expected|
    passed: bool
    libraries: tuple[str, ...]     # distribution names of reference libraries used for the expected value
    note: str = ""


@dataclass(frozen=True)
class CaseResult:
    case: Case
    status: str                    # "pass", "fail" or "error" (the case could not be run)
    outcomes: tuple[Outcome, ...]
    given: tuple[tuple[str, Any], ...] = ()   # the evaluated given values
    methods: tuple[str, ...] = ()             # calcdoc method ids the case exercised
    processes: tuple[tuple[str, str, str], ...] = ()   # (system, process, gas model) of its legs
    error: str = ""


@dataclass(frozen=True)
class Report:
    topics: tuple[TopicFile, ...]
    results: tuple[CaseResult, ...]
    environment: dict[str, str] = field(default_factory=dict)

    @property
    def passed(self) -> bool:
        """True when every case passes."""
        return bool(self.results) and all(r.status == "pass" for r in self.results)

    def count(self, status: str) -> int:
        """How many cases ended with a status."""
        return sum(1 for r in self.results if r.status == status)


def environment() -> dict[str, str]:
    """The installation the cases ran on: versions and platform, no paths and no clock."""
    env = {"calcdoc": __version__, "Python": f"{platform.python_implementation()} {platform.python_version()}"}
    for label, dist in _ENV_DISTS:
        env[label] = _reference.library_version(dist)
    env["platform"] = platform.platform()
    env["machine"] = platform.machine()
    return env


# -- running one case -------------------------------------------------------------------------------
def _job_text(case: Case) -> str:
    job = {"calcdoc": 1, "calc": {"number": f"VERIFY-{case.id}", "title": case.title, "revision": "0",
                                  "date": "2026-01-01"}}
    job.update(case.job or {})
    return dump_yaml(job)


def _resolve_function(dotted: str):
    module, _, attr = dotted.rpartition(".")
    while module:
        try:
            obj = importlib.import_module(module)
            break
        except ModuleNotFoundError:
            module, _, head = module.rpartition(".")
            attr = f"{head}.{attr}"
    else:
        raise ValueError(f"no module for {dotted}")
    for part in attr.split("."):
        obj = getattr(obj, part)
    return obj


def _compute(case: Case) -> tuple[Any, tuple[str, ...], tuple[tuple[str, str, str], ...]]:
    """What calcdoc computes for the case: the results JSON of its job, or the values of its calls."""
    if case.job is not None:
        job = loads(_job_text(case), f"{case.id}.yaml")
        res = run(job)
        procs = tuple((job.system, leg.process, job.gas.model) for leg in job.legs)
        return results_json(res), tuple(res.methods_used()), procs
    out = {}
    for name, spec in case.calls:
        fn = _resolve_function(spec["function"])
        out[name] = fn(*spec["args"], **spec["kwargs"]) if callable(fn) else fn
    return out, (), ()


_STEP = re.compile(r"([^.\[\]]+)|\[(\d+)\]")


def pick(data: Any, path: str) -> tuple[Any, str]:
    """The value at ``path`` (``legs[0].W_by_gas``, ``result.si``) and its unit where the data carry one."""
    obj = data
    for m in _STEP.finditer(path):
        key, index = m.group(1), m.group(2)
        if index is not None:
            obj = obj[int(index)]
        elif isinstance(obj, dict):
            obj = obj[key]
        else:
            obj = getattr(obj, key)
    if isinstance(obj, dict) and set(obj) == {"value", "unit"}:
        return obj["value"], obj["unit"]
    return obj, ""


def _compare(ex: Expected, want: Any, got: Any, got_unit: str, libs: tuple[str, ...], has_unit: bool) -> Outcome:
    numeric = isinstance(want, (int, float)) and not isinstance(want, bool)
    if not numeric:
        ok = got == want and type(got) is type(want)
        return Outcome(ex, want, got, got_unit, None, None, ok, libs, "" if ok else "differs")
    if isinstance(got, bool) or not isinstance(got, (int, float)) or not math.isfinite(float(got)):
        return Outcome(ex, want, got, got_unit, None, None, False, libs, "computed value is not a finite number")
    dev = float(got) - float(want)
    rel = dev / abs(want) if want else None
    allowed = ex.tol_abs + ex.tol_rel * abs(want)
    ok = abs(dev) <= allowed
    note = ""
    if has_unit and got_unit != ex.unit:
        ok, note = False, f"computed in '{got_unit}', expected in '{ex.unit}'"
    return Outcome(ex, want, float(got), got_unit or ex.unit, dev, rel, ok, libs, note)


def run_case(case: Case) -> CaseResult:
    """Evaluate the case's givens and expected values (reference side), run calcdoc, compare."""
    given: dict[str, Any] = {}
    given_libs: dict[str, tuple[str, ...]] = {}
    try:
        for name, expr in case.given:
            ev = _reference.evaluate(expr, given)
            given[name] = ev.value
            given_libs[name] = ev.libraries + tuple(
                lib for n in (_reference.names_used(expr) if isinstance(expr, str) else ()) for lib in given_libs.get(n, ()))
    except (ImportError, _reference.ExpressionError, ValueError, ArithmeticError) as exc:
        return CaseResult(case, "error", (), error=f"the reference values could not be evaluated: {_one_line(exc)}")
    try:
        data, methods, procs = _compute(case)
    except Exception as exc:  # the case reports any failure of calcdoc instead of stopping the selftest
        return CaseResult(case, "error", (), tuple(given.items()), error=f"calcdoc failed: {type(exc).__name__}: "
                                                                         f"{_one_line(exc)}")
    outcomes = []
    for ex in case.expected:
        try:
            if ex.formula is not None:
                ev = _reference.evaluate(ex.formula, given)
                found = set(ev.libraries)
                for n in _reference.names_used(ex.formula):
                    found.update(given_libs.get(n, ()))
                want, libs = ev.value, tuple(sorted(found))
            else:
                want, libs = ex.value, ()
        except (ImportError, _reference.ExpressionError, ValueError, ArithmeticError) as exc:
            outcomes.append(Outcome(ex, None, None, "", None, None, False, (), f"expected value not evaluated: "
                                                                               f"{_one_line(exc)}"))
            continue
        try:
            got, unit = pick(data, ex.quantity)
        except (KeyError, IndexError, AttributeError, TypeError):
            outcomes.append(Outcome(ex, want, None, "", None, None, False, libs,
                                    f"calcdoc's output has no '{ex.quantity}'"))
            continue
        outcomes.append(_compare(ex, want, got, unit, libs, has_unit=case.job is not None))
    status = "pass" if all(o.passed for o in outcomes) else "fail"
    return CaseResult(case, status, tuple(outcomes), tuple(given.items()), tuple(dict.fromkeys(methods + case.covers)),
                      procs)


def _one_line(exc: BaseException) -> str:
    text = str(exc).strip().splitlines()
    return (text[0] if text else type(exc).__name__)[:300]


def run_all(topics: list[TopicFile] | None = None) -> Report:
    """Run every case of every topic file shipped with the package."""
    topics = load_all() if topics is None else topics
    results = tuple(run_case(c) for tf in topics for c in tf.cases)
    return Report(tuple(topics), results, environment())


# -- coverage: what was and was not verified ------------------------------------------------------
def coverage(report: Report) -> dict[str, Any]:
    """Catalogue methods and process kinds with the cases that exercised them, and those with none."""
    by_method: dict[str, list[str]] = {m: [] for m in METHODS if m != "input"}
    by_process: dict[tuple[str, str], dict[str, list[str]]] = {}
    for system, procs in (("closed", CLOSED_PROCESSES), ("flow", FLOW_PROCESSES)):
        for p in procs:
            by_process[(system, p)] = {"ideal": [], "real": []}
    for r in report.results:
        for m in r.methods:
            if m in by_method and r.case.id not in by_method[m]:
                by_method[m].append(r.case.id)
        for system, p, model in r.processes:
            slot = by_process.setdefault((system, p), {"ideal": [], "real": []})
            if r.case.id not in slot[model]:
                slot[model].append(r.case.id)
    return {
        "methods": [{"id": m, "title": METHODS[m].title, "cases": ids} for m, ids in by_method.items()],
        "processes": [{"system": s, "process": p, "ideal_gas_cases": d["ideal"], "real_gas_cases": d["real"]}
                      for (s, p), d in by_process.items()],
    }


# -- the report as data -----------------------------------------------------------------------------
def _num(x: Any) -> Any:
    if isinstance(x, float) and not math.isfinite(x):
        return None
    return x


def case_json(r: CaseResult, versions: dict[str, str]) -> dict:
    """One case and its outcomes as data."""
    c = r.case
    values = dict(r.given)
    inputs: dict[str, Any] = {"given": [{"name": k, "expression": expr if isinstance(expr, str) else None,
                                         "value": _num(values.get(k))} for k, expr in c.given]}
    if c.job is not None:
        inputs["job"] = c.job
    else:
        inputs["calls"] = {n: s for n, s in c.calls}
    out_expected = []
    for o in r.outcomes:
        e = o.expected
        src = e.source or c.source
        out_expected.append({
            "quantity": e.quantity, "unit": e.unit,
            "expected": {"value": _num(o.expected_value), "formula": e.formula,
                         "source": {"kind": src.kind, "citation": src.citation},
                         "libraries": {_reference.LIBRARIES.get(lib, lib): versions.get(lib, "")
                                       for lib in o.libraries}},
            "tolerance": {"abs": e.tol_abs, "rel": e.tol_rel, "why": e.why},
            "computed": _num(o.computed), "deviation": _num(o.deviation), "relative_deviation": _num(o.rel_deviation),
            "status": "pass" if o.passed else "fail", "note": o.note,
        })
    return {"id": c.id, "topic": c.topic, "title": c.title, "file": c.file,
            "source": {"kind": c.source.kind, "citation": c.source.citation},
            "inputs": inputs, "expected": out_expected, "methods": list(r.methods), "status": r.status,
            "error": r.error, "note": c.note}


def to_json(report: Report) -> dict:
    """The verification report as data."""
    versions = {dist: _reference.library_version(dist) for dist in _reference.LIBRARIES}
    n = len(report.results)
    return {
        "schema": SCHEMA,
        "calcdoc": __version__,
        "verdict": "pass" if report.passed else "fail",
        "summary": {"cases": n, "passed": report.count("pass"), "failed": report.count("fail"),
                    "errors": report.count("error")},
        "source_kinds": SOURCE_KINDS,
        "not_verified": list(NOT_VERIFIED) + [s for tf in report.topics for s in tf.not_verified],
        "topics": [{"topic": tf.topic, "title": tf.title, "file": tf.file, "sha256": tf.sha256, "scope": tf.scope,
                    "not_verified": list(tf.not_verified), "cases": [r.case.id for r in report.results
                                                                      if r.case.topic == tf.topic]}
                   for tf in report.topics],
        "cases": [case_json(r, versions) for r in report.results],
        "coverage": coverage(report),
        "environment": dict(report.environment),
    }


def dumps(report: Report) -> str:
    """The verification report as JSON text."""
    return json.dumps(to_json(report), indent=2, ensure_ascii=False, allow_nan=False, default=str) + "\n"


def write(report: Report, out_dir, pdf: bool = True) -> list:
    """Write ``calcdoc-selftest.json`` (and ``.pdf``) into out_dir, atomically."""
    out = output_folder(out_dir)
    text = dumps(report)
    pdf_bytes = None
    if pdf:
        pdf_bytes = render_pdf(text, case_files())
    targets = ([(out / f"{STEM}.pdf", pdf_bytes)] if pdf_bytes is not None else []) + \
        [(out / f"{STEM}.json", text.encode("utf-8"))]
    written = write_all(targets, remove=[] if pdf else [out / f"{STEM}.pdf"])
    return sorted(written, key=lambda p: p.suffix != ".json")
