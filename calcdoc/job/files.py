"""Reading a file given on the command line as data: a regular file only, opened without blocking, and
never more than a cap. A named pipe, a device, a socket or a folder in place of a file is refused with a
message naming it (reading a pipe would wait for ever, reading /dev/zero would never end)."""
from __future__ import annotations

import os
import stat
from pathlib import Path

from ..errors import JobError, Problem

__all__ = ["read_regular"]

_KINDS = ((stat.S_ISFIFO, "a named pipe"), (stat.S_ISCHR, "a character device"), (stat.S_ISBLK, "a block device"),
          (stat.S_ISSOCK, "a socket"), (stat.S_ISDIR, "a folder"))


def _refuse(path: str | Path, found: str, valid: str) -> JobError:
    return JobError([Problem(str(path), 0, 0, "", found, valid)])


def _missing(path: Path, what: str) -> str:
    """Why a path does not exist: the file itself, a folder on the way, or a file where a folder should be."""
    for parent in reversed(path.parents):
        if str(parent) in (".", "", "/"):
            continue
        if not parent.exists():
            return f"the folder {parent} does not exist"
        if not parent.is_dir():
            return f"{parent} is a file, not a folder"
    return "no such file"


def read_regular(path: str | Path, cap: int, what: str = "a job file") -> bytes:
    """The bytes of a regular file of at most ``cap`` bytes; raises :class:`JobError` (one problem) naming
    the path and what is wrong (missing, a pipe or device or folder, unreadable, larger than the cap)."""
    p = Path(path)
    valid = f"give the path of {what}"
    try:
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except (FileNotFoundError, NotADirectoryError):
        raise _refuse(path, _missing(p, what), valid) from None
    except IsADirectoryError:
        raise _refuse(path, f"this is a folder, not {what}", valid) from None
    except PermissionError:
        raise _refuse(path, "permission denied: the file cannot be read", "make the file readable, or copy it") from None
    except (OSError, ValueError) as exc:   # ValueError: a NUL character in the path
        raise _refuse(path, f"cannot open the file ({getattr(exc, 'strerror', None) or exc})", valid) from None
    try:
        st = os.fstat(fd)
        for test, kind in _KINDS:
            if test(st.st_mode):
                raise _refuse(path, f"this is {kind}, not {what}; calcdoc reads regular files only", valid)
        if not stat.S_ISREG(st.st_mode):
            raise _refuse(path, f"this is not a regular file, not {what}", valid)
        if st.st_size > cap:
            raise _refuse(path, f"the file is {st.st_size:,} bytes, larger than {cap:,} bytes (the most {what} "
                          "may hold)", f"{what} is at most {cap:,} bytes")
        chunks, size = [], 0
        while size <= cap:
            try:
                chunk = os.read(fd, min(1 << 20, cap + 1 - size))
            except BlockingIOError:   # not expected of a regular file; never wait
                break
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
        if size > cap:
            raise _refuse(path, f"the file is larger than {cap:,} bytes (the most {what} may hold)",
                          f"{what} is at most {cap:,} bytes")
        return b"".join(chunks)
    except OSError as exc:
        raise _refuse(path, f"cannot read the file ({exc.strerror or exc})", valid) from None
    finally:
        os.close(fd)
