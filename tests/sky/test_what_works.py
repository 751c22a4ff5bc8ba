"""What would work when no channel of the kit does, from the sky layer's own estimate; the planned
antenna's own gain as an input of the sky ranking."""

import copy

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Wire, parse_ground, solve
from fieldkit.sky import sky_json
from fieldkit.sky.gain import elevation_gain_of, elevation_gains
from fieldkit.sky.what_works import FREQUENCY_STEP_MHZ, hours_text

# the case: 62° N in January, a 21–02 UTC schedule; low solar activity
NORTH = {
    "site": {"lat_deg": 62.0, "lon_deg": 10.0},
    "date": "2026-01-15",
    "solar": {"f107": 90},
    "channels_mhz": [3.55, 5.3715, 7.1],
    "schedule": {"start_utc": "21:00", "end_utc": "02:00"},
}


@pytest.fixture(scope="module")
def north():
    return sky_json(copy.deepcopy(NORTH))


def test_no_channel_works_and_what_would(north):
    sched = north["schedule"]
    assert sched["recommended_mhz"] is None
    w = sched["when_none_works"]
    assert w["hours_utc"] == [21, 22, 23, 0, 1, 2]  # in the window's order
    for b in w["by_hour"]:
        fof2 = north["fof2_mhz"][b["hour_utc"]]
        # secant law at vertical incidence: MUF(0 km) = foF2 (Davies, Ionospheric Radio, ch. 6) — the
        # highest frequency that covers the zone from 0 km is the sky layer's own foF2, to the grid
        assert fof2 - FREQUENCY_STEP_MHZ - 1e-9 <= b["high_mhz"] <= fof2 + 1e-9
        # FOT = 0.85 × MUF (Federal Standard 1037C)
        assert b["fot_mhz"] == pytest.approx(0.85 * fof2, abs=0.006)
        # and every channel of the kit is above it then: none returns from overhead
        assert all(ch["by_hour"][b["hour_utc"]]["covers_km"] is None for ch in north["channels"])
    # the issue: "the frequency that would work (about 2 MHz)"
    assert w["low_mhz"] <= 2.0 <= w["high_mhz"]
    assert w["words"].startswith("no channel of the kit works at 21:00–02:00 UTC (6 hours")
    assert f"{w['low_mhz']:.1f}–{w['high_mhz']:.1f} MHz" in w["words"]


def test_absorbed_by_day_points_higher():
    # a summer noon at 46.8° N, high solar activity, 10 W on 1.9 MHz: absorbed (George & Bradley);
    # what works lies above the channel and below foF2
    spec = {
        "site": {"lat_deg": 46.8, "lon_deg": 8.2},
        "date": "2026-06-21",
        "solar": {"f107": 180},
        "channels_mhz": [1.9],
        "schedule": {"start_utc": "10:00", "end_utc": "13:00"},
        "power_w": 10,
    }
    out = sky_json(spec)
    w = out["schedule"]["when_none_works"]
    assert w["low_mhz"] > 1.9
    assert w["high_mhz"] <= min(out["fof2_mhz"][10:14]) + 1e-9


def test_nvis_ceiling_is_the_days_largest_fof2(north):
    c = north["nvis_ceiling"]
    assert c["frequency_mhz"] == pytest.approx(max(north["fof2_mhz"]), abs=0.006)
    assert north["fof2_mhz"][c["hour_utc"]] == pytest.approx(c["frequency_mhz"], abs=0.006)


@pytest.mark.parametrize(
    ("hours", "text"),
    [
        ([21, 22, 23, 0, 1, 2], "21:00–02:00 UTC"),
        ([5], "05:00 UTC"),
        ([1, 2, 7], "01:00–02:00, 07:00 UTC"),
    ],
)
def test_hours_text(hours, text):
    assert hours_text(hours) == text


def _dipole(f_mhz, h):
    half = 142.6 / f_mhz / 2
    return Antenna(
        wires=(
            Wire(
                points_m=np.array([[-half, 0, h], [half, 0, h]]), radius_m=1e-3, conductor="copper"
            ),
        ),
        feed=Feed(wire=0, distance_m=half),
    )


def test_gain_of_a_solved_antenna_matches_the_spec_path():
    # the same dipole through the engine's JSON contract (the sky layer's own path) and from a solution
    # the planner already has: the same azimuth-averaged gains
    f, h = 3.6, 12.0
    spec = {
        "ground": "average",
        "wires": [
            {
                "points_m": [[-142.6 / f / 2, 0, h], [142.6 / f / 2, 0, h]],
                "diameter_mm": 2.0,
                "conductor": "copper",
            }
        ],
        "feed": {"wire": 0, "distance_m": 142.6 / f / 2},
    }
    (via_spec,) = elevation_gains(frequencies_mhz=[f], antenna=spec, ground=None)
    sol = solve(_dipole(f, h), frequencies_hz=[f * 1e6], ground=parse_ground("average"))[0]
    got = elevation_gain_of(sol)
    assert np.allclose(got.gain_dbi, via_spec.gain_dbi, atol=0.01)
    assert got.radiation_efficiency == pytest.approx(via_spec.radiation_efficiency, abs=1e-3)


def test_the_planned_antennas_gain_is_used():
    # a dipole 3 m over poor ground loses much of its power in the soil: given as the planned antenna
    # it reaches less than the default 0.15-wavelength dipole over average ground
    spec = {
        "site": {"lat_deg": 46.8, "lon_deg": 8.2},
        "date": "2026-12-01",
        "solar": {"f107": 120},
        "channels_mhz": [3.6],
        "power_w": 5,
        "mode": "ssb",
    }
    default = sky_json(copy.deepcopy(spec))
    low = solve(_dipole(3.6, 3.0), frequencies_hz=[3.6e6], ground=parse_ground("poor"))[0]
    planned = sky_json(copy.deepcopy(spec), gains={3.6: elevation_gain_of(low)})
    assert planned["antenna"]["kind"] == "planned"
    ant = planned["channels"][0]["antenna"]
    assert ant["zenith_gain_dbi"] == pytest.approx(low.zenith_gain_dbi, abs=0.01)
    assert ant["radiation_efficiency"] == pytest.approx(low.radiation_efficiency, abs=1e-3)
    snr = [
        r["nvis_snr_db"] for r in planned["channels"][0]["by_hour"] if r["nvis_snr_db"] is not None
    ]
    ref = [
        r["nvis_snr_db"] for r in default["channels"][0]["by_hour"] if r["nvis_snr_db"] is not None
    ]
    assert np.mean(snr) < np.mean(ref) - 3.0
