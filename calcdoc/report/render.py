"""Render results into the calc package: HTML from our templates, then a PDF with attachments.

WeasyPrint fetches only our own templates folder, the fonts that ship with matplotlib and data:
URLs (see :class:`RestrictedFetcher`); job text is autoescaped everywhere.
"""
from __future__ import annotations

import atexit
import datetime as _dt
import mimetypes
import os
import re
import shutil
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlsplit

from .. import units
from ..engine import software_versions
from ..job.quantities import PERCENT_MARGIN, QUANTITIES, percent_margin
from . import changes, format as fmt, methods, words
from .charts import diagrams, indicator_chart, sweep_chart, time_chart
from .conclusions import conclusions

CAUTIONS = (
    "Compressed gas stores energy. A vessel, cylinder or pipe that fails at pressure can release it "
    "violently; the energy stored rises with pressure and volume. Depressurise and isolate before work.",
    "Compression heats gas and expansion cools it. Discharge lines, coolers and machine casings can be hot "
    "enough to burn, to degrade lubricants and seals, or (with oil vapour in air) to ignite; expanded gas can "
    "be cold enough to embrittle materials or freeze moisture.",
    "This calculation does not replace the pressure-equipment, piping and machinery codes that apply to the "
    "equipment (for example the applicable pressure vessel code, piping code and compressor standard, in the "
    "edition in force). Design limits and allowable pressures must be taken from those codes and from the "
    "equipment datasheets.",
    "The results must be reviewed by a qualified engineer, and checked and approved by a licensed professional "
    "engineer where local rules require it, before they are used for design, purchase, operation or safety "
    "decisions.",
)

VESSEL_CAUTIONS = (
    "A depressuring time computed here is not a relief-device sizing: relief valves, rupture discs and "
    "depressuring systems are sized and selected under the applicable relief and pressure-vessel codes, for "
    "their own governing cases.",
    "Cold blowdown: the gas and the wall cool as the vessel empties. Temperatures below the minimum design "
    "metal temperature of the vessel, its nozzles and connected piping raise brittle-fracture questions; check "
    "them against the vessel's rating and the material and impact-test rules of the applicable code. A fast "
    "fill heats the gas and the wall: check the upper design temperature and any non-metallic liner or seal.",
)

ENGINE_ASSUMPTIONS = {
    "closed": (
        "The gas is a fixed mass (no leakage past seals or valves).",
        "Each leg follows a quasi-equilibrium (internally reversible) path of the stated kind.",
        "Kinetic and potential energy of the gas are neglected.",
        "The gas is uniform in pressure and temperature at every instant.",
    ),
    "flow": (
        "Steady flow: the mass flow is the same through every leg (no leakage, no side streams).",
        "Compressor and expander stages are adiabatic; coolers and heaters do no work.",
        "Kinetic and potential energy of the gas are neglected (total and static states are the same).",
        "A real-gas stage follows the path of constant polytropic efficiency, integrated with the equation of "
        "state; the Schultz (ASME PTC 10) result from the same end states is shown beside it.",
    ),
    "vessel": (
        "The vessel is rigid; the gas in it is uniform in pressure and temperature at every instant (well mixed).",
        "The orifice flow is an isentropic nozzle flow from the upstream stagnation state, choked or subsonic as "
        "the pressure ratio requires, times the discharge coefficient given; quasi-steady at each instant.",
        "Kinetic and potential energy of the gas in the vessel are neglected; gas leaves at the vessel's state.",
        "Heat: adiabatic (none), isothermal (whatever holds the gas temperature), or from a wall of one "
        "uniform temperature through a constant heat-transfer coefficient; the wall exchanges no heat with "
        "the surroundings.",
    ),
}


def templates_dir() -> Path:
    """The folder of the report templates (installed as calcdoc.templates)."""
    return Path(str(resources.files("calcdoc.templates")))


def fonts_dir() -> Path:
    """The fonts that ship with matplotlib (DejaVu), used by the report and its charts."""
    import matplotlib

    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


#: A run of this many characters without a space gets a break opportunity every BREAK_EVERY characters.
LONG_RUN, BREAK_EVERY = 60, 30
_LONG_RUN = re.compile(rf"[^\s\u200b]{{{LONG_RUN},}}")
_HASH = re.compile(r"[0-9a-f]{64}")


def breakable(value):
    """A text as written, with an invisible break opportunity (U+200B) inside every long run without spaces,
    so that a long unbroken text wraps in the PDF instead of stretching a table (WeasyPrint's layout time
    grows far faster than the length of an unbreakable run). Markup made by the templates, the URLs of our
    own fonts and charts, and SHA-256 hashes (printed in full, read back by ``calcdoc verify``) are left
    alone."""
    import markupsafe

    if not isinstance(value, str) or isinstance(value, markupsafe.Markup) or len(value) < LONG_RUN \
            or value.startswith(("data:", "file:")):
        return value

    def cut(m):
        run = m.group(0)
        if _HASH.fullmatch(run):
            return run
        return "\u200b".join(run[k:k + BREAK_EVERY] for k in range(0, len(run), BREAK_EVERY))

    return _LONG_RUN.sub(cut, value)


@lru_cache(maxsize=1)
def _env():
    """One Jinja2 environment per process, so a rebuild in ``calcdoc watch`` or a batch worker's next job
    does not compile the templates again (~0.25 s); its loader still reloads a template whose file changed.
    The compiled templates are also kept in the user's cache (Jinja2's own bytecode cache, keyed by each
    template's source checksum and the Jinja2 and Python versions; written atomically), so a cold run loads
    them rather than compiling. The HTML is the same either way (tests/report/test_render_cache.py)."""
    import jinja2

    folder = units.cache_dir("templates")
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(templates_dir())),
                             autoescape=True, undefined=jinja2.StrictUndefined,
                             trim_blocks=True, lstrip_blocks=True, finalize=breakable,
                             bytecode_cache=jinja2.FileSystemBytecodeCache(str(folder)) if folder else None)
    env.filters.update(num=fmt.num, refs=fmt.refs, qty=fmt.qty, unit_of=fmt.unit_of, value_in=fmt.value_in,
                       symbol=fmt.symbol, eq=fmt.equation, result_si=fmt.result_si,
                       css_string=fmt.css_string, flavour=fmt.flavour, subscripts=fmt.subscripts,
                       say=words.say, note=words.note, gas_text=words.gas_text)
    return env


def context(results) -> dict:
    """Everything the templates show, prepared for display (numbering, references, labels)."""
    job = results.job
    system = job.units
    used = results.methods_used()
    ref_keys: list[str] = []
    for mid in used:
        for key in methods.method(mid).refs:
            if key not in ref_keys:
                ref_keys.append(key)
    for key in getattr(results.gas, "eos_refs", ()):
        if key not in ref_keys:
            ref_keys.append(key)
    ref_no = {k: i + 1 for i, k in enumerate(ref_keys)}
    cite = {mid: [ref_no[k] for k in methods.method(mid).refs] for mid in used}
    if results.gas.model == "real" or results.gas.eos_refs:
        eos_nums = [ref_no[k] for k in results.gas.eos_refs if k in ref_no]
        cite["eos.real"] = sorted(set(cite.get("eos.real", []) + eos_nums))
    eos_nums = [ref_no[k] for k in getattr(results.gas, "eos_refs", ()) if k in ref_no]
    input_legs = {i.path: _leg_of(job, i.path) for i in job.inputs}
    lines = job.text.splitlines()
    charts = {}
    if results.legs:
        charts = diagrams(results, system)
    if results.system == "vessel" and results.legs:
        charts["time"] = time_chart(results, system)
        charts["wall"] = "yes" if any("T_wall" in (leg.series or {}) for leg in results.legs) else ""
    if results.extra.get("sweep"):
        charts["sweep"] = sweep_chart(results.extra["sweep"], system)
    if results.extra.get("cylinders"):
        charts["indicator"] = [(c["leg"], indicator_chart(c, system))    # type: ignore[assignment]
                               for c in results.extra["cylinders"]]
    return {
        "r": results,
        "job": job,
        "t": job.calc,
        "system": system,
        "methods": methods,
        "cite": cite,
        "references": [(ref_no[k], methods.reference(k)) for k in ref_keys],
        "eos_refs": [(n, methods.reference(ref_keys[n - 1])) for n in eos_nums],
        "eos_nums": eos_nums,
        "input_legs": input_legs,
        "job_lines": lines,
        "job_file_name": job_file_name(job),
        "cautions": CAUTIONS + (VESSEL_CAUTIONS if results.system == "vessel" else ()),
        "engine_assumptions": ENGINE_ASSUMPTIONS.get(results.system, ()),
        "inputs": sorted(job.inputs, key=lambda i: (i.line, i.col)),
        "charts": charts,
        "units": units,
        "software": results.software or software_versions(),
        "fonts_url": fonts_dir().as_uri(),
        "title_text": f"{job.calc.number} rev. {job.calc.revision} — {job.calc.title}",
        "unit_system_text": fmt.unit_system_text,
        "conclusions": conclusions(results, system),
        "marks": changes.marks(results),
        "input_label": changes.input_label,
        "result_label": changes.result_label,
        "shows_percent": changes.shows_percent,
        "percent_of": lambda name: percent_margin(QUANTITIES[name])[0] if name in QUANTITIES else "",
        "gauge_quantities": [n for n, (k, _) in PERCENT_MARGIN.items() if k == "gauge"],
    }


def job_file_name(job) -> str:
    """The job file's own name, without its folder (the PDF never shows where it was run)."""
    return Path(job.name.replace("\\", "/")).name or "job.yaml"


def _leg_of(job, path: str) -> str:
    """The name of the leg an input path belongs to (legs[1].end.volume → its leg name), else ''."""
    m = re.match(r"legs\[(\d+)\]", path)
    if not m:
        return ""
    k = int(m.group(1))
    return next((leg.name for leg in job.legs if leg.path == f"legs[{k}]"), "")


def load_weasyprint():
    """WeasyPrint, imported without the subprocesses of its native-library look-up.

    At import WeasyPrint opens Pango, HarfBuzz, fontconfig and GObject through cffi, trying several
    names for each (``libpango-1.0-0``, ``pango-1.0``, ... ``libpango-1.0.so.0``); every name that
    does not open directly is passed to ``ctypes.util.find_library``, which on Linux starts
    ``ldconfig``, ``gcc`` and ``ld`` to search (54 subprocesses counted for one import,
    LIBRARY-NOTES). The name that works on Linux, the soname (``libpango-1.0.so.0``), is in each
    list and opens directly. So on Linux the import runs with a ``find_library`` that answers
    "not found" at once, and the list moves on to the soname. Should that import fail (a system
    whose libraries only the search finds), WeasyPrint is imported again with the real look-up.
    Other systems import WeasyPrint as it is.
    """
    import sys

    if "weasyprint" in sys.modules or not sys.platform.startswith("linux"):
        import weasyprint

        return weasyprint
    import ctypes.util

    real = ctypes.util.find_library
    ctypes.util.find_library = lambda name: None
    try:
        import weasyprint
    except OSError:
        for mod in [m for m in sys.modules if m == "weasyprint" or m.startswith("weasyprint.")]:
            del sys.modules[mod]
        ctypes.util.find_library = real
        import weasyprint
    finally:
        ctypes.util.find_library = real
    return weasyprint


@lru_cache(maxsize=1)
def _font_config() -> Any:
    """One WeasyPrint font configuration per process. WeasyPrint registers each @font-face of the report
    with fontconfig in its configuration, keyed by the face's descriptors, and skips a face it holds
    already; a fresh configuration per render registered the seven DejaVu faces again every time. Shared,
    a rebuild in ``calcdoc watch`` (or a batch worker's next job) saves that work, ~30 % of the render;
    the PDF bytes are the same (tests/report/test_weasyprint_import.py)."""
    load_weasyprint()
    import multiprocessing.util

    from weasyprint.text.fonts import FontConfiguration

    config = FontConfiguration()
    # WeasyPrint copies the report's font files into a temporary folder that the configuration's __del__
    # removes; kept for the whole process, the configuration would meet its end at interpreter shutdown, where
    # that removal may fail, or never (a batch worker ends by os._exit): 3.7 MB left in the temporary folder
    # per process. So the folder is removed at exit, by atexit and by multiprocessing's finalizers (which a
    # worker process runs before it ends).
    atexit.register(_remove_font_files, config)
    multiprocessing.util.Finalize(None, _remove_font_files, args=(config,), exitpriority=10)
    return config


def _remove_font_files(config: Any) -> None:
    folder = getattr(config, "_folder", None)
    if folder:
        shutil.rmtree(folder, ignore_errors=True)
        config._folder = None


def render_html(results) -> str:
    """The calc package as HTML."""
    return _env().get_template("report.html").render(**context(results))


class _Fetcher:
    """Build lazily: WeasyPrint's URLFetcher subclass that serves only our own files and data: URLs."""

    _cls = None

    @classmethod
    def make(cls):
        if cls._cls is None:
            load_weasyprint()
            from weasyprint.urls import FatalURLFetchingError, URLFetcher, URLFetcherResponse

            roots = [templates_dir().resolve(), fonts_dir().resolve()]

            class RestrictedFetcher(URLFetcher):
                """Serves data: URLs and files under calcdoc's templates and matplotlib's fonts; refuses the rest."""

                def fetch(self, url, headers=None):
                    if url.startswith("data:"):
                        return super().fetch(url, headers)
                    if url.startswith("file://"):
                        path = Path(unquote(urlsplit(url).path)).resolve()
                        if any(path.is_relative_to(r) for r in roots) and path.is_file():
                            mime = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
                            return URLFetcherResponse(url, path.read_bytes(), {"Content-Type": mime})
                    raise FatalURLFetchingError(f"calcdoc refuses to fetch {url!r}: the report may use only "
                                                "its own templates and fonts")

            cls._cls = RestrictedFetcher
        return cls._cls(allowed_protocols=("file", "data"), allow_redirects=False, fail_on_errors=True)


#: WeasyPrint's user-agent style sheet styles ::marker and the five footnote and note pseudo-elements for every
#: element (``::marker {...}``, ``::footnote-call {...}``, ...), so layout made six pseudo-element styles per
#: element of the report whether it has a list marker, footnote or note or not: ~120,000 styles, ~140 MiB, for
#: a 100-leg job (of a peak of ~510 MiB). The report has list markers on ``li`` only (no other element is a
#: list item) and no footnotes or notes, so the markers keep their rule, narrowed to ``li``, and the footnote
#: and note rules are left out: the same computed styles for every box drawn, the same PDF bytes
#: (tests/report/test_render_memory.py). A template that makes another element a list item, or uses
#: ``float: footnote`` or ``position: note()``, needs its rule back here.
UA_NARROWED = {"::marker {": "li::marker {"}
UA_LEFT_OUT = ("::footnote-call {", "::footnote-marker {", "::note-call {", "::note-marker {", "::note-callback {")


def narrowed_ua_css(ua: str) -> str | None:
    """WeasyPrint's user-agent style sheet with the rules of :data:`UA_NARROWED` and :data:`UA_LEFT_OUT`
    changed, or None if the sheet does not have each of them once at the start of a line (another
    WeasyPrint: then its own sheet is used unchanged)."""
    lines = ua.split("\n")
    wanted = (*UA_NARROWED, *UA_LEFT_OUT)
    if any(sum(line.startswith(rule) for line in lines) != 1 for rule in wanted):
        return None
    out = []
    for line in lines:
        if line.startswith(UA_LEFT_OUT):
            continue
        for rule, narrowed in UA_NARROWED.items():
            if line.startswith(rule):
                line = narrowed + line[len(rule):]
        out.append(line)
    return "\n".join(out)


class _Html:
    """Build lazily: WeasyPrint's HTML with the user-agent style sheet of :func:`narrowed_ua_css`."""

    _cls = None

    @classmethod
    def make(cls, **kwargs):
        if cls._cls is None:
            load_weasyprint()
            from weasyprint import CSS, HTML
            from weasyprint.css.counters import CounterStyle
            from weasyprint.html import UA, UA_STYLESHEET

            text = narrowed_ua_css(UA)
            # its @counter-style rules go to a counter-style set of its own: WeasyPrint's are registered already
            sheet = UA_STYLESHEET if text is None else CSS(string=text, counter_style=CounterStyle())

            class ReportHTML(HTML):
                """HTML whose user-agent style sheet is the narrowed one."""

                def _ua_stylesheets(self, forms=False):
                    return [sheet if s is UA_STYLESHEET else s for s in super()._ua_stylesheets(forms)]

            cls._cls = ReportHTML
        return cls._cls(**kwargs)


def render_pdf(results, results_json: str) -> bytes:
    """The calc package as PDF bytes, with the job file and the results JSON attached."""
    load_weasyprint()
    from weasyprint import Attachment

    html = render_html(results)
    job = results.job
    epoch = _epoch(job.calc.date)
    stamp = _dt.datetime.fromtimestamp(epoch, _dt.UTC)
    base = safe_stem(job.calc.number, job.calc.revision)
    attachments = [
        Attachment(string=job.data, name=job_file_name(job), description="Job file, byte for byte",
                   created=stamp, modified=stamp, relationship="Source"),
        Attachment(string=results_json.encode("utf-8"), name=f"{base}.json", description="Results (calcdoc JSON)",
                   created=stamp, modified=stamp, relationship="Data"),
    ]
    # PDF/A-3b is not claimed: WeasyPrint can write pdf_variant="pdf/a-3b", but no conformance
    # validator (such as veraPDF) can be installed on our machines, so the claim could not be checked
    # (LIBRARY-NOTES: one build listed the attachment twice). Plain PDF with embedded files until then.
    fetcher = _Fetcher.make()
    doc = _Html.make(string=html, base_url=templates_dir().as_uri() + "/", url_fetcher=fetcher)
    # fontTools stamps the clock into every embedded font subset unless SOURCE_DATE_EPOCH is set
    # (LIBRARY-NOTES): pin it to the calc date for this rendering only.
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    os.environ["SOURCE_DATE_EPOCH"] = str(epoch)
    try:
        return doc.write_pdf(attachments=attachments, font_config=_font_config(), pdf_identifier=job.sha256[:32].encode("ascii"))
    finally:
        if saved is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved


def _epoch(date_text: str) -> int:
    try:
        d = _dt.date.fromisoformat(str(date_text)[:10])
    except ValueError:
        return 0
    return int(_dt.datetime(d.year, d.month, d.day, tzinfo=_dt.UTC).timestamp())


def safe_stem(number: str, revision: str) -> str:
    """A file name stem from calc number and revision: letters, digits, '-', '_' and '.' only."""
    stem = re.sub(r"[^A-Za-z0-9._-]+", "_", f"{number}_rev{revision}").strip("._") or "calc"
    return stem[:120]
