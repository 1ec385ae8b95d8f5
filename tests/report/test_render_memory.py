"""The narrowed user-agent style sheet (render.narrowed_ua_css): layout keeps no pseudo-element style per
element, and the report is the same PDF, byte for byte, as with WeasyPrint's own sheet."""
from __future__ import annotations

import io
import re

from pypdf import PdfReader

from calcdoc import engine
from calcdoc.job import loads
from calcdoc.report import render
from calcdoc.report.jsonfile import dumps

#: a closed job of 12 legs: several pages of calc tables, the numbered cautions (list markers), page X of Y
LEGS = "".join(f"  - {{name: Squeeze {k}, process: polytropic, n: 1.3, end: {{volume_ratio: 0.8}}}}\n"
               f"  - {{name: Relax {k}, process: isothermal, end: {{volume_ratio: 1.25}}}}\n" for k in range(1, 7))
JOB = ("calcdoc: 1\ncalc: {number: M-1, title: Memory, revision: A, date: 2026-11-28}\n"
       "gas: {model: ideal, k: 1.4, molar_mass: 28.97 g/mol}\n"
       "start: {pressure: 1 bar, temperature: 300 K, volume: 1 L}\nlegs:\n" + LEGS)


def test_the_installed_weasyprint_sheet_is_narrowed():
    """A WeasyPrint whose sheet no longer has the rules (an upgrade) would silently get its own sheet back."""
    render.load_weasyprint()
    from weasyprint.html import UA

    text = render.narrowed_ua_css(UA)
    assert text is not None
    rules = [line.split("{")[0].strip() for line in text.splitlines()
             if re.search(r"::(marker|footnote|note)", line)]
    assert rules == ["li::marker"]
    assert render.narrowed_ua_css(UA.replace("\n::note-call {", "\n::note-call, x {")) is None


def test_the_templates_need_no_rule_left_out():
    """Only li is a list item; no footnote and no note (else their rules must come back)."""
    for path in render.templates_dir().iterdir():
        if path.suffix in (".css", ".html"):
            text = path.read_text(encoding="utf-8")
            assert not re.search(r"list-item|float:\s*footnote|position:\s*note\(", text), path.name


def test_same_pdf_bytes_as_with_weasyprint_own_sheet(monkeypatch):
    job = loads(JOB, "m.yaml")
    res = engine.run(job)
    js = dumps(res)
    narrowed = render.render_pdf(res, js)
    from weasyprint import HTML

    monkeypatch.setattr(render._Html, "make", classmethod(lambda cls, **kw: HTML(**kw)))
    assert render.render_pdf(res, js) == narrowed
    pages = PdfReader(io.BytesIO(narrowed)).pages
    assert len(pages) >= 3
    assert f"Page {len(pages)} of {len(pages)}" in pages[-1].extract_text()


def test_layout_makes_no_pseudo_element_style_per_element(monkeypatch):
    render.load_weasyprint()
    from weasyprint import HTML
    from weasyprint.css import ComputedStyle

    made = [0]
    real_init = ComputedStyle.__init__

    def counted(self, *args, **kwargs):
        made[0] += 1
        real_init(self, *args, **kwargs)

    monkeypatch.setattr(ComputedStyle, "__init__", counted)
    html = "<table>" + "<tr><td>a</td><td><i>b</i></td></tr>" * 200 + "</table><ol><li>one</li></ol>"

    def styles(doc) -> int:
        made[0] = 0
        doc.render()
        return made[0]

    stock, narrowed = styles(HTML(string=html)), styles(render._Html.make(string=html))
    # WeasyPrint's own sheet: six pseudo-element styles for each of the 800 elements of the table rows
    assert stock > 6 * 800
    assert narrowed < 200, narrowed      # shared element styles, pages and their margin boxes (107 here)
