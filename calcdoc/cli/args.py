"""The command line's arguments: one parser for every command. It imports nothing of calcdoc but its
version, so that ``calcdoc --help`` and the light commands start at once."""
from __future__ import annotations

import argparse

from .. import __version__

__all__ = ["LIGHT", "build_parser"]

#: Commands that need neither the engine nor the report: :func:`calcdoc.main` runs them from
#: :mod:`calcdoc.cli.light`, which loads the job layer only.
LIGHT = frozenset({"check", "schema"})


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of every command."""
    p = argparse.ArgumentParser(
        prog="calcdoc",
        description="Turn a YAML job file into a checkable calculation package (PDF) and results (JSON) for "
                    "gas compression and expansion.",
        epilog="Exit codes: 0 success; 1 a design check fails (results and report are still written); "
               "2 bad input; 3 internal error.")
    p.add_argument("--version", action="version", version=f"calcdoc {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")
    r = sub.add_parser("run", help="compute a job and write its results JSON and PDF calc package",
                       description="Compute each job file and write OUT/<calc number>_rev<revision>.json and .pdf. "
                                   "A failing run leaves earlier outputs untouched.")
    r.add_argument("jobs", nargs="+", metavar="JOB.yaml",
                   help="job file(s) or folder(s) of job files; several jobs run in parallel over the cores")
    r.add_argument("--out", "-o", default="out", metavar="DIR", help="output folder (default: ./out)")
    r.add_argument("--no-pdf", action="store_true", help="write the results JSON only (no PDF)")
    r.add_argument("--quiet", "-q", action="store_true", help="print nothing but errors")
    r.add_argument("--jobs", "-j", dest="workers", type=int, default=0, metavar="N",
                   help="with several job files: how many to compute at once (default: one per core)")
    r.add_argument("--debug", action="store_true",
                   help="on an internal error, write the traceback to calcdoc-debug.log in the output folder")
    r.add_argument("--changes-since", metavar="OLD.yaml",
                   help="add a section 'Changes since revision X' comparing with an older revision of the job")
    w = sub.add_parser("watch", help="compute a job, then again each time its file is saved (Ctrl-C to stop)",
                       description="Compute JOB.yaml and write its results JSON and PDF as 'run' does; then keep the "
                                   "libraries loaded and rebuild each time the file changes, printing the check "
                                   "summary (or the problems of the job file) and keeping the last good report. "
                                   "Ctrl-C stops (exit code 130).")
    w.add_argument("job", metavar="JOB.yaml")
    w.add_argument("--out", "-o", default="out", metavar="DIR", help="output folder (default: ./out)")
    w.add_argument("--no-pdf", action="store_true", help="write the results JSON only (no PDF)")
    w.add_argument("--quiet", "-q", action="store_true", help="print nothing but errors")
    w.add_argument("--interval", type=float, default=0.5, metavar="S",
                   help="how often to look at the file, in seconds (default: 0.5)")
    w.add_argument("--debug", action="store_true",
                   help="on an internal error, write the traceback to calcdoc-debug.log in the output folder")
    c = sub.add_parser("check", help="validate job file(s) without computing or writing anything",
                       description="Read and validate job files; report every problem found (exit 2) or OK (exit 0).")
    c.add_argument("jobs", nargs="+", metavar="JOB.yaml")
    v = sub.add_parser("verify", help="check a calc package PDF: its attached job file, hashes and results",
                       description="Extract the job file attached to REPORT.pdf and check its sha256 against the hash "
                                   "printed in the report and in the attached results. Given JOB.yaml, say whether "
                                   "the report was made from it. With --rerun, compute the attached job again and "
                                   "compare the results.",
                       epilog="Exit codes: 0 everything matches; 1 a mismatch (altered report or attachment, another "
                              "job file, different results); 2 bad input (not a calcdoc PDF, missing file).")
    v.add_argument("report", metavar="REPORT.pdf")
    v.add_argument("job", nargs="?", metavar="JOB.yaml", help="the job file the report is claimed to come from")
    v.add_argument("--rerun", action="store_true", help="recompute the attached job and compare the results")
    v.add_argument("--trust", action="append", metavar="CERT.pem", default=None,
                   help="a certificate (PEM or DER) whose holder, or whose issued certificates, you trust as signers; "
                        "repeat for several. Each signature is listed; an untrusted signer or a change after signing "
                        "is a mismatch (exit 1)")
    g = sub.add_parser("sign", help="sign a calc package PDF as prepared, checked or approved (PAdES)",
                       description="Add a PAdES digital signature into the title block's field for the role, as an "
                                   "incremental update: earlier signatures and the attached job file stay valid. Keys "
                                   "and certificates as PEM files (OpenSSL), or one PKCS#12 file given as --key.",
                       epilog="Exit codes: 0 signed; 2 bad input (unreadable PDF, key or certificate, role already "
                              "signed).")
    g.add_argument("pdf", metavar="PDF")
    g.add_argument("--key", required=True, metavar="KEY.pem", help="private key (PEM), or a PKCS#12 file (.p12)")
    g.add_argument("--cert", metavar="CERT.pem", help="the signer's certificate (PEM); not needed with PKCS#12")
    g.add_argument("--role", required=True, choices=("prepared", "checked", "approved"))
    g.add_argument("--out", required=True, metavar="SIGNED.pdf")
    g.add_argument("--passphrase-env", metavar="VAR",
                   help="name of an environment variable holding the key's passphrase (never on the command line)")
    d = sub.add_parser("diff", help="compare two revisions of a job: inputs changed, results and checks that moved",
                       description="Compute both revisions and list every input that changed and every result and "
                                   "check that moved, largest relative change first.")
    d.add_argument("old", metavar="OLD.yaml", help="the older revision (or the job file, with --against)")
    d.add_argument("new", metavar="NEW.yaml", nargs="?", help="the newer revision")
    d.add_argument("--against", metavar="REV", help="compare JOB.yaml with itself at a git revision (e.g. HEAD~1)")
    sub.add_parser("schema", help="print the JSON Schema of the job file (for editors)")
    n = sub.add_parser("new", help="write a commented starter job file")
    n.add_argument("--system", choices=("closed", "flow", "vessel", "reciprocating"), default="closed",
                   help="closed (fixed mass), flow (steady flow), vessel (fills and empties over time) or "
                        "reciprocating (a flow job with reciprocating cylinders)")
    n.add_argument("path", metavar="FILE.yaml", nargs="?", help="where to write it (default: print it)")
    n.add_argument("--force", action="store_true", help="overwrite FILE.yaml if it exists")
    st = sub.add_parser("selftest", help="verify this installation: run every shipped reference case and write a "
                                        "verification report",
                       description="Run every reference case that ships inside calcdoc and write "
                                   "OUT/calcdoc-selftest.json and .pdf: each case's source, inputs, expected value "
                                   "with its tolerance, computed value, deviation and result, the installation's "
                                   "versions and a verdict. Exit 0 when all cases pass, 1 otherwise.")
    st.add_argument("--out", "-o", default="out", metavar="DIR", help="output folder (default: ./out)")
    st.add_argument("--no-pdf", action="store_true", help="write the JSON only (no PDF)")
    st.add_argument("--quiet", "-q", action="store_true", help="print nothing but the verdict and failures")
    return p
