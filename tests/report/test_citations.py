"""The method catalogue's citations: complete entries a signer can stand behind, and no doubtful wording in
any report (a citation recalled without the document at hand is replaced by the method in general words)."""
from __future__ import annotations

import re
from pathlib import Path

import pytest

import calcdoc
from calcdoc.report import methods, render

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "example_jobs").glob("*.yaml"))
DOUBTFUL = re.compile(r"from memory|check the edition|recalled without|cited from", re.I)


@pytest.mark.parametrize("key", sorted(methods.REFERENCES))
def test_every_reference_entry_is_complete(key):
    ref = methods.REFERENCES[key]
    assert ref.authors.strip(), f"{key}: no author"
    assert ref.title.strip(), f"{key}: no title"
    assert re.search(r"\b(1[89]|20)\d\d\b", ref.edition), f"{key}: no year in the edition field {ref.edition!r}"
    assert ref.publisher.strip(), f"{key}: no publisher or journal"
    assert re.search(r"\b(ch|sec|eq|fig|table)\b|chapter|section|equation|whole paper|pair|constant|layer",
                     ref.locator, re.I), f"{key}: no chapter, section or equation in {ref.locator!r}"
    assert ref.checked.strip(), f"{key}: does not name the document at hand it was checked against"
    assert not DOUBTFUL.search(ref.text()), f"{key}: doubtful wording in {ref.text()!r}"


def test_every_method_cites_only_catalogue_entries():
    for mid, m in methods.METHODS.items():
        for key in m.refs:
            assert key in methods.REFERENCES, f"method {mid} cites {key!r}, which the catalogue lacks"
        if mid != "input":      # a method no document confirms is stated as derived, in general words
            assert m.refs or "derived from first principles" in m.title, f"method {mid} names no reference"


def test_no_doubtful_wording_in_the_catalogue_text():
    for mid, m in methods.METHODS.items():
        assert not DOUBTFUL.search(m.title + " " + m.equation), mid


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_no_doubtful_wording_in_any_example_report(path):
    # the report's HTML carries every word of the PDF
    res = calcdoc.run(calcdoc.load(path))
    html = render.render_html(res)
    found = DOUBTFUL.search(html)
    assert found is None, f"{path.name}: '{found.group(0)}' in the report"
