"""A small cache of plan results keyed by the exact plan input, with one computation per input.

A plan of the demo site takes tens of seconds of CPU. The app plans first (``POST /api/plan``) and then
saves the same input as a deployment; phones repeat requests after a dropped connection. The plan is a
pure function of its input, so the same input gives the same result: the cache answers those at once,
and concurrent requests for one input wait for a single computation instead of starting several.
Entries expire after a while so that nothing depending on the day (an input without a date) is kept
for long.
"""

from __future__ import annotations

import hashlib
import json
import threading
import time
from collections import OrderedDict
from collections.abc import Callable
from typing import Any

DEFAULT_ENTRIES = 32
DEFAULT_TTL_S = 3600.0


def input_key(spec: Any) -> str:
    text = json.dumps(spec, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode()).hexdigest()


class PlanCache:
    """``get_or_compute(spec, compute)``: a stored copy of the result, or compute it once."""

    def __init__(self, *, entries: int = DEFAULT_ENTRIES, ttl_s: float = DEFAULT_TTL_S) -> None:
        self.entries = entries
        self.ttl_s = ttl_s
        self._store: OrderedDict[str, tuple[float, str]] = OrderedDict()
        self._flights: dict[str, threading.Lock] = {}
        self._lock = threading.Lock()
        self.hits = 0
        self.misses = 0

    def _lookup(self, key: str) -> Any | None:
        with self._lock:
            held = self._store.get(key)
            if held is None:
                return None
            stamp, text = held
            if time.monotonic() - stamp > self.ttl_s:
                del self._store[key]
                return None
            self._store.move_to_end(key)
            self.hits += 1
        return json.loads(text)  # a fresh copy: callers may keep or change it

    def get_or_compute(self, spec: Any, compute: Callable[[Any], Any]) -> Any:
        if self.entries <= 0:
            return compute(spec)
        key = input_key(spec)
        found = self._lookup(key)
        if found is not None:
            return found
        with self._lock:
            flight = self._flights.setdefault(key, threading.Lock())
        with flight:  # one computation per input; the others wait here and then read the cache
            found = self._lookup(key)
            if found is not None:
                return found
            result = compute(spec)
            text = json.dumps(result, allow_nan=False)
            with self._lock:
                self.misses += 1
                self._store[key] = (time.monotonic(), text)
                self._store.move_to_end(key)
                while len(self._store) > self.entries:
                    self._store.popitem(last=False)
                self._flights.pop(key, None)
        return json.loads(text)
