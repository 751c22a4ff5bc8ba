"""Ground under the antenna: free space, perfect ground, or a lossy half-space (εr, σ), with presets.

References
----------
.. [1] ITU-R Recommendation P.527-3, "Electrical characteristics of the surface of the Earth", 1992
   (ground classes at HF; values from memory, confirm against the original).
.. [2] The ground table widely reprinted in antenna handbooks and used in modelling practice
   (very good / average / poor / very poor).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, Literal

from fieldkit.constants import EPS0
from fieldkit.errors import InputError, join
from fieldkit.model_fields import GROUND_CONSTANTS

GroundKind = Literal["free-space", "perfect", "lossy"]


@dataclass(frozen=True)
class Ground:
    """What lies below z = 0.

    Parameters
    ----------
    kind : {"free-space", "perfect", "lossy"}
        Free space (no ground), a perfectly conducting plane, or a lossy dielectric half-space.
    relative_permittivity : float
        Relative permittivity εr of a lossy ground [-].
    conductivity_s_m : float
        Conductivity σ of a lossy ground [S/m].
    """

    kind: GroundKind = "free-space"
    relative_permittivity: float = 1.0
    conductivity_s_m: float = 0.0

    def complex_permittivity(self, frequency_hz: float) -> complex:
        """εc = εr − jσ/(ω ε0) [-] (time convention e^{jωt})."""
        return complex(
            self.relative_permittivity,
            -self.conductivity_s_m / (2 * math.pi * frequency_hz * EPS0),
        )


# name -> (εr, σ [S/m], source)
GROUND_PRESETS: dict[str, tuple[float, float, str]] = {
    "sea-water": (81.0, 5.0, "ITU-R P.527-3 (from memory)"),
    "fresh-water": (80.0, 0.003, "ITU-R P.527-3 (from memory)"),
    "wet": (30.0, 0.01, "ITU-R P.527-3 wet ground (from memory)"),
    "medium-dry": (15.0, 0.001, "ITU-R P.527-3 medium dry ground (from memory)"),
    "very-dry": (3.0, 0.0001, "ITU-R P.527-3 very dry ground (from memory)"),
    "very-good": (20.0, 0.0303, "modelling practice: rich soil (handbook ground table)"),
    "average": (13.0, 0.005, "modelling practice: clay (handbook ground table)"),
    "poor": (13.0, 0.002, "modelling practice: rocky (handbook ground table)"),
    "very-poor": (5.0, 0.001, "modelling practice: city, industrial (handbook ground table)"),
}
GROUND_NAMES = ("free-space", "perfect", *GROUND_PRESETS)


def parse_ground(value: Any, field: str = "ground") -> Ground:
    """Ground from a preset name or ``{"relative_permittivity", "conductivity_s_m"}``.

    Raises
    ------
    fieldkit.errors.InputError
        Unknown name, unknown keys, or constants out of range.
    """
    if isinstance(value, Ground):
        return value
    if isinstance(value, str):
        if value == "free-space":
            return Ground("free-space")
        if value == "perfect":
            return Ground("perfect")
        if value in GROUND_PRESETS:
            eps, sigma, _ = GROUND_PRESETS[value]
            return Ground("lossy", eps, sigma)
        raise InputError(
            field,
            f"unknown ground {value!r}; expected one of: {', '.join(GROUND_NAMES)} "
            "or {relative_permittivity, conductivity_s_m}",
            value=value,
        )
    if isinstance(value, Mapping):
        GROUND_CONSTANTS.check(value, field)
        GROUND_CONSTANTS.require(value, field)
        eps = GROUND_CONSTANTS.number(value, field, "relative_permittivity")
        sigma = GROUND_CONSTANTS.number(value, field, "conductivity_s_m")
        if eps <= 1.0 and sigma == 0.0:  # a "ground" of empty space: no reflection to model
            raise InputError(
                join(field, "relative_permittivity"),
                'εr = 1 with σ = 0 is empty space, not a ground: use "free-space" for no ground, '
                "or give the soil's constants (average ground: 13 and 0.005 S/m)",
                value=eps,
            )
        return Ground("lossy", eps, sigma)
    raise InputError(
        field,
        f"expected a ground name ({', '.join(GROUND_NAMES)}) or an object, got {value!r}",
        value=value,
    )
