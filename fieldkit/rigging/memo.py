"""A bounded cache for the hang geometry, keyed by the exact input numbers and shared across plans.

Hanging a wire is a pure function of a handful of numbers (positions, heights, lengths, weights,
pull). The service's plan cache answers only an input seen before as a whole; a re-plan of the demo
after an edit of the radio, the schedule or a power line's height hangs the very same wires again
(every hang a hit, measured), as does every later plan of one site in a running process. Another
date re-orders the channels by the sky, and with them the legs: then nearly every hang is new. Each hang used to be solved afresh: 0.08–0.09 s of CPU of a warm demo plan
(measured, issue 17). Within one plan hangs hardly repeat (2 of the demo's 134 spans), so a first
plan gains nothing from the cache; it pays ~6 µs per hang for the key and ~1 MB for the entries.

Keys are the exact values — each float by its 8 bytes and its type, never rounded — so ``0.0`` and
``-0.0``, or ``1`` and ``1.0``, are different keys, and a cached answer is bit for bit the one the
function would give. A refusal (:class:`~fieldkit.rigging.catenary.HangError`) is cached as its
message and raised anew each time. Arrays in a cached answer are made read-only: every caller shares
them. The size is bounded (least recently used entries go first).
"""

from __future__ import annotations

import functools
import struct
import threading
from collections import OrderedDict
from collections.abc import Callable
from typing import Any

import numpy as np

from fieldkit.rigging.catenary import HangError

# A demo plan hangs ~130 spans and ~300 inverted-Vs and re-cuts ~70 polylines; its 496 entries hold
# 1.15 MB, 2.3 kB each (tracemalloc, issue 17): 1024 entries per cache stay under 2.5 MB.
HANG_CACHE_ENTRIES = 1024


_PACK_DOUBLE = struct.Struct("<d").pack


def exact_key(value: Any) -> Any:
    """A hashable key that tells apart every float bit pattern and every type.

    Parameters
    ----------
    value : float, int, bool, str, None, a tuple/list of these, or an ndarray [-]

    Raises
    ------
    TypeError
        For any other type (so that nothing is keyed by identity or by a lossy repr).
    """
    kind = type(value)
    if kind is float:  # the common case first: a plain float is its 8 bytes
        return _PACK_DOUBLE(value)
    if kind is tuple or kind is list:
        return (kind, tuple(map(exact_key, value)))
    if isinstance(value, float):  # a float subclass (numpy's float64): its type stays in the key
        return (kind, _PACK_DOUBLE(value))
    if isinstance(value, (bool, int, str)) or value is None:
        return (kind, value)
    if isinstance(value, np.ndarray):
        arr = np.ascontiguousarray(value)
        return (np.ndarray, arr.dtype.str, arr.shape, arr.tobytes())
    raise TypeError(f"no exact key for a {kind.__name__}")


def _read_only(result: Any) -> Any:
    """The result with its array fields made read-only (it is shared by every caller)."""
    for v in getattr(result, "__dict__", {}).values():  # a dataclass's fields
        if isinstance(v, np.ndarray):
            v.setflags(write=False)
    return result


class ExactCache:
    """Least-recently-used store of a function's answers (or its HangError) by exact key."""

    def __init__(self, entries: int) -> None:
        self.entries = entries
        self._store: OrderedDict[Any, tuple[bool, Any]] = OrderedDict()
        self._lock = threading.Lock()
        self.hits = 0
        self.misses = 0

    def get(self, key: Any) -> tuple[bool, Any] | None:
        with self._lock:
            got = self._store.get(key)
            if got is None:
                self.misses += 1
                return None
            self._store.move_to_end(key)
            self.hits += 1
            return got

    def put(self, key: Any, entry: tuple[bool, Any]) -> None:
        with self._lock:
            self._store[key] = entry
            self._store.move_to_end(key)
            while len(self._store) > self.entries:
                self._store.popitem(last=False)

    def clear(self) -> None:
        with self._lock:
            self._store.clear()
            self.hits = self.misses = 0

    def __len__(self) -> int:
        return len(self._store)


def exact_memo(entries: int) -> Callable[[Callable[..., Any]], Callable[..., Any]]:
    """Decorate a keyword-only pure function with an :class:`ExactCache` (as ``fn.cache``).

    Only :class:`HangError` is cached among exceptions; any other error is raised uncached.
    """

    def decorate(fn: Callable[..., Any]) -> Callable[..., Any]:
        cache = ExactCache(entries)

        @functools.wraps(fn)
        def wrapper(**kwargs: Any) -> Any:
            key = tuple((name, exact_key(kwargs[name])) for name in sorted(kwargs))
            got = cache.get(key)
            if got is None:
                try:
                    got = (True, _read_only(fn(**kwargs)))
                except HangError as e:
                    got = (False, str(e))
                cache.put(key, got)
            ok, value = got
            if not ok:
                raise HangError(value)
            return value

        wrapper.cache = cache  # type: ignore[attr-defined]
        return wrapper

    return decorate
