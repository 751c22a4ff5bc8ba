"""Matrix fill of the thin-wire mixed-potential electric-field integral equation (free space, image).

Formulation: mixed-potential EFIE for thin wires, triangle (rooftop) current basis functions with
Galerkin testing, reduced kernel R = sqrt(|r − r'|² + a²). The element for test function f_m and
source function f_n is

    Z_mn = jωμ0 ∫∫ f_m·f_n G dl dl' + (1/jωε0) ∫∫ (df_m/dl)(df_n/dl') G dl dl',  G = e^{−jkR}/(4πR),

evaluated per pair of straight segments. The 1/R part of G is integrated over the source segment in
closed form and the smooth remainder (e^{−jkR} − 1)/R by Gauss–Legendre quadrature; the outer
(testing) integral uses Gauss–Legendre points. Perfect ground adds the mirror image with the sign
that reverses horizontal and keeps vertical currents.

References
----------
.. [1] D. R. Wilton, C. M. Butler, "Efficient numerical techniques for solving Pocklington's equation
   and their relationships to other methods", IEEE Trans. AP-24(1), 1976, pp. 83-86,
   doi:10.1109/TAP.1976.1141282 (mixed-potential thin-wire formulation, triangle basis).
.. [2] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan 1968, ch. 4 (Galerkin
   thin-wire solution, potential integrals).
.. [3] C. A. Balanis, *Antenna Theory*, 4th ed., Wiley 2016, §4.7 (image theory over a conductor).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from functools import lru_cache

import numpy as np

from fieldkit.constants import EPS0, MU0

from . import native
from .mesh import Mesh

N_TEST = 5  # Gauss points on the testing segment
N_SOURCE = 4  # Gauss points for the smooth part on the source segment


@lru_cache(maxsize=16)
def gauss01(n: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss–Legendre nodes and weights on [0, 1] (cached; treat as read-only).

    Roots of the Legendre polynomial P_n by Newton's method from Tricomi's first guess
    cos(π(i − 1/4)/(n + 1/2)), P_n and P_n′ by the three-term recurrence, weights
    2/((1 − x²) P_n′(x)²) (Abramowitz & Stegun 25.4.29; Press et al., *Numerical Recipes* 3rd ed.
    §4.6). Written out here so that the engine does not import ``numpy.polynomial`` (a few ms of
    every command's start-up); it matches ``numpy.polynomial.legendre.leggauss`` to 1e-15.
    """
    x = np.cos(math.pi * (np.arange(1, n + 1) - 0.25) / (n + 0.5))
    for _ in range(100):
        p, dp = _legendre(n, x)
        step = p / dp
        x = x - step
        if np.max(np.abs(step)) < 1e-15:
            break
    _, dp = _legendre(n, x)
    w = 2 / ((1 - x * x) * dp * dp)
    x, w = x[::-1], w[::-1]  # ascending
    return 0.5 * (x + 1), 0.5 * w


def _legendre(n: int, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """P_n(x) and P_n′(x) by the recurrence j P_j = (2j − 1) x P_{j−1} − (j − 1) P_{j−2}."""
    p0, p1 = np.ones_like(x), x
    for j in range(2, n + 1):
        p0, p1 = p1, ((2 * j - 1) * x * p1 - (j - 1) * p0) / j
    return p1, n * (x * p1 - p0) / (x * x - 1)


def basis_weights(mesh: Mesh, u: np.ndarray, w: np.ndarray) -> np.ndarray:
    """Map from basis coefficients to current × weight at every Gauss point, (N·Q, M).

    Row (s, q) holds Σ over the halves on segment s of sign · Λ(u_q) · w_q · Δ_s, so that
    Cᵀ T C is the Galerkin matrix of a point-to-point coupling T.
    """
    n, q, m = mesh.n_segments, len(u), mesh.n_basis
    shape_vals = np.where(mesh.half_shape[:, None] == 0, u[None, :], 1 - u[None, :])  # (H, Q)
    vals = shape_vals * (mesh.half_sign * mesh.length[mesh.half_seg])[:, None] * w[None, :]
    c = np.zeros((n, q, m))
    np.add.at(c, (mesh.half_seg, slice(None), np.arange(len(mesh.half_seg)) // 2), vals)
    return c.reshape(n * q, m)


def potential_integrals(
    obs: np.ndarray,
    src_start: np.ndarray,
    src_t: np.ndarray,
    src_len: np.ndarray,
    src_radius: np.ndarray,
    k: float,
) -> tuple[np.ndarray, np.ndarray]:
    """Integrals of G over each source segment, seen from each observation point.

    Returns ``(J0, J1)`` of shape (n_obs, n_src): J0 = ∫ G dl', J1 = ∫ (l'/Δ) G dl' with
    G = e^{−jkR}/(4πR), R = sqrt(|r − r'|² + a²).
    """
    i0, i1, r = _source_geometry(obs, src_start, src_t, src_len, src_radius)
    u, w = gauss01(N_SOURCE)
    s0, s1 = _smooth_sums(k, r, w[None, :] * src_len[:, None], u)
    return (i0 + s0) / (4 * math.pi), (i1 + s1) / (4 * math.pi)


def _smooth_sums(k: float, r: np.ndarray, wl: np.ndarray, u: np.ndarray):
    """Σ_q (e^{−jkr} − 1)/r · wl and the same · u_q over the source Gauss points, (P, S) each.

    The compiled kernel (:mod:`fieldkit.antenna.native`) when it is built, else
    :func:`_smooth_sums_numpy`.
    """
    out = native.smooth_potentials(k, r, wl, u)
    return _smooth_sums_numpy(k, r, wl, u) if out is None else out


def _smooth_sums_numpy(k: float, r: np.ndarray, wl: np.ndarray, u: np.ndarray):
    """:func:`_smooth_sums` in numpy: the reference the compiled kernel is tested against."""
    smooth = _expm1_minus_j(k, r) / r * wl[None, :, :]
    return smooth.sum(axis=2), (smooth * u[None, None, :]).sum(axis=2)


def _expm1_minus_j(k: float, r: np.ndarray) -> np.ndarray:
    """e^{−jkr} − 1 for real r, bit for bit numpy's complex ``expm1(−1j·k·r)`` at a third less
    time: numpy forms it as expm1(x)·cos(y) − 2 sin²(y/2) + j e^x sin(y), here with x = 0."""
    y = (-k) * r
    half = np.sin(y * 0.5)
    out = np.empty(r.shape, dtype=complex)
    out.real = -2 * half * half
    out.imag = np.sin(y)
    return out


_GEOMETRY_CACHE: OrderedDict[bytes, tuple[np.ndarray, np.ndarray, np.ndarray]] = OrderedDict()
_GEOMETRY_CACHE_SIZE = 8


def _source_geometry(obs, src_start, src_t, src_len, src_radius):
    """What :func:`potential_integrals` needs besides k: the closed-form integrals of 1/R
    (∫ dl'/R, ∫ (l'/Δ) dl'/R) and the distances R to the source Gauss points.

    Kept for the last few point sets: a wire solved at several frequencies (the resonance search's
    two, the SWR curve's) fills its matrix from the same geometry each time. The key is the exact
    bytes of the points, so a kept value is the value that would be computed.
    """
    key = b"|".join(
        np.ascontiguousarray(a, dtype=float).tobytes()
        for a in (obs, src_start, src_t, src_len, src_radius)
    )
    got = _GEOMETRY_CACHE.get(key)
    if got is not None:
        _GEOMETRY_CACHE.move_to_end(key)
        return got
    d = obs[:, None, :] - src_start[None, :, :]  # (P, S, 3)
    l0 = np.einsum("psi,si->ps", d, src_t)
    rho2 = np.einsum("psi,psi->ps", d, d) - l0 * l0 + src_radius[None, :] ** 2
    rho2 = np.maximum(rho2, (src_radius[None, :] ** 2))
    rho = np.sqrt(rho2)
    length = src_len[None, :]
    i0 = np.arcsinh((length - l0) / rho) + np.arcsinh(l0 / rho)  # ∫ dl'/R
    r_end = np.sqrt((length - l0) ** 2 + rho2)
    r_start = np.sqrt(l0 * l0 + rho2)
    i1 = (r_end - r_start + l0 * i0) / length  # ∫ (l'/Δ) dl'/R
    u, _ = gauss01(N_SOURCE)
    pts = src_start[:, None, :] + u[None, :, None] * (src_len[:, None, None] * src_t[:, None, :])
    diff = obs[:, None, None, :] - pts[None]  # (P, S, Q, 3)
    r = np.sqrt(np.einsum("psqi,psqi->psq", diff, diff) + src_radius[None, :, None] ** 2)
    got = (i0, i1, r)
    for a in got:
        a.setflags(write=False)
    _GEOMETRY_CACHE[key] = got
    if len(_GEOMETRY_CACHE) > _GEOMETRY_CACHE_SIZE:
        _GEOMETRY_CACHE.popitem(last=False)
    return got


def test_points(mesh: Mesh) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Gauss points on every segment: positions (N·Q, 3), weights·Δ (N·Q,), u (Q,)."""
    u, w = gauss01(N_TEST)
    pts = mesh.start[:, None, :] + u[None, :, None] * (
        mesh.length[:, None, None] * mesh.tangent[:, None, :]
    )
    return pts.reshape(-1, 3), (w[None, :] * mesh.length[:, None]).reshape(-1), u


def segment_pair_integrals(
    mesh: Mesh, src_start: np.ndarray, src_t: np.ndarray, k: float
) -> tuple[np.ndarray, np.ndarray]:
    """Segment-pair integrals for the vector and scalar potential terms.

    Returns ``P`` of shape (2, 2, N, N): P[a, b, p, q] = ∫_p ∫_q Λa(l) Λb(l') G dl' dl, with
    Λ0 rising and Λ1 falling along the segment, and ``S`` (N, N) = ∫_p ∫_q G dl' dl.
    """
    n = mesh.n_segments
    obs, wt, u = test_points(mesh)
    j0, j1 = potential_integrals(obs, src_start, src_t, mesh.length, mesh.radius, k)
    q = len(u)
    j0 = j0.reshape(n, q, n) * wt.reshape(n, q, 1)
    j1 = j1.reshape(n, q, n) * wt.reshape(n, q, 1)
    fall_src = j0 - j1
    shapes_obs = np.stack([u, 1 - u])  # (2, Q)
    p = np.empty((2, 2, n, n), dtype=complex)
    for a in range(2):
        p[a, 0] = np.einsum("q,pqs->ps", shapes_obs[a], j1)
        p[a, 1] = np.einsum("q,pqs->ps", shapes_obs[a], fall_src)
    s = j0.sum(axis=1)
    return p, s


def assemble(
    mesh: Mesh, p: np.ndarray, s: np.ndarray, src_t: np.ndarray, omega: float, sign: float = 1.0
) -> np.ndarray:
    """Half-function integrals → basis-function matrix (M, M) of the MPIE."""
    hs, ha, hg = mesh.half_seg, mesh.half_shape, mesh.half_sign
    tt = mesh.tangent[hs] @ src_t[hs].T  # (H, H)
    vec = p[ha[:, None], ha[None, :], hs[:, None], hs[None, :]] * tt
    deriv = hg * np.where(ha == 0, 1.0, -1.0) / mesh.length[hs]
    sca = s[hs[:, None], hs[None, :]] * np.outer(deriv, deriv)
    z_half = (1j * omega * MU0) * vec * np.outer(hg, hg) + sca / (1j * omega * EPS0)
    m = mesh.n_basis
    return sign * z_half.reshape(m, 2, m, 2).sum(axis=(1, 3))


def mirror(points: np.ndarray) -> np.ndarray:
    """Mirror points or vectors in the plane z = 0."""
    out = np.array(points, dtype=float, copy=True)
    out[..., 2] *= -1
    return out


def free_space_matrix(mesh: Mesh, k: float, omega: float) -> np.ndarray:
    """MPIE matrix of the wires alone [ohm]."""
    p, s = segment_pair_integrals(mesh, mesh.start, mesh.tangent, k)
    return assemble(mesh, p, s, mesh.tangent, omega)


def perfect_image_matrix(mesh: Mesh, k: float, omega: float) -> np.ndarray:
    """Contribution of the image in a perfectly conducting ground plane at z = 0 [ohm]."""
    start, tangent = mirror(mesh.start), mirror(mesh.tangent)
    p, s = segment_pair_integrals(mesh, start, tangent, k)
    # image current: mirrored geometry with reversed sign (horizontal reversed, vertical kept)
    return assemble(mesh, p, s, tangent, omega, sign=-1.0)


def loading_matrix(mesh: Mesh, z_per_m: np.ndarray) -> np.ndarray:
    """Galerkin matrix of a distributed series impedance z' per segment [ohm/m] → [ohm]."""
    hs, ha, hg = mesh.half_seg, mesh.half_shape, mesh.half_sign
    same = hs[:, None] == hs[None, :]
    overlap = np.where(ha[:, None] == ha[None, :], 1 / 3, 1 / 6) * mesh.length[hs][:, None]
    z_half = np.where(same, overlap * z_per_m[hs][:, None], 0) * np.outer(hg, hg)
    m = mesh.n_basis
    return z_half.reshape(m, 2, m, 2).sum(axis=(1, 3))


def segment_end_currents(mesh: Mesh, coeff: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Current at each segment's start and end (along its tangent) from basis coefficients [A]."""
    c_half = np.repeat(coeff, 2) * mesh.half_sign
    n = mesh.n_segments
    i_start = np.zeros(n, dtype=complex)
    i_end = np.zeros(n, dtype=complex)
    rise = mesh.half_shape == 0
    np.add.at(i_end, mesh.half_seg[rise], c_half[rise])
    np.add.at(i_start, mesh.half_seg[~rise], c_half[~rise])
    return i_start, i_end
