"""Render the verification report (``calcdoc selftest``) through the calc package's template machinery.

The template ``selftest.html`` shares ``report.css``; it is rendered from the selftest's JSON data
(the same dict that is written to ``calcdoc-selftest.json``), so the PDF and the JSON cannot disagree.
Presentation only: nothing here computes a value.
"""
from __future__ import annotations

import datetime as _dt
import hashlib
import json
import os
import re

from markupsafe import Markup, escape

from .. import units
from ..job.source import dump as dump_yaml
from . import format as fmt
from .render import _env, _Fetcher, _Html, fonts_dir, load_weasyprint, templates_dir

__all__ = ["context", "render_html", "render_pdf"]

#: Fixed document date of the PDF (its metadata and font subsets), so that the same cases, versions and
#: results give the same bytes. The date a verification was performed is written by hand on page 1.
EPOCH = 1767225600   # 2026-01-01T00:00:00Z

_KIND_SHORT = {"published": "published", "reference-library": "reference library", "from-memory": "unconfirmed",
               "common-practice": "common practice"}


def _sig(x, sig: int = 10) -> Markup:
    if isinstance(x, bool) or x is None or isinstance(x, str):
        return Markup(escape("—" if x is None else str(x).lower() if isinstance(x, bool) else x))
    text = str(fmt.num(float(x), sig, strip=True))
    # 1.500000000×10^7 → 1.5×10^7 (the plain range is stripped by fmt.num already)
    return Markup(re.sub(r"(\.\d*?)0+(?=×10)", r"\1", text).replace(".×10", "×10"))


def _tolerance(t: dict) -> Markup:
    parts = []
    if t.get("abs"):
        parts.append(f"±{fmt.num(t['abs'], 2, strip=True)}")
    if t.get("rel"):
        parts.append(f"±{fmt.num(t['rel'], 2, strip=True)} rel.")
    if not parts:
        parts.append("exact")
    return Markup(" + ".join(parts))


def _call_text(name: str, spec: dict) -> str:
    args = [repr(a) for a in spec.get("args", [])]
    args += [f"{k}={v!r}" for k, v in spec.get("kwargs", {}).items()]
    fn = spec["function"]
    return f"{name} = {fn}({', '.join(args)})" if args else f"{name} = {fn}"


def _job_text(job: dict) -> str:
    return dump_yaml(job, default_flow_style=None, width=100).rstrip()


def context(data: dict) -> dict:
    """What the template shows, prepared for display from the selftest's JSON data."""
    env = data["environment"]
    kinds: dict[str, int] = {k: 0 for k in data["source_kinds"]}
    libs: dict[str, str] = {}
    for c in data["cases"]:
        for e in c["expected"]:
            kinds[e["expected"]["source"]["kind"]] += 1
            libs.update(e["expected"]["libraries"])
    cases_by_topic = {t["topic"]: [c for c in data["cases"] if c["topic"] == t["topic"]] for t in data["topics"]}
    cov = data["coverage"]
    return {
        "d": data,
        "t": {"number": f"calcdoc {data['calcdoc']}", "title": "Software verification report",
              "project": "Installation verification", "revision": data["verdict"].upper()},
        "software": {"calcdoc": data["calcdoc"]},
        "fonts_url": fonts_dir().as_uri(),
        "kinds": kinds,
        "kind_short": _KIND_SHORT,
        "libraries": sorted(libs.items()),
        "cases_by_topic": cases_by_topic,
        "methods_done": [m for m in cov["methods"] if m["cases"]],
        "methods_open": [m for m in cov["methods"] if not m["cases"]],
        "processes_done": [p for p in cov["processes"] if p["ideal_gas_cases"] or p["real_gas_cases"]],
        "processes_open": [p for p in cov["processes"] if not (p["ideal_gas_cases"] or p["real_gas_cases"])],
        "env": env,
        "n_expected": sum(len(c["expected"]) for c in data["cases"]),
    }


def _filters(env) -> None:
    env.filters.update(sig=_sig, tolerance=_tolerance, pretty=lambda u: units.pretty_unit(u or ""),
                       call_text=_call_text, job_text=_job_text)


def render_html(data: dict) -> str:
    """The verification report as HTML."""
    env = _env()
    _filters(env)
    return env.get_template("selftest.html").render(**context(data))


def render_pdf(results_json: str, case_files: list[tuple[str, str]]) -> bytes:
    """The verification report as PDF bytes, with its JSON and the case files attached."""
    load_weasyprint()
    from weasyprint import Attachment

    data = json.loads(results_json)
    html = render_html(data)
    stamp = _dt.datetime.fromtimestamp(EPOCH, _dt.UTC)
    attachments = [Attachment(string=results_json.encode("utf-8"), name="calcdoc-selftest.json",
                              description="Verification results (JSON)", created=stamp, modified=stamp,
                              relationship="Data")]
    for name, text in case_files:
        attachments.append(Attachment(string=text.encode("utf-8"), name=name, description="Verification case file",
                                      created=stamp, modified=stamp, relationship="Source"))
    doc = _Html.make(string=html, base_url=templates_dir().as_uri() + "/", url_fetcher=_Fetcher.make())
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    os.environ["SOURCE_DATE_EPOCH"] = str(EPOCH)
    try:
        ident = hashlib.sha256(results_json.encode("utf-8")).hexdigest()[:32].encode("ascii")
        return doc.write_pdf(attachments=attachments, pdf_identifier=ident)
    finally:
        if saved is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved
