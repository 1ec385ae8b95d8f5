"""A fuzzer of calcdoc's inputs: mutated job files through ``check`` and ``run``, crafted PDFs through
``verify``, and odd paths through ``diff``. Every answer must be an exit code of 0, 1 or 2 with no
traceback and no internal error, within a time cap per input.

Fast profile (part of the normal test run): ``tests/cli/test_fuzz_inputs.py``.
Long profile (one command, from the checkout root)::

    timeout 14400 .venv/bin/python tests/fuzz/jobfuzz.py --mutants 10000 --cap 20 --seed 1

It prints the counts (mutants, exit codes, internal errors, tracebacks, timeouts) recorded in
``tests/fuzz/README.md``; it exits 1 if any input broke the bar (and lists the first few).
"""
from __future__ import annotations

import argparse
import contextlib
import io
import json
import os
import random
import signal
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

import yaml

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
SEEDS = sorted((ROOT / "example_jobs").glob("*.yaml"))

#: Values that have broken parsers before: unicode, huge and tiny numbers, non-numbers, markup, paths.
ODD_SCALARS = [
    "", " ", "0", "-0", "-1", "1e999", "-1e999", "1e-320", ".nan", ".inf", "-.inf", "NaN", "inf", "nan bar",
    "1e999 bar", "-5 bar", "0 K", "-300 degC", "1" + "0" * 400, "0x1F", "1_000", "1,5 bar", "12 bananas",
    "20 degC/s", "bar", "psig", "10 psig", "5 %", "150 %", "1/0", "()", "[", "{", "'", '"', "&a", "*a", "!!python/name:os.system",
    "$x$", "$\\frac{a}{$", "$\\foo$", "<script>alert(1)</script>", "{{ 7*7 }}", "{% raw %}", "%(x)s", "{x}",
    "../../../../etc/passwd", "/dev/zero", "/dev/stdin", "file:///etc/passwd", "http://127.0.0.1/x", "C:\\con",
    "Ω", "温度", "😀" * 30, "\u202etxet", "\u200b", "a\u0301", "ﬁ", "x" * 3000, "y " * 2500, "\t", "Nitrogen&Oxygen",
    "R410A.mix", "HEOS::Nitrogen", "Air.mix", "nitrogen", "Nitrogenx", "Methane[0.5]&Ethane[0.5]",
    True, False, None, 0, 1, -1, 2**64, 10**400, 1e308, -1e308, 5e-324, 1.5, [], {}, [1, 2], {"a": 1},
]


def _walk(obj, path=()):
    """Every (path, value) of a YAML data tree."""
    yield path, obj
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _walk(v, path + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _walk(v, path + (i,))


def _set(obj, path, value):
    for p in path[:-1]:
        obj = obj[p]
    obj[path[-1]] = value


def _delete(obj, path):
    for p in path[:-1]:
        obj = obj[p]
    del obj[path[-1]]


def _dump(data) -> str:
    return yaml.safe_dump(data, sort_keys=False, allow_unicode=True, width=10_000)


def _data_mutation(rng: random.Random, data) -> tuple[str, str]:
    places = [p for p, _ in _walk(data) if p]
    path = rng.choice(places)
    kind = rng.choice(("delete", "odd", "odd", "odd", "retype", "nest", "duplicate", "rename", "list"))
    if kind == "delete":
        _delete(data, path)
    elif kind == "odd":
        _set(data, path, rng.choice(ODD_SCALARS))
    elif kind == "retype":
        _, value = next(pv for pv in _walk(data) if pv[0] == path)
        _set(data, path, rng.choice(([value], {"value": value}, str(value), None, 1, True)))
    elif kind == "nest":
        deep: object = "1 bar"
        for _ in range(rng.choice((5, 39, 41, 120))):
            deep = [deep] if rng.random() < 0.5 else {"k": deep}
        _set(data, path, deep)
    elif kind == "list":
        _set(data, path, [rng.choice(ODD_SCALARS[:40]) for _ in range(rng.choice((0, 3, 1001)))])
    elif kind == "rename":
        parent = data
        for p in path[:-1]:
            parent = parent[p]
        if isinstance(parent, dict):
            parent[str(path[-1]) + rng.choice(("x", "_", "s", " "))] = parent.pop(path[-1])
    text = _dump(data)
    if kind == "duplicate":   # a key given twice (the YAML dumper will not write one)
        lines = text.splitlines(keepends=True)
        k = rng.randrange(len(lines))
        lines.insert(k, lines[k])
        text = "".join(lines)
    return kind, text


def _text_mutation(rng: random.Random, text: str) -> tuple[str, str]:
    kind = rng.choice(("bom", "crlf", "tabs", "truncate", "flip", "alias_bomb", "anchor", "surrogate", "tag",
                       "control", "nul", "latin1", "two_docs", "long_line", "cr_only"))
    if kind == "bom":
        return kind, "\ufeff" + text
    if kind == "crlf":
        return kind, text.replace("\n", "\r\n")
    if kind == "cr_only":
        return kind, text.replace("\n", "\r")
    if kind == "tabs":
        return kind, text.replace("  ", "\t", rng.randint(1, 5))
    if kind == "truncate":
        return kind, text[: rng.randrange(len(text))]
    if kind == "flip":
        k = rng.randrange(len(text))
        return kind, text[:k] + rng.choice("{}[]:,-&*!|>'\"#%@`?") + text[k + 1:]
    if kind == "alias_bomb":
        bomb = "a: &a [x, x, x, x, x, x, x, x, x]\n" + "".join(
            f"{c}: &{c} [*{p}, *{p}, *{p}, *{p}, *{p}, *{p}, *{p}, *{p}, *{p}]\n"
            for p, c in zip("abcdefgh", "bcdefghi", strict=True))
        return kind, bomb + text
    if kind == "anchor":
        return kind, text.replace("legs:", "legs: &L", 1).replace("calc:", "calc: &C", 1) + "extra: *C\n"
    if kind == "surrogate":
        return kind, text.replace("title: ", 'title: "\\ud800" #', 1)
    if kind == "tag":
        tag = rng.choice(("!!bool x", "!!timestamp x", "!!int 1.5", "!!float abc", "!!binary ###", "!!python/tuple [1]",
                          "!custom 1", "!!set {a}", "!!omap [a: 1]", "!!str 1", "!!null x"))
        lines = text.splitlines(keepends=True)
        cand = [i for i, ln in enumerate(lines) if ": " in ln and not ln.rstrip().endswith(":")]
        if cand:
            i = rng.choice(cand)
            head = lines[i].split(": ", 1)[0]
            lines[i] = f"{head}: {tag}\n"
        return kind, "".join(lines)
    if kind == "control":
        k = rng.randrange(len(text))
        return kind, text[:k] + rng.choice("\x00\x07\x1b\x7f\x85\u2028") + text[k:]
    if kind == "nul":
        return kind, text + "\x00"
    if kind == "latin1":
        return kind, text.replace("e", "\xe9", 1)   # written as latin-1 bytes below
    if kind == "two_docs":
        return kind, text + "---\n" + text
    return kind, text.replace("title: ", "title: " + "z" * 30_000 + " ", 1)


def mutants(n: int, seed: int):
    """``n`` mutated job files: (mutation kind, bytes)."""
    rng = random.Random(seed)
    texts = [p.read_text(encoding="utf-8") for p in SEEDS]
    for _ in range(n):
        text = rng.choice(texts)
        kinds = []
        for _ in range(rng.choice((1, 1, 2, 3))):
            if rng.random() < 0.6 and not {"alias_bomb", "anchor"} & set(kinds):   # never expand a bomb here
                try:
                    data = yaml.safe_load(text)
                except (yaml.YAMLError, ValueError, TypeError, KeyError, AttributeError, RecursionError):
                    data = None   # the mutant is no longer YAML PyYAML reads: mutate its text
                if isinstance(data, dict) and data:
                    kind, text = _data_mutation(rng, data)
                    kinds.append(kind)
                    continue
            kind, text = _text_mutation(rng, text)
            kinds.append(kind)
        raw = text.encode("latin-1", "replace") if "latin1" in kinds else text.encode("utf-8", "surrogatepass")
        yield "+".join(kinds), raw


class _Timeout(Exception):
    pass


def _alarm(signum, frame):
    raise _Timeout()


def call(argv: list[str], cap: float) -> tuple[int | str, str]:
    """Run the command line in this process with a time cap: (exit code or 'timeout'/'crash', stderr)."""
    import calcdoc

    err, out = io.StringIO(), io.StringIO()
    old = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, cap)
    try:
        with contextlib.redirect_stderr(err), contextlib.redirect_stdout(out):
            code: int | str = calcdoc.main(argv)
    except _Timeout:
        code = "timeout"
    except SystemExit as exc:   # argparse
        code = exc.code if isinstance(exc.code, int) else 2
    except BaseException as exc:  # noqa: BLE001 - a crash of the command is what we are looking for
        import traceback

        code = "crash"
        err.write("Traceback (fuzz harness): " + "".join(traceback.format_exception(exc))[-2000:])
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)
    return code, err.getvalue()


def bad(code, err: str) -> bool:
    """The bar: exit 0, 1 or 2 (130 for an interrupt is not expected here), no traceback, no internal error."""
    return code not in (0, 1, 2) or "Traceback" in err or "internal error" in err


def crafted_pdfs(folder: Path, valid_pdf: Path | None) -> list[tuple[str, Path]]:
    """PDFs a hostile user might give verify: not PDFs, truncated, bombs, nested JSON, wrong attachments."""
    from pypdf import PdfWriter

    out: list[tuple[str, Path]] = []

    def put(name: str, data: bytes) -> None:
        p = folder / f"{name}.pdf"
        p.write_bytes(data)
        out.append((name, p))

    def pdf(attachments: list[tuple[str, bytes]]) -> bytes:
        w = PdfWriter()
        w.add_blank_page(200, 200)
        for n, b in attachments:
            w.add_attachment(n, b)
        buf = io.BytesIO()
        w.write(buf)
        return buf.getvalue()

    put("empty", b"")
    put("text", b"hello")
    put("header_only", b"%PDF-1.7\n")
    put("garbage", b"%PDF-1.7\n" + bytes(range(256)) * 40)
    put("no_attachments", pdf([]))
    put("bomb", pdf([("job.yaml", b"calcdoc: 1\n"), ("results.json", b"\0" * 40_000_000)]))
    put("nested_json", pdf([("job.yaml", b"calcdoc: 1\n"), ("r.json", b"[" * 200_000 + b"]" * 200_000)]))
    put("schema_json_bad_job", pdf([("job.yaml", b"calcdoc: [\n"),
                                    ("r.json", json.dumps({"schema": "calcdoc-results/1"}).encode())]))
    put("three_attachments", pdf([("a", b"1"), ("b", b"2"), ("c", b"3")]))
    if valid_pdf is not None and valid_pdf.exists():
        data = valid_pdf.read_bytes()
        put("truncated", data[: len(data) // 2])
        put("flipped", data[:2000] + bytes([data[2000] ^ 0xFF]) + data[2001:])
        put("tail_cut", data[:-100])
    return out


def odd_paths(folder: Path) -> list[str]:
    """Paths for diff and check: folders, pipes, devices, files used as folders, missing folders."""
    afile = folder / "afile"
    afile.write_text("x", encoding="utf-8")
    fifo = folder / "pipe.yaml"
    if not fifo.exists():
        os.mkfifo(fifo)
    return [str(folder), str(fifo), "/dev/null", "/dev/zero", str(afile / "x.yaml"), str(folder / "missing" / "x.yaml"),
            "", "-", str(folder / ("n" * 300 + ".yaml")), str(afile)]


def run(n: int, seed: int, cap: float, run_every: int = 20, verbose: bool = False, verbose_every: int = 500) -> dict:
    """Fuzz ``n`` job-file mutants (``check`` each, ``run --no-pdf`` every ``run_every``-th), the crafted PDFs
    through ``verify`` and the odd paths through ``diff`` and ``check``. Returns the counts and the failures."""
    counts: Counter = Counter()
    failures: list[str] = []
    start = time.monotonic()
    with tempfile.TemporaryDirectory(prefix="calcdoc-fuzz-") as tmp:
        folder = Path(tmp)
        base = SEEDS[0]
        for i, (kind, raw) in enumerate(mutants(n, seed)):
            path = folder / f"m{i % 50}.yaml"
            path.write_bytes(raw)
            argv = ["check", str(path)]
            if i % run_every == run_every - 1:
                argv = ["run", str(path), "--out", str(folder / "out"), "--no-pdf", "--quiet"]
            code, err = call(argv, cap)
            counts[f"{argv[0]} exit {code}"] += 1
            counts["mutants"] += 1
            if bad(code, err):
                failures.append(f"mutant {i} ({kind}) {argv[0]}: exit {code}: {err.strip()[-600:]}")
                (folder.parent / f"calcdoc-fuzz-fail-{seed}-{i}.yaml").write_bytes(raw)
            if verbose and i % verbose_every == 0:
                print(f"{i} mutants, {time.monotonic() - start:.0f} s, {len(failures)} failures", flush=True)
        pdf_dir = folder / "pdfs"
        pdf_dir.mkdir()
        valid_out = folder / "valid"
        call(["run", str(base), "--out", str(valid_out), "--quiet"], max(cap, 60))
        valid = next(valid_out.glob("*.pdf"), None)
        for name, pdf in crafted_pdfs(pdf_dir, valid):
            for argv in (["verify", str(pdf)], ["verify", str(pdf), "--rerun"], ["verify", str(pdf), str(base)]):
                code, err = call(argv, cap)
                counts[f"verify exit {code}"] += 1
                counts["pdfs"] += 1
                if bad(code, err) or (name != "flipped" and code == 0):
                    failures.append(f"pdf {name} {' '.join(argv[2:])}: exit {code}: {err.strip()[-600:]}")
        paths = folder / "paths"
        paths.mkdir()
        for p in odd_paths(paths):
            for argv in (["diff", p, str(base)], ["diff", str(base), p], ["check", p], ["verify", p],
                         ["diff", p, "--against", "HEAD"]):
                code, err = call(argv, cap)
                counts[f"{argv[0]} path exit {code}"] += 1
                counts["paths"] += 1
                if bad(code, err) or code != 2:
                    failures.append(f"path {p!r} {argv}: exit {code}: {err.strip()[-400:]}")
    counts["timeouts"] = sum(v for k, v in counts.items() if k.endswith("exit timeout"))
    counts["tracebacks"] = sum(1 for f in failures if "Traceback" in f)
    counts["internal errors"] = sum(1 for f in failures if "internal error" in f or "exit 3" in f)
    counts["seconds"] = round(time.monotonic() - start)
    return {"counts": dict(sorted(counts.items())), "failures": failures}


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--mutants", type=int, default=10_000)
    ap.add_argument("--cap", type=float, default=20.0, help="seconds allowed for each input")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--run-every", type=int, default=20, help="every Nth mutant is also computed (run --no-pdf)")
    a = ap.parse_args(argv)
    res = run(a.mutants, a.seed, a.cap, a.run_every, verbose=True)
    print(json.dumps(res["counts"], indent=2))
    for f in res["failures"][:20]:
        print("FAIL", f)
    print(f"{len(res['failures'])} failures")
    return 1 if res["failures"] else 0


if __name__ == "__main__":
    sys.path.insert(0, str(ROOT))
    sys.exit(main())
