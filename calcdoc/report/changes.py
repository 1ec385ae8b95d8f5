"""Revision marks: what changed since an older revision (``--changes-since``), named as the job file and the
report's tables name it, and the marks in the margin of the rows that changed.

The comparison itself is the engine's (:mod:`calcdoc.engine.revision`, results ``changes_since``); here
its keys become the key path as the user wrote it (``legs[0].end.pressure``, with the leg's name) and the
label of the table the value stands in (``State 2, P``; ``Leg Stage 1, gas power P_gas``)."""
from __future__ import annotations

import re
from dataclasses import dataclass, field

__all__ = ["Marks", "input_label", "marks", "result_label", "shows_percent"]

#: Labels of the results-contract keys as the report's tables head them.
_STATE = {"P": "P (pressure)", "T": "T (temperature)", "v": "v (specific volume)", "rho": "ρ (density)",
          "u": "u (specific internal energy)", "h": "h (specific enthalpy)", "s": "s (specific entropy)",
          "Z": "Z (compressibility factor)", "V": "V (volume)", "V_dot": "actual volume flow", "phase": "phase"}
_LEG = {"W_by_gas": "W by gas", "Q_to_gas": "Q to gas", "dU": "ΔU", "dH": "ΔH", "dS": "ΔS", "n": "n",
        "work_in": "w_in (specific work in)", "q_in": "q_in (specific heat in)", "head": "H_p (polytropic head)",
        "head_isentropic": "H_s (isentropic head)", "eta_p": "η_p", "eta_s": "η_s", "power": "P_gas (gas power)",
        "shaft_power": "P_shaft (shaft power)", "duty": "Q̇ (duty)", "ratio": "pressure ratio"}
_FLOW = {"m_dot": "mass flow", "V_dot_1": "actual volume flow at the inlet", "V_dot_std": "standard volume flow",
         "n_dot": "molar flow"}

_STATE_KEY = re.compile(r"^state (?P<label>\S+) (?P<q>\S+)$")
_LEG_KEY = re.compile(r"^leg '(?P<name>.*)' (?P<q>\S+)$")
_CHECK_KEY = re.compile(r"^check '(?P<name>.*)' (?P<kind>max|min) at (?P<at>.*) (?P<q>value|margin|status)$")


def result_label(key: str) -> str:
    """A results-contract key as the report's tables label it."""
    if m := _STATE_KEY.match(key):
        return f"State {m['label']}, {_STATE.get(m['q'], m['q'])}"
    if m := _LEG_KEY.match(key):
        return f"Leg {m['name']}, {_LEG.get(m['q'], m['q'].replace('_', ' '))}"
    if m := _CHECK_KEY.match(key):
        return f"Check {m['name']} ({m['kind']}) at {m['at']}, {m['q']}"
    if key.startswith("flow "):
        return _FLOW.get(key[5:], key[5:]).capitalize()
    if key == "mass m":
        return "Mass of gas m"
    return key


def shows_percent(key: str, S) -> bool:
    """Whether a change of this result is shown in percent: not of a temperature, of a property whose zero
    is a reference state (u, h, s), or of a pressure shown as gauge."""
    m = _STATE_KEY.match(key)
    if m and m["q"] in ("T", "u", "h", "s"):
        return False
    if m and m["q"] == "P" and getattr(S, "gauge", False):
        return False
    c = _CHECK_KEY.match(key)
    return not (c and c["q"] == "margin")


_NAMED_ITEM = re.compile(r"^(?P<list>legs|limits)\[(?P<name>[^\]]*)\]")


def input_label(path: str, job) -> tuple[str, str]:
    """A changed input's key path as the user wrote it (list items by their index, as the inputs table shows
    them) and the name of the leg or limit it belongs to."""
    m = _NAMED_ITEM.match(path)
    if not m:
        return path, ""
    items = job.legs if m["list"] == "legs" else job.limits
    for k, item in enumerate(items):
        if item.name == m["name"]:
            return f"{m['list']}[{k}]{path[m.end():]}", item.name
    if m["name"].isdigit():
        return path, ""
    return path, m["name"]


@dataclass
class Marks:
    """What carries a revision mark in this report (empty without ``--changes-since``)."""

    revision: str = ""
    inputs: set[str] = field(default_factory=set)        # index paths of inputs (inputs table)
    states: set[str] = field(default_factory=set)        # state labels
    legs: set[str] = field(default_factory=set)          # leg names
    checks: set[tuple[str, str, str]] = field(default_factory=set)   # (name, kind, where)

    def __bool__(self) -> bool:
        return bool(self.inputs or self.states or self.legs or self.checks)


def marks(results) -> Marks:
    ch = results.extra.get("changes_since")
    if not ch:
        return Marks()
    out = Marks(revision=str(ch.get("revision", "")))
    for c in ch["inputs"]:
        if c["new"] is not None:
            out.inputs.add(input_label(c["path"], results.job)[0])
    for c in ch["results"]:
        key = c["key"]
        if m := _STATE_KEY.match(key):
            out.states.add(m["label"])
        elif m := _LEG_KEY.match(key):
            out.legs.add(m["name"])
        elif m := _CHECK_KEY.match(key):
            out.checks.add((m["name"], m["kind"], m["at"]))
    return out
