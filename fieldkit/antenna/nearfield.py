"""Near-field E and H at points from the solved segment currents and charges, ground included.

E = −jωA − ∇φ and H = ∇×A/μ0 from the piecewise-linear currents and the piecewise-constant line
charges (continuity equation) of the moment-method solution, integrated by Gauss–Legendre quadrature
with the reduced kernel. Over perfect ground the mirror image is added; over lossy ground the
reflected field of :mod:`fieldkit.antenna.sommerfeld` (the same Sommerfeld machinery as the matrix).

References
----------
.. [1] C. A. Balanis, *Antenna Theory*, 4th ed., Wiley 2016, §3.6 (potentials A, φ and the fields).
.. [2] R. F. Harrington, *Time-Harmonic Electromagnetic Fields*, McGraw-Hill 1961, §2-9.
"""

from __future__ import annotations

import math

import numpy as np

from fieldkit.constants import EPS0, MU0, SPEED_OF_LIGHT_M_S

from .kernel import gauss01, mirror

N_POINTS = 12  # Gauss points per segment
CHUNK = 512  # observation points per block (memory)


def _direct(obs, start, tangent, length, radius, i_start, i_end, omega, sign=1.0):
    """E and H of segments with linear current (and constant line charge) at obs (P, 3)."""
    k = omega / SPEED_OF_LIGHT_M_S
    u, w = gauss01(N_POINTS)
    src = start[:, None, :] + u[None, :, None] * (length[:, None, None] * tangent[:, None, :])
    cur = (i_start[:, None] * (1 - u[None, :]) + i_end[:, None] * u[None, :]) * (
        w[None, :] * length[:, None]
    )
    charge = -(i_end - i_start) / (1j * omega)  # per segment, charge per length × length / length
    q = charge[:, None] * w[None, :]  # ∫ q' dl weights: q' Δ w = (dI/dl·Δ) w ...
    src = src.reshape(-1, 3)
    cur = cur.reshape(-1)
    q = q.reshape(-1)
    tan = np.repeat(tangent, N_POINTS, axis=0)
    a2 = np.repeat(radius, N_POINTS) ** 2
    e_out = np.zeros((len(obs), 3), dtype=complex)
    h_out = np.zeros((len(obs), 3), dtype=complex)
    tx, ty, tz = tan[:, 0], tan[:, 1], tan[:, 2]
    cur_tan = cur[:, None] * tan  # (S, 3)
    for lo in range(0, len(obs), CHUNK):
        o = obs[lo : lo + CHUNK]
        dx = o[:, None, 0] - src[None, :, 0]  # (P, S), one array per component
        dy = o[:, None, 1] - src[None, :, 1]
        dz = o[:, None, 2] - src[None, :, 2]
        r = np.sqrt(dx * dx + dy * dy + dz * dz + a2[None])
        jkr = (1j * k) * r
        g = np.exp(-jkr) / (4 * math.pi * r)
        dg = -(1 + jkr) * g / (r * r)  # ∇G = dg · d
        a_vec = MU0 * (g @ cur_tan)
        wq = dg * q[None]  # ∇φ = Σ q dg d / ε0
        grad_phi = np.stack([(wq * dx).sum(1), (wq * dy).sum(1), (wq * dz).sum(1)], axis=1) / EPS0
        e_out[lo : lo + CHUNK] = -1j * omega * a_vec - grad_phi
        # H = ∫ I ∇G × t dl = Σ I dg (d × t)
        wc = dg * cur[None]
        wx, wy, wz = wc * dx, wc * dy, wc * dz
        h_out[lo : lo + CHUNK, 0] = wy @ tz - wz @ ty
        h_out[lo : lo + CHUNK, 1] = wz @ tx - wx @ tz
        h_out[lo : lo + CHUNK, 2] = wx @ ty - wy @ tx
    return sign * e_out, sign * h_out


def near_field(sol, points: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Complex RMS E [V/m] and H [A/m] at points (n, 3) for a :class:`~fieldkit.antenna.Solution`."""
    mesh, ground = sol.mesh, sol.ground
    i_start, i_end = sol.segment_currents_a
    omega = 2 * math.pi * sol.frequency_hz
    e, h = _direct(
        points, mesh.start, mesh.tangent, mesh.length, mesh.radius, i_start, i_end, omega
    )
    if ground.kind == "perfect":
        e2, h2 = _direct(
            points,
            mirror(mesh.start),
            mirror(mesh.tangent),
            mesh.length,
            mesh.radius,
            i_start,
            i_end,
            omega,
            sign=-1.0,
        )
        e, h = e + e2, h + h2
    elif ground.kind == "lossy":
        from .sommerfeld import reflected_near_field

        e2, h2 = reflected_near_field(sol, points)
        e, h = e + e2, h + h2
    return e, h
