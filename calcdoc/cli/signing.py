"""Digital signatures of a calc package: ``calcdoc sign`` and the signature part of ``calcdoc verify``.

A role (prepared, checked, approved) signs into its own field in the title block's signature table,
as a PAdES signature (ETSI EN 319 142, baseline B-B profile as pyHanko makes it) added by an
incremental update: the bytes signed before stay as they are, so earlier signatures and the attached
job file and results stay valid, and several roles can sign in turn. Keys and certificates are PEM (as
OpenSSL writes them) or one PKCS#12 file.

Verifying lists every signature: its role, the signer's name, the signing time the signer states,
whether it covers the document as it is now (anything after it only adds signatures), and whether the
signer's certificate chains to a certificate the checker trusts. pyHanko is imported only here, and
only when a command needs it; its loggers are quieted so that a finding is one line, never a traceback.
"""
from __future__ import annotations

import io
import logging
from dataclasses import dataclass
from pathlib import Path

from ..errors import CalcdocError
from ..report.output import write_atomic

__all__ = ["ROLES", "SignError", "SignatureFinding", "read_signatures", "sign"]

#: Roles that sign a calc package, in the order of the title block; each signs into the field of its name.
ROLES = ("prepared", "checked", "approved")

#: Height of a signature cell of the title block [pt] (report.css: .sign td { height: 16mm }).
_CELL_HEIGHT = 16.0 * 72.0 / 25.4


class SignError(CalcdocError):
    """A package cannot be signed or its signatures cannot be read (exit code 2)."""


@dataclass(frozen=True)
class SignatureFinding:
    """One signature of a package as verified."""

    role: str
    signer: str
    time: str
    intact: bool          # the signed bytes are unchanged and the signature over them is valid
    covers_now: bool      # nothing after it but more signatures (or it covers the whole file)
    trusted: bool
    detail: str = ""

    @property
    def ok(self) -> bool:
        return self.intact and self.covers_now and self.trusted

    def text(self) -> str:
        cover = ("covers the document as it is now" if self.covers_now else
                 "the document was CHANGED after this signature")
        trust = "signer trusted" if self.trusted else "signer NOT trusted" + (f" ({self.detail})" if self.detail else "")
        state = "intact" if self.intact else "BROKEN (the signed bytes changed)"
        return f"signature '{self.role}' by {self.signer} at {self.time}: {state}, {cover}, {trust}"


def _quiet() -> None:
    for name in ("pyhanko", "pyhanko_certvalidator", "pyhanko.sign", "fontTools"):
        logging.getLogger(name).setLevel(logging.CRITICAL)


def _field_name(role: str) -> str:
    return role.capitalize()


def _box(pdf: bytes, role: str) -> tuple[int, tuple[float, float, float, float]]:
    """Page and rectangle of a role's cell in the title block, from the named destinations the report
    sets on the three cells (ids signature-prepared, -checked, -approved)."""
    from pypdf import PdfReader

    reader = PdfReader(io.BytesIO(pdf), strict=False)
    dests = reader.named_destinations
    cells = [dests.get(f"signature-{r}") for r in ROLES]
    corners = [(c, float(c.left), float(c.top)) for c in cells
               if c is not None and c.left is not None and c.top is not None]
    if len(corners) != len(ROLES):
        raise SignError("this PDF has no signature table of a calcdoc report (render it again with this version "
                        "of calcdoc)")
    d, x0, top = corners[ROLES.index(role)]
    width = corners[1][1] - corners[0][1]
    page = reader.get_destination_page_number(d)
    return (page if page is not None else 0), (x0 + 1.5, top - _CELL_HEIGHT + 1.5, x0 + width - 1.5, top - 1.5)


def _signer(key: str, cert: str | None, passphrase: str | None):
    from pyhanko.sign import signers

    pw = passphrase.encode("utf-8") if passphrase is not None else None
    head = Path(key).read_bytes()[:64] if Path(key).is_file() else b""
    try:
        if key.lower().endswith((".p12", ".pfx")) or (head[:1] == b"\x30" and cert is None):
            s = signers.SimpleSigner.load_pkcs12(key, passphrase=pw)
        else:
            if cert is None:
                raise SignError("give --cert CERT.pem with a PEM key, or a PKCS#12 file (.p12) holding both")
            s = signers.SimpleSigner.load(key, cert, key_passphrase=pw)
    except SignError:
        raise
    except Exception as exc:  # pyHanko and cryptography raise many types for unreadable key material
        raise SignError(f"cannot read the key or certificate ({type(exc).__name__}): check the files and the "
                        "passphrase") from None
    if s is None:
        raise SignError("cannot read the key or certificate: check the files and the passphrase")
    return s


def sign(pdf_path: str, out_path: str, key: str, cert: str | None, role: str, passphrase: str | None = None) -> Path:
    """Sign a calc package as ``role`` into its title-block field, writing ``out_path`` atomically."""
    _quiet()
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers
    from pyhanko.stamp import TextStampStyle

    if role not in ROLES:
        raise SignError(f"role '{role}' is not one of {', '.join(ROLES)}")
    for p in (pdf_path, key) + ((cert,) if cert else ()):
        if not Path(p).is_file():
            raise SignError(f"{p}: no such file")
    data = Path(pdf_path).read_bytes()
    if not data.startswith(b"%PDF-"):
        raise SignError(f"{pdf_path}: not a PDF file")
    done = {f.role for f in read_signatures(data, None)}
    if role in done:
        raise SignError(f"{pdf_path} is already signed as '{role}'; each role signs once")
    page, box = _box(data, role)
    signer = _signer(key, cert, passphrase)
    meta = signers.PdfSignatureMetadata(field_name=_field_name(role), md_algorithm="sha256",
                                        subfilter=fields.SigSeedSubFilter.PADES, reason=f"{role} (calcdoc sign)")
    # pyHanko types the box as ints; the cell's corners in points are kept as they are
    spec = fields.SigFieldSpec(_field_name(role), on_page=page, box=box)  # type: ignore[arg-type]
    try:
        w = IncrementalPdfFileWriter(io.BytesIO(data), strict=False)
        out = io.BytesIO()
        style = TextStampStyle(stamp_text=f"{role.capitalize()}: %(signer)s\nDigitally signed %(ts)s",
                               background=None, border_width=0)
        signers.PdfSigner(meta, signer=signer, new_field_spec=spec, stamp_style=style).sign_pdf(w, output=out)
    except Exception as exc:  # a damaged PDF, a key that cannot sign: one line
        raise SignError(f"{pdf_path}: cannot sign ({type(exc).__name__}: {str(exc)[:160]})") from None
    target = Path(out_path)
    write_atomic(target, out.getvalue())
    return target


def read_signatures(pdf: bytes, trust: list[str] | None) -> list[SignatureFinding]:
    """Every signature of a PDF, validated; ``trust`` lists certificate files (PEM or DER) trusted as
    roots; None: the signer's trust is not judged (reported as not trusted)."""
    _quiet()
    from pyhanko.keys import load_cert_from_pemder
    from pyhanko.pdf_utils.reader import PdfFileReader
    from pyhanko.sign.diff_analysis import ModificationLevel
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko_certvalidator import ValidationContext

    try:
        reader = PdfFileReader(io.BytesIO(pdf), strict=False)
        sigs = list(reader.embedded_signatures)
    except Exception as exc:
        raise SignError(f"the PDF's signatures cannot be read ({type(exc).__name__})") from None
    if not sigs:
        return []
    roots = []
    for t in trust or ():
        try:
            roots.append(load_cert_from_pemder(t))
        except Exception:
            raise SignError(f"{t}: cannot read this certificate (PEM or DER)") from None
    out = []
    for sig in sigs:
        role = str(sig.field_name).lower()
        try:
            name = sig.signer_cert.subject.native
            signer = name.get("common_name") or sig.signer_cert.subject.human_friendly
            if name.get("organization_name"):
                signer += f" ({name['organization_name']})"
        except Exception:
            signer = "(unknown signer)"
        try:
            vc = ValidationContext(trust_roots=roots, allow_fetching=False)
            st = validate_pdf_signature(sig, signer_validation_context=vc)
        except Exception as exc:
            out.append(SignatureFinding(role, signer, "(unknown)", False, False, False,
                                        f"cannot be validated: {type(exc).__name__}"))
            continue
        when = st.signer_reported_dt.strftime("%Y-%m-%d %H:%M:%S %Z").strip() if st.signer_reported_dt else "(no time)"
        level = st.modification_level
        covers = st.coverage is not None and (
            st.coverage.name == "ENTIRE_FILE" or
            (st.coverage.name == "ENTIRE_REVISION" and level is not None and level <= ModificationLevel.FORM_FILLING))
        trusted = bool(roots) and bool(st.trusted)
        detail = "no --trust certificate given" if not roots else ("" if trusted else "chain not to a trusted certificate")
        out.append(SignatureFinding(role, signer, when, bool(st.intact and st.valid), bool(covers), trusted, detail))
    return out
