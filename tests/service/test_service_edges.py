"""The edge of the API: error JSON for every kind of bad request, security headers, body limits."""

from __future__ import annotations

import json

import pytest

from fieldkit.service.security import CONTENT_SECURITY_POLICY

ERROR_KEYS = {"error", "field", "detail"}


def assert_error(response, status: int) -> dict:
    assert response.status_code == status, response.get_data(as_text=True)
    assert response.mimetype == "application/json"
    body = response.json
    assert set(body) >= ERROR_KEYS
    assert body["detail"]
    return body


def test_health(client):
    response = client.get("/api/health")
    assert response.status_code == 200
    assert response.json["ok"] is True
    assert response.json["version"]


@pytest.mark.parametrize(
    ("method", "path"),
    [
        ("GET", "/api/nope"),
        ("POST", "/api/nope"),
        ("PUT", "/api/deployments/x/y/z"),
        ("GET", "/api"),
        ("GET", "/no-such-file.js"),
        ("GET", "/api/deployments/00000000-0000-0000-0000-000000000000"),
        ("DELETE", "/api/deployments/missing"),
        ("GET", "/api/deployments/missing/export"),
        ("GET", "/api/deployments/missing/checks"),
        ("GET", "/api/deployments/missing/checks.csv"),
    ],
)
def test_unknown_is_404_json(client, method, path):
    assert_error(client.open(path, method=method), 404)


@pytest.mark.parametrize(
    ("method", "path"),
    [
        ("POST", "/api/health"),
        ("DELETE", "/api/kit"),
        ("POST", "/api/kit"),
        ("GET", "/api/plan"),
        ("PATCH", "/api/deployments"),
        ("POST", "/api/openapi.json"),
        ("POST", "/index.html"),
    ],
)
def test_wrong_method_is_405_json(client, method, path):
    response = client.open(path, method=method, json={})
    assert_error(response, 405)
    assert response.headers["Allow"]


WRITES = [
    ("POST", "/api/model"),
    ("POST", "/api/sky"),
    ("POST", "/api/plan"),
    ("POST", "/api/deployments"),
    ("POST", "/api/deployments/import"),
    ("PUT", "/api/kit"),
    ("PUT", "/api/deployments/x"),
    ("PUT", "/api/deployments/x/checks/y"),
]


@pytest.mark.parametrize(("method", "path"), WRITES)
@pytest.mark.parametrize(
    "content_type", ["text/plain", "application/x-www-form-urlencoded", "multipart/form-data", None]
)
def test_writes_need_json_content_type(client, method, path, content_type):
    headers = {"Content-Type": content_type} if content_type else {}
    response = client.open(path, method=method, data='{"name": "x"}', headers=headers)
    assert_error(response, 415)


MALFORMED = [
    "",
    "   ",
    "{",
    "{'single': 'quotes'}",
    '{"a": NaN}',
    '{"a": Infinity}',
    '{"a": -Infinity}',
    '{"a": 1e999}',
    "[" * 100 + "]" * 100,
    '{"a":' * 40 + "1" + "}" * 40,
    "[" * 200_000,
]


@pytest.mark.parametrize(("method", "path"), WRITES)
@pytest.mark.parametrize("body", MALFORMED, ids=range(len(MALFORMED)))
def test_malformed_json_is_400(client, method, path, body):
    response = client.open(path, method=method, data=body, content_type="application/json")
    assert_error(response, 400)


def test_invalid_utf8_is_400(client):
    response = client.post(
        "/api/plan", data=b'{"name": "\xff\xfe"}', content_type="application/json"
    )
    assert_error(response, 400)


@pytest.mark.parametrize(("method", "path"), WRITES)
@pytest.mark.parametrize("body", ['"text"', "42", "null", "true"])
def test_top_level_must_be_object(client, method, path, body):
    response = client.open(path, method=method, data=body, content_type="application/json")
    assert assert_error(response, 422)["field"] == "(top level)"


@pytest.mark.parametrize(("method", "path"), WRITES)
def test_body_over_limit_is_413(app, client, method, path):
    big = json.dumps({"name": "x" * (app.config["MAX_CONTENT_LENGTH"] + 10)})
    response = client.open(path, method=method, data=big, content_type="application/json")
    assert_error(response, 413)


@pytest.mark.parametrize(
    "path",
    ["/api/health", "/api/nope", "/", "/api/deployments", "/missing.css", "/api/openapi.json"],
)
def test_security_headers_on_every_response(client, path):
    response = client.get(path)
    response.close()
    assert response.headers["Content-Security-Policy"] == CONTENT_SECURITY_POLICY
    assert "'unsafe-inline'" not in CONTENT_SECURITY_POLICY
    assert "frame-ancestors 'none'" in CONTENT_SECURITY_POLICY
    assert response.headers["X-Content-Type-Options"] == "nosniff"
    assert response.headers["Referrer-Policy"] == "no-referrer"


def test_security_headers_on_errors(client):
    for response in (
        client.post("/api/plan", data="{", content_type="application/json"),
        client.post("/api/plan", data="x", content_type="text/plain"),
        client.delete("/api/health"),
    ):
        assert response.headers["Content-Security-Policy"] == CONTENT_SECURITY_POLICY
        assert response.headers["X-Content-Type-Options"] == "nosniff"


def test_api_responses_are_not_cached(client):
    assert client.get("/api/deployments").headers["Cache-Control"] == "no-store"


def test_unexpected_error_is_500_json_without_traceback(app, client):
    # A route that fails in a way no input can cause stands in for a bug in a layer.
    @app.get("/api/_test_boom")
    def boom():
        raise RuntimeError("secret internals")

    body = assert_error(client.get("/api/_test_boom"), 500)
    assert "secret internals" not in json.dumps(body)
    assert "Traceback" not in json.dumps(body)
