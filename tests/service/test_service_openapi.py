"""The OpenAPI document against the URL map (every route and method described; nothing invented)."""

from __future__ import annotations

import re

IGNORED_METHODS = {"HEAD", "OPTIONS"}


def url_map_operations(app) -> set[tuple[str, str]]:
    out = set()
    for rule in app.url_map.iter_rules():
        if not rule.rule.startswith("/api/") or "_test" in rule.rule:
            continue
        path = re.sub(r"<(?:[^:>]+:)?([^>]+)>", r"{\1}", rule.rule)
        out |= {(path, m.lower()) for m in rule.methods - IGNORED_METHODS}
    return out


def test_openapi_matches_the_url_map(client, app):
    doc = client.get("/api/openapi.json").json
    described = {
        (path, method)
        for path, item in doc["paths"].items()
        for method in item
        if method in {"get", "put", "post", "delete", "patch"}
    }
    assert described == url_map_operations(app)


def test_openapi_structure(client):
    # OpenAPI Specification 3.1.0: required top-level fields, responses per operation, path
    # parameters declared for every template variable, every $ref resolvable.
    doc = client.get("/api/openapi.json").json
    assert doc["openapi"].startswith("3.1.")
    assert doc["info"]["title"] and doc["info"]["version"]
    for path, item in doc["paths"].items():
        params = {p["name"] for p in item.get("parameters", [])}
        assert params == set(re.findall(r"{([^}]+)}", path)), path
        for method, op in item.items():
            if method == "parameters":
                continue
            assert op["responses"], (path, method)
            assert any(code.startswith("2") for code in op["responses"]), (path, method)

    def refs(node):
        if isinstance(node, dict):
            for key, value in node.items():
                if key == "$ref":
                    yield value
                else:
                    yield from refs(value)
        elif isinstance(node, list):
            for value in node:
                yield from refs(value)

    for ref in refs(doc):
        target = doc
        for part in ref.removeprefix("#/").split("/"):
            target = target[part]
        assert isinstance(target, dict), ref


def test_health_is_marked_open(client):
    doc = client.get("/api/openapi.json").json
    assert doc["paths"]["/api/health"]["get"]["security"] == []
    assert {"key_header", "key_cookie"} <= set(doc["components"]["securitySchemes"])
