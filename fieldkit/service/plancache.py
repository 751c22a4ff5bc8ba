"""A small cache of plan results keyed by the exact plan input.

A plan of the demo site takes seconds of CPU. The app plans and then saves the same input as a
deployment; phones repeat requests after a dropped connection. The plan is a pure function of its
input, so the same input gives the same result: the cache answers those at once (the plan jobs of
:mod:`fieldkit.service.plan_jobs` also share one computation between concurrent requests for one
input). Entries expire after a while so that nothing depending on the day (an input without a date)
is kept for long. Results are kept as JSON text: a fresh copy for every reader.
"""

from __future__ import annotations

import hashlib
import json
import threading
import time
from collections import OrderedDict
from typing import Any

DEFAULT_ENTRIES = 32
DEFAULT_TTL_S = 3600.0


def input_key(spec: Any) -> str:
    text = json.dumps(spec, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode()).hexdigest()


class PlanCache:
    """``lookup(key)`` the JSON text of a stored result; ``store(key, text)`` a new one."""

    def __init__(self, *, entries: int = DEFAULT_ENTRIES, ttl_s: float = DEFAULT_TTL_S) -> None:
        self.entries = entries
        self.ttl_s = ttl_s
        self._store: OrderedDict[str, tuple[float, str]] = OrderedDict()
        self._lock = threading.Lock()
        self.hits = 0
        self.misses = 0

    def lookup(self, key: str) -> str | None:
        with self._lock:
            held = self._store.get(key)
            if held is None:
                self.misses += 1
                return None
            stamp, text = held
            if time.monotonic() - stamp > self.ttl_s:
                del self._store[key]
                self.misses += 1
                return None
            self._store.move_to_end(key)
            self.hits += 1
            return text

    def store(self, key: str, text: str) -> None:
        if self.entries <= 0:
            return
        with self._lock:
            self._store[key] = (time.monotonic(), text)
            self._store.move_to_end(key)
            while len(self._store) > self.entries:
                self._store.popitem(last=False)
