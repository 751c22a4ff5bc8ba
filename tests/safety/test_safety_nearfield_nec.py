"""The engine's near field where people stand, against NEC-2 (PyNEC NE/NH cards).

Points under and beside low NVIS dipoles at the heights the keep-out search uses (0.5, 1.0, 1.8 m): under
the high-voltage ends, beyond them, beside the centre. NEC-2: Burke & Poggio 1981, through PyNEC (test
only); the reference helper tests/reference/nec.py rescales NEC's peak fields to RMS at the input power.
Target (issue 6): |E| and |H| within 10 %.
"""

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Ground, Wire, solve
from fieldkit.safety.exposure import exposure_ratio
from fieldkit.safety.limits import exposure_limit
from tests.reference.nec import Piece, nec_solve

RADIUS_M = 0.8e-3  # 1.6 mm wire
POWER_W = 100.0


def _points(half: float) -> np.ndarray:
    """People around a dipole along x of half-length `half`."""
    return np.array(
        [
            [half, 0.0, 1.8],  # under the end
            [half + 1.0, 0.0, 1.8],  # just beyond the end
            [half, 2.0, 1.8],  # beside the end
            [half - 0.5, 1.0, 1.0],
            [half * 0.6, 1.5, 0.5],
            [0.0, 0.0, 1.8],  # under the feedpoint (the coax drop)
            [0.0, 3.0, 1.0],  # beside the centre
            [-half, 0.0, 0.5],  # under the other end, low
        ]
    )


def _lossy(eps_r, sigma):
    return Ground(kind="lossy", relative_permittivity=eps_r, conductivity_s_m=sigma)


# H over lossy ground: NEC-2 adds the ground's part of the NH near field with Fresnel reflection
# coefficients even under GN 2 (subroutine HSFLD; only EFLD, used by NE, adds the Sommerfeld field —
# NEC-2 source as translated in nec2c/xnec2c, fields.c), so NEC's H is not a 10 % reference next to
# lossy ground; its E is.
H_RTOL_LOSSY = 0.25
CASES = [
    # (frequency MHz, half-length m, height m, ground, H tolerance)
    (3.6, 19.8, 6.0, Ground(kind="perfect"), 0.10),  # 0.072 λ high
    (3.6, 19.8, 10.0, Ground(kind="perfect"), 0.10),  # 0.12 λ
    (7.1, 10.0, 4.0, Ground(kind="perfect"), 0.10),  # 0.095 λ
    (5.3715, 13.4, 6.0, Ground(kind="free-space"), 0.10),
    pytest.param(
        3.6, 19.8, 6.0, _lossy(13, 0.005), H_RTOL_LOSSY, marks=pytest.mark.slow
    ),  # average
    pytest.param(
        3.6, 19.8, 4.0, _lossy(13, 0.002), H_RTOL_LOSSY, marks=pytest.mark.slow
    ),  # poor, 0.048 λ
    pytest.param(7.1, 10.0, 4.0, _lossy(13, 0.005), H_RTOL_LOSSY, marks=pytest.mark.slow),
    pytest.param(
        5.3715, 13.4, 8.0, _lossy(20, 0.0303), H_RTOL_LOSSY, marks=pytest.mark.slow
    ),  # very good
    pytest.param(
        3.6, 19.8, 3.0, _lossy(5, 0.001), H_RTOL_LOSSY, marks=pytest.mark.slow
    ),  # very poor, 0.036 λ
]


@pytest.mark.parametrize(("f_mhz", "half", "height", "ground", "h_rtol"), CASES)
def test_near_field_vs_nec2(f_mhz, half, height, ground, h_rtol):
    pts = _points(half)
    wire = Wire(
        points_m=np.array([[-half, 0, height], [half, 0, height]]),
        radius_m=RADIUS_M,
        conductor="perfect",
    )
    sol = solve(
        Antenna(wires=(wire,), feed=Feed(wire=0, distance_m=half)),
        frequencies_hz=[f_mhz * 1e6],
        ground=ground,
        power_w=POWER_W,
    )[0]
    e, h = sol.near_field(pts)
    ref = nec_solve(
        [Piece((-half, 0, height), (half, 0, height), 41)],
        feed=(0, 20),
        frequency_mhz=f_mhz,
        radius_m=RADIUS_M,
        ground=(ground.kind, ground.relative_permittivity, ground.conductivity_s_m),
        near_points_m=pts,
        power_w=POWER_W,
    )
    e_mag, e_ref = np.linalg.norm(e, axis=1), np.linalg.norm(ref.e_v_per_m, axis=1)
    h_mag, h_ref = np.linalg.norm(h, axis=1), np.linalg.norm(ref.h_a_per_m, axis=1)
    np.testing.assert_allclose(e_mag, e_ref, rtol=0.10)  # NEC-2 NE card, issue 6 target 10 %
    np.testing.assert_allclose(h_mag, h_ref, rtol=h_rtol)  # NEC-2 NH card
    # and so the exposure ratio (∝ field²) agrees within (1 + tolerance)² − 1 (21 % where both are 10 %)
    lim = exposure_limit("fcc-uncontrolled", frequency_hz=f_mhz * 1e6)
    kw = {"e_limit": lim.e_v_per_m, "h_limit": lim.h_a_per_m, "averaging_factor": 1.0}
    np.testing.assert_allclose(
        exposure_ratio(e, h, **kw),
        exposure_ratio(ref.e_v_per_m, ref.h_a_per_m, **kw),
        rtol=(1 + h_rtol) ** 2 - 1,
    )
