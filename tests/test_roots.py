"""Tests of models.roots.bracketed_root against scipy's scalar root finder and closed forms.

Reference: scipy.optimize.brentq (Brent 1973), run per element with xtol=1e-300, rtol=1e-15
(its root is good to about 1e-15 relative, far inside the tolerances asked of our solver).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from models.roots import bracketed_root


def _brentq(f, a: float, b: float) -> float:
    return brentq(lambda x: float(f(np.float64(x))), a, b, xtol=1e-300, rtol=1e-15, maxiter=500)


# Standard smooth test equations. The functions are textbook classics (Wallis's cubic,
# Kepler's equation, the Dottie number); the root values are not quoted from anywhere: the
# reference for each is scipy.optimize.brentq on the same function.
SMOOTH = {
    "Wallis cubic x^3-2x-5": (lambda x: x**3 - 2 * x - 5, 2.0, 3.0),
    "cos x - x": (lambda x: np.cos(x) - x, 0.0, 1.0),
    "sin x - x/2": (lambda x: np.sin(x) - x / 2, np.pi / 2, np.pi),
    "exp x - 2": (lambda x: np.exp(x) - 2, 0.0, 2.0),
    "Kepler E - 0.9 sin E - 0.5": (lambda x: x - 0.9 * np.sin(x) - 0.5, 0.0, np.pi),
    "x^20 - 1": (lambda x: x**20 - 1, 0.0, 5.0),
    "exp(-5x)(x-1) + x^5": (lambda x: np.exp(-5 * x) * (x - 1) + x**5, 0.0, 1.0),
    "x exp(-x) - 0.1": (lambda x: x * np.exp(-x) - 0.1, 0.0, 1.0),
    "log x": (lambda x: np.log(x), 0.5, 5.0),
    "1/x - 3": (lambda x: 1 / x - 3, 0.1, 1.0),
    "tanh(50(x-0.3))": (lambda x: np.tanh(50 * (x - 0.3)), 0.0, 1.0),
    "sqrt x - 1e-3": (lambda x: np.sqrt(x) - 1e-3, 0.0, 1.0),
}


METHODS = ["chandrupatla", "anderson-bjorck"]


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("name", list(SMOOTH))
def test_smooth_functions_match_brentq(name, method, check):
    f, a, b = SMOOTH[name]
    expected = _brentq(f, a, b)
    for lo, hi in ((a, b), (b, a)):  # either order of the bracket
        r = bracketed_root(f, lo, hi, xtol=0.0, rtol=1e-10, method=method)
        assert bool(r.converged)
        # Tolerance: the solver guarantees |x - x*| <= 1e-10 |x|; brentq adds ~1e-15.
        check(
            f"root of {name} ({method})",
            float(r.root),
            expected,
            "scipy.optimize.brentq",
            rtol=1.01e-10,
        )
        # Efficiency on these smooth functions (brentq needs 6-17 calls on the same list).
        assert int(r.iterations) <= 20


def test_closed_form_roots(check):
    # ln 2 and sqrt 2: closed form, exact to double precision.
    r = bracketed_root(lambda x: np.exp(x) - 2, 0.0, 2.0, rtol=1e-12)
    check("root of exp x = 2", float(r.root), math.log(2), "closed form ln 2", rtol=1e-12)
    r = bracketed_root(lambda x: x * x - 2, 0.0, 2.0, rtol=1e-12)
    check("root of x^2 = 2", float(r.root), math.sqrt(2), "closed form sqrt 2", rtol=1e-12)


@pytest.mark.parametrize("method, most_calls", [("chandrupatla", 12), ("anderson-bjorck", 16)])
def test_vectorized_cube_roots_converge_fast(method, most_calls, check):
    # Each element its own equation x^3 = c; closed form x = c^(1/3). The bracket [0, 10] is
    # up to 20 times wider than the root: a hard case for secant-type steps.
    c = np.geomspace(0.1, 100.0, 1000)
    r = bracketed_root(lambda x: x**3 - c, 0.0, 10.0, xtol=0.0, rtol=1e-9, method=method)
    assert r.converged.all()
    check(f"x^3 = c, 1000 elements ({method})", r.root, np.cbrt(c), "closed form c^(1/3)",
          rtol=1e-9)
    # Target: 1e-9 relative within about 6-12 calls (measured: 12 and 16 at most).
    assert r.iterations.max() <= most_calls, np.bincount(r.iterations)


@pytest.mark.parametrize("method", METHODS)
def test_elements_are_independent(method):
    c = np.array([2.0, 5.0, 30.0, 0.7])
    together = bracketed_root(lambda x: x**3 - c, 0.0, 4.0, method=method)
    for i, ci in enumerate(c):
        alone = bracketed_root(lambda x, ci=ci: x**3 - ci, 0.0, 4.0, method=method)
        assert float(alone.root) == together.root[i]  # bit for bit
        assert int(alone.iterations) == together.iterations[i]


def test_same_sign_bracket_is_flagged_not_raised():
    c = np.array([8.0, -1.0, 27.0])  # x^3 - (-1) > 0 on [0, 4]: no sign change
    r = bracketed_root(lambda x: x**3 - c, 0.0, 4.0)
    assert r.converged.tolist() == [True, False, True]
    assert np.isnan(r.root[1])
    assert r.iterations[1] == 0
    np.testing.assert_allclose(r.root[[0, 2]], [2.0, 3.0], rtol=1e-9)  # closed form


def test_nan_in_f_and_bad_brackets_are_flagged():
    # f NaN beyond x = 0.5 while the root is at 0.7: the search meets NaN and stops, flagged.
    r = bracketed_root(lambda x: np.where(x > 0.5, np.nan, x - 0.7), 0.0, 1.0)
    assert not r.converged and np.isnan(r.root)
    # f NaN only inside the bracket (for 0.2 < x < 0.6; the first trial point, the secant
    # point 0.3, falls there): flagged, not converged, whatever the method.
    for method in METHODS:
        r = bracketed_root(
            lambda x: np.where((x > 0.2) & (x < 0.6), np.nan, x - 0.3), 0.0, 1.0, method=method
        )
        assert not r.converged and np.isnan(r.root) and int(r.iterations) == 1
    r = bracketed_root(lambda x: x - 0.5, np.array([np.nan, 0.0, -np.inf]), 1.0)
    assert r.converged.tolist() == [False, True, False]
    assert r.root[1] == pytest.approx(0.5, rel=1e-9)


def test_maxiter_exhausted_is_flagged():
    r = bracketed_root(lambda x: np.exp(x) - 2, 0.0, 2.0, rtol=1e-15, maxiter=2)
    assert not r.converged and np.isnan(r.root) and int(r.iterations) == 2


def test_call_count_and_known_ends():
    calls = []

    def f(x):
        calls.append(np.shape(x))
        return np.exp(x) - 2

    r = bracketed_root(f, 0.0, 2.0)
    assert len(calls) == 2 + int(r.iterations)
    calls.clear()
    r = bracketed_root(f, 0.0, 2.0, f_lo=-1.0, f_hi=math.exp(2) - 2)
    assert len(calls) == int(r.iterations)


def test_good_first_guess_saves_calls(check):
    c = np.geomspace(1e-2, 1e2, 200)
    cold = bracketed_root(lambda x: x**3 - c, 0.0, 10.0)
    warm = bracketed_root(lambda x: x**3 - c, 0.0, 10.0, x_first=np.cbrt(c) * 1.01)
    check("x^3 = c from a 1 % guess", warm.root, np.cbrt(c), "closed form c^(1/3)", rtol=1e-9)
    assert warm.iterations.max() < cold.iterations.max()


def test_discontinuous_sign_change_is_located():
    # A jump at x = 1/3 (not a root in the smooth sense): the bracket closes on the jump.
    r = bracketed_root(lambda x: np.where(x < 1 / 3, -1.0, 1.0), 0.0, 1.0, xtol=1e-12, rtol=0.0)
    assert r.converged and abs(float(r.root) - 1 / 3) <= 1e-12


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("power", [3, 9])
def test_multiple_root_converges_by_bisection_safeguard(power, method, check):
    # (x - 1)^p: a root of multiplicity p at x = 1 (closed form), where plain regula falsi
    # crawls; the bisection steps must still bring it home within the default maxiter.
    r = bracketed_root(lambda x: (x - 1.0) ** power, 0.0, 3.0, rtol=1e-10, method=method)
    assert r.converged
    check(f"root of (x-1)^{power} ({method})", float(r.root), 1.0, "closed form x = 1",
          rtol=1.01e-10)


def test_unknown_method_is_rejected():
    with pytest.raises(ValueError, match="method = 'newton'; expected"):
        bracketed_root(lambda x: x, -1.0, 1.0, method="newton")


def test_root_at_zero_needs_xtol():
    r = bracketed_root(lambda x: x**3, -1.0, 2.0, xtol=0.0, rtol=1e-9)
    assert not r.converged  # documented: a relative tolerance alone cannot close on 0
    r = bracketed_root(lambda x: x**3, -1.0, 2.0, xtol=1e-12, rtol=1e-9)
    assert r.converged and abs(float(r.root)) <= 1e-12


def test_inputs_not_mutated_and_shape_kept():
    lo = np.zeros((3, 4))
    hi = np.full((3, 4), 4.0)
    c = np.arange(1.0, 13.0).reshape(3, 4)
    lo0, hi0 = lo.copy(), hi.copy()
    r = bracketed_root(lambda x: x * x - c, lo, hi)
    assert r.root.shape == r.converged.shape == r.iterations.shape == (3, 4)
    np.testing.assert_array_equal(lo, lo0)
    np.testing.assert_array_equal(hi, hi0)
    np.testing.assert_allclose(r.root, np.sqrt(c), rtol=1e-9)  # closed form


@settings(max_examples=40, deadline=None)
@given(
    a=st.floats(0.1, 50.0),
    b=st.floats(-3.0, 3.0),
    p=st.floats(1.0, 3.0),
    method=st.sampled_from(METHODS),
)
def test_random_convex_functions_match_brentq(a, b, p, method):
    # f(x) = a x^p + b x - 1 is convex (a > 0, p >= 1) with f(0) = -1 < 0, so with
    # f(4) > 0 it has exactly one root in [0, 4] and both solvers must find it; with
    # f(4) < 0 there is no sign change and the element must be flagged.
    # Reference: scipy.optimize.brentq.
    def f(x):
        return a * x**p + b * x - 1.0

    lo, hi = 0.0, 4.0
    r = bracketed_root(f, lo, hi, rtol=1e-10, method=method)
    if np.sign(f(lo)) * np.sign(f(hi)) > 0:
        assert not r.converged
        return
    assert r.converged
    expected = _brentq(f, lo, hi)
    assert abs(float(r.root) - expected) <= 1.01e-10 * abs(expected)
