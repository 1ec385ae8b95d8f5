"""The examples in the docstrings of the physics and units modules run as written (doctest)."""
from __future__ import annotations

import doctest

import pytest

import calcdoc.physics.closed
import calcdoc.physics.gas
import calcdoc.physics.staging
import calcdoc.units

MODULES = [calcdoc.physics.closed, calcdoc.physics.staging, calcdoc.physics.gas, calcdoc.units]


@pytest.mark.parametrize("module", MODULES, ids=[m.__name__ for m in MODULES])
def test_docstring_examples(module):
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS)
    assert result.failed == 0
    if module is not calcdoc.physics.gas:
        assert result.attempted >= 1, "the module's published example runs"
