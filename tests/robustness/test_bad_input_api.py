"""Bad input over HTTP: every API endpoint through the Flask test client, with hostile bodies, wrong
content types, broken and huge JSON, odd ids and unicode.

Property (ARCHITECTURE.md, the service contract): every answer is below 500, carries the JSON error
``{"error", "field", "detail"}`` when it is an error, holds no NaN or infinity and no traceback, and
comes back within :data:`BOUND_S`.
"""

from __future__ import annotations

import copy
import json
import re
import time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.robustness import strategies as hs
from tests.robustness.helpers import (
    DIPOLE,
    SMALL_PLAN,
    TRACEBACK,
    ack,
    checklist_export,
    non_finite_paths,
)

BOUND_S = 30.0
WRITES = [
    ("POST", "/api/model"),
    ("POST", "/api/sky"),
    ("POST", "/api/plan"),
    ("POST", "/api/deployments"),
    ("PUT", "/api/deployments/{id}"),
    ("POST", "/api/deployments/import"),
    ("PUT", "/api/deployments/{id}/checks/pre-item-0"),
    ("PUT", "/api/kit"),
    ("POST", "/api/lan/key"),
]
READS = [
    "/api/health",
    "/api/deployments",
    "/api/deployments/{id}",
    "/api/deployments/{id}/export",
    "/api/deployments/{id}/checks",
    "/api/deployments/{id}/checks.csv",
    "/api/deployments/{id}/checks/pre-item-0",
    "/api/kit",
    "/api/lan",
    "/api/openapi.json",
]
API_SETTINGS = settings(
    max_examples=100,
    deadline=None,
    derandomize=True,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
TRIED = {"requests": 0}


def answered_well(response, started: float) -> None:
    TRIED["requests"] += 1
    elapsed = time.perf_counter() - started
    assert elapsed < BOUND_S, elapsed
    status = response.status_code
    text = response.get_data(as_text=True)
    assert status < 500, (status, text[:300])
    assert not TRACEBACK.search(text), text[:300]
    if response.mimetype == "application/json" and text:
        body = json.loads(text, parse_constant=lambda c: pytest.fail(f"{c} in a response"))
        assert non_finite_paths(body) == []
        if status >= 400:
            assert set(body) >= {"error", "field", "detail"}, body
            assert isinstance(body["detail"], str) and body["detail"]


def send(client, method, path, **kwargs):
    if "json" in kwargs:  # serialised here: a hostile client may well send NaN literals
        kwargs["data"] = json.dumps(kwargs.pop("json"))
        kwargs["content_type"] = "application/json"
    started = time.perf_counter()
    response = client.open(path, method=method, **kwargs)
    answered_well(response, started)
    return response


@pytest.fixture
def dep(client, deployment_id):
    return deployment_id


@API_SETTINGS
@given(st.sampled_from(WRITES), hs.hostile)
def test_every_write_endpoint_with_hostile_json(client, dep, endpoint, body):
    method, path = endpoint
    send(client, method, path.format(id=dep), json=body)


@API_SETTINGS
@given(
    st.sampled_from(WRITES),
    st.one_of(
        st.binary(max_size=200),
        st.sampled_from(
            [
                b"",
                b"   ",
                b"{",
                b"[1,2",
                b'{"a": NaN}',
                b'{"a": Infinity}',
                b'{"a": -Infinity}',
                b'{"a": 1e999}',
                b'{"a": 1, "a": 2}',
                b"\xff\xfe{}",
                b"\xef\xbb\xbf{}",  # a UTF-8 byte-order mark
                b'{"a": "\\ud800"}',
                b"null",
                b"42",
                b'"text"',
                b"[" * 100_000 + b"]" * 100_000,
                b'{"a":' * 50 + b"1" + b"}" * 50,
            ]
        ),
    ),
)
def test_every_write_endpoint_with_broken_bodies(client, dep, endpoint, raw):
    method, path = endpoint
    response = send(client, method, path.format(id=dep), data=raw, content_type="application/json")
    if path != "/api/lan/key" and raw.strip() in (
        b"",
        b"{",
        b"[1,2",
        b'{"a": NaN}',
        b'{"a": 1e999}',
    ):
        assert response.status_code == 400, response.get_json()


@API_SETTINGS
@given(
    st.sampled_from(WRITES),
    st.sampled_from(
        [
            None,
            "text/plain",
            "application/x-www-form-urlencoded",
            "multipart/form-data; boundary=x",
            "application/jsonx",
            "application/json-patch+json",
            "text/json",
            "application/xml",
            "image/png",
        ]
    ),
)
def test_wrong_content_types_are_415(client, dep, endpoint, content_type):
    method, path = endpoint
    response = send(
        client, method, path.format(id=dep), data=b'{"a": 1}', content_type=content_type
    )
    assert response.status_code == 415, (endpoint, content_type, response.status_code)
    assert response.get_json()["field"] == "Content-Type"


def test_json_content_type_with_parameters_is_accepted(client, dep):
    response = send(
        client,
        "PUT",
        f"/api/deployments/{dep}/checks/pre-item-0",
        data=json.dumps(ack()),
        content_type="application/json; charset=utf-8",
    )
    assert response.status_code == 200


def test_body_over_the_limit_is_413(client, dep):
    big = json.dumps({"note": "x" * (2 * 1024 * 1024)})
    for method, path in WRITES:
        response = send(
            client, method, path.format(id=dep), data=big, content_type="application/json"
        )
        expected = (409, 413) if path == "/api/lan/key" else (413,)  # rotation reads no body
        assert response.status_code in expected, (method, path, response.status_code)


def test_deeply_nested_json_is_400(client, dep):
    for depth in (33, 100, 5_000, 200_000):
        raw = "[" * depth + "]" * depth
        for method, path in WRITES:
            response = send(
                client, method, path.format(id=dep), data=raw, content_type="application/json"
            )
            expected = (409, 400) if path == "/api/lan/key" else (400,)
            assert response.status_code in expected, (depth, method, path, response.status_code)


ODD_IDS = [
    "",
    "%00",
    "%2e%2e",
    "..%2f..%2fetc%2fpasswd",
    "a" * 5000,
    "日本",
    "%F0%9F%93%A1",
    "%ED%A0%80",  # an encoded lone surrogate
    "%FF%FE",
    "'; DROP TABLE deployments; --",
    "<script>",
    "null",
    "-1",
    "1e308",
]


@pytest.mark.parametrize("odd", ODD_IDS)
def test_reads_and_deletes_with_odd_ids(client, dep, odd):
    for template in READS:
        path = template.replace("{id}", odd) if "{id}" in template else template
        send(client, "GET", path)
    send(client, "DELETE", f"/api/deployments/{odd}")
    send(client, "PUT", f"/api/deployments/{dep}/checks/{odd}", json=ack())
    assert client.get(f"/api/deployments/{dep}").status_code == 200  # the real one is still there


@API_SETTINGS
@given(hs.mutated(ack()))
def test_acknowledgement_mutations(client, dep, body):
    send(client, "PUT", f"/api/deployments/{dep}/checks/pre-item-1", json=body)


@API_SETTINGS
@given(hs.mutated(checklist_export()))
def test_import_mutations(client, body):
    response = send(client, "POST", "/api/deployments/import", json=body)
    if response.status_code in (200, 201):  # what was imported can be read and exported again
        new_id = response.get_json()["id"]
        send(client, "GET", f"/api/deployments/{new_id}")
        send(client, "GET", f"/api/deployments/{new_id}/export")
        send(client, "GET", f"/api/deployments/{new_id}/checks")
        send(client, "GET", f"/api/deployments/{new_id}/checks.csv")


KIT = {
    "wire": {"diameter_mm": 1.6, "conductor": "copper", "spool_m": 70},
    "coax": {"class": "rg-58", "length_m": 25},
    "masts": [{"id": "M1", "height_m": 9.0, "top_load_kg": 2.0, "guys": 3}],
    "note": "in the car",
}


@API_SETTINGS
@given(hs.mutated(KIT))
def test_kit_mutations_and_what_is_stored_reads_back(client, body):
    response = send(client, "PUT", "/api/kit", json=body)
    if response.status_code == 200:
        assert client.get("/api/kit").get_json()["kit"] == response.get_json()["kit"]


@API_SETTINGS
@given(hs.mutated(DIPOLE))
def test_model_endpoint_mutations(client, body):
    send(client, "POST", "/api/model", json=body)


@pytest.mark.slow
@settings(max_examples=25, deadline=None, derandomize=True, suppress_health_check=list(HealthCheck))
@given(
    hs.mutated(
        {**SMALL_PLAN, "name": "x"},
        values=st.sampled_from(hs.EXTREME_NUMBERS + hs.WEIRD_TEXT + [None, [], {}]),
    )
)
def test_deployment_create_mutations(client, body):
    response = send(client, "POST", "/api/deployments", json=body)
    if response.status_code == 201:
        send(client, "GET", f"/api/deployments/{response.get_json()['id']}")


@pytest.mark.parametrize(
    "name",
    ["日本語の名前", "\U0001f4e1 Relay", "Ünïcödé", "\u202eevil", "<b>x</b>", "=1+2", "a" * 200],
)
def test_unicode_names_round_trip(client, name):
    doc = checklist_export(name=name)
    created = send(client, "POST", "/api/deployments/import", json=doc)
    assert created.status_code == 201
    new_id = created.get_json()["id"]
    assert send(client, "GET", f"/api/deployments/{new_id}").get_json()["name"] == name
    listed = send(client, "GET", "/api/deployments").get_json()["deployments"]
    assert name in [d["name"] for d in listed]


@pytest.mark.parametrize("name", ["", "   ", "a" * 201, None, 5, ["x"], "\ud800"])
def test_bad_names_are_refused_by_field(client, name):
    doc = {**copy.deepcopy(SMALL_PLAN), "name": name}
    response = send(client, "POST", "/api/deployments", json=doc)
    assert response.status_code in (400, 422)
    assert response.get_json()["field"] in ("name", "(body)")


def test_unknown_routes_and_methods_are_json(client):
    for method, path in [
        ("GET", "/api/nothing"),
        ("POST", "/api/health"),
        ("PATCH", "/api/kit"),
        ("DELETE", "/api/kit"),
        ("TRACE", "/api/deployments"),
        ("GET", "/api/deployments/x/checks/y/z"),
    ]:
        response = send(client, method, path, json={})
        assert response.status_code in (404, 405), (method, path, response.status_code)
        assert response.get_json()["error"]


def test_counts_are_reported():
    print(f"\nAPI requests tried: {TRIED['requests']}")


def test_no_traceback_pattern_would_be_missed():
    # the detector itself finds a real traceback (so the property above can fail)
    assert re.search(TRACEBACK, 'Traceback (most recent call last):\n  File "x.py", line 1')
