"""Hypothesis strategies for hostile JSON: wrong types, non-finite and extreme numbers, unicode,
deep nesting, and mutations of a valid document at a random path.

The values are the usual suspects of input fuzzing (IEEE 754 specials and extremes, JSON's own type
set of RFC 8259 §3, Unicode outside the BMP and control characters) rather than anything specific.
"""

from __future__ import annotations

import copy
import math
from typing import Any

from hypothesis import strategies as st

EXTREME_NUMBERS = [
    math.nan,
    math.inf,
    -math.inf,
    1e308,
    -1e308,
    5e-324,
    -0.0,
    0,
    -1,
    -1e-9,
    2**63,
    -(2**63),
    10**30,
    1e-300,
]
WEIRD_TEXT = [
    "",
    " ",
    "\x00",
    "é",
    "日本語の名前",
    "\U0001f4e1 antenna",
    "\u202eevil",  # right-to-left override
    "a" * 10_000,
    "../../etc/passwd",
    "<script>alert(1)</script>",
    "'; DROP TABLE deployments; --",
    '=HYPERLINK("x")',
    "NaN",
    "1e308",
    "\ud800 lone surrogate",
    "0001-01-01T00:00:00+14:00",  # instants at the edges of datetime's range
    "9999-12-31T23:59:59-14:00",
    "0999-12-01T14:05:00Z",
    "24:00",
    "99:99",  # legal as a JSON escape (RFC 8259 §8.2), not as UTF-8
]


def deep(depth: int) -> Any:
    value: Any = 1
    for i in range(depth):
        value = [value] if i % 2 else {"a": value}
    return value


scalars = st.one_of(
    st.none(),
    st.booleans(),
    st.sampled_from(EXTREME_NUMBERS),
    st.integers(min_value=-(10**20), max_value=10**20),
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from(WEIRD_TEXT),
    st.text(max_size=30),
)

json_values = st.recursive(
    scalars,
    lambda children: st.one_of(
        st.lists(children, max_size=5), st.dictionaries(st.text(max_size=8), children, max_size=5)
    ),
    max_leaves=20,
)

hostile = st.one_of(
    json_values,
    st.sampled_from([deep(50), deep(200), list(range(10_000)), {"x" * 1000: 1}]),
)


def paths(doc: Any, prefix: tuple = ()) -> list[tuple]:
    """Every path (tuple of keys/indices) into a JSON document, the root included."""
    out = [prefix]
    if isinstance(doc, dict):
        for k, v in doc.items():
            out += paths(v, (*prefix, k))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            out += paths(v, (*prefix, i))
    return out


def replace_at(doc: Any, path: tuple, value: Any) -> Any:
    if not path:
        return value
    out = copy.deepcopy(doc)
    node = out
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    return out


def delete_at(doc: Any, path: tuple) -> Any:
    out = copy.deepcopy(doc)
    if not path:
        return out
    node = out
    for key in path[:-1]:
        node = node[key]
    del node[path[-1]]
    return out


@st.composite
def mutated(draw, base: Any, values=hostile):
    """The base document with one to three paths replaced by hostile values, deleted, or extended."""
    doc = copy.deepcopy(base)

    def value() -> Any:  # a copy: sampled constants must never be changed by a later "add"
        return copy.deepcopy(draw(values))

    for _ in range(draw(st.integers(1, 3))):
        where = draw(st.sampled_from(paths(doc)))
        action = draw(st.sampled_from(["replace", "replace", "replace", "delete", "add"]))
        if action == "delete" and where:
            doc = delete_at(doc, where)
        elif action == "add":
            node = doc
            for key in where:
                node = node[key]
            if isinstance(node, dict):
                node[draw(st.sampled_from(["extra", "ünïcode", "", "__proto__"]))] = value()
            elif isinstance(node, list):
                node.append(value())
            else:
                doc = replace_at(doc, where, value())
        else:
            doc = replace_at(doc, where, value())
    return doc
