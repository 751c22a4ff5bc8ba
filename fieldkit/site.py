"""The supports on the site sketch: one record and one parser for rigging and safety alike.

A support is anything that can hold a rope end at a usable rope height: a tree, a pole, a mast, a
building corner. A support marked unsafe (dead tree, cracked branch) is never used. This module sits
beside :mod:`fieldkit.errors` below every layer, so the rigging and the safety layer (siblings) share
it without importing each other.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, array, join, require_mapping, text
from fieldkit.fields import Record, flag, num, string

SUPPORT_KINDS = ("tree", "mast", "pole", "building", "vehicle", "other")
DEFAULT_SUPPORT_KIND = "tree"  # a support drawn without a kind is a tree: the usual case
MAX_SUPPORTS = 40
MAX_ID_LENGTH = 20
HEIGHT_RANGE_M = (0.5, 60.0)  # a rope height a throw line or a pole reaches
POSITION_RANGE_M = (-5000.0, 5000.0)  # within 5 km of the sketch's origin
TRUNK_RADIUS_RANGE_M = (0.0, 10.0)  # a trunk, a pole, or a canopy the wire must keep off
SUPPORT = Record(
    "Support",
    (
        string("id", required=True, description=f"unique, at most {MAX_ID_LENGTH} characters"),
        string("kind", *SUPPORT_KINDS, description=f"default {DEFAULT_SUPPORT_KIND}"),
        num("height_m", "m", *HEIGHT_RANGE_M, required=True, description="usable rope height"),
        num("x_m", "m", *POSITION_RANGE_M, required=True, description="east of the origin"),
        num("y_m", "m", *POSITION_RANGE_M, required=True, description="north of the origin"),
        flag("unsafe", description="never used (dead tree, cracked branch)"),
        num(
            "trunk_radius_m",
            "m",
            *TRUNK_RADIUS_RANGE_M,
            description="trunk or canopy radius the wire and ropes keep off; default 0.3 for a "
            "tree, 0.1 otherwise",
        ),
        string("note"),
    ),
    "a support on the site sketch",
)


@dataclass(frozen=True)
class Support:
    """One support: id, kind, usable rope height [m], position x (east), y (north) [m], unsafe flag,
    and the radius the wire and ropes must keep off (trunk or canopy; None: the kind's default) [m]."""

    id: str
    kind: str
    height_m: float
    x_m: float
    y_m: float
    unsafe: bool = False
    trunk_radius_m: float | None = None


def _kind(obj: Mapping[str, Any], field: str) -> str:
    kind = obj.get("kind", DEFAULT_SUPPORT_KIND)
    if kind not in SUPPORT_KINDS:
        raise InputError(
            join(field, "kind"), f"expected one of: {', '.join(SUPPORT_KINDS)}; got {kind!r}"
        )
    return kind


def _unsafe(obj: Mapping[str, Any], field: str) -> bool:
    unsafe = obj.get("unsafe", False)
    if not isinstance(unsafe, bool):
        raise InputError(join(field, "unsafe"), f"expected true or false, got {unsafe!r}")
    return unsafe


def parse_support(
    value: Any, field: str, taken: set[str] | frozenset[str] = frozenset()
) -> Support:
    """One support of the sketch (``note`` allowed and ignored); its id must not be in ``taken``."""
    obj = require_mapping(value, field)
    SUPPORT.check(obj, field)
    SUPPORT.require(obj, field)
    sid = text(obj["id"], join(field, "id"), max_length=MAX_ID_LENGTH)
    if sid in taken:
        raise InputError(join(field, "id"), f"duplicate support id {sid!r}")
    kind, unsafe = _kind(obj, field), _unsafe(obj, field)
    return Support(
        id=sid,
        kind=kind,
        height_m=SUPPORT.number(obj, field, "height_m"),
        x_m=SUPPORT.number(obj, field, "x_m"),
        y_m=SUPPORT.number(obj, field, "y_m"),
        unsafe=unsafe,
        trunk_radius_m=(
            SUPPORT.number(obj, field, "trunk_radius_m") if "trunk_radius_m" in obj else None
        ),
    )


def parse_supports(value: Any, field: str = "site.supports") -> list[Support]:
    """Validate the site's supports (ids unique; at most 40)."""
    out: list[Support] = []
    seen: set[str] = set()
    for i, item in enumerate(array(value, field, max_items=MAX_SUPPORTS)):
        support = parse_support(item, join(field, i), seen)
        seen.add(support.id)
        out.append(support)
    return out
