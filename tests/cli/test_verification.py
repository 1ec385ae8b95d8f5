"""The verification cases (calcdoc/verification/*.yaml), one test each, and the selftest around them.

The expected values and their sources live in the case files, not here: each case names its source
(published, reference library with version, from memory, common practice) and each expected value
its tolerance and why. These tests run the same cases the user's ``calcdoc selftest`` runs.
"""
from __future__ import annotations

import ast
import json
import re
from pathlib import Path

import pytest

import calcdoc
from calcdoc import selftest
from calcdoc.errors import EXIT_CHECK_FAILED, EXIT_OK
from calcdoc.selftest import cases as _cases, reference as _reference

TOPICS = _cases.load_all()
CASES = [c for tf in TOPICS for c in tf.cases]


def _explain(r: selftest.CaseResult) -> str:
    lines = [f"{r.case.id} ({r.case.file}:{r.case.line}) {r.status}: {r.error}"]
    for o in r.outcomes:
        if not o.passed:
            lines.append(f"  {o.expected.quantity}: expected {o.expected_value!r}, computed {o.computed!r}, "
                         f"deviation {o.deviation!r}, allowed abs {o.expected.tol_abs} + rel {o.expected.tol_rel}; {o.note}")
    return "\n".join(lines)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_case(case):
    # Expected values: as the case file states them (its source citation, or CoolProp/SciPy called
    # directly by calcdoc._reference), never computed by calcdoc.
    r = selftest.run_case(case)
    assert r.status == "pass", _explain(r)
    assert len(r.outcomes) == len(case.expected)


# -- the selftest command and its report ------------------------------------------------------------
@pytest.fixture(scope="module")
def selftest_out(tmp_path_factory):
    out = tmp_path_factory.mktemp("selftest")
    code = calcdoc.main(["selftest", "--out", str(out), "--quiet"])
    return code, out


def test_selftest_passes_on_this_installation(selftest_out):
    code, out = selftest_out
    data = json.loads((out / "calcdoc-selftest.json").read_text(encoding="utf-8"))
    assert code == EXIT_OK
    assert data["verdict"] == "pass"
    assert data["summary"] == {"cases": len(CASES), "passed": len(CASES), "failed": 0, "errors": 0}
    assert [c["id"] for c in data["cases"]] == [c.id for c in CASES]
    for c in data["cases"]:
        assert c["source"]["kind"] in _cases.SOURCE_KINDS and c["source"]["citation"]
        assert c["inputs"] and c["expected"]
        for e in c["expected"]:
            assert set(e) >= {"quantity", "unit", "expected", "tolerance", "computed", "deviation", "status"}
            assert e["expected"]["source"]["citation"]
            if e["deviation"] is not None:
                assert e["tolerance"]["why"]
    env = data["environment"]
    for key in ("calcdoc", "Python", "CoolProp", "pint", "WeasyPrint", "matplotlib", "SciPy", "platform"):
        assert env[key] and env[key] != "not installed", key
    assert env["calcdoc"] == calcdoc.__version__
    # values computed by a reference library record that library and its version
    libs = {n: v for c in data["cases"] for e in c["expected"] for n, v in e["expected"]["libraries"].items()}
    assert set(libs) == {"CoolProp", "SciPy"} and all(libs.values())
    assert data["not_verified"], "the report must say what was not verified"


def test_report_lists_every_case_id_exactly_once(selftest_out):
    from pypdf import PdfReader

    _, out = selftest_out
    reader = PdfReader(str(out / "calcdoc-selftest.pdf"))
    text = "\n".join(page.extract_text() for page in reader.pages)
    for c in CASES:
        assert len(re.findall(rf"(?<![\w-]){re.escape(c.id)}(?![\w-])", text)) == 1, c.id
    assert "Verdict: PASS" in text
    assert "What was not verified" in text
    names = set(reader.attachments)
    assert "calcdoc-selftest.json" in names
    assert {name for name, _ in _cases.case_files()} <= names


def test_breaking_an_engine_formula_fails_the_matching_cases(monkeypatch, tmp_path):
    import calcdoc.physics.closed as processes

    good = processes.polytropic_work
    monkeypatch.setattr(processes, "polytropic_work", lambda P1V1, r, n: 1.001 * good(P1V1, r, n))
    code = calcdoc.main(["selftest", "--out", str(tmp_path), "--no-pdf", "--quiet"])
    data = json.loads((tmp_path / "calcdoc-selftest.json").read_text(encoding="utf-8"))
    assert code == EXIT_CHECK_FAILED
    assert data["verdict"] == "fail"
    failed = {c["id"] for c in data["cases"] if c["status"] != "pass"}
    # polytropic_work serves polytropic legs and the isothermal leg of an ideal gas
    uses_it = {c.id for c in CASES if c.job and any(
        leg["process"] == "polytropic" or (leg["process"] == "isothermal" and c.job["gas"]["model"] == "ideal")
        for leg in c.job["legs"])}
    assert {"CLI-001", "CLI-002", "CLI-008", "CLR-002"} <= failed
    assert failed <= uses_it
    for c in data["cases"]:
        wrong = [e["quantity"] for e in c["expected"] if e["status"] == "fail"]
        assert all(q.endswith((".W_by_gas", ".Q_to_gas")) for q in wrong), (c["id"], wrong)


def test_a_wrong_expected_value_fails_with_its_deviation():
    text = CASE_FILE.replace("value: 801325.0", "value: 801326.0")
    tf = _cases.load_text(text, "extra.yaml")
    r = selftest.run_case(tf.cases[0])
    o = r.outcomes[0]
    assert r.status == "fail" and not o.passed
    assert o.deviation == pytest.approx(-1.0)   # 801 325 Pa computed against 801 326 Pa written in the case


# -- the case files: one source of truth, added as data ---------------------------------------------
CASE_FILE = """\
topic: extra
title: An added topic
scope: A topic file added as data.
cases:
  - id: EXT-001
    title: Gauge pressure
    source: {kind: published, citation: "P = P_gauge + P_atm; bar = 100 000 Pa (NIST SP 811)"}
    call: {function: calcdoc.units.parse_quantity, args: [7 barg, pressure], kwargs: {atmosphere: 101325.0}}
    expected:
      - {quantity: result.si, value: 801325.0, unit: Pa, tolerance: {abs: 1.0e-9}, why: exact definitions}
"""


def test_a_new_case_file_is_picked_up_without_code():
    files = _cases.case_files() + [("zz_extra.yaml", CASE_FILE)]
    topics = _cases.load_all(files)
    assert topics[-1].topic == "extra" and topics[-1].cases[0].id == "EXT-001"
    report = selftest.run_all([topics[-1]])
    assert report.passed and report.results[0].case.id == "EXT-001"


@pytest.mark.parametrize("change, message", [
    ("kind: published", "kind: guessed"),
    ("tolerance: {abs: 1.0e-9}, why: exact definitions", "a numerical expected value needs a tolerance and why"),
    ("value: 801325.0", "give exactly one of value and formula"),
    ("call: {function: calcdoc.units.parse_quantity", "is not a calcdoc function"),
])
def test_malformed_case_files_are_refused_with_file_line_and_key(change, message):
    bad = {
        "kind: published": CASE_FILE.replace("kind: published", "kind: guessed"),
        "tolerance: {abs: 1.0e-9}, why: exact definitions": CASE_FILE.replace(
            ", tolerance: {abs: 1.0e-9}, why: exact definitions", ""),
        "value: 801325.0": CASE_FILE.replace("value: 801325.0", "value: 801325.0, formula: '801325.0'"),
        "call: {function: calcdoc.units.parse_quantity": CASE_FILE.replace("calcdoc.units.parse_quantity", "os.system"),
    }[change]
    with pytest.raises(_cases.CaseFileError) as err:
        _cases.load_text(bad, "bad.yaml")
    text = str(err.value)
    assert re.search(r"^bad\.yaml:\d+:\d+: cases\[0\]", text), text
    assert (message if change != "kind: published" else "is not a kind of source") in text


def test_duplicate_case_ids_are_refused():
    with pytest.raises(_cases.CaseFileError, match="EXT-001' is used twice"):
        _cases.load_all([("a.yaml", CASE_FILE), ("b.yaml", CASE_FILE.replace("topic: extra", "topic: other"))])


@pytest.mark.parametrize("expr", ["__import__('os')", "P1.real", "[x for x in ()]", "open('f')", "PropsSI(x=1)"])
def test_expressions_run_only_arithmetic_and_the_reference_functions(expr):
    with pytest.raises(_reference.ExpressionError):
        _reference.evaluate(expr, {"P1": 1.0})


def test_reference_side_imports_nothing_from_calcdoc():
    # Expected values must never pass through calcdoc's own code paths.
    tree = ast.parse(Path(_reference.__file__).read_text(encoding="utf-8"))
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            assert node.level == 0 and not (node.module or "").startswith("calcdoc"), ast.unparse(node)
        if isinstance(node, ast.Import):
            assert not any(a.name.startswith("calcdoc") for a in node.names), ast.unparse(node)


def test_every_case_id_is_stable_in_form_and_unique():
    ids = [c.id for c in CASES]
    assert len(ids) == len(set(ids))
    assert all(re.fullmatch(r"[A-Z]{3}-\d{3}", i) for i in ids), ids


def test_json_is_deterministic():
    subset = [tf for tf in TOPICS if tf.topic in ("units", "constants")]
    assert selftest.dumps(selftest.run_all(subset)) == selftest.dumps(selftest.run_all(subset))


def test_a_case_calcdoc_cannot_run_is_reported_not_raised():
    text = CASE_FILE.replace(
        "    call: {function: calcdoc.units.parse_quantity, args: [7 barg, pressure], kwargs: {atmosphere: 101325.0}}\n",
        "    job:\n      gas: {fluid: NoSuchGas, model: real}\n"
        "      start: {pressure: 1 MPa, temperature: 300 K, volume: 1 L}\n"
        "      legs: [{name: Hold, process: isochoric, end: {temperature: 310 K}}]\n")
    report = selftest.run_all([_cases.load_text(text, "extra.yaml")])
    r = report.results[0]
    assert r.status == "error" and "NoSuchGas" in r.error
    assert not report.passed
    assert selftest.to_json(report)["verdict"] == "fail"


# -- rk4, the reference side's integrator for paths that are differential equations -------------------
def test_rk4_is_fourth_order_on_exponential_growth():
    # dy/dx = y, y(0) = 1 gives y(1) = e; the classical Runge–Kutta method has global error O(h^4)
    # (Hairer, Nørsett & Wanner 1993, sec. II.1), so halving the step cuts the error about 16-fold.
    import math

    err10 = _reference.rk4(lambda x, y: y, 0.0, 1.0, 1.0, 10) - math.e
    err20 = _reference.rk4(lambda x, y: y, 0.0, 1.0, 1.0, 20) - math.e
    assert abs(err20) < 1e-6
    assert 12.0 < err10 / err20 < 20.0


def test_rk4_expression_reproduces_the_ideal_gas_polytropic_path():
    # Along a compressor path of constant η_p, dh/dlnP = P·v/η_p = R·T/η_p; with h = cp·T the closed form
    # is T2/T1 = (P2/P1)^((k−1)/(k·η_p)) (Dixon & Hall 2014, ch. 2).
    given = {"R": 287.0, "cp": 1004.5, "eta": 0.8, "T1": 300.0, "P1": 1.0e5, "P2": 4.0e5}
    ev = _reference.evaluate("rk4(lambda x, h: R*h/(cp*eta), log(P1), cp*T1, log(P2), 40)/cp", given)
    assert ev.value == pytest.approx(300.0 * 4.0 ** (287.0 / (1004.5 * 0.8)), rel=1e-9)
    assert ev.libraries == ()   # rk4 is plain Python; the report names no library for it


def test_rk4_real_gas_path_is_converged_at_the_steps_the_cases_use():
    # The flow-real cases integrate dh/dlnP = P·v(P, h)/η_p with 100 steps (60 inside a root search);
    # halving the step must not change the enthalpy rise by more than 1e-9 of it (v from CoolProp directly).
    expr = ("rk4(lambda x, h: exp(x)/(0.8*PropsSI('Dmass', 'P', exp(x), 'Hmass', h, 'CarbonDioxide')), "
            "log(80.0e5), h1, log(250.0e5), {n}) - h1")
    given = {"h1": _reference.evaluate("PropsSI('Hmass', 'P', 80.0e5, 'T', 313.15, 'CarbonDioxide')", {}).value}
    coarse = _reference.evaluate(expr.format(n=30), given).value
    fine = _reference.evaluate(expr.format(n=60), given).value
    assert abs(coarse - fine) < 1e-9 * abs(fine)


@pytest.mark.parametrize("steps", ["0", "2.5", "1000001"])
def test_rk4_refuses_a_bad_number_of_steps(steps):
    with pytest.raises(_reference.ExpressionError, match="whole number of steps"):
        _reference.evaluate(f"rk4(lambda x, y: y, 0, 1, 1, {steps})", {})


def test_breaking_the_stage_ratio_fails_the_staging_cases_only(monkeypatch):
    # The flow cases must be sensitive to the engine: a stage ratio 0.1 % off fails every ideal-gas case
    # with a staged compressor and no other ideal-gas flow case.
    import calcdoc.physics.staging as staging

    good = staging.equal_stage_ratio
    monkeypatch.setattr(staging, "equal_stage_ratio", lambda *a, **k: 1.001 * good(*a, **k))
    flow = [c for c in CASES if c.topic in ("flow-ideal", "limits") and c.job and c.job.get("system") == "flow"]
    staged = {c.id for c in flow if any("staging" in leg for leg in c.job["legs"])}
    assert len(staged) >= 4
    failed = {c.id for c in flow if selftest.run_case(c).status != "pass"}
    assert failed == staged
