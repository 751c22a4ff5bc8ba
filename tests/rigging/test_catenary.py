"""Catenary and hung-wire statics against Irvine's closed forms and the worked values of REFERENCES.md."""

import math

import numpy as np
import pytest

from fieldkit.rigging.catenary import (
    HangError,
    Piece,
    catenary_sag_m,
    hang_between,
    hang_to_height,
    integrate_chain,
    point_load_sag_m,
)
from fieldkit.rigging.hung import hang_inverted_v, hang_span

W, L, H = 0.981, 30.0, 50.0  # REFERENCES.md "Catenary" worked example


def test_level_catenary_sag_worked_value():
    # Irvine, Cable Structures ch. 1; worked value REFERENCES.md: 2.223 m (parabolic 2.207 m)
    assert catenary_sag_m(span_m=L, weight_n_per_m=W, horizontal_tension_n=H) == pytest.approx(
        2.223, abs=5e-4
    )
    assert pytest.approx(2.207, abs=5e-4) == W * L * L / (8 * H)


def test_point_load_sag_worked_value():
    # REFERENCES.md (computed, derived from statics): P = 5 N at mid-span -> 2.987 m
    assert point_load_sag_m(
        span_m=L, weight_n_per_m=W, horizontal_tension_n=H, load_n=5.0
    ) == pytest.approx(2.987, abs=5e-4)


def test_weightless_point_load_sag():
    # statics of a weightless string: s = PL/(4H) (REFERENCES.md)
    shape = integrate_chain(
        (
            Piece(15.0 / math.cos(math.atan(0.1)), 0.0, True, 10.0),
            Piece(15.0 / math.cos(math.atan(0.1)), 0.0, True),
        ),
        horizontal_tension_n=H,
        start_vertical_n=-5.0,
    )
    assert -shape.z_m.min() == pytest.approx(10.0 * L / (4 * H), rel=1e-9)
    assert shape.u_m[-1] == pytest.approx(L, rel=1e-9)


def test_chain_solver_reproduces_irvine_with_given_tension():
    # Hang a free-length chain at the support tension of the point-loaded catenary,
    # T = H cosh(L/2a + asinh(P/2H)) (statics of the two halves): H and the sag come back.
    a = H / W
    t_support = H * math.cosh(L / (2 * a) + math.asinh(5.0 / (2 * H)))
    arc = 2 * a * math.sinh(L / (2 * a))  # Irvine ch. 1, unloaded arc length

    def chain(half):
        return (Piece(half, W, True, 5.0), Piece(half, W, True))

    shape, half = hang_between(
        chain, span_m=L, rise_m=0.0, end_tension_n=t_support, free_guess=L / 2
    )
    assert -shape.z_m.min() == pytest.approx(2.987, abs=5e-4)  # REFERENCES.md point-load value
    assert shape.horizontal_tension_n == pytest.approx(H, rel=1e-6)
    # with the point load the arc is longer than the unloaded one, at nearly the same H
    assert 2 * half > arc


def test_sampled_chain_matches_closed_form_everywhere():
    # each sample of a level chain lies on z = a[cosh((u - L/2)/a) - cosh(L/2a)] (Irvine ch. 1)
    a = H / W
    arc = 2 * a * math.sinh(L / (2 * a))
    shape = integrate_chain(
        (Piece(arc, W, True),),
        horizontal_tension_n=H,
        start_vertical_n=-W * arc / 2,
        samples_per_piece=50,
    )
    expected = a * (np.cosh((shape.u_m - L / 2) / a) - np.cosh(L / (2 * a)))
    np.testing.assert_allclose(shape.z_m, expected, atol=1e-9)


def _demo_span(**kw):
    args = dict(
        a_xy=(0.0, 0.0),
        a_height_m=12.0,
        b_xy=(45.0, 0.0),
        b_height_m=12.0,
        leg_m=19.5,
        wire_weight_n_per_m=0.23,
        rope_weight_n_per_m=0.1,
        feed_load_n=7.0,
        tension_n=60.0,
    )
    args.update(kw)
    return hang_span(**args)


def test_span_statics_balance():
    d = _demo_span()
    # vertical equilibrium: supports carry wire + ropes + feed load (statics)
    total = 2 * 19.5 * 0.23 + 2 * d.span_rope_m[0] * 0.1 + 7.0
    assert sum(d.support_vertical_n) == pytest.approx(total, rel=1e-9)
    assert max(d.end_tension_n) == pytest.approx(60.0, rel=1e-9)
    poly = np.sum(np.linalg.norm(np.diff(d.points_m, axis=0), axis=1))
    assert poly == pytest.approx(2 * 19.5, rel=2e-4)  # the polyline is the wire, chords ~ arc
    assert d.feed_distance_m == pytest.approx(poly / 2, rel=1e-3)
    assert d.feedpoint_height_m == pytest.approx(12.0 - d.sag_m - 0.0, abs=0.6)


def test_more_pull_less_sag():
    assert _demo_span(tension_n=120.0).sag_m < _demo_span(tension_n=40.0).sag_m


def test_short_span_droops_the_ends():
    d = _demo_span(b_xy=(30.0, 0.0))
    assert d.tail_m > 0 and d.span_rope_m == (0.0, 0.0)
    assert d.end_heights_m[0] < 12.0
    poly = np.sum(np.linalg.norm(np.diff(d.points_m, axis=0), axis=1))
    assert poly == pytest.approx(39.0, rel=2e-4)


def test_inverted_v_geometry():
    v = hang_inverted_v(
        centre_xy=(0, 0),
        axis_xy=(1, 0),
        apex_height_m=9.0,
        end_height_m=3.0,
        leg_m=19.5,
        wire_weight_n_per_m=0.23,
        feed_load_n=7.0,
        tension_n=30.0,
    )
    assert v.points_m[0, 2] == pytest.approx(3.0) and v.points_m[-1, 2] == pytest.approx(3.0)
    reach = v.points_m[-1, 0]
    # chord geometry: the apex angle is 2 atan(reach/drop)
    assert v.apex_angle_deg == pytest.approx(2 * math.degrees(math.atan2(reach, 6.0)))
    # each leg is nearly straight at this pull: reach close to sqrt(L^2 - drop^2)
    assert reach == pytest.approx(math.sqrt(19.5**2 - 36), rel=0.02)
    # the mast carries both legs' weight in part plus the feed load
    assert 7.0 < v.top_load_n < 7.0 + 2 * 30.0


def test_impossible_hangs_raise():
    with pytest.raises(HangError):
        hang_to_height((Piece(5.0, 0.2, True),), drop_m=6.0, end_tension_n=20.0)
    with pytest.raises(HangError):
        _demo_span(b_xy=(0.5, 0.0))


def test_inverted_v_mast_head_statics():
    # vertical equilibrium of the whole V (statics): the mast head carries both legs' weight, the feed
    # load, and the downward pull of both stake ropes (their vertical components at the ends)
    w, leg, feed = 0.23, 19.5, 7.0
    v = hang_inverted_v(
        centre_xy=(0, 0),
        axis_xy=(0, 1),
        apex_height_m=9.0,
        end_height_m=3.0,
        leg_m=leg,
        wire_weight_n_per_m=w,
        feed_load_n=feed,
        tension_n=25.0,
    )
    t_end = v.end_tension_n[0]
    h = v.horizontal_tension_n
    v_end = math.sqrt(t_end**2 - h**2)  # vertical part of the stake-rope pull at each end
    assert v.top_load_n == pytest.approx(2 * w * leg + feed + 2 * v_end, rel=1e-9)
    # the stake rope continues the wire's end direction (weightless rope, massless insulator)
    reach = math.hypot(*v.points_m[-1, :2])
    assert v.stake_distance_m == pytest.approx(reach + 3.0 * h / v_end, rel=1e-9)


def test_heavier_coax_sags_the_centre_more():
    from fieldkit.rigging.layouts import Mechanics

    light = Mechanics(0.23, 0.1, 3.4, 0.04 * 9.81, 25.0, 60.0)
    heavy = Mechanics(0.23, 0.1, 3.4, 0.15 * 9.81, 25.0, 60.0)  # RG-213 class vs RG-58 class mass
    # the hanging coax (feedpoint down to the ground) adds to the point load (statics)
    assert heavy.feed_load_n(9.0) - light.feed_load_n(9.0) == pytest.approx(
        (0.15 - 0.04) * 9.81 * 9.0
    )
    d_light = _demo_span(feed_load_n=light.feed_load_n(10.0))
    d_heavy = _demo_span(feed_load_n=heavy.feed_load_n(10.0))
    assert d_heavy.sag_m > d_light.sag_m


from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=60, deadline=None)
@given(
    span=st.floats(20.0, 70.0),
    h1=st.floats(6.0, 20.0),
    h2=st.floats(6.0, 20.0),
    leg=st.floats(8.0, 22.0),
    tension=st.floats(30.0, 300.0),
    feed=st.floats(0.0, 15.0),
)
def test_any_hang_balances_and_keeps_the_wire_length(span, h1, h2, leg, tension, feed):
    """Whatever the site: the polyline is the wire, the pull is as asked, and the supports carry the
    whole weight (statics). Hangs the solver refuses must say so with HangError."""
    try:
        d = _demo_span(
            b_xy=(span, 0.0),
            a_height_m=h1,
            b_height_m=h2,
            leg_m=leg,
            tension_n=tension,
            feed_load_n=feed,
        )
    except HangError:
        return
    poly = np.sum(np.linalg.norm(np.diff(d.points_m, axis=0), axis=1))
    assert poly == pytest.approx(2 * leg, rel=5e-4)
    assert max(d.end_tension_n) == pytest.approx(tension, rel=1e-6)
    if d.tail_m == 0:
        total = 2 * leg * 0.23 + 2 * d.span_rope_m[0] * 0.1 + feed
    else:  # the drooping tails hang from the supports too (their weight is not in the span)
        total = 2 * (leg - d.tail_m) * 0.23 + feed
    assert sum(d.support_vertical_n) == pytest.approx(total, rel=1e-6)
    assert d.feedpoint_height_m < max(h1, h2)
