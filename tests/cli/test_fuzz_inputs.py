"""The fast profile of the input fuzzer (tests/fuzz/jobfuzz.py): 500 mutated job files through check (every
25th also through run), crafted PDFs through verify and odd paths through diff and check. The bar: exit
0, 1 or 2 only, no traceback, no internal error, no input over the 20 s cap. The long profile (10 000
mutants) is one command in tests/fuzz/README.md."""
from __future__ import annotations

from fuzz import jobfuzz


def test_fast_fuzz_profile_meets_the_bar():
    res = jobfuzz.run(500, seed=2026, cap=20.0, run_every=25)
    counts = res["counts"]
    assert counts["mutants"] >= 500
    assert counts["pdfs"] >= 30 and counts["paths"] >= 40
    assert counts["timeouts"] == 0
    assert not res["failures"], "\n".join(res["failures"][:10])
    # the mutants reach every answer, not only one: refused input (2) and valid input (0) both occur
    assert counts.get("check exit 2", 0) > 100 and counts.get("check exit 0", 0) > 0


def test_mutants_are_reproducible_from_their_seed():
    assert list(jobfuzz.mutants(20, 5)) == list(jobfuzz.mutants(20, 5))
    assert list(jobfuzz.mutants(20, 5)) != list(jobfuzz.mutants(20, 6))
