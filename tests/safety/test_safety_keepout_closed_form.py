"""The keep-out search against the closed-form fields of a Hertzian dipole (no engine involved).

The fields of an infinitesimal electric dipole are exact solutions of Maxwell's equations (Balanis,
Antenna Theory, 4th ed., §4.2, eqs. 4-8a–c and 4-10a–c). The exact boundary where the time-averaged
exposure ratio falls to 1 is found here with a fine scan and Brent's root finder, independently of the
ray sampling and refinement in fieldkit.safety.exposure.
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from fieldkit.safety.exposure import PERSON_HEIGHTS_M, Landmark, exposure_ratio, keep_out
from fieldkit.safety.limits import exposure_limit

ETA0 = 376.730313668  # Ω
F_HZ = 7.0e6
K = 2 * math.pi * F_HZ / 299_792_458.0
IL = 40.0  # current moment I·l [A·m, RMS]
Z0 = 6.0  # dipole centre height [m]
LIMIT = exposure_limit("fcc-uncontrolled", frequency_hz=F_HZ)  # 117.7 V/m, 0.313 A/m
AVG = 0.4  # CW duty factor, transmitting throughout


def hertzian_fields(points, centre=(0.0, 0.0, Z0)):
    """E, H of a z-directed Hertzian dipole (Balanis eqs. 4-8a–c, 4-10a–c), Cartesian components."""
    d = np.asarray(points, float) - np.asarray(centre)
    r = np.linalg.norm(d, axis=1)
    rho = np.hypot(d[:, 0], d[:, 1])
    cos_t, sin_t = d[:, 2] / r, rho / r
    phase = np.exp(-1j * K * r)
    jkr = 1j * K * r
    e_r = ETA0 * IL * cos_t / (2 * math.pi * r**2) * (1 + 1 / jkr) * phase
    e_t = 1j * ETA0 * K * IL * sin_t / (4 * math.pi * r) * (1 + 1 / jkr - 1 / (K * r) ** 2) * phase
    h_p = 1j * K * IL * sin_t / (4 * math.pi * r) * (1 + 1 / jkr) * phase
    cos_p = np.where(rho > 0, d[:, 0] / np.where(rho > 0, rho, 1), 1.0)
    sin_p = np.where(rho > 0, d[:, 1] / np.where(rho > 0, rho, 1), 0.0)
    r_hat = np.column_stack([sin_t * cos_p, sin_t * sin_p, cos_t])
    t_hat = np.column_stack([cos_t * cos_p, cos_t * sin_p, -sin_t])
    p_hat = np.column_stack([-sin_p, cos_p, np.zeros_like(cos_p)])
    e = e_r[:, None] * r_hat + e_t[:, None] * t_hat
    h = h_p[:, None] * p_hat
    return e, h


def ratio_at(points):
    e, h = hertzian_fields(points)
    return exposure_ratio(
        e, h, e_limit=LIMIT.e_v_per_m, h_limit=LIMIT.h_a_per_m, averaging_factor=AVG
    )


def last_root(fn, lo, hi, step=1e-3):
    """Largest x in [lo, hi] where fn(x) - 1 changes sign, by scan + Brent (the reference)."""
    x = np.arange(lo, hi, step)
    v = fn(x)
    over = np.nonzero(v >= 1)[0]
    if len(over) == 0:
        return 0.0
    i = over[-1]
    return brentq(lambda s: fn(np.array([s]))[0] - 1, x[i], x[i + 1], xtol=1e-9)


WIRE = np.array([[0.0, 0.0, Z0 - 0.1], [0.0, 0.0, Z0 + 0.1]])


@pytest.fixture(scope="module")
def zone():
    marks = [
        Landmark("end-lower", "lower end", WIRE[0]),
        Landmark("end-upper", "upper end", WIRE[1]),
    ]
    return keep_out(
        hertzian_fields,
        wire_m=WIRE,
        feed_m=WIRE.mean(axis=0),
        e_limit=LIMIT.e_v_per_m,
        h_limit=LIMIT.h_a_per_m,
        averaging_factor=AVG,
        landmarks=marks,
    )


def test_keep_out_radius_matches_closed_form(zone):
    radii = {
        z: last_root(lambda rho, z=z: ratio_at(np.column_stack([rho, 0 * rho, 0 * rho + z])), 0, 30)
        for z in PERSON_HEIGHTS_M
    }
    assert radii[1.8] > 1.0  # the example has a real zone
    assert zone.keep_out_m == pytest.approx(max(radii.values()), abs=0.01)
    for h, d in zone.by_height:  # coarse samples with log-linear interpolation
        assert d == pytest.approx(radii[h], abs=0.05)
    # the outline is the circle (axisymmetric field): every vertex at the radius
    pts = np.array(zone.outline_m)
    assert len(pts) >= 24
    assert np.hypot(pts[:, 0], pts[:, 1]) == pytest.approx(max(radii.values()), abs=0.015)
    assert not zone.touching and not zone.beyond_reach


def test_end_separation_matches_closed_form(zone):
    # on the axis below the lower end (and above the upper one, by symmetry) the limit is met at s*
    s_star = last_root(
        lambda s: ratio_at(np.column_stack([0 * s, 0 * s, WIRE[0, 2] - s])), 0.1, WIRE[0, 2] - 0.05
    )
    seps = dict(zone.end_separation_m)
    assert seps["lower end"] == pytest.approx(s_star, abs=0.01)
    assert zone.min_end_height_m == pytest.approx(1.8 + s_star, abs=0.01)


def test_power_for_no_zone_scales_the_worst_point(zone):
    # ratio ∝ power: the worst sampled point is directly under the dipole at 1.8 m (closest approach)
    worst = ratio_at(np.array([[0.0, 0.0, 1.8]]))[0]
    assert zone.max_ratio == pytest.approx(worst, rel=1e-9)
    assert tuple(zone.max_ratio_point_m) == pytest.approx((0.0, 0.0, 1.8))


def test_no_zone_when_fields_are_weak():
    weak = keep_out(
        lambda p: tuple(f * 0.01 for f in hertzian_fields(p)),
        wire_m=WIRE,
        feed_m=WIRE.mean(axis=0),
        e_limit=LIMIT.e_v_per_m,
        h_limit=LIMIT.h_a_per_m,
        averaging_factor=AVG,
        landmarks=[],
    )
    assert weak.keep_out_m == 0.0 and weak.outline_m == [] and weak.zones_m == []
    assert weak.max_ratio < 1
