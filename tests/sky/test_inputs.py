"""Every bad sky input is refused with an InputError that names the field (fieldkit.errors)."""

import copy

import pytest

from fieldkit.errors import InputError
from fieldkit.sky import sky_json
from fieldkit.sky.inputs import parse_sky_spec

GOOD = {
    "site": {"lat_deg": 46.8, "lon_deg": 8.2, "utc_offset_h": 1},
    "date": "2026-12-01",
    "solar": {"f107": 120},
    "channels_mhz": [3.605, 7.055],
    "sounding": {"hour_utc": 14, "fof2_mhz": 7.0, "virtual_height_km": 280},
    "schedule": {"start_utc": "16:00", "end_utc": "20:00"},
    "power_w": 100,
    "mode": "ssb",
    "noise_environment": "rural",
}


def _with(path, value):
    spec = copy.deepcopy(GOOD)
    *parents, last = path
    node = spec
    for key in parents:
        node = node[key]
    if value is _DELETE:
        del node[last]
    else:
        node[last] = value
    return spec


_DELETE = object()

BAD = [
    (("site", "lat_deg"), 91, "site.lat_deg"),
    (("site", "lat_deg"), -90.5, "site.lat_deg"),
    (("site", "lat_deg"), "46.8", "site.lat_deg"),
    (("site", "lon_deg"), 180.1, "site.lon_deg"),
    (("site", "lon_deg"), _DELETE, "site.lon_deg"),
    (("site", "utc_offset_h"), 15, "site.utc_offset_h"),
    (("site", "altitude_m"), 1250, "site.altitude_m"),
    (("site",), [46.8, 8.2], "site"),
    (("date",), "2026-13-01", "date"),
    (("date",), "2026-02-30", "date"),
    (("date",), "yesterday", "date"),
    (("date",), 20261201, "date"),
    (("date",), "1850-01-01", "date"),
    (("date",), _DELETE, "date"),
    (("solar", "f107"), -5, "solar.f107"),
    (("solar", "f107"), 1000, "solar.f107"),
    (("solar",), {"sunspot_number": -1}, "solar.sunspot_number"),
    (("solar",), {}, "solar"),
    (("solar",), {"f107": 120, "sunspot_number": 80}, "solar"),
    (("solar",), {"flux": 120}, "solar.flux"),
    (("channels_mhz",), [3.6, 1.0], "channels_mhz[1]"),
    (("channels_mhz",), [30.5], "channels_mhz[0]"),
    (("channels_mhz",), [], "channels_mhz"),
    (("channels_mhz",), ["20m"], "channels_mhz[0]"),
    (("channels_mhz",), 3.6, "channels_mhz"),
    (("channels_mhz",), [True], "channels_mhz[0]"),
    (("mode",), "usb", "mode"),
    (("noise_environment",), "city", "noise_environment"),
    (("power_w",), 0, "power_w"),
    (("power_w",), -10, "power_w"),
    (("bandwidth_hz",), 1, "bandwidth_hz"),
    (("colour",), "red", "colour"),
    (("sounding", "hour_utc"), 24, "sounding.hour_utc"),
    (("sounding", "fof2_mhz"), _DELETE, "sounding.fof2_mhz"),
    (("sounding", "virtual_height_km"), _DELETE, "sounding.virtual_height_km"),
    (("sounding", "fof2_mhz"), -1, "sounding.fof2_mhz"),
    (("sounding", "virtual_height_km"), 50, "sounding.virtual_height_km"),
    (("sounding", "muf3000_mhz"), 1.0, "sounding.muf3000_mhz"),
    (("sounding", "station"), "X", "sounding.station"),
    (("schedule", "start_utc"), "25:00", "schedule.start_utc"),
    (("schedule", "end_utc"), "8pm", "schedule.end_utc"),
    (("schedule", "distances_km"), [60, 900], "schedule.distances_km[1]"),
    (("schedule", "every"), 1, "schedule.every"),
    (("antenna",), "dipole", "antenna"),
    (("site", "ground"), "swamp", "site.ground"),
    (
        ("site", "ground"),
        {"relative_permittivity": -3, "conductivity_s_m": 0.005},
        "site.ground.relative_permittivity",
    ),
]


@pytest.mark.parametrize(("path", "value", "field"), BAD, ids=[f"{b[2]}={b[1]!r}" for b in BAD])
def test_bad_input_names_the_field(path, value, field):
    with pytest.raises(InputError) as err:
        sky_json(_with(path, value))
    assert err.value.field == field
    assert err.value.detail  # says what is expected


def test_top_level_must_be_an_object():
    with pytest.raises(InputError):
        sky_json([GOOD])


def test_good_input_parses_with_defaults_named():
    spec = copy.deepcopy(GOOD)
    for key in ("power_w", "mode", "noise_environment"):
        del spec[key]
    parsed = parse_sky_spec(spec)
    assert parsed.defaults_used == ("power_w", "mode", "noise_environment")
    assert parsed.mode.name == "ssb" and parsed.power_w == 100.0


def test_sunspot_number_is_converted():
    spec = _with(("solar",), {"sunspot_number": 80})
    # ITU-R P.371-8: 63.7 + 0.728 x 80 + 0.00089 x 6400 = 127.64 sfu (computed)
    assert parse_sky_spec(spec).f107 == pytest.approx(127.636)


def test_band_presets():
    spec = _with(("channels_mhz",), ["80m", "60m", "40m", 4.0])
    assert parse_sky_spec(spec).channels_mhz == (3.6, 5.3595, 7.1, 4.0)
