"""The examples in the package's documentation run and print what they say."""

from __future__ import annotations

import doctest

import kernstep


def test_the_package_docstring_example_runs():
    # reference: the worked example of src/lib.rs (optimum 44 at x = (5, 2, 0, 4))
    outcome = doctest.testmod(kernstep, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert outcome.attempted >= 4 and outcome.failed == 0
