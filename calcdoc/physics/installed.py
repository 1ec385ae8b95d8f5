"""The versions of installed packages, read from the names of their ``.dist-info`` folders.

An installer records a package as ``<name>-<version>.dist-info`` on the import path (PEP 376, PEP 427), so
one listing of each folder of ``sys.path`` gives every version without parsing any package's metadata
(``importlib.metadata`` imports the email package and reads each METADATA file: ~50 ms of a cold run and
of ``calcdoc check``). A name found in no such folder, or in two (two installs, an old ``.egg-info``), is
answered by ``importlib.metadata`` as before.
"""
from __future__ import annotations

import os
import re
import sys
from functools import cache, lru_cache

__all__ = ["version"]


def _normal(name: str) -> str:
    """A project name as PEP 503 compares them: lower case, each run of '-', '_' and '.' one '-'."""
    return re.sub(r"[-_.]+", "-", name).lower()


@lru_cache(maxsize=1)
def _listed() -> dict[str, list[str]]:
    found: dict[str, list[str]] = {}
    for folder in sys.path:
        try:
            names = os.listdir(folder or ".")
        except OSError:
            continue
        for entry in names:
            if entry.endswith(".dist-info") and "-" in entry:
                name, _, ver = entry[: -len(".dist-info")].partition("-")
                found.setdefault(_normal(name), []).append(ver)
    return found


@cache
def version(dist: str) -> str | None:
    """The installed version of ``dist`` (a project name, e.g. "CoolProp"), or None when it is not installed."""
    listed = _listed().get(_normal(dist), [])
    if len(listed) == 1:
        return listed[0]
    from importlib import metadata

    try:
        return metadata.version(dist)
    except metadata.PackageNotFoundError:
        return None
