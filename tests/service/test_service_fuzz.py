"""Random, extreme and wrongly typed bodies against the write endpoints: a result or a 4xx, never 500."""

from __future__ import annotations

import json
import time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

ALLOWED = {200, 201, 400, 404, 409, 413, 415, 422}
# A plan may also meet a full plan queue (503 with Retry-After), a real answer of /api/plan.
ALLOWED_CALC = ALLOWED | {503}
# A request must finish within this bound [s] (random bodies are refused at validation).
BOUND_S = 10.0

scalars = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(min_value=-(2**70), max_value=2**70),
    st.floats(allow_nan=False, allow_infinity=False),
    st.sampled_from([1e308, -1e308, 5e-324, 0.0, -0.0]),
    st.text(max_size=40),
    st.sampled_from(["", "../../etc/passwd", "=cmd|' /C calc'!A0", "\u202e\u0000", "🙂" * 30]),
)
json_values = st.recursive(
    scalars,
    lambda children: st.one_of(
        st.lists(children, max_size=5),
        st.dictionaries(
            st.one_of(
                st.text(max_size=12),
                st.sampled_from(["done", "by", "at", "client_id", "wire", "masts", "name", "site"]),
            ),
            children,
            max_size=6,
        ),
    ),
    max_leaves=30,
)
acknowledgements = st.fixed_dictionaries(
    {},
    optional={
        "done": st.one_of(st.booleans(), scalars),
        "by": st.one_of(st.text(max_size=50), scalars),
        "at": st.one_of(st.datetimes().map(lambda d: d.isoformat()), st.text(max_size=30), scalars),
        "client_id": st.one_of(st.uuids().map(str), st.text(max_size=70), scalars),
    },
)

FUZZ = settings(
    max_examples=60,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)


def check(response, started, allowed=ALLOWED):
    assert response.status_code in allowed, response.get_data(as_text=True)[:500]
    assert time.perf_counter() - started < BOUND_S
    body = response.json
    assert body is not None
    if response.status_code >= 400:
        assert {"error", "field", "detail"} <= set(body)
    assert "NaN" not in json.dumps(body)


@FUZZ
@given(body=st.one_of(acknowledgements, json_values))
def test_fuzz_acknowledgements(client, planned, body):
    started = time.perf_counter()
    check(client.put(f"/api/deployments/{planned}/checks/pre-weather", json=body), started)


@FUZZ
@given(body=json_values)
def test_fuzz_kit(client, body):
    started = time.perf_counter()
    check(client.put("/api/kit", json=body), started)


@FUZZ
@given(body=json_values)
def test_fuzz_import(client, body):
    started = time.perf_counter()
    check(client.post("/api/deployments/import", json=body), started)


@pytest.mark.slow
@FUZZ
@given(path=st.sampled_from(["/api/model", "/api/sky", "/api/plan"]), body=json_values)
def test_fuzz_calc(client, path, body):
    started = time.perf_counter()
    check(client.post(path, json=body), started, ALLOWED_CALC)


@FUZZ
@given(raw=st.binary(max_size=200))
def test_fuzz_raw_bytes(client, raw):
    started = time.perf_counter()
    check(client.put("/api/kit", data=raw, content_type="application/json"), started)
