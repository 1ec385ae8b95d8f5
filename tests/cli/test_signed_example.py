"""The shipped example of a signed, twice-revised package (example_jobs/signed_package): its script makes
demo keys with OpenSSL, runs revisions A, B (changes since A) and C (changes since B), signs C as the three
roles and verifies it; here its output is checked again independently with pyHanko and pypdf."""
from __future__ import annotations

import io
import os
import shutil
import subprocess
import sys
from pathlib import Path

from pypdf import PdfReader

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = ROOT / "example_jobs" / "signed_package" / "make_signed_package.sh"


def test_the_signed_example_is_made_and_verifies(tmp_path):
    assert shutil.which("openssl"), "the example makes its demo keys with OpenSSL"
    env = {**os.environ, "CALCDOC": f"{sys.executable} -m calcdoc"}
    proc = subprocess.run(["bash", str(SCRIPT), str(tmp_path)], capture_output=True, text=True, env=env, timeout=600)
    assert proc.returncode == 0, proc.stderr + proc.stdout
    assert "verified:" in proc.stdout and proc.stdout.count("ok: signature") == 3
    signed = (tmp_path / "DEMO-LT-C-021_revC_signed.pdf").read_bytes()

    from pyhanko.keys import load_cert_from_pemder
    from pyhanko.pdf_utils.reader import PdfFileReader
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko_certvalidator import ValidationContext

    roots = [load_cert_from_pemder(str(tmp_path / "keys" / f"{r}.cert.pem")) for r in ("prepared", "checked", "approved")]
    vc = ValidationContext(trust_roots=roots, allow_fetching=False)
    sigs = PdfFileReader(io.BytesIO(signed), strict=False).embedded_signatures
    assert [s.field_name for s in sigs] == ["Prepared", "Checked", "Approved"]
    assert all(validate_pdf_signature(s, signer_validation_context=vc).bottom_line for s in sigs)

    reader = PdfReader(io.BytesIO(signed))
    text = "\n".join(p.extract_text() for p in reader.pages)
    # revision C of a twice-revised package: its history and its changes since B
    assert "Changes since revision B" in text and "Vendor efficiency confirmed" in text
    assert "legs[0].efficiency.isentropic" in text
    b = PdfReader(str(tmp_path / "DEMO-LT-C-021_revB.pdf"))
    assert "Changes since revision A" in "\n".join(p.extract_text() for p in b.pages)
