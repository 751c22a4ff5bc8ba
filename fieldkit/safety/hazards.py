"""Site hazards on the sketch (power lines, paths), validated at the edge (supports: :mod:`fieldkit.site`)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from fieldkit.errors import (
    InputError,
    array,
    choice,
    join,
    number,
    require_mapping,
    text,
)
from fieldkit.fields import Record, arr, num, string

HAZARD_KINDS = ("power_line", "path")
_KIND = string(
    "kind", required=True, missing=f"missing; expected one of: {', '.join(HAZARD_KINDS)}"
)
_POINTS = arr(
    "points_m",
    required=True,
    missing="missing; expected [[x_m, y_m], ...] (2 or more)",
    description="plan polyline [[x_m, y_m], ...], 2 points or more",
    schema={
        "minItems": 2,
        "items": {"type": "array", "items": {"type": "number"}, "minItems": 2, "maxItems": 2},
    },
)
POWER_LINE = Record(
    "PowerLine",
    (
        replace(_KIND, choices=("power_line",)),
        _POINTS,
        num(
            "height_m",
            "m",
            0.0,
            required=True,
            exclusive_minimum=True,
            missing="missing; expected the height of the lowest conductor above ground in m",
            description="the lowest conductor above ground",
        ),
        num("voltage_kv", "kV", 0.0, 1000.0, exclusive_minimum=True),
        string("note"),
        string("id"),
    ),
    "an overhead power line on the site sketch",
)
PATH = Record(
    "Path",
    (replace(_KIND, choices=("path",)), _POINTS, string("note"), string("id")),
    "a path, track or walkway people use",
)
#: Voltage assumed when a power line's voltage is not given [kV]: the top of the band for which
#: 29 CFR 1910.333(c)(3) asks 10 ft; distribution lines along tracks are usually below it.
ASSUMED_LINE_VOLTAGE_KV = 50.0


@dataclass(frozen=True)
class PowerLine:
    """An overhead power line: plan polyline [m] and conductor height [m] above ground."""

    points_m: np.ndarray  # (n, 2) x east, y north
    height_m: float
    voltage_kv: float | None = None
    note: str = ""
    kind: str = "power_line"
    id: str = ""  # the operator's name for it, if any


@dataclass(frozen=True)
class Path:
    """A path, track or walkway people use (plan polyline [m])."""

    points_m: np.ndarray
    note: str = ""
    kind: str = "path"
    id: str = ""  # the operator's name for it, if any


def _plan_points(value: Any, field: str) -> np.ndarray:
    items = array(value, field)
    if len(items) < 2:
        raise InputError(
            field,
            f"expected at least 2 points [x_m, y_m] for a line, got {len(items)}",
            value=value,
        )
    pts = []
    for i, p in enumerate(items):
        f = join(field, i)
        pair = array(p, f)
        if len(pair) != 2:
            raise InputError(f, f"expected [x_m, y_m], got {len(pair)} number(s)", value=p)
        pts.append([number(pair[0], join(f, 0), unit="m"), number(pair[1], join(f, 1), unit="m")])
    pts_arr = np.array(pts, dtype=float)
    if np.all(np.linalg.norm(pts_arr - pts_arr[0], axis=1) == 0):
        raise InputError(field, "all points coincide; a line needs two different points")
    return pts_arr


def _note(obj: Mapping[str, Any], field: str) -> str:
    return text(obj["note"], join(field, "note"), max_length=500) if "note" in obj else ""


def _id(obj: Mapping[str, Any], field: str) -> str:
    return text(obj["id"], join(field, "id"), max_length=40).strip() if "id" in obj else ""


#: How a hazard without a name of its own is called, numbered from 1 within its kind.
KIND_WORDS = {"power_line": "power line", "path": "path"}


def hazard_names(hazards: list[PowerLine | Path]) -> list[str]:
    """The name each hazard goes by in every text: the id the operator gave, else its kind numbered
    from 1 within that kind ("power line 1", "path 1")."""
    seen: dict[str, int] = {}
    out = []
    for hz in hazards:
        seen[hz.kind] = seen.get(hz.kind, 0) + 1
        out.append(hz.id or f"{KIND_WORDS[hz.kind]} {seen[hz.kind]}")
    return out


def _power_line(obj: Mapping[str, Any], f: str) -> PowerLine:
    POWER_LINE.check(obj, f)
    pts = _plan_points(obj["points_m"], join(f, "points_m"))
    POWER_LINE.require(obj, f, ("height_m",))
    height = POWER_LINE.number(obj, f, "height_m")
    volts = POWER_LINE.number(obj, f, "voltage_kv") if "voltage_kv" in obj else None
    return PowerLine(
        points_m=pts, height_m=height, voltage_kv=volts, note=_note(obj, f), id=_id(obj, f)
    )


def _path(obj: Mapping[str, Any], f: str) -> Path:
    PATH.check(obj, f)
    return Path(
        points_m=_plan_points(obj["points_m"], join(f, "points_m")),
        note=_note(obj, f),
        id=_id(obj, f),
    )


def parse_hazards(value: Any, field: str = "site.hazards") -> list[PowerLine | Path]:
    """Validate the site's hazards.

    Parameters
    ----------
    value : list
        ``[{"kind": "power_line", "points_m": [[x, y], ...], "height_m": 8.5, "voltage_kv"?: 20,
        "note"?: ...}, {"kind": "path", "points_m": [[x, y], ...], "note"?: ...}]`` (metres, kV).
    field : str
        Field path used in error messages.

    Returns
    -------
    list of PowerLine | Path

    Raises
    ------
    fieldkit.errors.InputError
        Naming the field and what is expected (e.g. ``site.hazards[0].height_m``).
    """
    if value is None:
        return []
    out: list[PowerLine | Path] = []
    for i, raw in enumerate(array(value, field)):
        f = join(field, i)
        obj = require_mapping(raw, f)
        kind_field = POWER_LINE.field("kind")
        if "kind" not in obj:
            raise InputError(join(f, "kind"), kind_field.missing)
        kind = choice(obj["kind"], join(f, "kind"), HAZARD_KINDS)
        POWER_LINE.require(obj, f, ("points_m",))
        out.append(_power_line(obj, f) if kind == "power_line" else _path(obj, f))
    return out
