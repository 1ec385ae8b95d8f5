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

