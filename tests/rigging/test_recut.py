"""The hung polyline re-cut for the engine: same wire, corners kept, one engine segment per chord.

Outside sources: the level catenary z = a(cosh(x/a) − 1), a = H/w (Irvine, *Cable Structures*, 1981,
ch. 1; REFERENCES.md) for the shape the new vertices must stay on; NEC-2 (PyNEC) for the resonance of
the re-cut wire in test_cut_vs_nec.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Wire
from fieldkit.antenna.mesh import SEGMENTS_PER_WAVELENGTH, build_mesh
from fieldkit.rigging.hung import hang_inverted_v, hang_span, recut
from fieldkit.rigging.options import max_chord_m


def _span(**kw):
    args = dict(
        a_xy=(0.0, 0.0),
        a_height_m=12.0,
        b_xy=(45.0, 0.0),
        b_height_m=12.0,
        leg_m=19.5,
        wire_weight_n_per_m=0.23,
        rope_weight_n_per_m=0.1,
        feed_load_n=0.0,
        tension_n=60.0,
    )
    args.update(kw)
    return hang_span(**args)


def _length(p):
    return float(np.linalg.norm(np.diff(p, axis=0), axis=1).sum())


def test_recut_level_wire_stays_on_the_catenary():
    # no feed load: the wire between the insulators is one level catenary (Irvine ch. 1)
    d = _span()
    r = recut(d, max_chord_m=0.9)
    p = r.points_m
    chords = np.linalg.norm(np.diff(p, axis=0), axis=1)
    assert chords.max() <= 0.9 + 1e-9
    assert _length(p) == pytest.approx(_length(d.points_m), rel=1e-4)
    # the lowest point is mid-span; a = H / w; every vertex on z = z_low + a (cosh(x/a) - 1)
    a = d.horizontal_tension_n / 0.23
    mid = p[np.argmin(p[:, 2])]
    z = mid[2] + a * (np.cosh((p[:, 0] - mid[0]) / a) - 1)
    assert np.abs(p[:, 2] - z).max() < 0.01  # within a centimetre, as the old samples


def test_recut_keeps_ends_feed_and_droop_corners():
    d = _span(b_xy=(30.0, 0.0), feed_load_n=7.0)  # short span: the ends droop at the supports
    assert d.tail_m > 0
    r = recut(d, max_chord_m=1.0)
    for end in (0, -1):
        assert np.allclose(r.points_m[end], d.points_m[end])
    for corner in (1, -2):  # the insulator points at the supports, where the droop starts
        assert np.min(np.linalg.norm(r.points_m - d.points_m[corner], axis=1)) < 1e-9
    cum = np.r_[0, np.cumsum(np.linalg.norm(np.diff(d.points_m, axis=0), axis=1))]
    feed = d.points_m[np.argmin(np.abs(cum - d.feed_distance_m))]
    k = np.argmin(np.linalg.norm(r.points_m - feed, axis=1))
    assert np.allclose(r.points_m[k], feed)
    assert r.feed_distance_m == pytest.approx(_length(r.points_m[: k + 1]), rel=1e-12)
    assert r.feed_distance_m == pytest.approx(d.feed_distance_m, rel=1e-4)
    assert r.end_heights_m == d.end_heights_m


@pytest.mark.parametrize("f_mhz", [3.6, 7.1])
def test_one_engine_segment_per_chord(f_mhz):
    d = hang_inverted_v(
        centre_xy=(0.0, 0.0),
        axis_xy=(1.0, 0.0),
        apex_height_m=12.0,
        end_height_m=4.0,
        leg_m=143 / f_mhz / 2 * 0.95,
        wire_weight_n_per_m=0.2,
        feed_load_n=7.0,
        tension_n=40.0,
    )
    f_hz = f_mhz * 1e6
    r = recut(d, max_chord_m=max_chord_m(f_hz))
    antenna = Antenna(
        wires=(Wire(points_m=r.points_m, radius_m=0.8e-3),),
        feed=Feed(wire=0, distance_m=r.feed_distance_m),
    )
    # the top of the SWR curve is the highest frequency solved on this wire
    mesh = build_mesh(antenna, max_frequency_hz=f_hz * 1.04)
    assert len(mesh.start) == len(r.points_m) - 1
    # and the engine would need about that many anyway: wire length / its segment length
    need = _length(r.points_m) / (299_792_458.0 / (f_hz * 1.04) / SEGMENTS_PER_WAVELENGTH)
    assert len(mesh.start) <= math.ceil(need) + 2


def test_a_cut_just_past_a_vertex_leaves_no_piece_the_engine_refuses():
    # found planning the demo as a linked dipole: the 3.79 MHz link landed 2.3 mm past a vertex
    # and the engine refused the piece (thin-wire limit: 4 radii); the plan crashed
    from fieldkit.rigging.hung import MIN_CUT_PIECE_M, _cut_polyline

    pts = np.array([[0.0, 0, 10], [5.0, 0, 10], [10.0, 0, 9.5]])
    out = _cut_polyline(pts, 5.0023)
    assert len(out) == 2  # the vertex at 5 m is dropped, not kept 2.3 mm from the end
    pieces = np.linalg.norm(np.diff(out, axis=0), axis=1)
    assert pieces.min() >= MIN_CUT_PIECE_M
    assert abs(pieces.sum() - 5.0023) < 1e-3  # the chord is under 1 mm short (computed)
