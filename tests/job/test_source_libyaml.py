"""The bounds on a job file's nesting and alias expansion are looked at with libyaml where PyYAML has it
(the pure-Python scanner costs ~10 ms of every ``calcdoc check``); a file libyaml refuses, or finds out of
bounds, is looked at again in Python, so that the place and the words of every message are the ones the
pure-Python reader gives."""
from __future__ import annotations

from pathlib import Path

import pytest
import yaml

from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.job.source import _check_depth, _check_expansion, _loader

BAD = Path(__file__).parent / "bad_jobs"
EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "example_jobs").glob("*.yaml"))


def _refusal(check, text: str, fast: bool) -> tuple | None:
    try:
        check(text, "job.yaml", fast=fast)
    except JobError as exc:
        return tuple((p.line, p.column, p.found) for p in exc.problems)
    return None


def test_libyaml_is_the_fast_loader_where_pyyaml_has_it():
    assert _loader(True) is (yaml.CSafeLoader if yaml.__with_libyaml__ else yaml.SafeLoader)
    assert _loader(False) is yaml.SafeLoader


@pytest.mark.parametrize("text", [
    (BAD / "alias_bomb.yaml").read_text(encoding="utf-8"),
    "calcdoc: 1\nassumptions: " + "[" * 60 + "]" * 60 + "\n",
    "calcdoc: 1\n" + "".join("  " * k + f"k{k}:\n" for k in range(45)) + "  " * 45 + "v: 1\n",
])
def test_both_scanners_refuse_a_hostile_file_at_the_same_place(text):
    for check in (_check_depth, _check_expansion):
        assert _refusal(check, text, fast=True) == _refusal(check, text, fast=False)
    assert _refusal(_check_depth, text, False) or _refusal(_check_expansion, text, False)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_both_scanners_pass_every_example(path):
    text = path.read_text(encoding="utf-8")
    for check in (_check_depth, _check_expansion):
        assert _refusal(check, text, fast=True) is None and _refusal(check, text, fast=False) is None


def test_a_syntax_error_is_worded_by_the_python_reader(monkeypatch):
    text = "calcdoc: 1\ncalc: {number: X, title: [unclosed\n"
    with pytest.raises(JobError) as exc:
        loads(text, "job.yaml")
    (p,) = exc.value.problems
    python_words = None
    try:
        yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as e:
        python_words = e.problem
    assert python_words and python_words in p.found
