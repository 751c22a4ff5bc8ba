"""Numerical robustness of the engine: odd but legal geometry gets a finite answer or a clear refusal.

Limits checked against their sources: the thin-wire rule that a segment be several radii long
(NEC-2 User's Guide, Burke & Poggio 1981, Part III §2: Δ/a ≳ 2..8); segments no longer than about
λ/10 (same source); physical bounds of the results (Balanis, Antenna Theory, 4th ed., §2.13–2.14:
radiation efficiency 0..1, SWR ≥ 1, input resistance > 0 for a passive antenna).
"""

from __future__ import annotations

import copy
import math
import re
import time

import pytest

from fieldkit.antenna import model_json
from fieldkit.errors import InputError
from tests.robustness.helpers import DIPOLE, non_finite_paths

C0 = 299_792_458.0  # m/s, SI definition
BOUND_S = 30.0  # longest any single model call here may take (stated in docs/robustness.md)


def spec(**changes) -> dict:
    out = copy.deepcopy(DIPOLE)
    out.update(changes)
    return out


def finite_or_refused(model: dict, *, field_prefix: str | None = None) -> dict | InputError:
    """Run the model; the answer is physical and finite, or an InputError naming a field."""
    start = time.perf_counter()
    try:
        out = model_json(model)
    except InputError as exc:
        assert exc.field and exc.detail, exc
        if field_prefix is not None:
            assert exc.field.startswith(field_prefix), (exc.field, exc.detail)
        return exc
    finally:
        assert time.perf_counter() - start < BOUND_S
    assert non_finite_paths(out) == [], non_finite_paths(out)
    for r in out["results"]:
        assert r["impedance_ohm"]["r"] > 0
        assert 0 <= r["radiation_efficiency"] <= 1.0001
        assert r["swr"] is None or r["swr"] >= 1
        assert r["power_w"]["radiated"] >= 0
    return out


def test_piece_shorter_than_the_thin_wire_limit_is_refused():
    # 10 mm wire, a 15 mm piece: 3 radii, under the 4-radii rule (NEC-2 User's Guide §2)
    model = spec(
        wires=[
            {
                "points_m": [[-20, 0, 10], [-19.985, 0, 10], [20, 0, 10]],
                "diameter_mm": 10,
            }
        ]
    )
    exc = finite_or_refused(model)
    assert isinstance(exc, InputError) and exc.field == "wires[0].points_m[1]"
    assert "thin-wire" in exc.detail


def test_fattest_wire_allowed_still_solves():
    out = finite_or_refused(spec(wires=[{**DIPOLE["wires"][0], "diameter_mm": 100}]))
    assert not isinstance(out, InputError)
    # a fatter dipole resonates at a shorter length (more end effect), so at the same length and
    # frequency it is the more inductive of the two (Balanis, Antenna Theory, ch. 8, the resonant
    # length falls as the radius grows — from memory)
    thin = model_json(spec())["results"][0]["impedance_ohm"]["x"]
    assert out["results"][0]["impedance_ohm"]["x"] > thin


def _fan(n_per_side: int, height_m: float) -> dict:
    """A fan dipole: a short fed centre wire, n arms fanning out from each end (junctions of n+1)."""
    wires = [{"points_m": [[-0.5, 0, height_m], [0.5, 0, height_m]], "diameter_mm": 2}]
    for side in (-1, 1):
        for k in range(n_per_side):
            angle = math.radians(-30 + 60 * k / max(n_per_side - 1, 1))
            length = 10.0 + 2.5 * k  # arms for several bands
            end = [
                side * (0.5 + length * math.cos(angle)),
                length * math.sin(angle),
                height_m - 0.05 * length,  # a little droop
            ]
            wires.append({"points_m": [[side * 0.5, 0, height_m], end], "diameter_mm": 2})
    return spec(frequency_mhz=5.0, wires=wires, feed={"wire": 0, "distance_m": 0.5})


@pytest.mark.slow
def test_junctions_with_many_wires_fan_of_six():
    out = finite_or_refused(_fan(6, 10.0))
    assert not isinstance(out, InputError), out
    assert out["results"][0]["segments"] >= 13 * 15


def test_very_low_height_five_thousandths_of_a_wavelength():
    f = 3.6e6
    h = 0.005 * C0 / f  # 0.42 m
    model = spec(wires=[{"points_m": [[-20, 0, h], [20, 0, h]], "diameter_mm": 2}])
    out = finite_or_refused(model)
    if not isinstance(out, InputError):
        # over perfect ground a dipole this low is nearly shorted by its image: low resistance
        # (Balanis §4.7.2, horizontal dipole over a PEC plane)
        assert out["results"][0]["impedance_ohm"]["r"] < 20


def test_point_at_the_ground_surface_is_refused():
    model = spec(wires=[{"points_m": [[-20, 0, 0.0005], [20, 0, 10]], "diameter_mm": 2}])
    exc = finite_or_refused(model)
    assert isinstance(exc, InputError) and exc.field == "wires[0].points_m[0]"


@pytest.mark.parametrize("z", [-5.0, -0.001, 0.0])
def test_wire_through_the_ground_is_refused(z):
    model = spec(wires=[{"points_m": [[-20, 0, 10], [0, 0, z], [20, 0, 10]], "diameter_mm": 2}])
    exc = finite_or_refused(model)
    assert isinstance(exc, InputError) and exc.field == "wires[0].points_m[1]"


def test_high_frequency_for_the_wire_length():
    # 40 m of wire at 28 MHz is about 3.7 wavelengths: ~300 segments, still inside the limits
    out = finite_or_refused(spec(frequency_mhz=14.2))
    assert not isinstance(out, InputError)
    # at 60 MHz the same wire needs ~640 segments: refused with the limit named
    exc = finite_or_refused(spec(frequency_mhz=60.0))
    assert isinstance(exc, InputError) and exc.field == "wires"
    assert "segments" in exc.detail and "limit" in exc.detail


def test_sea_water_ground_is_answered_or_refused_by_name():
    out = finite_or_refused(spec(ground="sea-water"), field_prefix="ground")
    if isinstance(out, InputError):
        assert "lossy" in out.detail or "ground" in out.detail


def test_wire_almost_touching_another():
    r = 1e-3
    gap = 3 * r  # centre lines 3 radii apart: the surfaces are one radius apart
    model = spec(
        wires=[
            {"points_m": [[-20, 0, 10], [20, 0, 10]], "diameter_mm": 2},
            {"points_m": [[-10, gap, 10], [10, gap, 10]], "diameter_mm": 2},
        ]
    )
    finite_or_refused(model)


def test_wires_touching_or_crossing_are_refused():
    touching = spec(
        wires=[
            {"points_m": [[-20, 0, 10], [20, 0, 10]], "diameter_mm": 2},
            {"points_m": [[-10, 0.0015, 10], [10, 0.0015, 10]], "diameter_mm": 2},
        ]
    )
    exc = finite_or_refused(touching)
    assert isinstance(exc, InputError) and exc.field.startswith("wires[1]")
    crossing = spec(
        wires=[
            {"points_m": [[-20, 0, 10], [20, 0, 10]], "diameter_mm": 2},
            {"points_m": [[0, -5, 8], [0, 5, 12]], "diameter_mm": 2},
        ]
    )
    exc = finite_or_refused(crossing)
    assert isinstance(exc, InputError) and exc.field.startswith("wires[1]")


def test_ten_thousand_wires_are_refused_quickly():
    wires = [
        {"points_m": [[-1, i * 0.1, 10], [1, i * 0.1, 10]], "diameter_mm": 1} for i in range(10_000)
    ]
    start = time.perf_counter()
    exc = finite_or_refused(spec(wires=wires))
    assert isinstance(exc, InputError) and exc.field == "wires"
    assert time.perf_counter() - start < 5.0  # minutes without the limit; slack for a loaded CI


def test_a_wire_of_two_thousand_points_is_refused_quickly():
    """More pieces than the segment limit can never be solved: refused before any O(n²) work."""
    pts = [[-10 + 20 * k / 1999, 0, 10] for k in range(2000)]
    start = time.perf_counter()
    exc = finite_or_refused(
        spec(wires=[{"points_m": pts, "diameter_mm": 0.01}], feed={"wire": 0, "distance_m": 10.005})
    )
    assert isinstance(exc, InputError) and exc.field.startswith("wires")
    assert time.perf_counter() - start < 5.0  # minutes without the limit; slack for a loaded CI


def test_a_frequency_sweep_beyond_the_work_limit_is_refused_quickly():
    """200 frequencies on a 300-segment wire is minutes of work: refused at once, by name."""
    model = spec(
        frequencies_mhz=[14.0 + 0.001 * i for i in range(200)],
        wires=[{"points_m": [[-20, 0, 10], [20, 0, 10]], "diameter_mm": 2}],
    )
    model.pop("frequency_mhz")
    start = time.perf_counter()
    exc = finite_or_refused(model)
    assert isinstance(exc, InputError) and exc.field.startswith("frequencies_mhz"), exc
    assert time.perf_counter() - start < 5.0  # minutes without the limit; slack for a loaded CI


def test_a_long_list_of_specs_is_refused_before_any_is_solved():
    """500 small specs would run for a minute; the total is checked first, naming the one over."""
    specs = [spec() for _ in range(500)]
    start = time.perf_counter()
    exc = finite_or_refused(specs)
    assert isinstance(exc, InputError) and re.fullmatch(r"\[\d+\]\.frequency_mhz", exc.field)
    assert "limit" in exc.detail
    assert time.perf_counter() - start < 5.0


def test_near_field_points_count_toward_the_work_limit():
    """20 000 near-field points (allowed by count) on a dipole is ~20 s of work: refused by name."""
    model = spec(near_field={"points_m": [[i * 0.002, 1.0, 1.8] for i in range(20_000)]})
    start = time.perf_counter()
    exc = finite_or_refused(model)
    assert isinstance(exc, InputError) and exc.field == "near_field.points_m", exc
    assert time.perf_counter() - start < 5.0  # minutes without the limit; slack for a loaded CI
