"""Site hazards on the sketch (power lines, paths), validated at the edge (supports: :mod:`fieldkit.site`)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.errors import (
    InputError,
    array,
    check_keys,
    choice,
    join,
    number,
    require_mapping,
    text,
)

HAZARD_KINDS = ("power_line", "path")
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


@dataclass(frozen=True)
class Path:
    """A path, track or walkway people use (plan polyline [m])."""

    points_m: np.ndarray
    note: str = ""
    kind: str = "path"


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
        if "kind" not in obj:
            raise InputError(
                join(f, "kind"), f"missing; expected one of: {', '.join(HAZARD_KINDS)}"
            )
        kind = choice(obj["kind"], join(f, "kind"), HAZARD_KINDS)
        if "points_m" not in obj:
            raise InputError(join(f, "points_m"), "missing; expected [[x_m, y_m], ...] (2 or more)")
        if kind == "power_line":
            check_keys(obj, f, ("kind", "points_m", "height_m", "voltage_kv", "note", "id"))
            pts = _plan_points(obj["points_m"], join(f, "points_m"))
            if "height_m" not in obj:
                raise InputError(
                    join(f, "height_m"),
                    "missing; expected the height of the lowest conductor above ground in m",
                )
            height = number(
                obj["height_m"], join(f, "height_m"), unit="m", minimum=0.0, exclusive_minimum=True
            )
            volts = None
            if "voltage_kv" in obj:
                volts = number(
                    obj["voltage_kv"],
                    join(f, "voltage_kv"),
                    unit="kV",
                    minimum=0.0,
                    exclusive_minimum=True,
                    maximum=1000.0,
                )
            out.append(
                PowerLine(points_m=pts, height_m=height, voltage_kv=volts, note=_note(obj, f))
            )
        else:
            check_keys(obj, f, ("kind", "points_m", "note", "id"))
            out.append(
                Path(
                    points_m=_plan_points(obj["points_m"], join(f, "points_m")), note=_note(obj, f)
                )
            )
    return out
