"""Reflection-coefficient (image × Fresnel) near fields of current elements over lossy ground.

The approximation NEC-2 applies to its NH (near magnetic field) card even with Sommerfeld ground
(shown in tests/antenna/test_nec_lossy.py: NEC-2's H equals this to 0.2 %). Each image element is
split into the parts perpendicular (TE, Γh) and parallel (TM, Γv) to its plane of incidence at the
specular angle (Balanis, Advanced Engineering Electromagnetics ch. 5; NEC-2 User's Guide, GN card).
Test-only helper.
"""

import math

import numpy as np

from fieldkit.constants import EPS0


def dipole_fields(obs, src, moment, k, omega):
    """Free-space E (V/m) and H (A/m) of current elements (moment = I·dl vectors, A·m)."""
    d = obs[:, None, :] - src[None]
    r = np.linalg.norm(d, axis=-1)
    jkr = 1j * k * r
    g = np.exp(-jkr) / r
    g1 = -(1 + jkr) * g / r**2
    g2 = (3 + jkr * (3 + jkr)) * g / r**4
    pd = np.einsum("si,osi->os", moment, d)
    e = (k * k * g + g1)[..., None] * moment[None] + (g2 * pd)[..., None] * d
    e = e.sum(1) / (4 * math.pi * 1j * omega * EPS0)
    h = np.cross((g1[..., None] * d), moment[None]).sum(1) / (4 * math.pi)
    return e, h


def rc_reflected(obs, src, moment, k, omega, eps):
    img = src.copy()
    img[:, 2] *= -1
    d = obs[:, None, :] - img[None]
    rho = np.hypot(d[..., 0], d[..., 1])
    R = np.linalg.norm(d, axis=-1)
    sinpsi = d[..., 2] / R
    root = np.sqrt(eps - (1 - sinpsi**2) + 0j)
    gv = (eps * sinpsi - root) / (eps * sinpsi + root)
    gh = (sinpsi - root) / (sinpsi + root)
    rh = np.stack(
        [d[..., 0] / np.maximum(rho, 1e-12), d[..., 1] / np.maximum(rho, 1e-12), 0 * rho], -1
    )
    ph = np.stack([-rh[..., 1], rh[..., 0], 0 * rho], -1)
    m = np.broadcast_to(moment[None], d.shape)
    mr = np.einsum("osi,osi->os", m, rh)
    mp = np.einsum("osi,osi->os", m, ph)
    mimg = (gh * mp)[..., None] * ph - (gv * mr)[..., None] * rh
    mimg[..., 2] = gv * m[..., 2]
    # fields of each image element separately (moment differs per obs)
    r = R
    jkr = 1j * k * r
    g = np.exp(-jkr) / r
    g1 = -(1 + jkr) * g / r**2
    g2 = (3 + jkr * (3 + jkr)) * g / r**4
    pd = np.einsum("osi,osi->os", mimg, d)
    e = ((k * k * g + g1)[..., None] * mimg + (g2 * pd)[..., None] * d).sum(1) / (
        4 * math.pi * 1j * omega * EPS0
    )
    h = np.cross(g1[..., None] * d, mimg).sum(1) / (4 * math.pi)
    return e, h
