"""The report: Jinja2 templates → HTML → PDF (WeasyPrint). Presentation only, never physics."""
from .render import render_html, render_pdf

__all__ = ["render_html", "render_pdf"]
