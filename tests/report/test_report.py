"""The calc package PDF: contents, traceability, reproducibility and safety, read back with pypdf.

PDF renders are expensive (~1-2 s each), so each job is rendered once per module by a fixture and
every test reads that one file.
"""
from __future__ import annotations

import dataclasses
import io
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from pypdf import PdfReader

import calcdoc
from calcdoc.engine.results import Check
from calcdoc.physics.calc import Calc
from calcdoc.report import methods, render

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "example_jobs" / "press_gas_spring.yaml"
DEMO_US = ROOT / "example_jobs" / "press_gas_spring_us.yaml"
DEMO_CO2 = ROOT / "example_jobs" / "co2_cylinder_charge.yaml"

HOSTILE_TITLE = 'Spring <b>x</b> </style> <link rel="attachment" href="file:///etc/passwd">'
HOSTILE_JOB = f"""calcdoc: 1
calc:
  number: 'T-<i>1</i>'
  title: '{HOSTILE_TITLE}'
  project: '<script>alert(1)</script> & "quotes"'
  client: '<img src="file:///etc/hostname">'
  revision: '<u>C</u>'
  date: 2026-11-02
  prepared_by: '"><link rel=attachment href=file:///etc/passwd>'
  checked_by: '@import url(file:///etc/passwd);'
  drawings: ['<a href="http://127.0.0.1/">drawing</a>']
  history:
    - {{revision: A, date: 2026-10-01, description: '</td></tr></table><h1>injected</h1>'}}
units: US
gas: {{model: ideal, k: 1.4, molar_mass: 28.97 g/mol}}
start: {{pressure: 100 psia, temperature: 70 degF, volume: 2 ft3}}
legs:
  - name: '<em>Stroke</em> </style>'
    process: polytropic
    n: 1.3
    end: {{volume: 1 ft3}}
    note: '<link rel="attachment" href="file:///etc/passwd"> note'
assumptions:
  - '<style>body {{ display: none }}</style> stays text'
"""


def _text(pdf: bytes) -> str:
    return "\n".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages)


def _flat(text: str) -> str:
    """Text with all whitespace removed (pypdf breaks lines where the PDF does)."""
    return re.sub(r"\s+", "", text)


def _attachments(pdf: bytes) -> dict[str, list[bytes]]:
    return PdfReader(io.BytesIO(pdf)).attachments


def _render(job_path: Path, out: Path, cwd: Path | None = None, epoch: str | None = None):
    """Run the job and write its outputs (in this process, optionally from another folder and epoch)."""
    old_cwd, old_epoch = os.getcwd(), os.environ.get("SOURCE_DATE_EPOCH")
    try:
        if cwd is not None:
            os.chdir(cwd)
        if epoch is not None:
            os.environ["SOURCE_DATE_EPOCH"] = epoch
        results = calcdoc.run(calcdoc.load(job_path))
        json_path, pdf_path = calcdoc.write(results, out)
        _render.epoch_after = os.environ.get("SOURCE_DATE_EPOCH")
    finally:
        os.chdir(old_cwd)
        if old_epoch is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = old_epoch
    return results, json_path.read_bytes(), pdf_path.read_bytes(), pdf_path


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo_out")
    results, js, pdf, path = _render(DEMO, out)
    return {"results": results, "json": js, "pdf": pdf, "text": _text(pdf), "path": path}


@pytest.fixture(scope="module")
def demo_again(tmp_path_factory):
    """The same job again: another output folder, another working folder, a relative job path and a
    SOURCE_DATE_EPOCH in the environment that differs from the calc date."""
    out = tmp_path_factory.mktemp("elsewhere") / "deeper" / "out"
    work = tmp_path_factory.mktemp("work")
    job = work / "jobs" / DEMO.name
    job.parent.mkdir()
    shutil.copyfile(DEMO, job)
    _, js, pdf, _ = _render(Path("jobs") / DEMO.name, out, cwd=work, epoch="1234567890")
    return {"json": js, "pdf": pdf, "epoch_after": _render.epoch_after}


@pytest.fixture(scope="module")
def us(tmp_path_factory):
    results, js, pdf, _ = _render(DEMO_US, tmp_path_factory.mktemp("us"))
    return {"results": results, "pdf": pdf, "text": _text(pdf)}


@pytest.fixture(scope="module")
def hostile(tmp_path_factory):
    d = tmp_path_factory.mktemp("hostile")
    job = d / "hostile.yaml"
    job.write_text(HOSTILE_JOB, encoding="utf-8")
    results, js, pdf, _ = _render(job, d / "out")
    return {"results": results, "json": js, "pdf": pdf, "text": _text(pdf), "job": job.read_bytes(),
            "html": render.render_html(results)}


# ------------------------------------------------------------------------------------------- contents
def test_title_block_on_cover(demo):
    t = demo["results"].job.calc
    cover = PdfReader(io.BytesIO(demo["pdf"])).pages[0].extract_text()
    for item in (t.number, t.title, t.project, t.revision, t.date, t.prepared_by, t.checked_by,
                 "Approved by", *t.drawings, *(d for _, _, d in t.history), demo["results"].job.sha256):
        assert _flat(item) in _flat(cover), item


def test_client_and_approver_shown_when_given(us):
    t = us["results"].job.calc
    assert t.client and t.approved_by
    cover = PdfReader(io.BytesIO(us["pdf"])).pages[0].extract_text()
    assert t.client in cover and t.approved_by in cover


def test_every_page_has_calc_number_revision_and_page_x_of_y(demo):
    t = demo["results"].job.calc
    pages = PdfReader(io.BytesIO(demo["pdf"])).pages
    assert len(pages) >= 3
    for k, page in enumerate(pages, start=1):
        text = page.extract_text()
        assert t.number in text and f"Rev. {t.revision}" in text, k
        assert f"Page {k} of {len(pages)}" in text, k


def test_sections_in_order(demo):
    text = demo["text"]
    heads = ["1 Summary", "2 Basis", "3 Inputs", "4 Assumptions", "5 Method and calculation", "6 Results",
             "7 Design checks", "8 Diagrams", "9 Cautions", "10 References", "Appendix A: job file",
             "Appendix B: software"]
    at = [text.find(h) for h in heads]
    assert -1 not in at, dict(zip(heads, at, strict=True))
    assert at == sorted(at)


def test_every_leg_name_in_text(demo):
    flat = _flat(demo["text"])
    for leg in demo["results"].job.legs:
        assert _flat(leg.name) in flat


def test_summary_gives_verdict_and_plain_warnings(demo, tmp_path_factory):
    summary = demo["text"][demo["text"].find("1 Summary"):demo["text"].find("2 Basis")]
    assert "Design checks" in summary and "No design limits are set" in summary
    assert "Warnings" in summary and "None." in summary


def test_near_saturation_job_warns_in_summary_and_draws_the_dome(tmp_path_factory):
    results, _, pdf, _ = _render(DEMO_CO2, tmp_path_factory.mktemp("co2"))
    # CarbonDioxide at the cooled end state lies within 5 K of its dew point (CoolProp called directly).
    import CoolProp.CoolProp as CP

    end = results.states[-1].state
    assert end.T - CP.PropsSI("T", "P", end.P, "Q", 1, "CarbonDioxide") < 5.0
    text = _text(pdf)
    summary = text[text.find("1 Summary"):text.find("2 Basis")]
    assert "Warning 1" in summary and "condensationispossible" in _flat(summary)
    assert results.saturation, "the charts get the saturation dome for a path near it"
    assert "saturation line of the fluid" in text


def test_method_citations_used_and_only_those(demo):
    flat = _flat(demo["text"])
    res = demo["results"]
    used = {k for mid in res.methods_used() for k in methods.method(mid).refs} | set(res.gas.eos_refs)
    refs_part = flat[flat.find(_flat("10 References")):flat.find(_flat("Appendix A"))]
    for key in used:
        assert _flat(methods.reference(key))[:60] in refs_part, key
    listed = re.findall(r"\[(\d+)\]", demo["text"][demo["text"].find("10 References"):demo["text"].find("Appendix A")])
    assert sorted(map(int, listed)) == list(range(1, len(used) + 1))
    # a method the real-gas demo does not use must not be cited: R = R_u/M (CODATA) belongs to ideal gases
    assert "ideal.R" not in res.methods_used()
    assert _flat(methods.reference("codata2018"))[:40] not in flat
    # every marker [n] in the calculation points at a listed reference
    body = demo["text"][demo["text"].find("5 Method"):demo["text"].find("10 References")]
    cited = {int(n) for group in re.findall(r"\[([\d, ]+)\]", body) for n in group.split(",")}
    assert cited and cited <= set(range(1, len(used) + 1))


def test_basis_names_the_equation_of_state_and_its_reference(demo):
    basis = demo["text"][demo["text"].find("2 Basis"):demo["text"].find("3 Inputs")]
    assert "Equation of state" in basis and "Span" in basis     # Span et al. (2000), the nitrogen EOS
    assert "Sign convention" in basis and "Reference state" in basis and "Site atmosphere" in basis


def test_inputs_as_entered_and_as_used_with_line(demo):
    job = demo["results"].job
    inputs = demo["text"][demo["text"].find("3 Inputs"):demo["text"].find("4 Assumptions")]
    lines = job.text.splitlines()
    for inp in job.inputs:
        assert inp.entered in inputs
        assert inp.entered in lines[inp.line - 1]        # the line printed is where it was written
    # as used: absolute, in the job's pressure unit (bar): 150 bar g + about 0.97 bar at 320 m
    assert re.search(r"150 barg \(gauge\)\s+150\.9\d+\s?bara\s+35", inputs)


def test_assumptions_of_engine_and_job(demo):
    text = _flat(demo["text"])
    for a in render.ENGINE_ASSUMPTIONS["closed"] + demo["results"].job.assumptions:
        assert _flat(a) in text


def test_cautions_present(demo):
    text = _flat(demo["text"])
    for c in render.CAUTIONS:
        assert _flat(c) in text


def test_appendix_lists_the_job_file_and_versions(demo):
    text = demo["text"]
    appendix = _flat(text[text.find("Appendix A"):])
    for line in demo["results"].job.text.splitlines():
        assert _flat(line) in appendix
    for name, ver in demo["results"].software.items():
        assert _flat(name) in appendix and _flat(ver) in appendix


def test_result_markup_is_typeset_not_shown_as_code(demo):
    assert "<sup>" not in demo["text"] and "<sub>" not in demo["text"] and "{" not in demo["text"].split("Appendix A")[0]


# ------------------------------------------------------------------------------- US customary report
def test_us_report_uses_us_units(us):
    text = us["text"]
    results = text[text.find("6 Results"):text.find("7 Design checks")]
    # the job shows pressures as psig and volumes in in³ (units: {system: US, pressure: psig, volume: in3})
    for head in ("P [psig]", "T [°F]", "v [ft³/lb]", "h [Btu/lb]", "W by gas [Btu]"):
        assert head in results
    assert "kPa" not in results and "°C" not in results
    inputs = text[text.find("3 Inputs"):text.find("4 Assumptions")]
    # inputs as used, converted back to the report's units: 86 degF shows as 86 °F, 113 in3 as in³
    assert re.search(r"86 degF\s+86\s?°F", inputs)
    assert re.search(r"113 in3\s+113\s?in³", inputs)
    assert "psia abs" not in text


# ------------------------------------------------------------------------------------- design checks
def test_checks_table_and_failed_verdict(demo):
    res = demo["results"]
    end = res.states[1].state
    ok = Check("Spring end temperature", "temperature", "Compression stroke", Calc("T_2", end.T, "K", "", "input"),
               423.15, "max", "K", 423.15 - end.T, 100 * (423.15 - end.T) / 423.15, 0.0, "pass",
               basis="seal datasheet (demo)")
    bad = Check("Spring end pressure", "pressure", "Compression stroke", Calc("P_2", end.P, "Pa", "", "input"),
                30e6, "max", "Pa", 30e6 - end.P, 100 * (30e6 - end.P) / 30e6, 0.0, "fail",
                basis="maker's rating <b>(demo)</b>")
    html = render.render_html(dataclasses.replace(res, checks=(ok, bad)))
    checks = html[html.find("7 Design checks"):html.find("8 Diagrams")]
    for item in ("Spring end temperature", "Spring end pressure", "PASS", "FAIL", "seal datasheet (demo)",
                 "maker&#39;s rating &lt;b&gt;(demo)&lt;/b&gt;", "150.00\u202f°C"):
        assert item in checks, item
    # the demo shows pressures as gauge: 300 bar absolute is 300 bar less the site atmosphere (~0.97 bar)
    assert re.search(r"max 299\.0\d\u202fbarg", checks)
    summary = html[html.find("1 Summary"):html.find("2 Basis")]
    assert "FAIL: 1 of 2 design checks fail" in summary and "Spring end pressure at Compression stroke" in summary


# --------------------------------------------------------------------------- traceability, reproducing
def test_attachments_round_trip_byte_for_byte(demo):
    att = _attachments(demo["pdf"])
    assert att == {DEMO.name: [DEMO.read_bytes()], demo["path"].with_suffix(".json").name: [demo["json"]]}


def test_two_runs_give_identical_bytes_wherever_and_whenever(demo, demo_again):
    assert demo_again["json"] == demo["json"]
    assert demo_again["pdf"] == demo["pdf"]


def test_rendering_restores_source_date_epoch(demo_again):
    assert demo_again["epoch_after"] == "1234567890"


def test_no_absolute_paths_in_outputs(demo, tmp_path_factory):
    for blob in (demo["pdf"], demo["json"]):
        assert str(ROOT).encode() not in blob and b"/tmp/" not in blob


# ---------------------------------------------------------------------------------------------- safety
def test_job_markup_shows_literally(hostile):
    text = _flat(hostile["text"])
    for literal in (HOSTILE_TITLE, '<script>alert(1)</script> & "quotes"', '<img src="file:///etc/hostname">',
                    "T-<i>1</i>", "<u>C</u>", '"><link rel=attachment href=file:///etc/passwd>',
                    "@import url(file:///etc/passwd);", '<a href="http://127.0.0.1/">drawing</a>',
                    "</td></tr></table><h1>injected</h1>", "<em>Stroke</em> </style>",
                    '<link rel="attachment" href="file:///etc/passwd"> note', "<style>body { display: none }</style> stays text"):
        assert _flat(literal) in text, literal
    assert "injected" not in [h.strip() for h in hostile["text"].splitlines()]


def test_job_markup_never_becomes_html(hostile):
    html = hostile["html"]
    assert '<link rel="attachment"' not in html and "<script>" not in html and "<h1>injected" not in html
    assert "<style>body" not in html and "<em>Stroke" not in html
    style = html[html.find("<style>"):html.find("</style>")]
    assert "<" not in style[len("<style>"):], "job text cannot close or open a tag inside the style sheet"


def test_only_our_two_files_are_attached(hostile):
    att = _attachments(hostile["pdf"])
    assert sorted(att) == sorted(["hostile.yaml", render.safe_stem("T-<i>1</i>", "<u>C</u>") + ".json"])
    assert att["hostile.yaml"] == [hostile["job"]]


def test_fetcher_serves_only_templates_fonts_and_data(tmp_path):
    from weasyprint.urls import FatalURLFetchingError

    fetcher = render._Fetcher.make()
    css = render.templates_dir() / "report.css"
    font = render.fonts_dir() / "DejaVuSans.ttf"
    assert fetcher.fetch(css.as_uri()) is not None
    assert fetcher.fetch(font.as_uri()) is not None
    assert fetcher.fetch("data:text/plain,hello") is not None
    outside = tmp_path / "secret.txt"
    outside.write_text("secret")
    link = tmp_path / "link.css"
    link.symlink_to(Path("/etc/hostname") if Path("/etc/hostname").exists() else outside)
    refused = ["file:///etc/passwd", outside.as_uri(), link.as_uri(),
               render.templates_dir().as_uri() + "/../pyproject.toml",
               render.templates_dir().as_uri() + "/%2e%2e/%2e%2e/pyproject.toml",
               render.fonts_dir().as_uri() + "/../../../../__init__.py",
               "http://127.0.0.1/x.css", "https://127.0.0.1/x.css", "ftp://127.0.0.1/x"]
    for url in refused:
        with pytest.raises(FatalURLFetchingError):
            fetcher.fetch(url)


def test_restricted_fetcher_stops_a_file_link_in_html():
    from weasyprint import HTML
    from weasyprint.urls import FatalURLFetchingError

    html = '<html><head><link rel="attachment" href="file:///etc/passwd"></head><body>x</body></html>'
    with pytest.raises(FatalURLFetchingError, match="refuses"):
        HTML(string=html, base_url=render.templates_dir().as_uri() + "/",
             url_fetcher=render._Fetcher.make()).write_pdf()


# ----------------------------------------------------------------------------------------- formatting
def test_symbols_typeset_with_subscripts_and_italics():
    from calcdoc.report.format import symbol

    assert symbol("P_1") == "<i>P</i><sub>1</sub>"
    assert symbol("v(P_1, T_1)") == "<i>v</i>(<i>P</i><sub>1</sub>, <i>T</i><sub>1</sub>)"
    assert symbol("exp((1 − n)·ln r)") == "exp((1 − <i>n</i>)·ln <i>r</i>)"
    assert "<b>" not in symbol("<b>x</b>")


def test_chart_frame_takes_in_the_nearby_dome_only():
    from calcdoc.report import charts

    plt = charts._pyplot()
    fig, ax = plt.subplots()
    charts._limits(ax, [10.0, 20.0], [100.0, 200.0], [5.0, 15.0, 500.0], [60.0, 90.0, 5000.0])
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    plt.close(fig)
    assert x0 < 5.0 and y0 < 60.0          # the dome point next to the path is in the frame
    assert x1 < 500.0 and y1 < 5000.0      # the far one is not


def test_cli_run_writes_named_outputs_only_in_out(tmp_path):
    """Output names come from calc number and revision; nothing else is written (JSON only: no render)."""
    out = tmp_path / "out"
    proc = subprocess.run([sys.executable, "-m", "calcdoc", "run", str(DEMO), "--out", str(out), "--no-pdf", "-q"],
                          cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert sorted(p.name for p in tmp_path.rglob("*")) == ["DEMO-210-C-004_revB.json", "out"]
