"""A height sweep solved together (fieldkit.antenna.sweep) gives the JSON of each spec solved alone.

The reference is the engine's own one-spec path, which the NEC-2 comparisons of this directory
check (test_nec_ideal, test_nec_lossy, test_nec_property); the sweep only shares work between
translated copies, so its output must be the same, to the printed digit.
"""

from __future__ import annotations

import copy

import pytest

from fieldkit.antenna import model_json, spec, sweep


def _flat(height_m: float, **extra) -> dict:
    return {
        "frequency_mhz": 3.6,
        "ground": "average",
        "wires": [
            {
                "points_m": [[-20.0, 0.0, height_m], [20.0, 0.0, height_m]],
                "diameter_mm": 2.0,
                "conductor": "copper",
            }
        ],
        "feed": {"wire": 0, "distance_m": 20.0},
        "pattern": {"elevation_deg": list(range(0, 91, 5)), "azimuth_deg": [0, 90]},
        **extra,
    }


def _inverted_v(apex_m: float, **extra) -> dict:
    # legs 19 m long drooping 4 m each way: every coordinate a multiple of 1/8 m, so the copies
    # are translations to the bit
    return {
        "frequency_mhz": 7.1,
        "ground": "poor",
        "wires": [
            {
                "points_m": [
                    [-9.5, 0.0, apex_m - 4.0],
                    [0.0, 0.0, apex_m],
                    [9.5, 0.0, apex_m - 4.0],
                ],
                "diameter_mm": 1.6,
                "conductor": "copper",
                "insulation": {"thickness_mm": 0.8, "relative_permittivity": 3.5},
            }
        ],
        "feed": {"wire": 0, "distance_m": (9.5**2 + 4.0**2) ** 0.5},
        "power_w": 100,
        **extra,
    }


def _alone(specs: list[dict]) -> list[dict]:
    return [model_json(copy.deepcopy(s)) for s in specs]


@pytest.fixture()
def batches(monkeypatch):
    """Counts the translated groups solved together (the real solver runs)."""
    calls = []
    real = spec.solve_translated

    def counted(antennas, meshes, **kw):
        calls.append(len(antennas))
        return real(antennas, meshes, **kw)

    monkeypatch.setattr(spec, "solve_translated", counted)
    return calls


@pytest.mark.parametrize("ground", ["average", "perfect", "free-space", "sea-water"])
def test_flat_sweep_equals_specs_alone(batches, ground):
    specs = [_flat(h, ground=ground) for h in (4.0, 6.5, 9.0, 12.25, 18.0)]
    together = model_json(copy.deepcopy(specs))
    assert batches == [5]
    assert together == _alone(specs)


def test_inverted_v_sweep_with_two_frequencies_equals_specs_alone(batches):
    specs = []
    for apex in (8.0, 9.5, 11.0, 14.0):
        s = _inverted_v(apex)
        s.pop("frequency_mhz")
        s["frequencies_mhz"] = [7.0, 7.2]
        specs.append(s)
    together = model_json(copy.deepcopy(specs))
    assert batches == [4]
    assert together == _alone(specs)


def test_mixed_list_keeps_order_and_solves_only_copies_together(batches):
    specs = [
        _flat(5.0),
        _inverted_v(10.0),
        _flat(7.0),
        _flat(7.0, near_field={"points_m": [[0, 0, 1.8]]}),  # near field: solved alone
        _flat(9.0, power_w=100),  # another power: another group of one
        _flat(11.0),
    ]
    together = model_json(copy.deepcopy(specs))
    assert batches == [3]
    assert together == _alone(specs)


def test_a_sweep_shares_one_mesh_shape():
    prepared = [spec._prepare(_flat(h), "") for h in (3.0, 10.0, 25.0)]
    keys = {sweep.translation_key(p["antenna"], mesh) for p, _w, mesh in prepared}
    assert len(keys) == 1
    other = spec._prepare(_flat(3.0, wires=[{**_flat(3.0)["wires"][0], "conductor": "steel"}]), "")
    assert sweep.translation_key(other[0]["antenna"], other[2]) not in keys
