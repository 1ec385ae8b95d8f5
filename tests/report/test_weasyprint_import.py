"""WeasyPrint is imported without the subprocesses of ctypes' library search, and still renders."""
from __future__ import annotations

import subprocess
import sys

PROBE = """
import sys
n = [0]
sys.addaudithook(lambda ev, args: n.__setitem__(0, n[0] + (ev == "subprocess.Popen")))
from calcdoc.report.render import load_weasyprint
wp = load_weasyprint()
import ctypes.util
assert ctypes.util.find_library.__module__ == "ctypes.util", "the real look-up is restored"
started = n[0]
pdf = wp.HTML(string="<p>calcdoc</p>").write_pdf()
print(started, pdf[:5].decode())
"""


def test_import_starts_no_subprocess_and_renders():
    r = subprocess.run([sys.executable, "-c", PROBE], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    started, magic = r.stdout.split()
    # plain `import weasyprint` starts 54 here (ldconfig, gcc, ld per library name tried; LIBRARY-NOTES)
    assert started == "0"
    assert magic == "%PDF-"



def test_shared_font_configuration_gives_the_same_pdf_bytes():
    """The font configuration is shared by the renders of one process (calcdoc watch, batch workers):
    a render with a fresh one and the renders after it are byte-identical."""
    from calcdoc import engine
    from calcdoc.job import loads
    from calcdoc.report import render
    from calcdoc.report.jsonfile import dumps

    job = loads("calcdoc: 1\ncalc: {number: F-1, title: Fonts, revision: A, date: 2026-11-28}\n"
                "gas: {model: ideal, k: 1.4, molar_mass: 28.97 g/mol}\n"
                "start: {pressure: 1 bar, temperature: 300 K, volume: 1 L}\n"
                "legs:\n  - {name: Squeeze, process: isentropic, end: {volume_ratio: 0.5}}\n", "f.yaml")
    res = engine.run(job)
    js = dumps(res)
    render._font_config.cache_clear()
    fresh = render.render_pdf(res, js)
    again = render.render_pdf(res, js)
    assert render._font_config.cache_info().hits >= 1        # the second render reused the configuration
    assert again == fresh
