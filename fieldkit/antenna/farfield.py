"""Far field of the segment currents: space wave over free space, perfect or lossy ground.

The radiation vector of each straight segment with a linear current is integrated in closed form.
Over ground the space wave adds the mirror image weighted by the plane-wave Fresnel coefficients
(Γv for the θ component, Γh for the φ component) at the elevation of the ray; the ground wave, which
carries no power to the sky, is not part of the far field.

References
----------
.. [1] C. A. Balanis, *Antenna Theory*, 4th ed., Wiley 2016, §2.15 (gain), §4.7-4.8 (dipoles over
   ground, image method), §6.2 (array factor).
.. [2] C. A. Balanis, *Advanced Engineering Electromagnetics*, 2nd ed., Wiley 2012, ch. 5 (Fresnel
   reflection coefficients); G. J. Burke, A. J. Poggio, NEC-2 User's Guide, LLNL 1981, GN card.
"""

from __future__ import annotations

import math
from collections import OrderedDict

import numpy as np

from fieldkit.constants import ETA0, MU0, SPEED_OF_LIGHT_M_S

from .grounds import Ground
from .kernel import gauss01
from .mesh import Mesh


def directions(elevation_deg: np.ndarray, azimuth_deg: np.ndarray) -> np.ndarray:
    """Unit vectors r̂ for a grid [n_az, n_el, 3]."""
    el = np.radians(np.asarray(elevation_deg, dtype=float))[None, :]
    az = np.radians(np.asarray(azimuth_deg, dtype=float))[:, None]
    cos_el = np.cos(el)
    out = np.empty((az.shape[0], el.shape[1], 3))
    out[..., 0] = cos_el * np.cos(az)
    out[..., 1] = cos_el * np.sin(az)
    out[..., 2] = np.sin(el)
    return out


RUN_TOLERANCE_M = (
    1e-9  # centre spacings equal to this are one arithmetic run (phase error < 1e-6 rad)
)


def _runs(mesh: Mesh) -> list[tuple[int, int]] | None:
    """Maximal runs [i, j) of equally spaced segment centres, or None if they are too fragmented.

    Cached on the mesh. A straight wire cut into equal segments is one run; an inverted V two.
    """
    memo = mesh._memo
    if "runs" not in memo:
        c = mesh.centre
        n = len(c)
        d = np.diff(c, axis=0)
        same = (np.abs(np.diff(d, axis=0)) <= RUN_TOLERANCE_M).all(axis=1).tolist()
        runs, i = [], 0
        while i < n:
            end = min(i + 2, n)
            while end < n and same[end - 2]:
                end += 1
            runs.append((i, end))
            i = end
        memo["runs"] = runs if len(runs) <= max(2, n // 8) else None
    return memo["runs"]


def _phases(mesh: Mesh, rhat: np.ndarray, k: float, z_sign: float) -> np.ndarray:
    """e^{jk r̂·c'} for every direction and segment centre c' = (x, y, z_sign·z) − o', (D, S).

    Centres are taken relative to the mesh origin o (its first segment's start, mirrored with c),
    so that translated copies of the wires share them (see :func:`_radiation_vectors`). Along an
    arithmetic run of centres the factor is a geometric sequence: its start and ratio are
    exponentials and the rest complex products (relative rounding ~ S·1e-16).
    """
    sign = np.array([1.0, 1.0, z_sign])
    c = (mesh.centre - mesh.start[0]) * sign
    runs = _runs(mesh)
    if runs is None:
        return np.exp(1j * k * (rhat @ c.T))
    out = np.empty((len(rhat), len(c)), dtype=complex)
    for i, j in runs:
        out[:, i] = np.exp(1j * k * (rhat @ c[i]))
        if j - i > 1:
            out[:, i + 1 : j] = np.exp(1j * k * (rhat @ (c[i + 1] - c[i])))[:, None]
            np.cumprod(out[:, i:j], axis=1, out=out[:, i:j])
    return out


_PHASE_CACHE: OrderedDict[bytes, tuple] = OrderedDict()
_PHASE_CACHE_SIZE = 16
_PHASE_CACHE_MAX_ELEMENTS = 200_000  # directions × segments of one cached entry (≤ 6 MB)


def _relative_phases(mesh: Mesh, rhat: np.ndarray, k: float, with_image: bool) -> tuple:
    """:func:`_phases` of the wires and of their image, reused for a repeated set of directions."""
    cacheable = len(rhat) * mesh.n_segments <= _PHASE_CACHE_MAX_ELEMENTS
    if cacheable:
        key = mesh.shape_key() + np.array([k, float(with_image)]).tobytes() + rhat.tobytes()
        hit = _PHASE_CACHE.get(key)
        if hit is not None:
            _PHASE_CACHE.move_to_end(key)
            return hit
    value = (
        _phases(mesh, rhat, k, 1.0),
        _phases(mesh, rhat, k, -1.0) if with_image else None,
    )
    if cacheable:
        _PHASE_CACHE[key] = value
        if len(_PHASE_CACHE) > _PHASE_CACHE_SIZE:
            _PHASE_CACHE.popitem(last=False)
    return value


def _radiation_vectors(mesh: Mesh, i_start, i_end, rhat, k, with_image: bool):
    """N(r̂) = Σ ∫ I(l) t e^{jk r̂·r(l)} dl for the wires and for their mirror image [A·m].

    Each segment (≤ λ/80 long) is integrated by its midpoint with the mean of its end currents;
    the relative error is (kΔ)²/24 < 3e-4. The phases are relative to the mesh origin o and the
    factor e^{jk r̂·o} is applied to the sums, so a translated copy of the wires (a rope-height
    sweep) reuses them.
    """
    moment = (0.5 * (i_start + i_end) * mesh.length)[:, None] * mesh.tangent  # (S, 3)
    rel_direct, rel_image = _relative_phases(mesh, rhat, k, with_image)
    origin = mesh.start[0]
    if not with_image:
        return (rel_direct @ moment) * np.exp(1j * k * (rhat @ origin))[:, None], None
    mirror = np.array([1.0, 1.0, -1.0])
    shift = np.exp(1j * k * (rhat @ np.stack([origin, origin * mirror], axis=1)))  # (D, 2)
    direct = (rel_direct @ moment) * shift[:, :1]
    image = (rel_image @ (moment * mirror)) * shift[:, 1:]
    return direct, image


def fresnel(
    ground: Ground, frequency_hz: float, sin_el: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Plane-wave reflection coefficients (Γv, Γh) at elevation ψ (sin ψ given) [-]."""
    if ground.kind == "perfect":
        one = np.ones_like(sin_el, dtype=complex)
        return one, -one
    eps = ground.complex_permittivity(frequency_hz)
    root = np.sqrt(eps - (1 - sin_el**2) + 0j)
    gv = (eps * sin_el - root) / (eps * sin_el + root)
    gh = (sin_el - root) / (sin_el + root)
    return gv, gh


_DIRECTION_CACHE: OrderedDict[bytes, tuple] = OrderedDict()
_DIRECTION_CACHE_SIZE = 64


def _direction_terms(r: np.ndarray, ground: Ground, frequency_hz: float, with_image: bool):
    """rz, sinθ, cosφ, sinφ, the Fresnel Γv, Γh and the below-horizon mask (or None) of directions.

    Cached on the directions and the ground's permittivity: a sweep asks for the same directions
    (pattern, zenith, power-integration grid) of every spec.
    """
    eps = ground.complex_permittivity(frequency_hz) if ground.kind == "lossy" else 0j
    key = r.tobytes() + np.array([with_image, ground.kind == "perfect", eps]).tobytes()
    terms = _DIRECTION_CACHE.get(key)
    if terms is not None:
        _DIRECTION_CACHE.move_to_end(key)
        return terms
    terms = _direction_terms_of(r, ground, frequency_hz, with_image)
    _DIRECTION_CACHE[key] = terms
    if len(_DIRECTION_CACHE) > _DIRECTION_CACHE_SIZE:
        _DIRECTION_CACHE.popitem(last=False)
    return terms


def _direction_terms_of(r: np.ndarray, ground: Ground, frequency_hz: float, with_image: bool):
    """As :func:`_direction_terms`, uncached (for directions asked once, e.g. a refinement)."""
    rx, ry, rz = r[:, 0].copy(), r[:, 1], r[:, 2].copy()
    sin_t = np.sqrt(np.maximum(0.0, 1 - rz * rz))
    phi = np.arctan2(ry, rx)
    cos_p, sin_p = np.cos(phi), np.sin(phi)
    gv = gh = below = None
    if with_image:
        gv, gh = fresnel(ground, frequency_hz, rz)
        below = rz < 0
        if not below.any():
            below = None
    return rz, sin_t, cos_p, sin_p, gv, gh, below


def _combine(n_dir, n_img, terms, frequency_hz: float):
    """θ and φ field components from the radiation vectors (..., D, 3) of the wires and image."""
    rz, sin_t, cos_p, sin_p, gv, gh, below = terms

    def theta_phi(n):  # components along θ̂ = (cosθ cosφ, cosθ sinφ, −sinθ) and φ̂ = (−sinφ, cosφ, 0)
        horiz = n[..., 0] * cos_p + n[..., 1] * sin_p
        return rz * horiz - sin_t * n[..., 2], n[..., 1] * cos_p - n[..., 0] * sin_p

    n_th, n_ph = theta_phi(n_dir)
    if n_img is not None:
        i_th, i_ph = theta_phi(n_img)
        n_th = n_th - gv * i_th
        n_ph = n_ph + gh * i_ph
        if below is not None:  # over ground, no field below the horizon
            n_th = np.where(below, 0, n_th)
            n_ph = np.where(below, 0, n_ph)
    factor = -1j * 2 * math.pi * frequency_hz * MU0 / (4 * math.pi)
    return factor * n_th, factor * n_ph


def far_field(
    mesh: Mesh, i_start, i_end, ground: Ground, frequency_hz: float, rhat: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """θ and φ components of r·e^{jkr}·E at unit distance [V], for RMS currents, shape rhat[..., 0]."""
    k = 2 * math.pi * frequency_hz / SPEED_OF_LIGHT_M_S
    shape = rhat.shape[:-1]
    r = rhat.reshape(-1, 3)
    with_image = ground.kind != "free-space"
    terms = _direction_terms(r, ground, frequency_hz, with_image)
    n_dir, n_img = _radiation_vectors(mesh, i_start, i_end, r, k, with_image)
    e_th, e_ph = _combine(n_dir, n_img, terms, frequency_hz)
    return e_th.reshape(shape), e_ph.reshape(shape)


def far_field_translated(
    meshes, currents, ground: Ground, frequency_hz: float, rhats
) -> list[tuple[np.ndarray, np.ndarray]]:
    """:func:`far_field` of translated copies of one mesh (a sweep), each at its own directions.

    ``meshes`` share one shape (:meth:`Mesh.shape_key`); ``currents`` holds the (start, end)
    segment currents of each; ``rhats`` the directions (..., 3) of each. When every copy asks for
    the same directions, the phases of the wires are those of the shared cache; otherwise the
    phases of all directions are formed in one pass. Either way the sums of all copies are one
    stacked matrix product. The results equal :func:`far_field` per copy to rounding.
    """
    k = 2 * math.pi * frequency_hz / SPEED_OF_LIGHT_M_S
    with_image = ground.kind != "free-space"
    mesh = meshes[0]
    moments = np.stack(
        [(0.5 * (i0 + i1) * mesh.length)[:, None] * mesh.tangent for i0, i1 in currents]
    )  # (H, S, 3)
    mirror = np.array([1.0, 1.0, -1.0])
    origins = np.stack([m.start[0] for m in meshes])  # (H, 3)
    first = rhats[0]
    if all(r is first or np.array_equal(r, first) for r in rhats[1:]):
        r = first.reshape(-1, 3)
        terms = _direction_terms(r, ground, frequency_hz, with_image)
        rel_direct, rel_image = _relative_phases(mesh, r, k, with_image)
        n_dir = (rel_direct @ moments) * np.exp(1j * k * (r @ origins.T)).T[:, :, None]
        n_img = None
        if with_image:
            shift = np.exp(1j * k * (r @ (origins * mirror).T)).T[:, :, None]
            n_img = (rel_image @ (moments * mirror)) * shift
        e_th, e_ph = _combine(n_dir, n_img, terms, frequency_hz)
        shape = first.shape[:-1]
        return [(a.reshape(shape), b.reshape(shape)) for a, b in zip(e_th, e_ph, strict=True)]
    flat = [x.reshape(-1, 3) for x in rhats]
    r = np.concatenate(flat)
    terms = _direction_terms_of(r, ground, frequency_hz, with_image)
    ends = np.cumsum([len(x) for x in flat])
    blocks = [slice(e - len(x), e) for e, x in zip(ends, flat, strict=True)]
    row_origin = np.repeat(origins, [len(x) for x in flat], axis=0)

    def sums(rel, moment):  # per copy: its block of phases times its moments
        if len({len(x) for x in flat}) == 1:
            return (rel.reshape(len(flat), -1, rel.shape[1]) @ moment).reshape(-1, 3)
        return np.concatenate([rel[blk] @ moment[h] for h, blk in enumerate(blocks)])

    n_dir = sums(_phases(mesh, r, k, 1.0), moments)
    n_dir *= np.exp(1j * k * np.einsum("ij,ij->i", r, row_origin))[:, None]
    n_img = None
    if with_image:
        n_img = sums(_phases(mesh, r, k, -1.0), moments * mirror)
        n_img *= np.exp(1j * k * np.einsum("ij,ij->i", r, row_origin * mirror))[:, None]
    e_th, e_ph = _combine(n_dir, n_img, terms, frequency_hz)
    return [
        (e_th[blk].reshape(x.shape[:-1]), e_ph[blk].reshape(x.shape[:-1]))
        for blk, x in zip(blocks, rhats, strict=True)
    ]


def gain_from_field(e_th, e_ph, input_power_w: float) -> tuple[np.ndarray, np.ndarray]:
    """Partial gains (θ, φ) relative to input power, linear [-]; fields RMS at unit distance."""
    scale = 4 * math.pi / (ETA0 * input_power_w)
    return scale * np.abs(e_th) ** 2, scale * np.abs(e_ph) ** 2


def power_grid(
    mesh: Mesh,
    ground: Ground,
    frequency_hz: float,
    *,
    n_el: int | None = None,
    n_az: int | None = None,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Elevations and azimuths [deg] of the power integration and the elevation weights [-].

    Gauss–Legendre in sin(elevation) and the trapezoidal rule in azimuth (exact for a periodic,
    band-limited integrand); the number of points follows the electrical size k·r of the wires and
    their image (12 suffice below ~1 λ: error < 1e-8 against 48 × 72 points, docs/engine.md).
    """
    if n_el is None or n_az is None:
        k = 2 * math.pi * frequency_hz / SPEED_OF_LIGHT_M_S
        c = mesh.centre
        size = float(np.max(np.linalg.norm(c - np.r_[c[:, :2].mean(axis=0), 0.0], axis=1)))
        n = max(12, math.ceil(2 * k * size) + 6)
        n_el, n_az = n_el or n, n_az or n
    x, w = gauss01(n_el)
    if ground.kind == "free-space":
        mu, wmu = 2 * x - 1, 2 * w  # sin(elevation) over [-1, 1]
    else:
        mu, wmu = x, w  # upper half-space
    return np.degrees(np.arcsin(mu)), np.arange(n_az) * 360.0 / n_az, wmu


def power_from_field(e_th, e_ph, grid_deg, *, grid: dict | None = None) -> float:
    """Radiated power [W] from the fields on a :func:`power_grid` (its result as ``grid_deg``)."""
    el, az, wmu = grid_deg
    intensity = (np.abs(e_th) ** 2 + np.abs(e_ph) ** 2) / ETA0  # W/sr, RMS fields
    power = float((intensity * wmu[None, :]).sum() * (2 * math.pi / len(az)))
    if grid is not None:
        grid.update(elevation_deg=el, azimuth_deg=az, intensity_w_sr=intensity)
    return power


def radiated_power(
    mesh: Mesh,
    i_start,
    i_end,
    ground: Ground,
    frequency_hz: float,
    *,
    n_el: int | None = None,
    n_az: int | None = None,
    grid: dict | None = None,
) -> float:
    """Power carried by the space wave, integrated over the upper half-space (or sphere) [W].

    On the grid of :func:`power_grid`. When ``grid`` is given it receives the directions and
    intensities [W/sr] used.
    """
    grid_deg = power_grid(mesh, ground, frequency_hz, n_el=n_el, n_az=n_az)
    e_th, e_ph = far_field(
        mesh, i_start, i_end, ground, frequency_hz, directions(grid_deg[0], grid_deg[1])
    )
    return power_from_field(e_th, e_ph, grid_deg, grid=grid)
