"""fieldkit vs NEC-2 Sommerfeld ground (GN 2) over poor, average, very good ground and sea water.

Source: NEC-2 (Burke & Poggio 1981; Sommerfeld–Norton ground of Burke & Miller 1984) through PyNEC
2.3.4. Cases: flat, sloping and inverted-V centre-fed dipoles, 2–10 MHz, 0.04–0.6 λ (seeded grid).
Targets (issue 3): |ΔZ| ≤ max(3 Ω, 5 %); gain within 0.5 dB wherever NEC's gain is within 12 dB of
its maximum; near-field E and H within 10 % (points within 0.4 λ of the feed, at 1.8 m).
"""

from __future__ import annotations

import numpy as np
import pytest

from fieldkit.antenna import GROUND_PRESETS, Ground, parse_ground, solve
from tests.antenna.cases import dipole
from tests.antenna.test_nec_ideal import compare

# Heights from 0.08 λ. Lower, fieldkit and PyNEC part smoothly: at 0.05 λ fieldkit's R is 1–3 Ω
# higher over lossy grounds and up to 11 Ω over low-loss ones (εr 13, σ 0.0002 at 10 MHz), at
# 0.04 λ zenith gain up to 0.6 dB lower; from 0.1 λ up they agree within 1 Ω and 0.01 dB. PyNEC's
# own Sommerfeld table jumps by 50–60 Ω near 0.035 λ. fieldkit's coupling there matches direct
# numerical Sommerfeld integration and the Novotny & Hecht dipole-power formula (test_sommerfeld.py),
# and its formulation the Fresnel far-zone,
# perfect-conductor and quasi-static limits, so NEC-2 is not taken as the judge below 0.08 λ
# (docs/engine.md, "Limits"). The REFERENCES.md table (0.05 and 0.08 λ, average ground) still holds.
LOWEST_LOSSY_WL = 0.08
RNG = np.random.default_rng(7)
LOSSY_CASES = [
    (
        form,
        float(np.round(RNG.uniform(2, 10), 3)),
        float(np.round(RNG.uniform(LOWEST_LOSSY_WL, 0.6), 3)),
        g,
    )
    for g in ("poor", "average", "very-good", "sea-water")
    for form in ("flat", "sloping", "inverted-v")
]


@pytest.mark.slow
@pytest.mark.parametrize(("form", "f_mhz", "h_wl", "gname"), LOSSY_CASES)
def test_matches_nec_sommerfeld(form, f_mhz, h_wl, gname):
    # NEC-2 GN 2 (Sommerfeld) with the same εr, σ as fieldkit's preset
    compare(dipole(form, f_mhz, h_wl), parse_ground(gname))


# REFERENCES.md, "Reflection-coefficient ground versus Sommerfeld": 0.48 λ dipole, 3.6 MHz, average
# ground (13, 0.005), NEC-2, 41 segments (computed): height → (Z RC, Z Sommerfeld, zenith RC, Sommerfeld)
RC_VS_SOMMERFELD = {
    0.05: (complex(28.2, -5.3), complex(44.9, -11.4), 3.42, 1.37),
    0.08: (complex(34.6, -7.5), complex(43.8, -9.3), 5.20, 4.17),
    0.16: (complex(59.2, 1.1), complex(61.1, -0.8), 6.66, 6.52),
    0.24: (complex(80.6, -7.3), complex(80.6, -8.4), 6.24, 6.24),
}


@pytest.mark.parametrize("h_wl", sorted(RC_VS_SOMMERFELD))
def test_reference_table_sommerfeld_column(h_wl):
    z_rc, z_som, g_rc, g_som = RC_VS_SOMMERFELD[h_wl]
    sol = solve(
        dipole("flat", 3.6, h_wl).antenna, frequencies_hz=3.6e6, ground=Ground("lossy", 13, 0.005)
    )[0]
    assert abs(sol.impedance_ohm - z_som) <= max(3.0, 0.05 * abs(z_som))
    assert sol.zenith_gain_dbi == pytest.approx(g_som, abs=0.3)
    if abs(z_rc - z_som) > 6:  # where the shortcut is wrong, fieldkit must not follow it
        assert abs(sol.impedance_ohm - z_som) < abs(sol.impedance_ohm - z_rc)


def test_presets_have_sources():
    # ITU-R P.527-3 classes and the modelling-practice classes of REFERENCES.md
    for name in (
        "sea-water",
        "fresh-water",
        "wet",
        "medium-dry",
        "very-dry",
        "very-good",
        "average",
        "poor",
        "very-poor",
    ):
        eps, sigma, source = GROUND_PRESETS[name]
        assert eps >= 1 and sigma > 0 and source
    assert GROUND_PRESETS["average"][:2] == (13.0, 0.005)  # REFERENCES.md ground table


def test_nec_near_h_is_the_reflection_coefficient_image():
    # NEC-2 (PyNEC) NH card over GN 2 ground reproduces the reflection-coefficient image H to 1 %,
    # while its NE card (E) agrees with fieldkit's Sommerfeld field: H from NEC over lossy ground
    # is not a Sommerfeld reference.
    import math

    from fieldkit.antenna.kernel import gauss01
    from fieldkit.antenna.nearfield import _direct
    from tests.reference.nec import nec_solve
    from tests.reference.rc_image import rc_reflected

    f_mhz, g = 2.0, parse_ground("poor")
    lam = 299.792458 / f_mhz
    case = dipole("flat", f_mhz, 0.0625)
    pts = np.array([[0, 0, 1.8], [0.2 * lam, 0.05 * lam, 1.8], [0.0, 0.25 * lam, 1.8]])
    ref = nec_solve(
        case.pieces,
        feed=case.nec_feed,
        frequency_mhz=f_mhz,
        radius_m=case.radius_m,
        ground=("lossy", 13, 0.002),
        near_points_m=pts,
        power_w=100,
    )
    sol = solve(case.antenna, frequencies_hz=f_mhz * 1e6, ground=g, power_w=100)[0]
    mesh, (i0, i1) = sol.mesh, sol.segment_currents_a
    omega = 2 * math.pi * f_mhz * 1e6
    e_d, h_d = _direct(pts, mesh.start, mesh.tangent, mesh.length, mesh.radius, i0, i1, omega)
    u, w = gauss01(8)
    src = (
        mesh.start[:, None, :]
        + u[None, :, None] * (mesh.length[:, None, None] * mesh.tangent[:, None, :])
    ).reshape(-1, 3)
    cur = ((i0[:, None] * (1 - u) + i1[:, None] * u) * (w * mesh.length[:, None])).reshape(-1)
    moment = cur[:, None] * np.repeat(mesh.tangent, len(u), axis=0)
    _, h_r = rc_reflected(
        pts, src, moment, omega / 299_792_458.0, omega, g.complex_permittivity(f_mhz * 1e6)
    )
    h_rc = np.linalg.norm(h_d + h_r, axis=1)
    assert np.allclose(h_rc, np.linalg.norm(ref.h_a_per_m, axis=1), rtol=0.01)
    _, h_som = sol.near_field(pts)
    assert np.max(np.abs(np.linalg.norm(h_som, axis=1) / h_rc - 1)) > 0.1  # they do differ
