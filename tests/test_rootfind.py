"""Our Brent's method against scipy.optimize.brentq (the reference implementation
of the same published algorithm), and the outward bracket scan."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from balance.rootfind import NoBracket, brent, scan_root

FUNCTIONS = [
    (lambda x: x**3 - 2 * x - 5, 2.0, 3.0),
    (lambda x: math.cos(x) - x, 0.0, 1.0),
    (lambda x: math.exp(x) - 10.0, 0.0, 5.0),
    (lambda x: (x - 1.0) * (x + 2.0) * (x + 3.0), 0.0, 3.0),
    (lambda x: math.atan(x - 0.3), -5.0, 40.0),
    (lambda x: x * math.exp(-x) - 0.1, 0.0, 1.0),
]


@pytest.mark.parametrize("f, a, b", FUNCTIONS)
def test_brent_matches_scipy(f, a, b):
    # scipy.optimize.brentq is the outside reference for Brent's method.
    assert brent(f, a, b) == pytest.approx(brentq(f, a, b, xtol=1e-14), abs=1e-12)


@settings(max_examples=200, deadline=None)
@given(st.floats(-50, 50), st.floats(0.1, 20), st.floats(0.5, 2.0))
def test_brent_on_shifted_powers(root, width, power):
    f = lambda x: math.copysign(abs(x - root) ** power, x - root)  # noqa: E731
    x = brent(f, root - width, root + 0.7 * width)
    assert x == pytest.approx(root, abs=1e-9 * max(1.0, abs(root)))


def test_brent_refuses_no_bracket():
    with pytest.raises(NoBracket):
        brent(lambda x: x * x + 1.0, -1.0, 1.0)


def test_scan_finds_the_root_nearest_the_start():
    f = lambda x: math.sin(x)  # noqa: E731 - roots at k pi
    grid = np.linspace(0.5, 20.0, 400)
    root, jumps, _ = scan_root(f, grid, start=9.0)
    assert root == pytest.approx(3 * math.pi, abs=1e-12)
    assert jumps == 0


def test_scan_reports_a_jump_not_a_root():
    # A step function changes sign without a zero: a jump (like a two-phase gap), never a root.
    f = lambda x: -1.0 if x < 3.3 else 1.0  # noqa: E731
    root, jumps, _ = scan_root(f, np.linspace(0, 10, 50), start=1.0)
    assert root is None and jumps == 1


def test_scan_skips_points_that_raise():
    def f(x):
        if 4 < x < 6:
            raise ValueError("no state here")
        return x - 8.0

    root, jumps, skipped = scan_root(f, np.linspace(0, 10, 101), start=1.0)
    assert root == pytest.approx(8.0)
    assert skipped and all(isinstance(exc, ValueError) for exc in skipped)
