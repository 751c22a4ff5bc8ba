"""The hung-chain root finders against scipy.optimize (brentq; MINPACK hybrd through root).

scipy is the reference here: fieldkit only stopped importing it at run time (issue 17: ~0.3 s of a
cold plan). Hangs solved both ways must agree far below the millimetre the plan prints.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq, root

from fieldkit.rigging import catenary, roots
from fieldkit.rigging.catenary import Piece, hang_between, hang_to_height


@pytest.mark.parametrize(
    ("f", "a", "b"),
    [
        (lambda x: x**3 - 2 * x - 5, 2.0, 3.0),  # Wallis's cubic, root 2.0945514815423265 (classic)
        (lambda x: math.cos(x) - x, 0.0, 1.0),
        (lambda x: math.exp(x) - 1e4, 0.0, 20.0),
        (lambda x: math.tanh(40 * (x - 0.7)) + 0.3, 0.0, 3.0),  # steep: bisection must carry it
        (lambda x: math.atan(x - 0.3) * 1e-9, -50.0, 80.0),
        (lambda x: x, 0.0, 1.0),  # root at an end of the bracket
    ],
)
def test_brent_finds_scipys_root(f, a, b):
    xtol = 1e-12
    got = roots.brent(f, a, b, xtol=xtol)
    want = brentq(f, a, b, xtol=xtol)
    assert abs(got - want) <= 2 * (xtol + 4 * np.finfo(float).eps * abs(want))


def test_brent_refuses_a_bracket_without_a_sign_change():
    with pytest.raises(ValueError, match="differ in sign"):
        roots.brent(lambda x: x * x + 1, -1.0, 1.0, xtol=1e-12)


def test_newton_solves_a_small_system_like_minpack():
    def fun(x):  # Broyden-style tridiagonal test function (Moré, Garbow & Hillstrom 1981, #30)
        y = (3 - 2 * x) * x + 1
        y[1:] -= x[:-1]
        y[:-1] -= 2 * x[1:]
        return y

    x0 = -np.ones(3)
    got = roots.newton_system(fun, x0)
    want = root(fun, x0, method="hybr", options={"xtol": 1e-11}).x
    np.testing.assert_allclose(got, want, rtol=1e-9)
    assert np.max(np.abs(fun(got))) < 1e-12


def _dipole_chain(free_m: float) -> tuple[Piece, ...]:
    # rope – 20 m leg – 0.8 N balun – 20 m leg – rope (the demo's wire weight, computed)
    rope, wire = 0.02, 0.0165
    return (
        Piece(free_m, rope, False),
        Piece(20.0, wire, True, load_after_n=0.8),
        Piece(20.0, wire, True),
        Piece(free_m, rope, False),
    )


@pytest.mark.parametrize(("span", "rise", "pull"), [(44.0, 0.0, 60.0), (41.0, 3.5, 40.0), (46.0, -2.0, 90.0)])  # fmt: skip
def test_hang_between_agrees_with_the_minpack_solution(monkeypatch, span, rise, pull):
    shape, free = hang_between(
        _dipole_chain, span_m=span, rise_m=rise, end_tension_n=pull, free_guess=1.0
    )
    # the same hang with MINPACK's hybrid method alone (what fieldkit used before)
    monkeypatch.setattr(catenary, "newton_system", lambda *a, **k: None)
    ref_shape, ref_free = hang_between(
        _dipole_chain, span_m=span, rise_m=rise, end_tension_n=pull, free_guess=1.0
    )
    assert free == pytest.approx(ref_free, abs=1e-9)
    np.testing.assert_allclose(shape.u_m, ref_shape.u_m, atol=1e-8)
    np.testing.assert_allclose(shape.z_m, ref_shape.z_m, atol=1e-8)
    assert shape.horizontal_tension_n == pytest.approx(ref_shape.horizontal_tension_n, rel=1e-9)
    assert shape.u_m[-1] == pytest.approx(span, abs=1e-6)
    assert shape.z_m[-1] == pytest.approx(rise, abs=1e-6)


def test_hang_to_height_agrees_with_scipys_brentq(monkeypatch):
    leg = (Piece(19.0, 0.0165, True), Piece(3.0, 0.02, False))
    shape, reach = hang_to_height(leg, drop_m=6.0, end_tension_n=30.0)
    monkeypatch.setattr(catenary, "brent", lambda f, a, b, xtol, **_: brentq(f, a, b, xtol=xtol))
    ref_shape, ref_reach = hang_to_height(leg, drop_m=6.0, end_tension_n=30.0)
    assert reach == pytest.approx(ref_reach, abs=1e-9)
    assert shape.z_m[-1] == pytest.approx(-6.0, abs=1e-9)
    np.testing.assert_allclose(shape.z_m, ref_shape.z_m, atol=1e-9)
