"""The FCC OET Bulletin 65 far-field estimate, shown beside the near-field result.

OET 65 estimates the power density of an antenna from its EIRP, with a factor 2.56 (= 1.6², a 60 %
field reflection from the ground adding in phase) for ground reflection:

    S = 2.56 · EIRP / (4 π R²)   ⇒   R = √(2.56 · EIRP / (4 π S_limit))

It assumes the person is in the far field. Within a wavelength of an HF dipole (80 m at 3.75 MHz) the
fields are reactive near fields — strongest close to the high-voltage wire ends — so the estimate can be
far off in either direction. fieldkit computes the keep-out zone from the engine's near field and gives
this figure only for comparison.

References
----------
.. [1] FCC OET Bulletin 65, Edition 97-01 (1997), eq. (10) S = 0.64·EIRP/(π R²) [equivalently
   2.56·EIRP/(4 π R²)], and Supplement B for amateur stations.
.. [2] Balanis, Antenna Theory, 4th ed., §4.6: half-wave dipole directivity 1.641 (2.15 dBi).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: Ground-reflection factor of OET Bulletin 65 (1.6² for a 60 % reflection in phase).
GROUND_REFLECTION_FACTOR = 2.56
#: Gain used for the estimate: the free-space half-wave dipole, 2.15 dBi (Balanis §4.6). OET 65's factor
#: 2.56 already stands for the ground, so the gain over ground would count the ground twice.
DIPOLE_GAIN_DBI = 2.15

NOTE = (
    "OET Bulletin 65 far-field estimate (ground factor 2.56, dipole 2.15 dBi): crude this close to an HF "
    "antenna — people under a low dipole stand in its reactive near field, strongest near the wire "
    "ends, where the estimate can be wrong either way. The keep-out zone comes from the near field."
)


@dataclass(frozen=True)
class Oet65Estimate:
    eirp_w: float  # time-averaged EIRP [W]
    gain_dbi: float
    distance_m: float  # distance at which S falls to the limit [m]

    def to_json(self) -> dict:
        return {
            "eirp_w": round(self.eirp_w, 3),
            "gain_dbi": self.gain_dbi,
            "ground_factor": GROUND_REFLECTION_FACTOR,
            "distance_m": round(self.distance_m, 3),
            "note": NOTE,
        }


def power_density_w_m2(*, eirp_w: float, distance_m: float) -> float:
    """OET 65 power density with ground reflection at a distance [W/m²]."""
    return GROUND_REFLECTION_FACTOR * eirp_w / (4 * math.pi * distance_m**2)


def oet65_estimate(
    *, average_power_w: float, s_limit_w_m2: float, gain_dbi: float = DIPOLE_GAIN_DBI
) -> Oet65Estimate:
    """Distance at which the OET 65 estimate meets the limit.

    Parameters
    ----------
    average_power_w : float
        Time-averaged power into the antenna [W] (duty factor and transmit fraction applied).
    s_limit_w_m2 : float
        Power-density limit [W/m²] (plane-wave equivalent where the table gives none).
    gain_dbi : float
        Antenna gain [dBi]; the free-space dipole by default.
    """
    eirp = average_power_w * 10 ** (gain_dbi / 10)
    return Oet65Estimate(
        eirp_w=eirp,
        gain_dbi=gain_dbi,
        distance_m=math.sqrt(GROUND_REFLECTION_FACTOR * eirp / (4 * math.pi * s_limit_w_m2)),
    )
