"""Hung cables: chains of catenary pieces with point loads, for wires and ropes between supports.

A hung dipole is a chain: rope – wire leg – feedpoint (balun + hanging coax, a point load) – wire leg –
rope. Every piece is an elastic-free catenary with its own weight per length; all pieces share one
horizontal tension H; the vertical tension component grows by the weight of each piece and jumps by
each point load. This module integrates that chain in closed form and solves it for the end points and
the tension the operator applies.

References
----------
.. [1] H. M. Irvine, *Cable Structures*, MIT Press 1981, ch. 1 (the inextensible catenary and the
   cable with concentrated loads).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from fieldkit.rigging.roots import brent, hybrid_system, newton_system


@dataclass(frozen=True)
class Piece:
    """One uniform stretch of a hung chain.

    Parameters
    ----------
    length_m : arc length [m]
    weight_n_per_m : weight per unit length [N/m]
    conducting : True for antenna wire, False for rope
    load_after_n : point load hung at the far end of this piece [N]
    """

    length_m: float
    weight_n_per_m: float
    conducting: bool
    load_after_n: float = 0.0


@dataclass(frozen=True)
class ChainShape:
    """A solved hung chain in its vertical plane (u horizontal from the first end, z up).

    Attributes
    ----------
    u_m, z_m : sampled points along the chain [m]
    piece_bounds : (first, last) sample index of each piece; a piece's first sample is the previous
        piece's last
    horizontal_tension_n : H [N]
    end_tensions_n : tension at the first and last end [N]
    end_vertical_n : upward pull each end support must supply (vertical component) [N]
    """

    u_m: np.ndarray
    z_m: np.ndarray
    piece_bounds: tuple[tuple[int, int], ...]
    horizontal_tension_n: float
    end_tensions_n: tuple[float, float]
    end_vertical_n: tuple[float, float]


def _piece_xz(h: float, w: float, v0: float, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Horizontal and vertical offset along one catenary piece (Irvine ch. 1, eq. 1.5).

    ``v0`` is the vertical tension component at the start (H times the slope dz/du); it grows by
    ``w`` per metre of arc.
    """
    v = v0 + w * s
    if w * float(np.max(s, initial=0.0)) < 1e-9 * h:  # weightless: straight line
        ds = s / np.hypot(1.0, v0 / h)
        return ds, ds * v0 / h
    u = (h / w) * (np.arcsinh(v / h) - np.arcsinh(v0 / h))
    z = (h / w) * (np.hypot(1.0, v / h) - np.hypot(1.0, v0 / h))
    return u, z


def integrate_chain(
    pieces: tuple[Piece, ...],
    *,
    horizontal_tension_n: float,
    start_vertical_n: float,
    samples_per_piece: int = 8,
) -> ChainShape:
    """Shape of a chain from its first end, given H and the vertical component there.

    Parameters
    ----------
    pieces : the chain from the first end [-]
    horizontal_tension_n : H, common to all pieces [N]
    start_vertical_n : vertical tension component at the first end, H·dz/du (negative when the
        chain leaves that end downward) [N]
    samples_per_piece : points per piece (excluding its start) [-]

    Returns
    -------
    ChainShape
    """
    h = horizontal_tension_n
    v = start_vertical_n
    us, zs, bounds = [np.zeros(1)], [np.zeros(1)], []
    u0 = z0 = 0.0
    count = 0
    for p in pieces:
        n = samples_per_piece if p.length_m > 0 else 0
        if n:
            s = np.linspace(0.0, p.length_m, n + 1)[1:]
            du, dz = _piece_xz(h, p.weight_n_per_m, v, s)
            us.append(u0 + du)
            zs.append(z0 + dz)
            u0, z0 = float(u0 + du[-1]), float(z0 + dz[-1])
        bounds.append((count, count + n))
        count += n
        v += p.weight_n_per_m * p.length_m + p.load_after_n
    v_end = v - pieces[-1].load_after_n
    t0 = float(np.hypot(h, start_vertical_n))
    t1 = float(np.hypot(h, v_end))
    return ChainShape(
        u_m=np.concatenate(us),
        z_m=np.concatenate(zs),
        piece_bounds=tuple(bounds),
        horizontal_tension_n=h,
        end_tensions_n=(t0, t1),
        end_vertical_n=(-start_vertical_n, v_end),
    )


def _piece_end(h: float, w: float, v0: float, s: float) -> tuple[float, float]:
    """:func:`_piece_xz` at the far end of a piece only, in scalar arithmetic (the solvers' inner loop)."""
    if w * max(s, 0.0) < 1e-9 * h:
        ds = s / math.hypot(1.0, v0 / h)
        return ds, ds * v0 / h
    v = v0 + w * s
    return (
        (h / w) * (math.asinh(v / h) - math.asinh(v0 / h)),
        (h / w) * (math.hypot(1.0, v / h) - math.hypot(1.0, v0 / h)),
    )


def _end_point(pieces: tuple[Piece, ...], h: float, v0: float) -> tuple[float, float, float]:
    """(u, z, vertical component) at the last end, without sampling."""
    u = z = 0.0
    h, v = float(h), float(v0)
    for p in pieces:
        if p.length_m > 0:
            du, dz = _piece_end(h, p.weight_n_per_m, v, p.length_m)
            u += du
            z += dz
        v += p.weight_n_per_m * p.length_m + p.load_after_n
    return u, z, v - pieces[-1].load_after_n


def catenary_sag_m(*, span_m: float, weight_n_per_m: float, horizontal_tension_n: float) -> float:
    """Mid-span sag of a level catenary, s = a[cosh(L/2a) − 1], a = H/w (Irvine ch. 1) [m]."""
    a = horizontal_tension_n / weight_n_per_m
    return a * (np.cosh(span_m / (2 * a)) - 1.0)


def point_load_sag_m(
    *, span_m: float, weight_n_per_m: float, horizontal_tension_n: float, load_n: float
) -> float:
    """Mid-span sag of a level catenary carrying a point load P at mid-span [m].

    s = a[cosh(L/2a + asinh(P/2H)) − √(1 + (P/2H)²)], from statics of two catenary halves meeting
    at the load (Irvine ch. 1, concentrated loads).
    """
    a = horizontal_tension_n / weight_n_per_m
    q = load_n / (2 * horizontal_tension_n)
    return a * (np.cosh(span_m / (2 * a) + np.arcsinh(q)) - np.hypot(1.0, q))


# Below this |log(H/T)| the residual runs in plain floats (np.exp cannot overflow or reach 0 there,
# so no step divides by zero and float arithmetic gives numpy's very bits); beyond it, numpy's.
_EXP_SAFE = 700.0


class HangError(ValueError):
    """The chain cannot hang between the given points at the given tension."""


def hang_between(
    pieces_of: Callable[[float], tuple[Piece, ...]],
    *,
    span_m: float,
    rise_m: float,
    end_tension_n: float,
    free_guess: float,
) -> tuple[ChainShape, float]:
    """Hang a chain between two fixed points with the larger end tension equal to the applied pull.

    The chain has one free length (``pieces_of(free)`` builds it), e.g. the rope paid out at each
    end, or for a short span the wire length between the supports. Three unknowns — H, the
    vertical component at the first end and the free length — meet three conditions: the chain
    ends ``span_m`` along and ``rise_m`` up from its start, and the larger end tension equals
    ``end_tension_n``.

    Returns
    -------
    (ChainShape, free length)

    Raises
    ------
    HangError
        When no such hang exists (the chain cannot reach, or the pull cannot carry it).
    """
    t = end_tension_n

    def probe(x: np.ndarray) -> np.ndarray:
        with np.errstate(all="ignore"):  # the solver may probe absurd tensions on the way
            h, v0, free = t * np.exp(x[0]), t * x[1], span_m * x[2]
            try:
                u, z, v1 = _end_point(pieces_of(free), h, v0)
            except (ZeroDivisionError, OverflowError, ValueError):
                return np.full(3, 1e6)
            tmax = max(math.hypot(h, v0), math.hypot(h, v1))
            out = np.array([(u - span_m) / span_m, (z - rise_m) / span_m, tmax / t - 1.0])
        return np.where(np.isfinite(out), out, 1e6)

    def residual(x: np.ndarray) -> np.ndarray:
        x0, x1, x2 = float(x[0]), float(x[1]), float(x[2])
        if not (abs(x0) < _EXP_SAFE and math.isfinite(x1) and math.isfinite(x2)):
            return probe(x)  # far out: numpy's overflow and division rules, warnings silenced
        h, v0, free = t * float(np.exp(x0)), t * x1, span_m * x2
        try:
            u, z, v1 = _end_point(pieces_of(free), h, v0)
        except (ZeroDivisionError, OverflowError, ValueError):
            return np.full(3, 1e6)
        tmax = max(math.hypot(h, v0), math.hypot(h, v1))
        out = ((u - span_m) / span_m, (z - rise_m) / span_m, tmax / t - 1.0)
        return np.array([c if math.isfinite(c) else 1e6 for c in out])

    starts = [
        np.array([np.log(guess_h), -0.15 + 0.5 * rise_m / max(span_m, 1e-9), free_guess / span_m])
        for guess_h in (0.97, 0.8, 0.5)
    ]
    best = None
    # Newton first (no scipy import); MINPACK's hybrid method only if Newton finds nothing
    for solver in (newton_system, hybrid_system):
        for x0 in starts:
            x = solver(residual, x0, xtol=1e-11)
            if x is not None and np.max(np.abs(residual(x))) < 1e-8:
                best = x
                break
        if best is not None:
            break
    if best is None:
        raise HangError("no hang found at this tension")
    h, v0, free = t * np.exp(best[0]), t * best[1], span_m * best[2]
    return integrate_chain(pieces_of(free), horizontal_tension_n=h, start_vertical_n=v0), free


def hang_to_height(
    pieces: tuple[Piece, ...], *, drop_m: float, end_tension_n: float
) -> tuple[ChainShape, float]:
    """Hang a chain from a fixed first end down to a given height, its far end free to move along.

    Used for an inverted-V leg from the apex: the end insulator ends ``drop_m`` below the apex with
    the end tension ``end_tension_n``; the horizontal reach follows.

    Returns
    -------
    (ChainShape, horizontal reach [m])
    """
    t = end_tension_n
    length = sum(p.length_m for p in pieces)
    if drop_m >= length:
        raise HangError("the leg is too short to reach that low")

    # the far end carries the chain's weight less its own load (the same sum, once)
    weight = sum(p.weight_n_per_m * p.length_m + p.load_after_n for p in pieces)
    weight -= pieces[-1].load_after_n

    def z_end(h: float) -> tuple[float, float]:
        # for a given H the far-end tension fixes its vertical component; integrate backwards.
        # The leg descends toward the end: slope negative there. (math.sqrt and np.sqrt both
        # round correctly, IEEE 754: the same bits.)
        v1 = -math.sqrt(max(t * t - h * h, 0.0))
        v0 = v1 - weight
        u, z, _ = _end_point(pieces, h, v0)
        return z, v0

    def f(h: float) -> float:
        return z_end(h)[0] + drop_m

    lo, hi = t * 1e-4, t * (1 - 1e-12)
    f_lo, f_hi = f(lo), f(hi)
    if f_lo * f_hi > 0:
        raise HangError("the pull cannot hold the leg at that angle")
    h = brent(f, lo, hi, xtol=1e-12 * t, fa=f_lo, fb=f_hi)
    v0 = np.float64(z_end(h)[1])  # numpy's type, as np.sqrt gave it
    shape = integrate_chain(pieces, horizontal_tension_n=h, start_vertical_n=v0)
    return shape, float(shape.u_m[-1])
