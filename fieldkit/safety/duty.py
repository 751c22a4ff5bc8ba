"""Time averaging of a transmitter's output: mode duty factor and the fraction of time on the air.

Exposure limits are averages over 6 or 30 minutes (see :mod:`fieldkit.safety.limits`), so the field
that counts is the peak-envelope field scaled by the mode's duty factor and by the fraction of the
averaging time the operator actually transmits. Both scale power, so fields scale with their square root.

References
----------
.. [1] FCC OET Bulletin 65, Supplement B (amateur radio stations), 1997, Table 1 "operating duty factor
   of modes": conversational SSB about 20 %, CW about 40 %, FM and continuous data 100 %. From memory.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import choice, join, require_mapping
from fieldkit.fields import Record, num, string

#: Mode duty factor: average power over peak-envelope power while keyed (OET 65 Suppl. B, from memory).
MODE_DUTY_FACTOR: dict[str, float] = {
    "ssb": 0.20,  # conversational SSB voice, no heavy speech processing
    "cw": 0.40,  # conversational CW
    "data": 1.00,  # continuous-carrier data modes
    "fm": 1.00,  # constant-envelope FM
}
#: Plain names of the modes, for item texts.
MODE_LABEL = {"ssb": "SSB", "cw": "CW", "data": "data", "fm": "FM"}
#: Default fraction of the averaging time spent transmitting: the worst case (on the air throughout).
DEFAULT_TRANSMIT_FRACTION = 1.0


@dataclass(frozen=True)
class Radio:
    """The transmitter as far as exposure is concerned."""

    power_w: float  # peak-envelope power delivered to the feedline [W]
    mode: str
    transmit_fraction: float = DEFAULT_TRANSMIT_FRACTION  # share of the averaging time on the air

    @property
    def duty_factor(self) -> float:
        return MODE_DUTY_FACTOR[self.mode]

    @property
    def averaging_factor(self) -> float:
        """Time-averaged power over peak-envelope power (duty factor × transmit fraction)."""
        return self.duty_factor * self.transmit_fraction

    @property
    def average_power_w(self) -> float:
        return self.power_w * self.averaging_factor

    def label(self) -> str:
        return f"{self.power_w:g} W {MODE_LABEL[self.mode]}"

    def to_json(self) -> dict[str, Any]:
        return {
            "power_w": self.power_w,
            "mode": self.mode,
            "duty_factor": self.duty_factor,
            "transmit_fraction": self.transmit_fraction,
            "average_power_w": round(self.average_power_w, 4),
            "duty_source": "OET Bulletin 65 Supplement B, Table 1 (from memory)",
        }


RADIO = Record(
    "Radio",
    (
        num(
            "power_w",
            "W",
            0.0,
            required=True,
            exclusive_minimum=True,
            missing="missing; expected the transmitter power in W",
            description="peak-envelope power into the feedline",
        ),
        string(
            "mode",
            *MODE_DUTY_FACTOR,
            required=True,
            missing=f"missing; expected one of: {', '.join(MODE_DUTY_FACTOR)}",
        ),
        num(
            "transmit_fraction",
            "",
            0.0,
            1.0,
            exclusive_minimum=True,
            description="share of the averaging time on the air (default 1, the worst case)",
        ),
        string("note"),
    ),
    "the transmitter, as far as RF exposure is concerned",
)


def parse_radio(value: Any, field: str = "radio") -> Radio:
    """Validate the radio JSON: ``{"power_w", "mode", "transmit_fraction"?}``.

    ``transmit_fraction`` (0–1] is the share of the averaging time spent transmitting; when absent the
    worst case 1.0 is used and said so in the output.
    """
    obj: Mapping[str, Any] = require_mapping(value, field)
    RADIO.check(obj, field)
    RADIO.require(obj, field)
    power = RADIO.number(obj, field, "power_w")
    mode = choice(obj["mode"], join(field, "mode"), MODE_DUTY_FACTOR)
    fraction = DEFAULT_TRANSMIT_FRACTION
    if "transmit_fraction" in obj:
        fraction = RADIO.number(obj, field, "transmit_fraction")
    return Radio(power_w=power, mode=mode, transmit_fraction=fraction)
