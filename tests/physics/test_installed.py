"""Package versions read from the names of the .dist-info folders are the ones importlib.metadata reads from
the packages' metadata; a name listed twice, or not at all, is left to importlib.metadata."""
from __future__ import annotations

from importlib import metadata

import pytest

from calcdoc.physics import installed

DEPENDENCIES = ("CoolProp", "pint", "PyYAML", "Jinja2", "matplotlib", "weasyprint", "numpy", "pypdf", "pyyaml",
                "coolprop", "jinja2")


@pytest.mark.parametrize("dist", DEPENDENCIES)
def test_version_is_the_one_importlib_metadata_reads(dist):
    assert installed.version(dist) == metadata.version(dist)


def test_not_installed_is_none():
    assert installed.version("no-such-package-of-calcdoc") is None


def test_a_name_listed_twice_is_left_to_importlib_metadata(monkeypatch):
    monkeypatch.setattr(installed, "_listed", lambda: {"numpy": ["0.0.1", "0.0.2"]})
    installed.version.cache_clear()
    try:
        assert installed.version("numpy") == metadata.version("numpy")
    finally:
        installed.version.cache_clear()
