"""NEC-2 (PyNEC) runs of a hung dipole polyline, for the cut-list reference checks (tests only).

NEC-2: Burke & Poggio, *Numerical Electromagnetics Code (NEC) — Method of Moments*, LLNL 1981.
Cards: GW (one single-segment wire per step along the polyline, so that one segment is centred on the
feedpoint), GN 2 (Sommerfeld–Norton ground) or GN 1 (perfect), LD 5 (wire conductivity), optional
LD 2 (series inductance per metre: the dielectric jacket as L' = (mu0/2pi)(1 - 1/eps_r) ln(b/a),
Richmond & Newman, Radio Science 11(1), 1976 — NEC-2 has no jacket card), EX 0, FR, XQ.
"""

from __future__ import annotations

import math

import numpy as np

MU0 = 4e-7 * math.pi  # classical SI value [H/m]
COPPER_S_M = 1 / 1.7241e-8  # IEC 60028 annealed copper


def _resample(points: np.ndarray, feed_m: float, n_half: int) -> np.ndarray:
    """Points along the polyline so that segment n_half is centred on the feed (legs equal length)."""
    seg = np.linalg.norm(np.diff(points, axis=0), axis=1)
    cum = np.concatenate([[0.0], np.cumsum(seg)])
    total = cum[-1]
    n = 2 * n_half + 1
    # the feed segment is centred on feed_m; the rest spread evenly over each side
    ds_mid = total / n
    left = np.linspace(0.0, feed_m - ds_mid / 2, n_half + 1)
    right = np.linspace(feed_m + ds_mid / 2, total, n_half + 1)
    s = np.concatenate([left, right])
    return np.column_stack([np.interp(s, cum, points[:, k]) for k in range(3)])


def nec_impedance(
    points_m,
    *,
    feed_distance_m: float,
    frequency_mhz: float,
    radius_m: float,
    ground: tuple,
    conductivity_s_m: float | None = COPPER_S_M,
    jacket: tuple[float, float] | None = None,
    n_half: int = 30,
) -> complex:
    """Feed impedance from NEC-2 of the polyline fed at ``feed_distance_m``.

    ground: ("perfect",) | ("lossy", eps_r, sigma); jacket: (thickness_m, eps_r) or None.
    """
    import PyNEC

    pts = _resample(np.asarray(points_m, dtype=float), feed_distance_m, n_half)
    ctx = PyNEC.nec_context()
    geo = ctx.get_geometry()
    for tag in range(len(pts) - 1):
        geo.wire(tag + 1, 1, *pts[tag], *pts[tag + 1], radius_m, 1.0, 1.0)
    ctx.geometry_complete(0)
    if conductivity_s_m is not None:
        ctx.ld_card(5, 0, 0, 0, conductivity_s_m, 0.0, 0.0)
    if jacket is not None:
        b = radius_m + jacket[0]
        inductance = MU0 / (2 * math.pi) * (1 - 1 / jacket[1]) * math.log(b / radius_m)
        ctx.ld_card(2, 0, 0, 0, 0.0, inductance, 0.0)
    if ground[0] == "perfect":
        ctx.gn_card(1, 0, 0, 0, 0, 0, 0, 0)
    elif ground[0] == "lossy":
        ctx.gn_card(2, 0, float(ground[1]), float(ground[2]), 0, 0, 0, 0)
    ctx.ex_card(0, n_half + 1, 1, 0, 1.0, 0, 0, 0, 0, 0)
    ctx.fr_card(0, 1, frequency_mhz, 0)
    ctx.xq_card(0)
    return complex(np.asarray(ctx.get_input_parameters(0).get_impedance()).ravel()[0])


def nec_resonance_mhz(points_m, *, feed_distance_m: float, guess_mhz: float, **kw) -> float:
    """Frequency where NEC-2's feed reactance crosses zero (secant from the guess) [MHz]."""
    f0, f1 = guess_mhz * 0.995, guess_mhz * 1.005
    x0 = nec_impedance(points_m, feed_distance_m=feed_distance_m, frequency_mhz=f0, **kw).imag
    x1 = nec_impedance(points_m, feed_distance_m=feed_distance_m, frequency_mhz=f1, **kw).imag
    for _ in range(8):
        f2 = f1 - x1 * (f1 - f0) / (x1 - x0)
        if abs(f2 - f1) < 1e-6 * f1:
            return f2
        f0, x0 = f1, x1
        f1, x1 = (
            f2,
            nec_impedance(points_m, feed_distance_m=feed_distance_m, frequency_mhz=f2, **kw).imag,
        )
    return f1


def nec_pattern(
    points_m,
    *,
    feed_distance_m: float,
    frequency_mhz: float,
    radius_m: float,
    ground: tuple,
    elevations_deg,
    azimuths_deg,
    conductivity_s_m: float | None = COPPER_S_M,
    n_half: int = 30,
) -> tuple[complex, np.ndarray]:
    """Feed impedance and power gain [dBi] of the polyline from NEC-2 on a regular grid of directions
    (one RP card; elevations ascending and evenly spaced, ending at the zenith).

    Returns (Z, gain[i_azimuth, i_elevation]).
    """
    import PyNEC

    el = np.asarray(elevations_deg, dtype=float)
    az = np.asarray(azimuths_deg, dtype=float)
    pts = _resample(np.asarray(points_m, dtype=float), feed_distance_m, n_half)
    ctx = PyNEC.nec_context()
    geo = ctx.get_geometry()
    for tag in range(len(pts) - 1):
        geo.wire(tag + 1, 1, *pts[tag], *pts[tag + 1], radius_m, 1.0, 1.0)
    ctx.geometry_complete(0)
    if conductivity_s_m is not None:
        ctx.ld_card(5, 0, 0, 0, conductivity_s_m, 0.0, 0.0)
    if ground[0] == "perfect":
        ctx.gn_card(1, 0, 0, 0, 0, 0, 0, 0)
    else:
        ctx.gn_card(2, 0, float(ground[1]), float(ground[2]), 0, 0, 0, 0)
    ctx.ex_card(0, n_half + 1, 1, 0, 1.0, 0, 0, 0, 0, 0)
    ctx.fr_card(0, 1, frequency_mhz, 0)
    theta = 90.0 - el[::-1]  # from the zenith down
    dth = float(theta[1] - theta[0]) if len(theta) > 1 else 0.0
    dph = float(az[1] - az[0]) if len(az) > 1 else 0.0
    ctx.rp_card(0, len(theta), len(az), 0, 5, 0, 0, float(theta[0]), float(az[0]), dth, dph, 0, 0)
    gain = np.asarray(ctx.get_radiation_pattern(0).get_gain(), dtype=float)  # [theta, phi]
    z = complex(np.asarray(ctx.get_input_parameters(0).get_impedance()).ravel()[0])
    return z, gain[::-1, :].T
