"""The plan input's ``retrim``: a measurement after raising, decoded once.

A dip (``dip_mhz``), an analyser reading (``at_mhz`` with ``x_ohm`` and ``r_ohm``) or an analyser
file (``sweep``: its format and text), each taken where ``at`` says: at the feedpoint (the default)
or at the radio end of the kit's coax.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from fieldkit.errors import InputError, choice, require_mapping
from fieldkit.fields import Record, nested, num, string
from fieldkit.rigging.analyser import MAX_POINTS, MAX_TEXT_BYTES, SWEEP_FORMATS, read_sweep
from fieldkit.rigging.line import MEASURED_AT
from fieldkit.rigging.measured import Reading
from fieldkit.sky.inputs import MAX_CHANNEL_MHZ, MIN_CHANNEL_MHZ

RETRIM_FORMS = ("flat", "sloping", "inverted-v")
SWEEP = Record(
    "AnalyserSweep",
    (
        string(
            "format",
            *SWEEP_FORMATS,
            required=True,
            missing="required: csv or touchstone",
            description="touchstone: a one-port .s1p; csv: a header naming frequency_mhz (or "
            "frequency_khz, frequency_hz) with r_ohm and x_ohm, or swr",
        ),
        string(
            "text",
            required=True,
            missing="required: the analyser file's text",
            schema={"maxLength": MAX_TEXT_BYTES},
            description=f"the file's text: at most {MAX_TEXT_BYTES} bytes and {MAX_POINTS} points",
        ),
        string("name", schema={"maxLength": 200}, description="the file's name, shown back"),
    ),
    "an analyser file's sweep of the raised antenna",
)
RETRIM = Record(
    "Retrim",
    (
        num(
            "frequency_mhz",
            "MHz",
            MIN_CHANNEL_MHZ,
            MAX_CHANNEL_MHZ,
            required=True,
            missing="required: the channel to re-trim for",
            description="one of channels_mhz",
        ),
        string("form", *RETRIM_FORMS),
        num("leg_now_m", "m", 0.5, 200),
        string(
            "at",
            *MEASURED_AT,
            description="where the measurement was taken: feedpoint (default) or radio (the radio "
            "end of kit.coax; R + jX and sweeps are moved to the feedpoint through it)",
        ),
        num("dip_mhz", "MHz", 1.0, 40, description="the measured SWR dip"),
        num("at_mhz", "MHz", 1.0, 40, description="analyser reading: frequency (with x_ohm)"),
        num("r_ohm", "ohm", 0, 5000),
        num("x_ohm", "ohm", -5000, 5000),
        nested("sweep", SWEEP),
    ),
    "a measurement after raising: the SWR dip, R + jX at a frequency, or an analyser file",
)


@dataclass(frozen=True)
class Retrim:
    """A measurement after raising: the channel to re-trim for [Hz], ``form`` restricting it to one
    form, the leg as it hangs now [m] (None: the cut list's), and the reading itself."""

    target_hz: float
    form: str | None = None
    leg_now_m: float | None = None
    reading: Reading = field(default_factory=Reading)
    sweep_name: str | None = None


def _number(obj: Mapping[str, Any], key: str) -> float:
    return RETRIM.number(obj, "retrim", key)


def _sweep(value: Any):
    obj = require_mapping(value, "retrim.sweep")
    SWEEP.check(obj, "retrim.sweep")
    SWEEP.require(obj, "retrim.sweep")
    fmt = choice(obj["format"], "retrim.sweep.format", SWEEP_FORMATS)
    if not isinstance(obj["text"], str):
        raise InputError("retrim.sweep.text", "expected the file's text as a string")
    if "name" in obj and not isinstance(obj["name"], str):
        raise InputError("retrim.sweep.name", "expected the file's name as a string")
    return read_sweep(obj["text"], format=fmt), obj.get("name")


def _reading(obj: Mapping[str, Any], at: str) -> Reading:
    """The measured dip, the analyser's R + jX at a frequency, or a sweep."""
    given = [k for k in ("sweep", "dip_mhz", "at_mhz") if k in obj]
    if len(given) > 1:
        raise InputError(f"retrim.{given[1]}", f"give one measurement: {' or '.join(given)}")
    if "sweep" in obj:
        return Reading(at=at, sweep=_sweep(obj["sweep"])[0])
    if "dip_mhz" in obj:
        return Reading(at=at, dip_hz=_number(obj, "dip_mhz") * 1e6)
    if "at_mhz" in obj and "x_ohm" in obj:
        r = _number(obj, "r_ohm") if "r_ohm" in obj else None
        if r is None and at == "radio":
            raise InputError(
                "retrim.r_ohm",
                "required with at: radio: R with X in ohm, to move the reading through the coax",
            )
        return Reading(
            at=at, at_hz=_number(obj, "at_mhz") * 1e6, r_ohm=r, x_ohm=_number(obj, "x_ohm")
        )
    raise InputError(
        "retrim.dip_mhz",
        "give the measured SWR dip (dip_mhz), or at_mhz with r_ohm and x_ohm, or an analyser "
        "file (sweep)",
    )


def parse_retrim(value: Any, channels: tuple[float, ...]) -> Retrim | None:
    """``{"frequency_mhz", "form"?, "leg_now_m"?, "at"?}`` with ``dip_mhz``, or ``at_mhz`` with
    ``r_ohm`` and ``x_ohm``, or ``sweep``."""
    if value is None:
        return None
    obj = require_mapping(value, "retrim")
    RETRIM.check(obj, "retrim")
    RETRIM.require(obj, "retrim")
    target = _number(obj, "frequency_mhz") * 1e6
    if all(abs(target - c) > 1.0 for c in channels):
        raise InputError("retrim.frequency_mhz", "expected one of channels_mhz")
    form = choice(obj["form"], "retrim.form", RETRIM_FORMS) if "form" in obj else None
    at = choice(obj.get("at", "feedpoint"), "retrim.at", MEASURED_AT)
    leg = _number(obj, "leg_now_m") if "leg_now_m" in obj else None
    name = obj["sweep"].get("name") if isinstance(obj.get("sweep"), Mapping) else None
    return Retrim(target, form, leg, _reading(obj, at), name)
