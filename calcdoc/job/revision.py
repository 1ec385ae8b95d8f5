"""A job file as it stood at an earlier git revision (``calcdoc diff --against REV``)."""
from __future__ import annotations

import subprocess
from pathlib import Path

from ..errors import JobError, Problem
from .jobfile import loads
from .model import Job

__all__ = ["load_revision"]


def load_revision(path: str | Path, rev: str) -> Job:
    """A job file as it stood at a git revision (``git show REV:./file`` in the file's folder)."""
    p = Path(path)
    name = f"{path}@{rev}"
    if rev.startswith("-") or any(ch in rev for ch in "\n\r\0"):
        raise JobError([Problem(name, 0, 0, "", f"'{rev}' is not a git revision", "give a revision such as HEAD~1 or a tag")])
    folder = p.parent if str(p.parent) else Path(".")
    if not folder.is_dir():
        found = f"the folder {folder} does not exist" if not folder.exists() else f"{folder} is a file, not a folder"
        raise JobError([Problem(name, 0, 0, "", found, "give the path of a job file in a git working tree")])
    try:
        proc = subprocess.run(["git", "show", f"{rev}:./{p.name}"], cwd=str(folder.resolve()),
                              capture_output=True, timeout=60, stdin=subprocess.DEVNULL)
    except FileNotFoundError:
        raise JobError([Problem(name, 0, 0, "", "git is not installed", "install git or compare two files")]) from None
    except subprocess.TimeoutExpired:
        raise JobError([Problem(name, 0, 0, "", "git did not answer within 60 s", "compare two files instead")]) from None
    except OSError as exc:
        raise JobError([Problem(name, 0, 0, "", f"cannot run git ({exc.strerror or exc})",
                                "compare two files instead")]) from None
    if proc.returncode != 0:
        msg = proc.stderr.decode("utf-8", "replace").strip().splitlines()
        raise JobError([Problem(name, 0, 0, "", f"git cannot show the file at {rev}: {msg[-1] if msg else 'unknown error'}",
                                "give a revision in which the file exists (git log -- FILE lists them)")])
    return loads(proc.stdout, name)
