"""The verification cases: one YAML file per topic under ``calcdoc/verification/``, read and checked.

The schema is described in ``calcdoc/verification/README.md``. This module only reads and validates
the files; :mod:`calcdoc.selftest` runs the cases. A malformed case file is refused with a message
naming file:line:column, the key and what would be valid (:class:`CaseFileError`).
"""
from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from importlib import resources
from typing import Any

from ..errors import CalcdocError, JobError, Problem
from ..job.reader import Reader
from ..job.source import Node, load as _load_yaml
from ..report.methods import METHODS
from . import reference as _reference

__all__ = ["SOURCE_KINDS", "Case", "CaseFileError", "Expected", "Source", "TopicFile", "load_all", "load_text"]

#: How an expected value is known, as the report labels it.
SOURCE_KINDS = {
    "published": "Published (standard, handbook, paper or textbook; citation given)",
    "reference-library": "Independent reference library, called directly (named, with its version)",
    "from-memory": "Unconfirmed: the case author's value, written without the cited document at hand; a check of consistency, not a verification against the source, until someone confirms it against the citation",
    "common-practice": "Common practice (a rule of the trade)",
}

_FILE_KEYS = ("topic", "title", "scope", "not_verified", "cases")
_CASE_KEYS = ("id", "title", "source", "given", "job", "call", "calls", "expected", "covers", "note")
_EXPECTED_KEYS = ("quantity", "unit", "value", "formula", "tolerance", "why", "source")
_CALL_KEYS = ("function", "args", "kwargs")


class CaseFileError(CalcdocError):
    """A verification case file is malformed; lists every problem found."""

    def __init__(self, problems: list[Problem]):
        self.problems = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))


@dataclass(frozen=True)
class Source:
    kind: str
    citation: str


@dataclass(frozen=True)
class Expected:
    quantity: str                 # path into the computed data: legs[0].W_by_gas, states[1].T, result.si
    unit: str                     # SI unit of the value (pint spelling), "" when dimensionless or text
    value: Any = None             # a literal (number, text, boolean), or None
    formula: str | None = None    # an expression over the given values (see calcdoc.selftest.reference)
    tol_abs: float = 0.0
    tol_rel: float = 0.0
    why: str = ""                 # why this tolerance
    source: Source | None = None  # overrides the case's source for this value


@dataclass(frozen=True)
class Case:
    id: str
    topic: str
    title: str
    source: Source
    given: tuple[tuple[str, Any], ...]   # (name, number or expression), evaluated in order
    job: dict | None                     # a job fragment (title block added by the runner)
    calls: tuple[tuple[str, dict], ...]  # (name, {function, args, kwargs}) direct calls into calcdoc
    expected: tuple[Expected, ...]
    covers: tuple[str, ...] = ()         # method ids this case verifies besides those its job uses
    note: str = ""
    file: str = ""
    line: int = 0


@dataclass(frozen=True)
class TopicFile:
    topic: str
    title: str
    scope: str
    not_verified: tuple[str, ...]
    cases: tuple[Case, ...]
    file: str
    sha256: str = field(default="")


def _plain(node: Node) -> Any:
    if node.kind == "map":
        return {k: _plain(v) for k, v in node.value.items()}
    if node.kind == "seq":
        return [_plain(v) for v in node.value]
    return node.value


class _Reader(Reader):
    """Reads a case file with the job file's reader (the same file:line:col messages); text and tolerances
    are read more strictly here (text is required, numbers are non-negative)."""

    def __init__(self, name: str):
        super().__init__(name)

    def mapping(self, node: Node, allowed: tuple[str, ...], required: tuple[str, ...] = (),
                what: str = "") -> dict[str, Node]:
        """The allowed keys; unknown and missing keys are problems (a case's own names pass through)."""
        self.hints = {k: "required keys here: " + ", ".join(required) for k in required}
        return super().mapping(node, allowed, required, what)

    def text(self, node: Node | None, default: str = "", required: bool = True, what: str = "text",
             most: int = 0) -> str:
        """A non-empty text, stripped."""
        if node is None:
            return default
        if node.kind != "scalar" or not isinstance(node.value, str) or not node.value.strip():
            self.add(node, "expected text", "write plain text")
            return default
        return node.value.strip()

    def number(self, node: Node, lo: float | None = 0.0, hi: float | None = None, lo_open: bool = False,
               hi_open: bool = False, what: str = "a non-negative number") -> float:
        """A non-negative number (a tolerance)."""
        if node.kind != "scalar" or isinstance(node.value, bool) or not isinstance(node.value, (int, float)) \
                or node.value < 0:
            self.add(node, "expected a non-negative number", "write for example 1.0e-9")
            return 0.0
        return float(node.value)

    def source(self, node: Node) -> Source | None:
        m = self.mapping(node, ("kind", "citation"), ("kind", "citation"))
        kind = m.get("kind")
        if kind is not None and kind.value not in SOURCE_KINDS:
            self.add(kind, f"'{kind.value}' is not a kind of source", "valid: " + ", ".join(SOURCE_KINDS))
            return None
        if kind is None or "citation" not in m:
            return None
        return Source(kind.value, self.text(m["citation"]))

    def topic_file(self, tree: Node, sha: str) -> TopicFile | None:
        m = self.mapping(tree, _FILE_KEYS, ("topic", "title", "scope", "cases"))
        topic = self.text(m.get("topic"))
        not_verified = tuple(self.text(n) for n in (m["not_verified"].value if "not_verified" in m
                                                     and m["not_verified"].kind == "seq" else ()))
        cases_node = m.get("cases")
        cases = []
        if cases_node is not None:
            if cases_node.kind != "seq" or not cases_node.value:
                self.add(cases_node, "expected a non-empty list of cases", "write one case a list item")
            else:
                cases = [c for c in (self.case(n, topic) for n in cases_node.value) if c is not None]
        if self.problems:
            return None
        return TopicFile(topic, self.text(m["title"]), self.text(m["scope"]), not_verified, tuple(cases), self.name, sha)

    def case(self, node: Node, topic: str) -> Case | None:
        m = self.mapping(node, _CASE_KEYS, ("id", "title", "source", "expected"))
        if not m:
            return None
        has = [k for k in ("job", "call", "calls") if k in m]
        if len(has) != 1:
            self.add(node, f"the case gives {' and '.join(has) if has else 'no inputs'}",
                     "give exactly one of job (a job fragment), call or calls (direct calls into calcdoc)")
        source = self.source(m["source"]) if "source" in m else None
        given: list[tuple[str, Any]] = []
        if "given" in m:
            for key, child in self.mapping(m["given"], tuple(m["given"].value) if m["given"].kind == "map" else (),
                                           ()).items():
                if child.kind != "scalar" or isinstance(child.value, bool):
                    self.add(child, "expected a number or an expression", "write for example 2.0e5 or 'P1*V1'")
                    continue
                value = child.value
                if isinstance(value, str) and _looks_numeric(value):
                    value = float(value)    # YAML 1.1 reads 15.0e6 (no sign in the exponent) as text
                self.formula(child)
                given.append((key, value))
        job = None
        if "job" in m:
            if m["job"].kind != "map":
                self.add(m["job"], "expected a job fragment (a mapping)", "write gas, start, legs as in a job file")
            else:
                job = _plain(m["job"])
        calls: list[tuple[str, dict]] = []
        if "call" in m:
            calls.append(("result", self.call(m["call"])))
        if "calls" in m:
            for key, child in self.mapping(m["calls"], tuple(m["calls"].value) if m["calls"].kind == "map" else (),
                                           ()).items():
                calls.append((key, self.call(child)))
        expected = []
        ex = m.get("expected")
        if ex is not None:
            if ex.kind != "seq" or not ex.value:
                self.add(ex, "expected a non-empty list of expected values", "write one value a list item")
            else:
                expected = [e for e in (self.expected(n) for n in ex.value) if e is not None]
        covers = tuple(_plain(m["covers"])) if "covers" in m and m["covers"].kind == "seq" else ()
        if "covers" in m and m["covers"].kind != "seq":
            self.add(m["covers"], "expected a list of method ids", "write for example [atm.std, gauge]")
        if covers:
            for c in covers:
                if c not in METHODS:
                    self.add(m["covers"], f"'{c}' is not a method id of calcdoc.methods", "use an id of the catalogue")
        if source is None or not isinstance(m["id"].value, str):
            if not isinstance(m["id"].value, str):
                self.add(m["id"], "expected the case id as text", "write for example CLI-001")
            return None
        return Case(m["id"].value, topic, self.text(m["title"]), source, tuple(given), job, tuple(calls),
                    tuple(expected), covers, self.text(m.get("note")), self.name, node.line)

    def call(self, node: Node) -> dict:
        m = self.mapping(node, _CALL_KEYS, ("function",))
        fn = self.text(m.get("function"))
        if fn and not fn.startswith("calcdoc."):
            self.add(m["function"], f"'{fn}' is not a calcdoc function", "a call names a function of calcdoc, "
                     "for example calcdoc.units.parse_quantity; reference values go in expected")
        args = _plain(m["args"]) if "args" in m else []
        kwargs = _plain(m["kwargs"]) if "kwargs" in m else {}
        if not isinstance(args, list):
            self.add(m["args"], "expected a list of arguments", "write for example ['7 barg', pressure]")
        if not isinstance(kwargs, dict):
            self.add(m["kwargs"], "expected a mapping of keyword arguments", "write for example {atmosphere: 101325}")
        return {"function": fn, "args": args if isinstance(args, list) else [],
                "kwargs": kwargs if isinstance(kwargs, dict) else {}}

    def formula(self, node: Node) -> None:
        if isinstance(node.value, str):
            try:
                _reference.names_used(node.value)
            except _reference.ExpressionError as exc:
                self.add(node, str(exc), "see calcdoc/verification/README.md for what an expression may use")

    def expected(self, node: Node) -> Expected | None:
        m = self.mapping(node, _EXPECTED_KEYS, ("quantity",))
        if not m:
            return None
        if ("value" in m) == ("formula" in m):
            self.add(node, "give exactly one of value and formula", "value: a number or text as published; "
                     "formula: an expression over the given values")
            return None
        value = _plain(m["value"]) if "value" in m else None
        formula = None
        if "formula" in m:
            if m["formula"].kind != "scalar" or not isinstance(m["formula"].value, str):
                self.add(m["formula"], "expected an expression as text", "write for example 'P1*V1*log(V2/V1)'")
            else:
                self.formula(m["formula"])
                formula = m["formula"].value
        numeric = formula is not None or (isinstance(value, (int, float)) and not isinstance(value, bool))
        tol_abs = tol_rel = 0.0
        if numeric:
            if "tolerance" not in m or "why" not in m:
                self.add(node, "a numerical expected value needs a tolerance and why",
                         "add tolerance: {rel: 1.0e-9} (or abs:, in the value's unit) and why: the reason")
            else:
                t = self.mapping(m["tolerance"], ("abs", "rel"), ())
                if not t:
                    self.add(m["tolerance"], "the tolerance is empty", "give abs, rel or both")
                tol_abs = self.number(t["abs"]) if "abs" in t else 0.0
                tol_rel = self.number(t["rel"]) if "rel" in t else 0.0
            if "unit" not in m:
                self.add(node, "a numerical expected value needs its SI unit", "add unit: Pa (or '' if dimensionless)")
        elif isinstance(value, str) and _looks_numeric(value):
            self.add(m["value"], f"YAML reads '{value}' as text, not as a number",
                     "write the exponent with its sign and the mantissa with a point (1.07478e+5) or write 107478.0")
        elif "tolerance" in m:
            self.add(m["tolerance"], "a text or boolean value is compared exactly", "remove the tolerance")
        unit = _plain(m["unit"]) if "unit" in m else ""
        src = self.source(m["source"]) if "source" in m else None
        return Expected(self.text(m["quantity"]), "" if unit is None else str(unit), value, formula, tol_abs, tol_rel,
                        self.text(m["why"]) if "why" in m else "", src)


def _looks_numeric(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def load_text(text: str, name: str) -> TopicFile:
    """Read one case file's text; raises :class:`CaseFileError` listing every problem."""
    try:
        tree = _load_yaml(text, name)
    except JobError as exc:
        raise CaseFileError(exc.problems) from None
    reader = _Reader(name)
    tf = reader.topic_file(tree, hashlib.sha256(text.encode("utf-8")).hexdigest())
    if reader.problems or tf is None:
        raise CaseFileError(reader.problems)
    return tf


def case_files() -> list[tuple[str, str]]:
    """(file name, text) of every case file shipped in the package, sorted by name."""
    root = resources.files("calcdoc.verification")
    out = []
    for entry in sorted(root.iterdir(), key=lambda e: e.name):
        if entry.name.endswith(".yaml") and entry.is_file():
            out.append((entry.name, entry.read_text(encoding="utf-8")))
    return out


def load_all(files: list[tuple[str, str]] | None = None) -> list[TopicFile]:
    """Every case file, validated together: ids must be unique over all files."""
    files = case_files() if files is None else files
    topics: list[TopicFile] = []
    problems: list[Problem] = []
    for name, text in files:
        try:
            topics.append(load_text(text, name))
        except CaseFileError as exc:
            problems += exc.problems
    seen: dict[str, str] = {}
    for tf in topics:
        for c in tf.cases:
            if c.id in seen:
                problems.append(Problem(tf.file, c.line, 0, "id", f"the case id '{c.id}' is used twice "
                                        f"(also in {seen[c.id]})", "give each case its own stable id"))
            seen[c.id] = f"{tf.file}"
    if problems:
        raise CaseFileError(problems)
    return topics
