"""Verifying a calc package: which job file made this PDF, and do its results still follow from it?

A calcdoc PDF carries the job file (byte for byte) and the results JSON as embedded files, and prints
the job file's SHA-256 on its cover and in its appendix. :func:`verify` reads them back and checks:

1. the attached job file hashes to the SHA-256 printed in the PDF's text and to ``input_sha256`` in
   the attached results (a mismatch means the PDF or an attachment was altered);
2. given a job file, whether the report was made from it (same bytes, same hash);
3. with ``rerun``, that computing the attached job again gives the attached results: byte for byte,
   or else every number within a relative 1e-9 (when only library versions differ).

The library raises :class:`VerifyError` for input it cannot read (not a PDF, no calcdoc attachments,
a missing job file); a verification that runs to the end returns :class:`Verification`, whose ``ok``
is false if anything did not match. Only the command line maps these to exit codes.
"""
from __future__ import annotations

import difflib
import hashlib
import json
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from .. import __version__
from ..engine import run
from ..engine.results import RESULTS_SCHEMA
from ..errors import EXIT_BAD_INPUT, EXIT_INTERNAL, CalcdocError, JobError
from ..job import loads
from ..job.files import read_regular
from ..job.source import MAX_BYTES as MAX_JOB_BYTES
from ..report.jsonfile import dumps

__all__ = ["Finding", "RerunFailed", "Verification", "VerifyError", "read_package", "verify"]

#: Relative tolerance for numbers in a rerun whose bytes differ (e.g. another CoolProp build).
RERUN_RTOL = 1e-9

_PRINTED_HASH = re.compile(r"SHA-256:?\s*((?:[0-9a-f]\s*){64})")


class VerifyError(CalcdocError):
    """The report or job file cannot be read as calcdoc input (exit code 2)."""


@dataclass(frozen=True)
class Finding:
    ok: bool
    text: str


@dataclass
class Verification:
    """What :func:`verify` found, in order; ``ok`` only if every finding is."""

    pdf: str
    job_name: str = ""
    job_sha256: str = ""
    findings: list[Finding] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        """True when there are findings and every one of them is ok."""
        return bool(self.findings) and all(f.ok for f in self.findings)

    def add(self, ok: bool, text: str) -> None:
        """Record one finding."""
        self.findings.append(Finding(ok, text))

    def lines(self) -> list[str]:
        """The findings as lines for the terminal, with the verdict last."""
        out = [f"{self.pdf}: attached job file {self.job_name or '(none)'}, sha256 {self.job_sha256 or '(none)'}"]
        out += [f"  {'ok' if f.ok else 'MISMATCH'}: {f.text}" for f in self.findings]
        out.append(f"{'verified' if self.ok else 'NOT VERIFIED'}: {self.pdf}")
        return out


@dataclass(frozen=True)
class Package:
    """What a calcdoc PDF carries: attached job file and results, and the hashes printed in its text."""

    job_name: str
    job_data: bytes
    results_name: str
    results_text: str
    results: dict
    printed_hashes: tuple[str, ...]


#: Caps on what verify reads: the PDF, each attachment once inflated, the pages whose text is read.
MAX_PDF_BYTES = 64_000_000
MAX_ATTACHMENT_BYTES = 16_000_000
MAX_PAGES = 2_000


def read_package(pdf_path: str | Path) -> Package:
    """The attachments and printed hashes of a calcdoc PDF; raises :class:`VerifyError` if it is not one.

    The file is treated as hostile: a regular file of at most MAX_PDF_BYTES, every stream inflated to at
    most MAX_ATTACHMENT_BYTES (a decompression bomb stops at the cap), at most MAX_PAGES pages, and the
    attached JSON parsed with its nesting bounded."""
    import io
    import logging

    import pypdf
    from pypdf import PdfReader
    from pypdf.errors import PyPdfError

    data = _read(pdf_path, "a PDF", MAX_PDF_BYTES)
    if not data.startswith(b"%PDF-"):
        raise VerifyError(f"{pdf_path}: not a PDF file")
    logging.getLogger("pypdf").setLevel(logging.ERROR)   # a damaged file is reported by us, once
    cap = MAX_ATTACHMENT_BYTES
    config = pypdf.get_configuration().with_overwrites(
        zlib_maximum_output_length=cap, lzw_maximum_output_length=cap, run_length_maximum_output_length=cap,
        brotli_maximum_output_length=cap, jbig2_maximum_output_length=cap, maximum_declared_stream_length=cap,
        array_based_stream_maximum_output_length=cap, stream_decoding_work_maximum_length=4 * cap)
    try:
        with pypdf.apply_configuration(config):
            reader = PdfReader(io.BytesIO(data), strict=False)
            attached = [(name, blob) for name, blobs in reader.attachments.items() for blob in blobs]
            if len(reader.pages) > MAX_PAGES:
                raise VerifyError(f"{pdf_path}: the PDF has {len(reader.pages):,} pages; a calcdoc report has at "
                                  f"most {MAX_PAGES:,}")
            text = "\n".join(page.extract_text() or "" for page in reader.pages)
    except VerifyError:
        raise
    except PyPdfError as exc:   # a damaged file, or a limit reached (a decompression bomb)
        raise VerifyError(f"{pdf_path}: the PDF cannot be read ({type(exc).__name__}: {_one_line(exc)})") from None
    except (RecursionError, MemoryError):
        raise VerifyError(f"{pdf_path}: the PDF's structure is nested too deeply or too large to read") from None
    except Exception as exc:   # pypdf on a crafted file: anything else it raises is still a file we cannot read
        raise VerifyError(f"{pdf_path}: the PDF cannot be read ({type(exc).__name__}: {_one_line(exc)})") from None
    big = [n for n, b in attached if len(b) > cap]
    if big:
        raise VerifyError(f"{pdf_path}: the attachment {big[0]!r} is larger than {cap:,} bytes once inflated; "
                          "calcdoc's attachments are far smaller")
    kinds = [_is_results(b) for _, b in attached]
    results = [a for a, k in zip(attached, kinds, strict=True) if k]
    others = [a for a, k in zip(attached, kinds, strict=True) if not k]
    if not attached:
        raise VerifyError(f"{pdf_path}: the PDF has no attached files; it is not a calcdoc calc package "
                          "(calcdoc attaches the job file and the results JSON)")
    if len(results) != 1 or len(others) != 1:
        names = ", ".join(_one_line(n, 60) for n, _ in attached[:6]) + (", ..." if len(attached) > 6 else "")
        raise VerifyError(f"{pdf_path}: expected two attachments (the job file and the calcdoc results JSON), "
                          f"found {len(attached)}: {names}")
    rname, rblob = results[0]
    rtext = rblob.decode("utf-8")
    printed = tuple(re.sub(r"\s+", "", m.group(1)) for m in _PRINTED_HASH.finditer(text))
    return Package(others[0][0], others[0][1], rname, rtext, _json(rtext), printed)


def _one_line(exc: object, most: int = 120) -> str:
    text = " ".join(str(exc).split())
    return text if len(text) <= most else text[:most] + "…"


#: Deepest nesting of the results JSON read back (calcdoc writes a few levels).
MAX_JSON_DEPTH = 64


def _json(text: str):
    """JSON text parsed with its nesting bounded first (no recursion on a crafted document); None if not JSON."""
    depth = 0
    in_str = esc = False
    for ch in text:
        if in_str:
            if esc:
                esc = False
            elif ch == "\\":
                esc = True
            elif ch == '"':
                in_str = False
        elif ch == '"':
            in_str = True
        elif ch in "[{":
            depth += 1
            if depth > MAX_JSON_DEPTH:
                return None
        elif ch in "]}":
            depth -= 1
    try:
        return json.loads(text)
    except (ValueError, RecursionError):
        return None


def _is_results(blob: bytes) -> bool:
    try:
        obj = _json(blob.decode("utf-8"))
    except UnicodeDecodeError:
        return False
    return isinstance(obj, dict) and obj.get("schema") == RESULTS_SCHEMA


def _read(path: str | Path, what: str, cap: int) -> bytes:
    """A regular file's bytes (at most ``cap``), or a VerifyError saying why not."""
    try:
        return read_regular(path, cap, what)
    except JobError as exc:
        p = exc.problems[0]
        raise VerifyError(f"{path}: {p.found}" + (f"; {p.valid}" if p.valid else "")) from None


def verify(pdf_path: str | Path, job_path: str | Path | None = None, rerun: bool = False) -> Verification:
    """Check a calc package against itself, against a job file, and (``rerun``) against a new run."""
    pkg = read_package(pdf_path)
    sha = hashlib.sha256(pkg.job_data).hexdigest()
    v = Verification(str(pdf_path), pkg.job_name, sha)
    # 1. the report against itself
    if not pkg.printed_hashes:
        v.add(False, "no job-file SHA-256 is printed in the report's text")
    else:
        bad = sorted({h for h in pkg.printed_hashes if h != sha})
        v.add(not bad, f"the attached job file's sha256 {'matches' if not bad else 'differs from'} the hash printed "
                       f"in the report ({len(pkg.printed_hashes)} place{'s' if len(pkg.printed_hashes) > 1 else ''})"
                       + (f": printed {', '.join(bad)}" if bad else ""))
    stated = pkg.results.get("input_sha256")
    v.add(stated == sha, f"the attached job file's sha256 {'matches' if stated == sha else 'differs from'} "
                         f"input_sha256 in the attached results ({pkg.results_name})"
                         + ("" if stated == sha else f": results state {stated}"))
    # 1b. the results JSON written beside the report must be the one attached to it (a kill between the two
    # renames of an older calcdoc, or two runs into one folder, could leave a mixed pair)
    beside = Path(pdf_path).with_suffix(".json")
    if beside.exists():
        try:
            text = _read(beside, "a results JSON", MAX_ATTACHMENT_BYTES).decode("utf-8", "replace")
        except VerifyError as exc:
            v.add(False, f"the results JSON beside the report cannot be read: {exc}")
        else:
            same = text == pkg.results_text
            v.add(same, f"the results JSON beside the report ({beside.name}) "
                        + ("is the one attached to it" if same else "is NOT the one attached to it (a mixed pair: "
                           "the JSON and the PDF come from different runs)"))
    # 2. the report against a job file
    if job_path is not None:
        given = _read(job_path, "a job file", MAX_JOB_BYTES)
        gsha = hashlib.sha256(given).hexdigest()
        if gsha == sha:
            v.add(True, f"the report was made from {job_path} (same sha256)")
        else:
            v.add(False, f"the report was NOT made from {job_path}: its sha256 is {gsha}"
                         + _first_difference(pkg.job_data, given, str(job_path)))
    # 3. the results against a new run of the attached job
    if rerun:
        _rerun(v, pkg)
    return v


def _first_difference(attached: bytes, given: bytes, name: str, context: int = 0, most: int = 6) -> str:
    a = attached.decode("utf-8", "replace").splitlines()
    b = given.decode("utf-8", "replace").splitlines()
    diff = [d for d in difflib.unified_diff(a, b, "attached", name, n=context, lineterm="")
            if not d.startswith(("---", "+++"))]
    if not diff:
        return " (the lines are the same; the bytes differ, e.g. line endings or a byte-order mark)"
    shown = "\n      ".join(diff[:most]) + ("\n      ..." if len(diff) > most else "")
    return "\n    differences (attached → given):\n      " + shown


class RerunFailed(VerifyError):
    """The attached job does not compute again: the command answers as ``calcdoc run`` of that job would
    (``code`` 2 for bad input, 3 for an internal error), with its message."""

    def __init__(self, message: str, code: int):
        super().__init__(message)
        self.code = code


def _rerun(v: Verification, pkg: Package) -> None:
    try:
        text = dumps(run(loads(pkg.job_data, pkg.job_name)))
    except JobError as exc:
        raise RerunFailed("\n".join(str(p) for p in exc.problems), EXIT_BAD_INPUT) from None
    except CalcdocError as exc:
        raise RerunFailed(f"{pkg.job_name}: {exc}", EXIT_BAD_INPUT) from None
    except (RecursionError, MemoryError, Exception):   # an internal error: one line, as calcdoc run says it
        raise RerunFailed(f"{pkg.job_name}: internal error in calcdoc {__version__} while recomputing the attached "
                          "job; please report it with the job file", EXIT_INTERNAL) from None
    if text == pkg.results_text:
        v.add(True, "recomputed results are identical to the attached results, byte for byte")
        return
    new = json.loads(text)
    old = dict(pkg.results)
    if "changes_since" in old and "changes_since" not in new:
        # the comparison with an older revision needs that revision's job file, which the report does not
        # carry: the rerun checks this job's own results and says so
        old.pop("changes_since")
        v.add(True, "the report's section of changes since an older revision is not recomputed (the older job "
                    "file is not attached); the job's own results are compared")
    if old == new:
        v.add(True, "recomputed results are identical to the attached results")
        return
    diffs = _compare(old, new)
    if diffs:
        shown = "\n      ".join(diffs[:8]) + ("\n      ..." if len(diffs) > 8 else "")
        v.add(False, f"recomputed results differ from the attached results in {len(diffs)} place"
                     f"{'s' if len(diffs) > 1 else ''}:\n      {shown}")
    else:
        versions = ", ".join(f"{k} {pkg.results.get('software', {}).get(k)} → {new.get('software', {}).get(k)}"
                             for k in sorted(set(pkg.results.get("software", {})) | set(new.get("software", {})))
                             if pkg.results.get("software", {}).get(k) != new.get("software", {}).get(k))
        v.add(True, f"recomputed results agree with the attached results within {RERUN_RTOL:g} relative"
                    + (f" (software versions differ: {versions})" if versions else ""))


def _compare(old, new, path: str = "") -> list[str]:
    """Differences between two results documents, ignoring software versions; numbers within RERUN_RTOL."""
    if path == "software":
        return []
    if isinstance(old, dict) and isinstance(new, dict):
        out = []
        for k in list(old) + [k for k in new if k not in old]:
            sub = f"{path}.{k}" if path else k
            if k not in old or k not in new:
                out.append(f"{sub}: {'missing in the new run' if k not in new else 'new in the new run'}")
            else:
                out += _compare(old[k], new[k], sub)
        return out
    if isinstance(old, list) and isinstance(new, list):
        if len(old) != len(new):
            return [f"{path}: {len(old)} items attached, {len(new)} recomputed"]
        return [d for i, (a, b) in enumerate(zip(old, new, strict=True)) for d in _compare(a, b, f"{path}[{i}]")]
    num = (int, float)
    if isinstance(old, num) and isinstance(new, num) and not isinstance(old, bool) and not isinstance(new, bool):
        if math.isclose(old, new, rel_tol=RERUN_RTOL, abs_tol=1e-12):
            return []
        return [f"{path}: attached {old!r}, recomputed {new!r}"]
    return [] if old == new else [f"{path}: attached {old!r}, recomputed {new!r}"]
