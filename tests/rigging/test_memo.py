"""The hang cache gives back exactly what the hang itself computes, keyed by exact values, bounded.

Reference: the uncached function (``fn.__wrapped__``) for every answer — the cache must not change a
bit of it. The hangs themselves are checked against Irvine's catenary in test_catenary.py.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from fieldkit.rigging.catenary import HangError
from fieldkit.rigging.hung import hang_inverted_v, hang_span, recut
from fieldkit.rigging.memo import ExactCache, exact_key, exact_memo

# a sloping span with a feed load (values as in the demo's kit, rounded)
SPAN = {"a_xy": (0.0, 0.0), "b_xy": (44.0, 3.0), "a_height_m": 13.0, "b_height_m": 10.5}
SPAN |= {"leg_m": 19.8, "wire_weight_n_per_m": 0.2, "rope_weight_n_per_m": 0.08}
SPAN |= {"feed_load_n": 6.5, "tension_n": 70.0}


def _same(a, b):
    """Field by field, arrays bit for bit."""
    for f in dataclasses.fields(a):
        x, y = getattr(a, f.name), getattr(b, f.name)
        if isinstance(x, np.ndarray):
            assert x.tobytes() == y.tobytes() and x.shape == y.shape, f.name
        else:
            assert x == y and type(x) is type(y), f.name


def test_exact_key_tells_apart_what_rounding_or_equality_would_merge():
    assert exact_key(0.0) != exact_key(-0.0)  # equal as numbers, different bits
    assert exact_key(1) != exact_key(1.0)
    assert exact_key(np.float64(0.1)) != exact_key(0.1)  # the type stays in the key
    assert exact_key(0.1) != exact_key(0.1 + 2**-56)  # the last bit counts
    assert exact_key((1.5, "a")) == exact_key((1.5, "a"))
    with pytest.raises(TypeError, match="no exact key"):
        exact_key(object())


def test_cached_span_is_the_uncached_hang_bit_for_bit():
    hang_span.cache.clear()
    first = hang_span(**SPAN)
    again = hang_span(**SPAN)
    assert again is first and hang_span.cache.hits == 1
    _same(first, hang_span.__wrapped__(**SPAN))
    with pytest.raises(ValueError, match="read-only"):
        first.points_m[0, 0] = 1.0  # shared by every caller: nobody may change it


def test_a_refusal_is_cached_and_raised_afresh():
    hang_inverted_v.cache.clear()
    args = dict(
        centre_xy=(0.0, 0.0),
        axis_xy=(1.0, 0.0),
        apex_height_m=10.0,
        end_height_m=11.0,  # ends above the apex: refused
        leg_m=10.0,
        wire_weight_n_per_m=0.2,
        feed_load_n=5.0,
        tension_n=40.0,
    )
    errors = []
    for _ in range(2):
        with pytest.raises(HangError, match="below the apex") as e:
            hang_inverted_v(**args)
        errors.append(e.value)
    assert errors[0] is not errors[1] and hang_inverted_v.cache.hits == 1


def test_recut_cached_is_the_uncached_cut():
    d = hang_span(**{**SPAN, "b_xy": (30.0, 0.0), "feed_load_n": 7.0})
    a = recut(d, max_chord_m=1.0)
    b = recut(d, max_chord_m=1.0)
    assert a.points_m is b.points_m
    c = recut(d, max_chord_m=math.nextafter(1.0, 2.0))  # another key: cut afresh
    assert c.points_m is not a.points_m
    assert c.points_m.tobytes() == a.points_m.tobytes()  # the same cut (one bit of chord apart)


def test_the_cache_is_bounded_least_recently_used_first():
    cache = ExactCache(2)
    for k in "abc":
        cache.put(k, (True, k))
    assert len(cache) == 2 and cache.get("a") is None
    cache.get("b")  # b used: c goes next
    cache.put("d", (True, "d"))
    assert cache.get("c") is None and cache.get("b") == (True, "b")


def test_other_errors_are_not_cached():
    calls = []

    @exact_memo(4)
    def flaky(*, x: float) -> float:
        calls.append(x)
        raise RuntimeError("not a hang refusal")

    for _ in range(2):
        with pytest.raises(RuntimeError):
            flaky(x=1.0)
    assert calls == [1.0, 1.0] and len(flaky.cache) == 0
