"""The reflected near field takes as few Gauss points per segment as its error bound allows."""

from __future__ import annotations

import numpy as np
import pytest

from fieldkit.antenna import parse_ground, solve
from fieldkit.antenna import sommerfeld as sf
from tests.antenna.cases import dipole


@pytest.mark.parametrize(("h_wl", "ground"), [(0.0625, "poor"), (0.12, "sea-water")])
def test_fewer_points_give_the_eight_point_field(monkeypatch, h_wl, ground):
    # the 8-point rule is the one checked against NEC-2 (test_nec_lossy); fewer points where the
    # bound (L / 2d)^(2n) < 1e-10 holds must give the same field to far below any printed digit
    f_mhz = 3.6
    lam = 299.792458 / f_mhz
    case = dipole("flat", f_mhz, h_wl)
    sol = solve(case.antenna, frequencies_hz=f_mhz * 1e6, ground=parse_ground(ground))[0]
    pts = np.array(
        [[x, y, z] for x in (0.0, 0.1 * lam, 0.3 * lam) for y in (0.0, 3.0) for z in (0.5, 1.8)]
    )
    assert sf._reflected_gauss_points(sol.mesh, pts) < 8  # the shortcut is taken here
    e, h = sf.reflected_near_field(sol, pts)
    monkeypatch.setattr(sf, "REFLECTED_GAUSS_POINTS", (8,))
    e8, h8 = sf.reflected_near_field(sol, pts)
    assert np.max(np.abs(e - e8)) <= 1e-8 * np.max(np.abs(e8))
    assert np.max(np.abs(h - h8)) <= 1e-8 * np.max(np.abs(h8))


def test_where_the_bound_does_not_hold_eight_points_stay():
    # a point as far below the ground as the wire is above it: its image distance goes to zero
    case = dipole("flat", 3.6, 0.0625)
    sol = solve(case.antenna, frequencies_hz=3.6e6, ground=parse_ground("average"))[0]
    low = float(sol.mesh.start[:, 2].min())
    assert sf._reflected_gauss_points(sol.mesh, np.array([[0.0, 0.0, -low]])) == 8
