"""The `fieldkit model` JSON contract: validate a spec, solve it, and report the results.

See ARCHITECTURE.md, "Contract: fieldkit model". JSON carries units in its names (``_mm``, ``_m``,
``_mhz``); everything inside is SI.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S
from fieldkit.errors import InputError, array, choice, join, number, require_mapping
from fieldkit.model_fields import (
    FEED,
    MAX_COORDINATE_M,
    MAX_NEAR_FIELD_POINTS,
    MAX_WIRES,
    MODEL,
    MODEL_INSULATION,
    MODEL_RESULT,
    MODEL_SOLUTION,
    MODEL_WIRE,
    NEAR_FIELD,
    PATTERN,
)

from .blas import single_threaded
from .grounds import parse_ground
from .materials import CONDUCTORS, Insulation
from .mesh import Antenna, Feed, Wire, checked_mesh
from .solver import MAX_FREQUENCY_HZ, MIN_FREQUENCY_HZ, solve
from .sweep import figures_together, solve_translated, translation_key

SPEC_KEYS = MODEL.names
WIRE_KEYS = MODEL_WIRE.names
MAX_PATTERN_POINTS = 200_000
# Work bound of one call (a CLI run or an API request). Cost per frequency ≈ segments²/1000 + 1 work
# units, plus near-field points and pattern directions per segment; one unit is 0.01-0.05 s on the
# shared 2-core test machine (measured, docs/robustness.md: 562 segments 9-12 s, 282 segments
# 0.9-5.5 s per frequency; 10 000 near-field points on 40 segments 6.8 s; 200 000 directions 3.5-7 s),
# so 400 units keep a call within ~15 s there and refuse, at once, work that would run for minutes.
WORK_SEGMENTS_SQUARED = 1000.0
WORK_NEAR_POINT_SEGMENTS = 2000.0
WORK_DIRECTION_SEGMENTS = 50_000.0
MAX_WORK_UNITS = 400.0


def _point(value: Any, field: str) -> list[float]:
    pt = array(value, field, min_items=3, max_items=3)
    return [
        number(c, join(field, i), unit="m", minimum=-MAX_COORDINATE_M, maximum=MAX_COORDINATE_M)
        for i, c in enumerate(pt)
    ]


def _frequencies(spec: Mapping[str, Any], field: str) -> list[float]:
    lo, hi = MIN_FREQUENCY_HZ / 1e6, MAX_FREQUENCY_HZ / 1e6
    if "frequency_mhz" in spec and "frequencies_mhz" in spec:
        raise InputError(
            join(field, "frequencies_mhz"), "give frequency_mhz or frequencies_mhz, not both"
        )
    if "frequency_mhz" in spec:
        return [
            number(
                spec["frequency_mhz"],
                join(field, "frequency_mhz"),
                unit="MHz",
                minimum=lo,
                maximum=hi,
            )
        ]
    if "frequencies_mhz" in spec:
        name = join(field, "frequencies_mhz")
        items = array(spec["frequencies_mhz"], name, min_items=1, max_items=200)
        return [
            number(v, join(name, i), unit="MHz", minimum=lo, maximum=hi)
            for i, v in enumerate(items)
        ]
    raise InputError(
        join(field, "frequency_mhz"), "required: a frequency in MHz (or frequencies_mhz)"
    )


def _wire(value: Any, field: str) -> Wire:
    w = require_mapping(value, field)
    MODEL_WIRE.check(w, field)
    MODEL_WIRE.require(w, field)
    pts_name = join(field, "points_m")
    pts = array(w["points_m"], pts_name, min_items=2, max_items=2000)
    points = np.array([_point(p, join(pts_name, i)) for i, p in enumerate(pts)])
    diameter = MODEL_WIRE.number(w, field, "diameter_mm")
    conductor = choice(w.get("conductor", "copper"), join(field, "conductor"), CONDUCTORS)
    insulation = None
    if w.get("insulation") is not None:
        ins_name = join(field, "insulation")
        ins = require_mapping(w["insulation"], ins_name)
        MODEL_INSULATION.check(ins, ins_name)
        MODEL_INSULATION.require(ins, ins_name)
        insulation = Insulation(
            thickness_m=MODEL_INSULATION.number(ins, ins_name, "thickness_mm") / 1e3,
            relative_permittivity=MODEL_INSULATION.number(ins, ins_name, "relative_permittivity"),
        )
    return Wire(
        points_m=points, radius_m=diameter / 2e3, conductor=conductor, insulation=insulation
    )


def _angles(value: Any, field: str, lo: float, hi: float) -> np.ndarray:
    items = array(value, field, min_items=1, max_items=3601)
    # fast path: plain finite numbers within bounds (the usual case); anything else goes through
    # `number` item by item so that the error names the item
    if all(type(v) is float or type(v) is int for v in items):
        arr = np.array(items, dtype=float)
        if np.all(np.isfinite(arr)) and arr.min() >= lo and arr.max() <= hi:
            return arr
    return np.array(
        [number(v, join(field, i), unit="deg", minimum=lo, maximum=hi) for i, v in enumerate(items)]
    )


def parse_spec(spec: Any, field: str = "") -> dict[str, Any]:
    """Validate one model spec; returns the engine objects and options."""
    spec = require_mapping(spec, field)
    MODEL.check(spec, field)
    freqs = _frequencies(spec, field)
    MODEL.require(spec, field, ("ground",))
    ground = parse_ground(spec["ground"], join(field, "ground"))
    MODEL.require(spec, field, ("wires",))
    wires_name = join(field, "wires")
    wires = tuple(
        _wire(w, join(wires_name, i))
        for i, w in enumerate(array(spec["wires"], wires_name, min_items=1, max_items=MAX_WIRES))
    )
    MODEL.require(spec, field, ("feed",))
    feed_name = join(field, "feed")
    feed = require_mapping(spec["feed"], feed_name)
    FEED.check(feed, feed_name)
    FEED.require(feed, feed_name)
    feed_obj = Feed(
        wire=number(
            feed["wire"], join(feed_name, "wire"), minimum=0, maximum=len(wires) - 1, integer=True
        ),
        distance_m=FEED.number(feed, feed_name, "distance_m"),
    )
    power = MODEL.number(spec, field, "power_w", default=1.0)
    z_ref = MODEL.number(spec, field, "reference_impedance_ohm", default=50.0)
    pattern = None
    if spec.get("pattern") is not None:
        pname = join(field, "pattern")
        p = require_mapping(spec["pattern"], pname)
        PATTERN.check(p, pname)
        PATTERN.require(p, pname)
        lo = -90.0 if ground.kind == "free-space" else 0.0
        el = _angles(p["elevation_deg"], join(pname, "elevation_deg"), lo, 90.0)
        az = _angles(p["azimuth_deg"], join(pname, "azimuth_deg"), -360.0, 360.0)
        if el.size * az.size > MAX_PATTERN_POINTS:
            raise InputError(
                pname, f"expected at most {MAX_PATTERN_POINTS} directions, got {el.size * az.size}"
            )
        pattern = (el, az)
    near = None
    if spec.get("near_field") is not None:
        nname = join(field, "near_field")
        n = require_mapping(spec["near_field"], nname)
        NEAR_FIELD.check(n, nname)
        NEAR_FIELD.require(n, nname)
        pts_name = join(nname, "points_m")
        items = array(n["points_m"], pts_name, min_items=1, max_items=MAX_NEAR_FIELD_POINTS)
        near = np.array([_point(p, join(pts_name, i)) for i, p in enumerate(items)])
        if ground.kind != "free-space":
            low = np.nonzero(near[:, 2] < 0)[0]
            if low.size:
                raise InputError(
                    join(pts_name, int(low[0])), "expected a point at or above the ground (z ≥ 0)"
                )
    return {
        "antenna": Antenna(wires=wires, feed=feed_obj),
        "frequencies_hz": [f * 1e6 for f in freqs],
        "ground": ground,
        "power_w": power,
        "reference_impedance_ohm": z_ref,
        "pattern": pattern,
        "near_field": near,
    }


def _round(x: float, digits: int = 4) -> float:
    return float(f"{x:.{digits}g}") if np.isfinite(x) else x


def _result(sol, pattern, near, pol=None) -> dict[str, Any]:
    z = sol.impedance_ohm
    bw = sol.beamwidth_deg()
    out: dict[str, Any] = {
        "frequency_mhz": sol.frequency_hz / 1e6,
        "impedance_ohm": {"r": round(z.real, 3), "x": round(z.imag, 3)},
        "swr": round(sol.swr, 3) if np.isfinite(sol.swr) else None,
        "radiation_efficiency": round(sol.radiation_efficiency, 4),
        "zenith_gain_dbi": round(sol.zenith_gain_dbi, 2),
        "max_gain_dbi": round(sol.max_gain_dbi, 2),
        "max_gain_elevation_deg": round(sol.max_gain_elevation_deg, 2),
        "max_gain_azimuth_deg": round(sol.max_gain_azimuth_deg, 2),
        "beamwidth_deg": {k: round(v, 1) for k, v in bw.items()},
        "wire_azimuth_deg": round(sol.wire_azimuth_deg(), 1),
        "power_w": {k: _round(v, 5) for k, v in sol.power_w.items()},
        "segments": sol.mesh.n_segments,
        "feed_current_a": round((sol.power_w["input"] / z.real) ** 0.5, 5),
    }
    if pattern is not None:
        el, az = pattern
        pol = pol if pol is not None else sol.gain_dbi_by_polarisation(el, az)
        total = 10 * np.log10(10 ** (pol["vertical"] / 10) + 10 ** (pol["horizontal"] / 10))
        out["pattern"] = {"elevation_deg": el.tolist(), "azimuth_deg": az.tolist()}
        out["gain_dbi"] = np.round(total, 2).tolist()
        out["gain_dbi_horizontal"] = np.round(pol["horizontal"], 2).tolist()
        out["gain_dbi_vertical"] = np.round(pol["vertical"], 2).tolist()
    if near is not None:
        e, h = sol.near_field(near)
        out["near_field"] = {
            "points_m": near.tolist(),
            "low_accuracy_points": _far_from_wires(sol, near),
            "e_v_per_m": np.round(np.linalg.norm(e, axis=1), 4).tolist(),
            "h_a_per_m": np.round(np.linalg.norm(h, axis=1), 6).tolist(),
            "e_vector_v_per_m": [[{"re": c.real, "im": c.imag} for c in row] for row in e.tolist()],
            "h_vector_a_per_m": [[{"re": c.real, "im": c.imag} for c in row] for row in h.tolist()],
        }
    return MODEL_SOLUTION.written(out)


NEAR_FIELD_RANGE_WL = (
    0.4  # complex-image ground is checked to this horizontal distance (docs/engine.md)
)


def _far_from_wires(sol, points: np.ndarray) -> list[int]:
    """Indices of points (over lossy ground) farther than NEAR_FIELD_RANGE_WL from every wire point.

    There the reflected field from the complex images loses accuracy (tens of % at 1 λ), while the
    field itself is weak; the keep-out zones lie well inside this range.
    """
    if sol.ground.kind != "lossy":
        return []
    lam = SPEED_OF_LIGHT_M_S / sol.frequency_hz
    c = sol.mesh.centre
    d = np.hypot(points[:, None, 0] - c[None, :, 0], points[:, None, 1] - c[None, :, 1]).min(axis=1)
    return np.nonzero(d > NEAR_FIELD_RANGE_WL * lam)[0].tolist()


def _prefixed(err: InputError, field: str) -> InputError:
    if field and not err.field.startswith(field):
        return InputError(join(field, err.field), err.detail, value=err.value)
    return err


def _prepare(spec: Any, field: str) -> tuple[dict[str, Any], dict[str, float], Any]:
    """The parsed spec, its work units by cause and its mesh (geometry checked here)."""
    p = parse_spec(spec, field)
    try:
        mesh = checked_mesh(p["antenna"], p["ground"], float(max(p["frequencies_hz"])))
    except InputError as err:
        raise _prefixed(err, field) from None
    n, n_freq = mesh.n_segments, len(p["frequencies_hz"])
    directions = 0 if p["pattern"] is None else p["pattern"][0].size * p["pattern"][1].size
    near = 0 if p["near_field"] is None else len(p["near_field"])
    work = {
        "frequencies_mhz" if n_freq > 1 else "frequency_mhz": n_freq
        * (n * n / WORK_SEGMENTS_SQUARED + 1.0),
        "near_field.points_m": n_freq * n * near / WORK_NEAR_POINT_SEGMENTS,
        "pattern": n_freq * n * directions / WORK_DIRECTION_SEGMENTS,
    }
    return p, work, mesh


def _check_work(
    prepared: list[tuple[dict[str, Any], dict[str, float], Any]], fields: list[str]
) -> None:
    """Refuse a call whose total work is beyond :data:`MAX_WORK_UNITS`, naming its largest cause."""
    total = 0.0
    for (p, work, mesh), field in zip(prepared, fields, strict=True):
        n = mesh.n_segments
        total += sum(work.values())
        if total > MAX_WORK_UNITS:
            cause = max(work, key=work.get)
            before = " (with the specs before it)" if total > sum(work.values()) else ""
            raise InputError(
                join(field, cause),
                f"too much work for one request: {len(p['frequencies_hz'])} frequencies on {n} "
                f"segments{before} is about {total:.0f} work units, the limit is "
                f"{MAX_WORK_UNITS:.0f}; use fewer frequencies, points or directions, less wire, "
                "or split the request",
            )


def _solve_one(p: dict[str, Any], field: str) -> dict[str, Any]:
    try:
        sols = solve(
            p["antenna"],
            frequencies_hz=p["frequencies_hz"],
            ground=p["ground"],
            power_w=p["power_w"],
            reference_impedance_ohm=p["reference_impedance_ohm"],
        )
    except InputError as err:
        raise _prefixed(err, field) from None
    return MODEL_RESULT.written(
        {"results": [_result(s, p["pattern"], p["near_field"]) for s in sols]}
    )


def _sweep_key(p: dict[str, Any], mesh) -> tuple | None:
    """Specs with equal keys are translated copies solved alike (a height sweep), else None."""
    if p["near_field"] is not None:
        return None
    pattern = None if p["pattern"] is None else tuple(a.tobytes() for a in p["pattern"])
    return (
        translation_key(p["antenna"], mesh),
        tuple(p["frequencies_hz"]),
        p["ground"],
        p["power_w"],
        p["reference_impedance_ohm"],
        pattern,
    )


def _solve_sweep(group: list[tuple[dict[str, Any], Any]], fields: list[str]) -> list[dict]:
    """Translated copies solved together (:mod:`fieldkit.antenna.sweep`); same JSON as one by one."""
    p0 = group[0][0]
    try:
        per_copy = solve_translated(
            [p["antenna"] for p, _ in group],
            [mesh for _, mesh in group],
            frequencies_hz=p0["frequencies_hz"],
            ground=p0["ground"],
            power_w=p0["power_w"],
            reference_impedance_ohm=p0["reference_impedance_ohm"],
        )
    except InputError:  # solve them one by one, so the error names the spec it belongs to
        return [_solve_one(p, f) for (p, _), f in zip(group, fields, strict=True)]
    out = [{"results": []} for _ in group]
    for j in range(len(p0["frequencies_hz"])):
        sols = [s[j] for s in per_copy]
        pols = figures_together(sols, p0["pattern"])
        for o, sol, pol in zip(out, sols, pols, strict=True):
            o["results"].append(_result(sol, p0["pattern"], None, pol))
    return out


def _solve_all(prepared, fields: list[str]) -> list[dict]:
    """Every spec of a list, translated copies of one antenna together."""
    groups: dict[tuple, list[int]] = {}
    alone: list[int] = []
    for i, (p, _work, mesh) in enumerate(prepared):
        key = _sweep_key(p, mesh)
        if key is None:
            alone.append(i)
        else:
            groups.setdefault(key, []).append(i)
    out: list = [None] * len(prepared)
    for idx in groups.values():
        if len(idx) == 1:
            alone.extend(idx)
            continue
        got = _solve_sweep([prepared[i][::2] for i in idx], [fields[i] for i in idx])
        for i, r in zip(idx, got, strict=True):
            out[i] = r
    for i in alone:
        out[i] = _solve_one(prepared[i][0], fields[i])
    return out


@single_threaded()
def model_json(spec: dict | list) -> dict | list:
    """Run the `fieldkit model` contract on one spec (→ object) or a list of specs (→ list).

    Every spec is checked, and the total work bounded (:data:`MAX_WORK_UNITS`), before any is solved.
    Specs of a list that are translated copies of one antenna (a height sweep) are solved together.

    Raises
    ------
    fieldkit.errors.InputError
        Any bad input, naming the field (``[i].wires[0].points_m[1]`` for the i-th spec of a list).
    """
    if isinstance(spec, list):
        if not spec:
            raise InputError("(top level)", "expected a spec object or a non-empty array of specs")
        fields = [f"[{i}]" for i in range(len(spec))]
        prepared = [_prepare(s, f) for s, f in zip(spec, fields, strict=True)]
        _check_work(prepared, fields)
        return _solve_all(prepared, fields)
    prepared = _prepare(spec, "")
    _check_work([prepared], [""])
    return _solve_one(prepared[0], "")
