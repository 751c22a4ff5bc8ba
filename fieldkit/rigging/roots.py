"""Root finders for the hung-chain equations, so that hanging a wire needs no scipy import.

``scipy.optimize`` costs about 0.3 s of CPU to import (measured, issue 17) — more than a cold plan
can spend on all its imports — for two small problems: a bracketed scalar root (the inverted-V leg)
and three equations in three unknowns (a chain between two fixed points). Both are solved here to
the same tolerances; :func:`newton_system` falls back to MINPACK's hybrid method through scipy only
when Newton's method finds nothing from any start, so no hang that solved before is refused now.

References
----------
.. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall 1973, ch. 4
   (the zero finder: bisection, secant and inverse quadratic interpolation).
.. [2] J. E. Dennis, R. B. Schnabel, *Numerical Methods for Unconstrained Optimization and
   Nonlinear Equations*, SIAM 1996, §6.3 (Newton's method with backtracking), §5.4
   (finite-difference Jacobians).
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

EPS = float(np.finfo(float).eps)


def brent(
    f: Callable[[float], float],
    a: float,
    b: float,
    *,
    xtol: float,
    rtol: float = 4 * EPS,
    max_iter: int = 100,
    fa: float | None = None,
    fb: float | None = None,
) -> float:
    """A zero of ``f`` in [a, b], where f(a) and f(b) differ in sign (Brent 1973) [1].

    Converged when the bracket is shorter than 2·(xtol + rtol·|x|)/2 round the best estimate.
    ``fa``, ``fb``: f(a) and f(b) when the caller has them already (not evaluated again).

    Raises
    ------
    ValueError
        When f(a) and f(b) have the same sign, or no convergence in ``max_iter`` steps.
    """
    fa = f(a) if fa is None else fa
    fb = f(b) if fb is None else fb
    if fa == 0:
        return a
    if fb == 0:
        return b
    if (fa > 0) == (fb > 0):
        raise ValueError("f(a) and f(b) must differ in sign")
    c, fc = a, fa
    d = e = b - a
    for _ in range(max_iter):
        if (fb > 0) == (fc > 0):  # keep the root between b and c
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):  # b is the best estimate so far
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 0.5 * (xtol + rtol * abs(b))
        m = 0.5 * (c - b)
        if fb == 0 or abs(m) <= tol:
            return b
        if abs(e) >= tol and abs(fa) > abs(fb):
            s = fb / fa
            if a == c:  # secant
                p, q = 2 * m * s, 1 - s
            else:  # inverse quadratic interpolation
                q, r = fa / fc, fb / fc
                p = s * (2 * m * q * (q - r) - (b - a) * (r - 1))
                q = (q - 1) * (r - 1) * (s - 1)
            if p > 0:
                q = -q
            else:
                p = -p
            if 2 * p < min(3 * m * q - abs(tol * q), abs(e * q)):
                e, d = d, p / q  # the interpolation step is accepted
            else:
                d = e = m  # bisection
        else:
            d = e = m
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, m)
        fb = f(b)
    raise ValueError(f"no convergence in {max_iter} steps")


def newton_system(
    fun: Callable[[np.ndarray], np.ndarray],
    x0: np.ndarray,
    *,
    xtol: float = 1e-11,
    max_iter: int = 60,
) -> np.ndarray | None:
    """A root of a small system fun(x) = 0 by Newton's method with backtracking [2], or None.

    The Jacobian is taken by forward differences; a step is halved until it lowers |fun|.
    Converged when the Newton step is below xtol·(|x| + xtol).
    """
    x = np.asarray(x0, dtype=float)
    fx = fun(x)
    norm = _norm(fx)
    n = len(x)
    for _ in range(max_iter):
        jac = np.empty((n, n))
        for j in range(n):
            h = math.sqrt(EPS) * max(abs(x[j]), 1.0)
            xh = x.copy()
            xh[j] += h
            jac[:, j] = (fun(xh) - fx) / (xh[j] - x[j])
        try:
            step = np.linalg.solve(jac, -fx)
        except np.linalg.LinAlgError:
            return None
        if not np.all(np.isfinite(step)):
            return None
        if _norm(step) <= xtol * (_norm(x) + xtol):
            return x + step
        t = 1.0
        while True:
            trial = x + t * step
            f_trial = fun(trial)
            n_trial = _norm(f_trial)
            if n_trial < norm:
                break
            t *= 0.5
            if t < 1e-6:
                return None
        x, fx, norm = trial, f_trial, n_trial
    return None


def _norm(v: np.ndarray) -> float:
    # math.hypot scales internally: a probe at an absurd tension gives 1e200 residuals, whose
    # squares overflow a dot product (found by the catenary property test)
    return math.hypot(*(float(c) for c in v))


def hybrid_system(fun, x0: np.ndarray, *, xtol: float = 1e-11) -> np.ndarray | None:
    """MINPACK's hybrid method through scipy (imported only here), or None."""
    from scipy.optimize import root

    sol = root(fun, x0, method="hybr", options={"xtol": xtol})
    return sol.x if sol.success else None
