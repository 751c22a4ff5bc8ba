"""NEC-2 (through PyNEC) reference runs of simple wire antennas, for tests only.

NEC-2: G. J. Burke, A. J. Poggio, *Numerical Electromagnetics Code (NEC) — Method of Moments*, LLNL
1981. PyNEC (GPL-3.0) wraps the C++ port nec2++; fieldkit never imports it. Cards used: GW (wire),
GN 1 (perfect ground) / GN 2 (Sommerfeld–Norton lossy ground), LD 5 (wire conductivity), EX 0
(voltage source on a segment), FR, RP (power gain, dBi re input power), NE/NH (near fields).

NEC currents and fields are peak values for the 1 V excitation; :func:`nec_solve` rescales them to
RMS at the requested input power so that they compare directly with fieldkit's.

Usage::

    from tests.reference.nec import Piece, nec_solve
    r = nec_solve([Piece((-20, 0, 8), (20, 0, 8), 41)], feed=(0, 20), frequency_mhz=3.6,
                  radius_m=1e-3, ground=("lossy", 13, 0.005), elevation_deg=[90], azimuth_deg=[0])
    r.impedance_ohm, r.gain_dbi   # gain_dbi[i_azimuth][i_elevation]
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Piece:
    """One straight NEC wire (GW card): end points [m] and its number of segments."""

    start: tuple[float, float, float]
    end: tuple[float, float, float]
    segments: int


@dataclass(frozen=True)
class NecResult:
    impedance_ohm: complex
    gain_dbi: np.ndarray | None  # [n_azimuth, n_elevation]
    e_v_per_m: np.ndarray | None  # complex RMS (n, 3) at power_w
    h_a_per_m: np.ndarray | None


def nec_solve(
    pieces: list[Piece],
    *,
    feed: tuple[int, int],
    frequency_mhz: float,
    radius_m: float,
    ground: tuple,
    conductivity_s_m: float | None = None,
    elevation_deg=None,
    azimuth_deg=None,
    near_points_m=None,
    power_w: float = 1.0,
) -> NecResult:
    """Run NEC-2 on straight pieces.

    Parameters
    ----------
    feed : (piece index, 0-based segment index within the piece)
    ground : ("free-space",) | ("perfect",) | ("lossy", eps_r, sigma_s_m)
    conductivity_s_m : wire conductivity for LD 5 (None = perfect conductor)
    elevation_deg, azimuth_deg : pattern directions (elevation from the horizon)
    near_points_m : points for NE/NH near fields
    """
    import PyNEC

    ctx = PyNEC.nec_context()
    geo = ctx.get_geometry()
    for tag, p in enumerate(pieces, start=1):
        geo.wire(tag, p.segments, *p.start, *p.end, radius_m, 1.0, 1.0)
    ctx.geometry_complete(0)
    if conductivity_s_m is not None:
        ctx.ld_card(5, 0, 0, 0, conductivity_s_m, 0.0, 0.0)
    if ground[0] == "perfect":
        ctx.gn_card(1, 0, 0, 0, 0, 0, 0, 0)
    elif ground[0] == "lossy":
        ctx.gn_card(2, 0, float(ground[1]), float(ground[2]), 0, 0, 0, 0)
    ctx.ex_card(0, feed[0] + 1, feed[1] + 1, 0, 1.0, 0, 0, 0, 0, 0)
    ctx.fr_card(0, 1, frequency_mhz, 0)
    gain = None
    if elevation_deg is not None:
        el = np.asarray(elevation_deg, dtype=float)
        az = np.asarray(azimuth_deg, dtype=float)
        gain = np.empty((len(az), len(el)))
        # one RP card per azimuth keeps arbitrary (non-uniform) elevation lists simple
        k = 0
        for ia, a in enumerate(az):
            for ie, e in enumerate(el):
                ctx.rp_card(0, 1, 1, 0, 5, 0, 0, 90.0 - e, a, 0, 0, 0, 0)
                gain[ia, ie] = np.asarray(ctx.get_radiation_pattern(k).get_gain()).ravel()[0]
                k += 1
    else:
        ctx.xq_card(0)
    z = complex(np.asarray(ctx.get_input_parameters(0).get_impedance()).ravel()[0])
    e_f = h_f = None
    if near_points_m is not None:
        pts = np.asarray(near_points_m, dtype=float).reshape(-1, 3)
        p_nec = 0.5 * (1.0 / z).real  # W for the 1 V peak source
        scale = math.sqrt(power_w / p_nec) / math.sqrt(2)
        e_f = np.empty((len(pts), 3), dtype=complex)
        h_f = np.empty((len(pts), 3), dtype=complex)
        for i, (x, y, zz) in enumerate(pts):
            ctx.ne_card(0, 1, 1, 1, x, y, zz, 0, 0, 0)
            nf = ctx.get_near_field_pattern(2 * i)
            e_f[i] = [complex(np.ravel(getattr(nf, f"get_field_{c}")())[0]) for c in "xyz"]
            ctx.nh_card(0, 1, 1, 1, x, y, zz, 0, 0, 0)
            nh = ctx.get_near_field_pattern(2 * i + 1)
            h_f[i] = [complex(np.ravel(getattr(nh, f"get_field_{c}")())[0]) for c in "xyz"]
        e_f *= scale
        h_f *= scale
    return NecResult(impedance_ohm=z, gain_dbi=gain, e_v_per_m=e_f, h_a_per_m=h_f)
