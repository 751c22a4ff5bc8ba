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

import numpy as np

from .geometry import Mesh
from .grounds import Ground
from .kernel import mirror
from .materials import ETA0, MU0


def directions(elevation_deg: np.ndarray, azimuth_deg: np.ndarray) -> np.ndarray:
    """Unit vectors r̂ for a grid [n_az, n_el, 3]."""
    el = np.radians(np.asarray(elevation_deg, dtype=float))[None, :]
    az = np.radians(np.asarray(azimuth_deg, dtype=float))[:, None]
    return np.stack(
        np.broadcast_arrays(np.cos(el) * np.cos(az), np.cos(el) * np.sin(az), np.sin(el)), axis=-1
    )


def _radiation_vector(start, tangent, length, i_start, i_end, rhat, k) -> np.ndarray:
    """N(r̂) = Σ ∫ I(l) t e^{jk r̂·r(l)} dl over segments, linear current per segment [A·m]."""
    phase0 = np.exp(1j * k * (rhat @ start.T))  # (D, S)
    alpha = k * (rhat @ tangent.T) * length[None, :]
    small = np.abs(alpha) < 1e-3
    a = np.where(small, 1.0, alpha)
    ea = np.exp(1j * a)
    e0 = np.where(small, 1 + 0.5j * alpha - alpha**2 / 6, (ea - 1) / (1j * a))
    e1 = np.where(small, 0.5 + 1j * alpha / 3 - alpha**2 / 8, ea / (1j * a) + (ea - 1) / a**2)
    amp = (i_start[None, :] * (e0 - e1) + i_end[None, :] * e1) * length[None, :] * phase0
    return amp @ tangent  # (D, 3)


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


def far_field(
    mesh: Mesh, i_start, i_end, ground: Ground, frequency_hz: float, rhat: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """θ and φ components of r·e^{jkr}·E at unit distance [V], for RMS currents, shape rhat[..., 0]."""
    k = 2 * math.pi * frequency_hz / 299_792_458.0
    shape = rhat.shape[:-1]
    r = rhat.reshape(-1, 3)
    sin_t = np.sqrt(np.maximum(0.0, 1 - r[:, 2] ** 2))
    phi = np.arctan2(r[:, 1], r[:, 0])
    th_hat = np.stack([r[:, 2] * np.cos(phi), r[:, 2] * np.sin(phi), -sin_t], axis=-1)
    ph_hat = np.stack([-np.sin(phi), np.cos(phi), np.zeros_like(phi)], axis=-1)
    n_dir = _radiation_vector(mesh.start, mesh.tangent, mesh.length, i_start, i_end, r, k)
    n_th = np.einsum("di,di->d", n_dir, th_hat)
    n_ph = np.einsum("di,di->d", n_dir, ph_hat)
    if ground.kind != "free-space":
        n_img = _radiation_vector(
            mirror(mesh.start), mirror(mesh.tangent), mesh.length, i_start, i_end, r, k
        )
        gv, gh = fresnel(ground, frequency_hz, r[:, 2])
        n_th = n_th - gv * np.einsum("di,di->d", n_img, th_hat)
        n_ph = n_ph + gh * np.einsum("di,di->d", n_img, ph_hat)
        below = r[:, 2] < 0
        n_th = np.where(below, 0, n_th)
        n_ph = np.where(below, 0, n_ph)
    factor = -1j * 2 * math.pi * frequency_hz * MU0 / (4 * math.pi)
    return (factor * n_th).reshape(shape), (factor * n_ph).reshape(shape)


def gain_from_field(e_th, e_ph, input_power_w: float) -> tuple[np.ndarray, np.ndarray]:
    """Partial gains (θ, φ) relative to input power, linear [-]; fields RMS at unit distance."""
    scale = 4 * math.pi / (ETA0 * input_power_w)
    return scale * np.abs(e_th) ** 2, scale * np.abs(e_ph) ** 2


def radiated_power(
    mesh: Mesh,
    i_start,
    i_end,
    ground: Ground,
    frequency_hz: float,
    *,
    n_el: int = 24,
    n_az: int = 36,
) -> float:
    """Power carried by the space wave, integrated over the upper half-space (or sphere) [W]."""
    x, w = np.polynomial.legendre.leggauss(n_el)
    if ground.kind == "free-space":
        mu, wmu = x, w  # cos θ over [-1, 1]
    else:
        mu, wmu = 0.5 * (x + 1), 0.5 * w  # upper half-space
    el = np.degrees(np.arcsin(mu))
    az = np.arange(n_az) * 360.0 / n_az
    e_th, e_ph = far_field(mesh, i_start, i_end, ground, frequency_hz, directions(el, az))
    intensity = (np.abs(e_th) ** 2 + np.abs(e_ph) ** 2) / ETA0  # W/sr, RMS fields
    return float((intensity * wmu[None, :]).sum() * (2 * math.pi / n_az))
