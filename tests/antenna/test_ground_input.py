"""A ground of empty space is refused by name; the limit next to it is free space (Balanis)."""

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Wire, model_json, parse_ground, solve
from fieldkit.errors import InputError


@pytest.mark.parametrize("field", ["ground", "site.ground"])
def test_empty_space_ground_is_refused_by_name(field):
    with pytest.raises(InputError) as e:
        parse_ground({"relative_permittivity": 1, "conductivity_s_m": 0}, field)
    assert e.value.field == f"{field}.relative_permittivity"
    assert "free-space" in e.value.detail


def test_model_contract_refuses_it_before_solving():
    spec = {
        "frequency_mhz": 7.1,
        "ground": {"relative_permittivity": 1, "conductivity_s_m": 0},
        "wires": [{"points_m": [[-10, 0, 8], [10, 0, 8]], "diameter_mm": 2}],
        "feed": {"wire": 0, "distance_m": 10},
    }
    with pytest.raises(InputError) as e:
        model_json(spec)
    assert e.value.field == "ground.relative_permittivity"


def test_next_to_empty_space_the_ground_vanishes():
    # εr → 1, σ → 0: the reflected wave vanishes and the dipole sees free space (Balanis §4.6: a thin
    # half-wave dipole 73 + j42.5 Ω; here the same wire with and without the near-empty half-space)
    f = 7.1e6
    half = 0.24 * 299792458 / f
    ant = Antenna(
        wires=(Wire(points_m=np.array([[-half, 0, 8.0], [half, 0, 8.0]]), radius_m=1e-3),),
        feed=Feed(wire=0, distance_m=half),
    )
    near = solve(
        ant,
        frequencies_hz=[f],
        ground=parse_ground({"relative_permittivity": 1.0001, "conductivity_s_m": 0}),
    )[0]
    free = solve(ant, frequencies_hz=[f], ground=parse_ground("free-space"))[0]
    assert abs(near.impedance_ohm - free.impedance_ohm) < 0.5
