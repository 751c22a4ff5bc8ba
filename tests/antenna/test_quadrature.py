"""Gauss–Legendre rule of the engine against numpy's reference routine and exactness by degree."""

import math

import numpy as np
import pytest

from fieldkit.antenna.kernel import gauss01


@pytest.mark.parametrize("n", [1, 2, 4, 5, 8, 12, 24, 48, 96])
def test_gauss01_matches_numpy_leggauss(n):
    # reference library: numpy.polynomial.legendre.leggauss (Golub–Welsch + Newton), mapped to [0, 1]
    x_ref, w_ref = np.polynomial.legendre.leggauss(n)
    x, w = gauss01(n)
    assert np.allclose(x, 0.5 * (x_ref + 1), rtol=0, atol=1e-14)
    assert np.allclose(w, 0.5 * w_ref, rtol=0, atol=1e-14)


@pytest.mark.parametrize("n", [1, 3, 7, 16])
def test_gauss01_is_exact_to_degree_2n_minus_1(n):
    # Abramowitz & Stegun 25.4.29: an n-point Gauss rule integrates x^k exactly for k ≤ 2n − 1
    x, w = gauss01(n)
    for k in range(2 * n):
        assert math.isclose(float(w @ x**k), 1 / (k + 1), rel_tol=1e-13)
    if n <= 5:  # and not for x^2n (its error falls below rounding for large n)
        assert not math.isclose(float(w @ x ** (2 * n)), 1 / (2 * n + 1), rel_tol=1e-9)
