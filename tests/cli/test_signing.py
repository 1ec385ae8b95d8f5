"""Digital signatures of a calc package (`calcdoc sign`, `calcdoc verify --trust`), checked independently
of calcdoc's own verify: with pyHanko's validation API and by reading the signature fields with pypdf.
Keys and certificates are made here at run time (throwaway test keys, never stored)."""
from __future__ import annotations

import datetime as dt
import io
import re
from pathlib import Path

import pytest
from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import rsa
from cryptography.hazmat.primitives.serialization import pkcs12
from cryptography.x509.oid import NameOID
from pypdf import PdfReader

import calcdoc

JOB = """calcdoc: 1
calc: {number: SIG-001, title: Signed package, revision: A, date: 2026-11-30,
       history: [{revision: A, date: 2026-11-30, description: Issued for review}]}
units: {system: SI, pressure: bar}
gas: {fluid: Nitrogen, model: ideal}
start: {pressure: 10 bar, temperature: 20 degC, volume: 2 L}
legs:
  - {name: Compression, process: polytropic, n: 1.3, end: {volume: 1 L}}
"""


def _identity(folder: Path, name: str, p12_password: bytes | None = None):
    key = rsa.generate_private_key(public_exponent=65537, key_size=2048)
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, name),
                         x509.NameAttribute(NameOID.ORGANIZATION_NAME, "Test Engineering")])
    now = dt.datetime.now(dt.UTC)
    cert = (x509.CertificateBuilder().subject_name(subject).issuer_name(subject).public_key(key.public_key())
            .serial_number(x509.random_serial_number()).not_valid_before(now - dt.timedelta(days=1))
            .not_valid_after(now + dt.timedelta(days=30))
            .add_extension(x509.BasicConstraints(ca=True, path_length=None), critical=True)
            .add_extension(x509.KeyUsage(digital_signature=True, content_commitment=True, key_encipherment=False,
                                         data_encipherment=False, key_agreement=False, key_cert_sign=True,
                                         crl_sign=False, encipher_only=False, decipher_only=False), critical=True)
            .sign(key, hashes.SHA256()))
    stem = name.split()[0].lower()
    key_path, cert_path = folder / f"{stem}.key.pem", folder / f"{stem}.cert.pem"
    key_path.write_bytes(key.private_bytes(serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8,
                                           serialization.NoEncryption()))
    cert_path.write_bytes(cert.public_bytes(serialization.Encoding.PEM))
    p12 = None
    if p12_password is not None:
        p12 = folder / f"{stem}.p12"
        p12.write_bytes(pkcs12.serialize_key_and_certificates(
            stem.encode(), key, cert, None, serialization.BestAvailableEncryption(p12_password)))
    return key_path, cert_path, p12


@pytest.fixture(scope="module")
def package(tmp_path_factory):
    folder = tmp_path_factory.mktemp("signing")
    job = folder / "job.yaml"
    job.write_text(JOB, encoding="utf-8")
    written = calcdoc.write(calcdoc.run(calcdoc.load(job)), folder / "out")
    pdf = next(p for p in written if p.suffix == ".pdf")
    ids = {"alice": _identity(folder, "Alice Preparer"), "bob": _identity(folder, "Bob Checker", b"test-pw"),
           "carol": _identity(folder, "Carol Approver"), "mallory": _identity(folder, "Mallory Other")}
    return {"folder": folder, "pdf": pdf, "ids": ids}


@pytest.fixture(scope="module")
def signed(package, tmp_path_factory):
    """The package signed by the three roles in turn: PEM, PKCS#12, PEM."""
    folder, ids = package["folder"], package["ids"]
    s1, s2, s3 = folder / "s1.pdf", folder / "s2.pdf", folder / "s3.pdf"
    mp = pytest.MonkeyPatch()
    mp.setenv("TEST_P12_PW", "test-pw")
    codes = [
        calcdoc.main(["sign", str(package["pdf"]), "--key", str(ids["alice"][0]), "--cert", str(ids["alice"][1]),
                  "--role", "prepared", "--out", str(s1)]),
        calcdoc.main(["sign", str(s1), "--key", str(ids["bob"][2]), "--passphrase-env", "TEST_P12_PW",
                  "--role", "checked", "--out", str(s2)]),
        calcdoc.main(["sign", str(s2), "--key", str(ids["carol"][0]), "--cert", str(ids["carol"][1]),
                  "--role", "approved", "--out", str(s3)]),
    ]
    mp.undo()
    assert codes == [0, 0, 0]
    return {"s1": s1, "s2": s2, "s3": s3, "trust": [str(ids[n][1]) for n in ("alice", "bob", "carol")]}


def _pyhanko_statuses(data: bytes, trust: list[str]):
    from pyhanko.keys import load_cert_from_pemder
    from pyhanko.pdf_utils.reader import PdfFileReader
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko_certvalidator import ValidationContext

    reader = PdfFileReader(io.BytesIO(data), strict=False)
    vc = ValidationContext(trust_roots=[load_cert_from_pemder(t) for t in trust], allow_fetching=False)
    return [(s.field_name, validate_pdf_signature(s, signer_validation_context=vc)) for s in reader.embedded_signatures]


def test_pyhanko_validates_every_signature_independently(signed):
    statuses = _pyhanko_statuses(signed["s3"].read_bytes(), signed["trust"])
    assert [n for n, _ in statuses] == ["Prepared", "Checked", "Approved"]
    for name, st in statuses:
        assert st.intact and st.valid and st.trusted, name
    # the last signature covers the whole file; the earlier ones their revision, later changes being signatures
    assert statuses[-1][1].coverage.name == "ENTIRE_FILE"
    for _, st in statuses[:-1]:
        assert st.coverage.name == "ENTIRE_REVISION" and st.modification_level.name in ("LTA_UPDATES", "FORM_FILLING")


def test_pypdf_reads_the_signature_fields_in_the_title_block(signed):
    reader = PdfReader(str(signed["s3"]))
    fields = reader.get_fields()
    page = reader.pages[0]
    height = float(page.mediabox.height)
    for role in ("Prepared", "Checked", "Approved"):
        f = fields[role]
        assert f["/FT"] == "/Sig"
        v = f["/V"].get_object()
        assert v["/SubFilter"] == "/ETSI.CAdES.detached" and len(v["/ByteRange"]) == 4
    widgets = [a.get_object() for a in page["/Annots"] if a.get_object().get("/FT") == "/Sig"]
    assert len(widgets) == 3
    rects = sorted((float(w["/Rect"][0]), float(w["/Rect"][1])) for w in widgets)
    assert rects[0][0] < rects[1][0] < rects[2][0]                 # side by side, prepared to approved
    assert all(y > height / 3 for _, y in rects)                 # in the title block, on the upper part of page 1
    # the attachments are still there, byte for byte
    assert set(reader.attachments) == {"job.yaml", "SIG-001_revA.json"}


def test_calcdoc_verify_lists_every_signature_and_keeps_the_attachment_checks(signed, capsys):
    code = calcdoc.main(["verify", str(signed["s3"])] + sum((["--trust", t] for t in signed["trust"]), []))
    out = capsys.readouterr().out
    assert code == 0, out
    assert out.count("ok: signature") == 3 and "NOT VERIFIED" not in out
    for role, who in (("prepared", "Alice Preparer"), ("checked", "Bob Checker"), ("approved", "Carol Approver")):
        assert re.search(rf"signature '{role}' by {who} \(Test Engineering\) at \d{{4}}-\d\d-\d\d .*intact, covers the "
                         "document as it is now, signer trusted", out), role
    assert "matches the hash printed in the report" in out and "matches input_sha256" in out


def test_an_untrusted_signer_fails_verify(signed, package, capsys):
    code = calcdoc.main(["verify", str(signed["s2"]), "--trust", str(package["ids"]["mallory"][1])])
    captured = capsys.readouterr()
    assert code == 1 and "signer NOT trusted" in captured.out and "Traceback" not in captured.err + captured.out
    assert calcdoc.main(["verify", str(signed["s1"])]) == 1      # no trust list given: not trusted
    assert "no --trust certificate given" in capsys.readouterr().out


def _content_stream_offset(data: bytes) -> int:
    page = PdfReader(io.BytesIO(data)).pages[0]
    ref = page.raw_get("/Contents")
    ref = ref[0] if isinstance(ref, list) else ref
    obj = data.index(f"\n{ref.idnum} 0 obj".encode()) + 1
    return data.index(b"stream", obj) + len(b"stream\n") + 40


def test_one_byte_changed_in_a_content_stream_fails(signed, tmp_path, capsys):
    data = bytearray(signed["s3"].read_bytes())
    at = _content_stream_offset(bytes(data))
    data[at] ^= 0x01
    bad = tmp_path / "tampered.pdf"
    bad.write_bytes(bytes(data))
    statuses = _pyhanko_statuses(bytes(data), signed["trust"])
    assert not all(st.intact for _, st in statuses)           # pyHanko: the signed bytes changed
    code = calcdoc.main(["verify", str(bad)] + sum((["--trust", t] for t in signed["trust"]), []))
    captured = capsys.readouterr()
    assert code != 0
    assert "Traceback" not in captured.err + captured.out
    assert "BROKEN" in captured.out or captured.err.startswith("error:")


def test_a_change_after_signing_is_found(signed, tmp_path, capsys):
    from pyhanko.pdf_utils.generic import NameObject, TextStringObject
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter

    w = IncrementalPdfFileWriter(io.BytesIO(signed["s2"].read_bytes()), strict=False)
    page = w.root["/Pages"]["/Kids"][0]
    page[NameObject("/Rotate")] = TextStringObject("90")          # not a signature: a change of the page
    w.update_container(page)
    out = io.BytesIO()
    w.write(out)
    changed = tmp_path / "changed.pdf"
    changed.write_bytes(out.getvalue())
    code = calcdoc.main(["verify", str(changed)] + sum((["--trust", t] for t in signed["trust"]), []))
    text = capsys.readouterr().out
    assert code == 1 and "CHANGED after this signature" in text


def test_a_role_signs_once_and_bad_keys_are_exit_2(signed, package, tmp_path, capsys):
    ids = package["ids"]
    code = calcdoc.main(["sign", str(signed["s1"]), "--key", str(ids["alice"][0]), "--cert", str(ids["alice"][1]),
                     "--role", "prepared", "--out", str(tmp_path / "again.pdf")])
    err = capsys.readouterr().err
    assert code == 2 and "already signed as 'prepared'" in err and not (tmp_path / "again.pdf").exists()
    code = calcdoc.main(["sign", str(package["pdf"]), "--key", str(ids["alice"][1]), "--cert", str(ids["alice"][1]),
                     "--role", "checked", "--out", str(tmp_path / "x.pdf")])
    err = capsys.readouterr().err
    assert code == 2 and err.startswith("error:") and "Traceback" not in err
