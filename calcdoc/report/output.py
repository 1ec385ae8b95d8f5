"""Writing results and reports: atomically, inside the chosen folder only."""
from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ..errors import CalcdocError
from .jsonfile import dumps
from .render import render_pdf, safe_stem


def write_atomic(target: Path, data: bytes) -> None:
    """Write to a temporary file beside the target, then rename over it (never a partial file)."""
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=str(target.parent))
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, 0o644)
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def output_paths(results, out_dir: str | os.PathLike) -> tuple[Path, Path]:
    """The results JSON and PDF paths of a job in the output folder."""
    out = Path(out_dir)
    stem = safe_stem(results.job.calc.number, results.job.calc.revision)
    return out / f"{stem}.json", out / f"{stem}.pdf"


def write(results, out_dir: str | os.PathLike, pdf: bool = True) -> list[Path]:
    """Write ``<stem>.json`` and ``<stem>.pdf`` into out_dir. Both are rendered in memory first, so
    a failure leaves any earlier report of the same job untouched."""
    out = Path(out_dir)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise CalcdocError(f"cannot create the output folder {out}: {exc.strerror}") from None
    json_path, pdf_path = output_paths(results, out)
    job_path = Path(results.job.name).resolve()
    for p in (json_path, pdf_path):
        if p.resolve() == job_path:
            raise CalcdocError(f"refusing to overwrite the job file {results.job.name}")
    text = dumps(results)
    pdf_bytes = None
    if pdf:
        pdf_bytes = render_pdf(results, text)
    targets = [(json_path, text.encode("utf-8"))] + ([(pdf_path, pdf_bytes)] if pdf_bytes is not None else [])
    return write_all(targets)


def write_all(targets: list[tuple[Path, bytes]]) -> list[Path]:
    """Write every file to a temporary file beside its target first, then rename them all, so a failure
    while writing (disk full, permissions) leaves every earlier file as it was and no partial file."""
    staged: list[tuple[str, Path]] = []
    try:
        for target, data in targets:
            fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=str(target.parent))
            staged.append((tmp, target))
            with os.fdopen(fd, "wb") as fh:
                fh.write(data)
                fh.flush()
                os.fsync(fh.fileno())
            os.chmod(tmp, 0o644)
        for tmp, target in staged:
            os.replace(tmp, target)
    except OSError as exc:
        _discard(staged)
        raise CalcdocError(f"cannot write {target}: {exc.strerror or exc}; earlier outputs are unchanged") from None
    except BaseException:
        _discard(staged)
        raise
    return [target for _, target in staged]


def _discard(staged: list[tuple[str, Path]]) -> None:
    for tmp, _ in staged:
        try:
            os.unlink(tmp)
        except OSError:
            pass
