"""pint's parsed definitions kept in calcdoc's cache folder: built once, renamed into place whole, and
giving the same conversions as a registry built from the definitions."""
from __future__ import annotations

import subprocess
import sys

PROBE = """
from calcdoc import units
import pint
u = units.registry()
print(repr(u.Quantity(7.5, 'psi').to('Pa').magnitude), repr(u.Quantity(3, 'ft**3/min').to('m**3/s').magnitude),
      repr(pint.UnitRegistry().Quantity(7.5, 'psi').to('Pa').magnitude))
"""


def _probe(cache: str) -> list[str]:
    env = {"CALCDOC_CACHE_DIR": cache, "PATH": "/usr/bin:/bin", "HOME": cache}
    r = subprocess.run([sys.executable, "-c", PROBE], capture_output=True, text=True, env=env, timeout=120)
    assert r.returncode == 0, r.stderr
    return r.stdout.split()


def test_registry_cache_is_built_once_and_converts_the_same(tmp_path):
    import pint

    cold = _probe(str(tmp_path))
    folders = [p.name for p in tmp_path.iterdir()]
    assert folders == [f"pint-{pint.__version__}"]          # no private build folder left behind
    assert any((tmp_path / folders[0]).iterdir())
    warm = _probe(str(tmp_path))
    assert warm == cold
    assert cold[0] == cold[2]                                # cached registry = registry from the definitions


def test_no_cache_when_turned_off(tmp_path):
    out = _probe("")
    assert len(out) == 3 and out[0] == out[2]
