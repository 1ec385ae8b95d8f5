"""Writing results and reports: atomically, inside the chosen folder only, and safe against a kill.

The JSON and the PDF of a job are a pair: the PDF carries the JSON as an attachment, and a JSON beside
a PDF from another run is as misleading as a half-written file. A write therefore

1. takes the output folder's lock (``flock`` on the folder itself: a kernel lock, released when its
   process ends however it ends, so no stale lock file can block the next run; two runs into one folder
   take turns);
2. clears what a killed earlier run left behind: completes a pair whose journal says both files were
   ready (roll forward), and removes its temporary ``.part`` files;
3. writes each file to a ``.part`` file beside its target and syncs it; then writes the journal (the
   pair's temporary and final names), atomically;
4. renames the files into place with SIGINT and SIGTERM held back, and removes the journal.

After SIGINT or SIGTERM at any moment the folder holds the earlier pair or the new one. SIGKILL cannot be
held back: a kill between the two renames leaves the journal, and the next write into the folder
completes the pair before anything else; ``calcdoc verify`` meanwhile reports the JSON beside the PDF as
not the one attached to it. Writing the JSON alone (``--no-pdf``) removes the earlier PDF of the same job
in the same step, so that no PDF stands beside results it does not carry.
"""
from __future__ import annotations

import errno
import json
import os
import re
import signal
import tempfile
import threading
from contextlib import contextmanager
from pathlib import Path

from ..errors import CalcdocError
from .jsonfile import dumps
from .render import render_pdf, safe_stem

__all__ = ["JOURNAL_SUFFIX", "WRITTEN", "clean_folder", "folder_lock", "output_folder", "output_paths", "write", "write_all",
           "write_atomic"]

#: First argument of a KeyboardInterrupt raised after the pair was in place (the files written are the second).
WRITTEN = "written"
#: The journal of a pair being renamed into place: ``.<stem>.pair`` in the output folder.
JOURNAL_SUFFIX = ".pair"
#: Temporary files calcdoc makes beside a target: ``.<name>.<random>.part`` (tempfile's random part).
_PART = re.compile(r"^\..+\.[A-Za-z0-9_]{6,}\.part$")


def output_folder(out_dir: str | os.PathLike) -> Path:
    """The output folder, made if missing; a CalcdocError (bad input) when it cannot be a folder."""
    out = Path(out_dir)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except FileExistsError:
        raise CalcdocError(f"cannot use {out} as the output folder: it is a file, not a folder") from None
    except NotADirectoryError:
        raise CalcdocError(f"cannot create the output folder {out}: a part of the path is a file, not a "
                           "folder") from None
    except OSError as exc:
        raise CalcdocError(f"cannot create the output folder {out}: {exc.strerror or exc}") from None
    if not out.is_dir():
        raise CalcdocError(f"cannot use {out} as the output folder: it is not a folder")
    return out


@contextmanager
def folder_lock(out: Path):
    """Hold the folder's lock (``flock`` on the folder itself) for the duration; waits for another calcdoc
    writing into the same folder. Released by the kernel if the process dies."""
    import fcntl

    try:
        fd = os.open(out, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError as exc:
        raise CalcdocError(f"cannot open the output folder {out}: {exc.strerror or exc}") from None
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX)
        except OSError as exc:   # a file system without locks (some network mounts): say so, do not guess
            if exc.errno not in (errno.ENOLCK, errno.EOPNOTSUPP, errno.EINVAL):
                raise
            raise CalcdocError(f"cannot lock the output folder {out} ({exc.strerror}); write to a local "
                               "folder") from None
        yield
    finally:
        os.close(fd)   # releases the lock


@contextmanager
def _signals_held():
    """SIGINT and SIGTERM held back (delivered at the end) while a pair is renamed into place."""
    if threading.current_thread() is not threading.main_thread() or not hasattr(signal, "pthread_sigmask"):
        yield
        return
    held = {signal.SIGINT, signal.SIGTERM}
    old = signal.pthread_sigmask(signal.SIG_BLOCK, held)
    try:
        yield
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, old)


def clean_folder(out: Path) -> None:
    """What killed runs left in the folder (call with the folder's lock held): complete each pair whose
    journal is there, then remove calcdoc's temporary files."""
    try:
        names = sorted(os.listdir(out))
    except OSError:
        return
    for name in names:
        if name.startswith(".") and name.endswith(JOURNAL_SUFFIX):
            _roll_forward(out, out / name)
    for name in sorted(os.listdir(out)):
        if _PART.match(name) and (out / name).is_file():
            try:
                os.unlink(out / name)
            except OSError:
                pass


def _roll_forward(out: Path, journal: Path) -> None:
    try:
        steps = json.loads(journal.read_text(encoding="utf-8"))
        pairs = [(str(a), str(b)) for a, b in steps]
    except (OSError, ValueError, TypeError):
        pairs = []
    for tmp, target in pairs:
        if "/" in tmp or "/" in target or "\0" in tmp + target:   # names inside this folder only
            continue
        src, dst = out / tmp, out / target
        try:
            if tmp == "":
                continue
            if src.is_file():
                os.replace(src, dst)
        except OSError:
            pass
    for tmp, target in pairs:   # a JSON written alone removes the earlier PDF (recorded as ("", target))
        if tmp == "" and "/" not in target:
            try:
                os.unlink(out / target)
            except OSError:
                pass
    try:
        os.unlink(journal)
    except OSError:
        pass


def write_atomic(target: Path, data: bytes) -> None:
    """Write to a temporary file beside the target, then rename over it (never a partial file), under the
    folder's lock."""
    with folder_lock(target.parent):
        _write_atomic(target, data)


def _write_atomic(target: Path, data: bytes) -> None:
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=str(target.parent))
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, 0o644)
        with _signals_held():
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
    """Write ``<stem>.json`` and ``<stem>.pdf`` into out_dir as a pair. Both are rendered in memory first, so
    a failure leaves any earlier report of the same job untouched."""
    out = output_folder(out_dir)
    json_path, pdf_path = output_paths(results, out)
    job_path = Path(results.job.name).resolve()
    for p in (json_path, pdf_path):
        if p.resolve() == job_path:
            raise CalcdocError(f"refusing to overwrite the job file {results.job.name}")
    text = dumps(results)
    pdf_bytes = None
    if pdf:
        pdf_bytes = render_pdf(results, text)
    # the PDF first, the JSON last: the JSON's arrival completes the pair
    targets = ([(pdf_path, pdf_bytes)] if pdf_bytes is not None else []) + [(json_path, text.encode("utf-8"))]
    written = write_all(targets, remove=[] if pdf else [pdf_path])
    return sorted(written, key=lambda p: p.suffix != ".json")


def write_all(targets: list[tuple[Path, bytes]], remove: list[Path] | None = None) -> list[Path]:
    """Write files that belong together into one folder: each to a temporary file beside its target first,
    then (under the folder's lock, with a journal) rename them all, so that a failure or a kill leaves the
    earlier files or the new ones, never a mix, and no partial file. ``remove`` are earlier files of the
    same set that no longer belong (deleted in the same step)."""
    remove = remove or []
    out = targets[0][0].parent if targets else None
    if out is None:
        return []
    staged: list[tuple[str, Path]] = []
    journal = out / f".{targets[-1][0].stem}{JOURNAL_SUFFIX}"
    target = targets[0][0]
    committed = False
    with folder_lock(out):
        clean_folder(out)
        try:
            for target, data in targets:
                fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=str(out))
                staged.append((tmp, target))
                with os.fdopen(fd, "wb") as fh:
                    fh.write(data)
                    fh.flush()
                    os.fsync(fh.fileno())
                os.chmod(tmp, 0o644)
            steps = [(Path(tmp).name, t.name) for tmp, t in staged] + [("", p.name) for p in remove if p.exists()]
            with _signals_held():
                if len(steps) > 1:
                    _write_atomic(journal, json.dumps(steps).encode("utf-8"))
                for tmp, target in staged:
                    os.replace(tmp, target)
                for p in remove:
                    if p.exists():
                        os.unlink(p)
                if len(steps) > 1:
                    os.unlink(journal)
                committed = True
            _sync_folder(out)
        except OSError as exc:
            _discard(staged, journal)
            raise CalcdocError(f"cannot write {target}: {exc.strerror or exc}; earlier outputs are unchanged") from None
        except KeyboardInterrupt as exc:
            if committed:   # the signal held back during the renames: the new pair is in place
                raise KeyboardInterrupt(WRITTEN, [str(t) for _, t in staged]) from exc
            _discard(staged, journal)
            raise
        except BaseException:
            _discard(staged, journal)
            raise
    return [target for _, target in staged]


def _sync_folder(out: Path) -> None:
    try:
        fd = os.open(out, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _discard(staged: list[tuple[str, Path]], journal: Path) -> None:
    for tmp in [t for t, _ in staged] + [str(journal)]:
        try:
            os.unlink(tmp)
        except OSError:
            pass
