"""Below 3 m: the ground under the low wire as a zone to fence, and the wire-within-reach item
(hand-made sketches; the 3 m figure is common practice: a raised hand reaches ~2.4 m, a carried pole
or a walking head more)."""

import numpy as np
import pytest

from fieldkit.antenna import Ground
from fieldkit.safety import safety_block
from fieldkit.safety.low_wire import low_wire_zones

HALF, APEX = 10.0, 8.0


def _vee(end_z):
    return {
        "form": "inverted-v",
        "frequency_mhz": 7.1,
        "supports_used": ["M1"],
        "rope_heights_m": {"M1": APEX},
        "hung_wire_m": [[-HALF, 0, end_z], [0, 0, APEX], [HALF, 0, end_z]],
        "feed_distance_m": float(np.hypot(HALF, APEX - end_z)),
        "wire": {"diameter_mm": 1.6, "conductor": "copper"},
        "feedpoint_height_m": APEX,
        "mast": {"id": "M1", "height_m": APEX, "guys": 3},
        "swr": 1.2,
    }


SITE = {"ground": "average", "supports": [], "hazards": []}


def test_zone_under_the_low_ends_by_hand():
    # ends at 2 m rising straight to 8 m at the middle: z = 2 + 6 (x + 10)/10 reaches 3 m at
    # x = −8.33 m (and +8.33 m): each zone runs from the end to there, widened by 1 m (computed)
    zones = low_wire_zones(np.array(_vee(2.0)["hung_wire_m"], float))
    assert len(zones) == 2
    west = np.array(min(zones, key=lambda z: min(p[0] for p in z)))
    assert west[:, 0].min() == pytest.approx(-11.0, abs=0.01)
    assert west[:, 0].max() == pytest.approx(-10 + 10 / 6 + 1.0, abs=0.01)
    assert west[:, 1].min() == pytest.approx(-1.0, abs=0.01)
    assert west[:, 1].max() == pytest.approx(1.0, abs=0.01)
    assert low_wire_zones(np.array(_vee(3.5)["hung_wire_m"], float)) == []


@pytest.mark.parametrize(("end_z", "low"), [(2.8, True), (3.5, False)])
def test_block_below_three_metres(end_z, low):
    # 5 W SSB: no RF keep-out zone at all, yet a wire at 2.8 m gets the reach item and its zone
    out = safety_block(
        option=_vee(end_z),
        site=SITE,
        radio={"power_w": 5, "mode": "ssb"},
        ground=Ground("lossy", 13, 0.005),
    )
    ids = {it["id"] for it in out["checklist"]}
    assert ("pre-wire-in-reach" in ids) == low
    assert bool(out["low_wire_zones_m"]) == low
