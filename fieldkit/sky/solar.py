"""Solar activity indices: F10.7 radio flux and the smoothed sunspot number R12.

References
----------
.. [1] ITU-R P.371-8 (1999), "Choice of indices for long-term ionospheric predictions":
   ``Phi12 = 63.7 + 0.728 R12 + 0.00089 R12^2`` (from memory). IRI-2020 (irisub.for) and PyIRI's
   ``R12_2_F107`` use the same relation with 63.75.
"""

from __future__ import annotations

import math

P371_A = 63.7  # sfu; ITU-R P.371-8 (from memory)
P371_B = 0.728  # sfu per sunspot; ITU-R P.371-8
P371_C = 0.00089  # sfu per sunspot^2; ITU-R P.371-8


def f107_from_sunspot(*, sunspot_number: float) -> float:
    """F10.7 [sfu] from the 12-month smoothed sunspot number R12 (ITU-R P.371-8)."""
    r = sunspot_number
    return P371_A + P371_B * r + P371_C * r * r


def sunspot_from_f107(*, f107: float) -> float:
    """R12 from F10.7 [sfu]: the positive root of the ITU-R P.371-8 relation (0 below 63.7 sfu)."""
    c = P371_A - f107
    disc = P371_B * P371_B - 4.0 * P371_C * c
    return max((-P371_B + math.sqrt(disc)) / (2.0 * P371_C), 0.0)
