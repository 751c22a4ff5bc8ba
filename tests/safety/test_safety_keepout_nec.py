"""The whole keep-out result on the engine's near field against the same search on NEC-2's near field.

The keep-out search takes any field function, so it is run twice on a low flat dipole (20 m at 3.5 m,
7.1 MHz, data mode): once on the engine's near field, once on NEC-2's (PyNEC NE/NH cards through
tests/reference/nec.py; Burke & Poggio 1981). Outline reach, distance from each end, minimum end
height and the power at which no zone is left must agree.
"""

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Ground, Wire, solve
from fieldkit.safety.exposure import Landmark, keep_out
from fieldkit.safety.limits import exposure_limit
from tests.reference.nec import Piece, nec_solve

F_MHZ, HALF, HEIGHT, RADIUS = 7.1, 10.0, 3.5, 0.8e-3
WIRE = np.array([[-HALF, 0.0, HEIGHT], [HALF, 0.0, HEIGHT]])
FEED = np.array([0.0, 0.0, HEIGHT])
MARKS = [
    Landmark("end-w", "west end", WIRE[0]),
    Landmark("end-e", "east end", WIRE[1]),
    Landmark("feedpoint", "feedpoint", FEED),
]
LIMIT = exposure_limit("fcc-uncontrolled", frequency_hz=F_MHZ * 1e6)


def _zone(fields):
    return keep_out(
        fields,
        wire_m=WIRE,
        feed_m=FEED,
        e_limit=LIMIT.e_v_per_m,
        h_limit=LIMIT.h_a_per_m,
        averaging_factor=1.0,  # data mode, transmitting throughout
        landmarks=MARKS,
    )


@pytest.mark.parametrize(
    ("ground", "nec_ground", "power_w", "reach_rtol"),
    [
        (Ground(kind="perfect"), ("perfect",), 200.0, 0.03),
        # over lossy ground NEC-2's H uses reflection coefficients (see test_safety_nearfield_nec.py);
        # the zone's side reach beside the centre is H-driven there
        pytest.param(
            Ground(kind="lossy", relative_permittivity=13.0, conductivity_s_m=0.005),
            ("lossy", 13.0, 0.005),
            700.0,
            0.10,
            marks=pytest.mark.slow,
        ),
    ],
)
def test_keep_out_on_engine_matches_keep_out_on_nec2(ground, nec_ground, power_w, reach_rtol):
    sol = solve(
        Antenna(
            wires=(Wire(points_m=WIRE, radius_m=RADIUS, conductor="perfect"),),
            feed=Feed(wire=0, distance_m=HALF),
        ),
        frequencies_hz=[F_MHZ * 1e6],
        ground=ground,
        power_w=power_w,
    )[0]

    def nec_fields(points):
        ref = nec_solve(
            [Piece(tuple(WIRE[0]), tuple(WIRE[1]), 41)],
            feed=(0, 20),
            frequency_mhz=F_MHZ,
            radius_m=RADIUS,
            ground=nec_ground,
            near_points_m=points,
            power_w=power_w,
        )
        return ref.e_v_per_m, ref.h_a_per_m

    ours, ref = _zone(sol.near_field), _zone(nec_fields)
    assert ref.keep_out_m > 0.5  # the case has a real zone
    assert ours.keep_out_m == pytest.approx(ref.keep_out_m, rel=reach_rtol)
    for (_, d_ours), (_, d_ref) in zip(ours.by_landmark, ref.by_landmark, strict=True):
        assert d_ours == pytest.approx(d_ref, abs=0.1)
    assert ours.min_end_height_m == pytest.approx(ref.min_end_height_m, abs=0.05)
    assert power_w / ours.max_ratio == pytest.approx(power_w / ref.max_ratio, rel=0.05)
