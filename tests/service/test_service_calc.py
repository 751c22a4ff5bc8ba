"""POST /api/model, /api/sky, /api/plan: the CLI's functions behind the API, same JSON both ways."""

from __future__ import annotations

import json

import pytest

from fieldkit import paths

from .service_fixtures import layer_state

DEMO = paths.assets_dir() / "demo"
ENDPOINTS = {
    "/api/model": ("fieldkit.antenna", "model_json", "dipole-model.json"),
    "/api/sky": ("fieldkit.sky", "sky_json", "sky.json"),
}


def demo(name: str):
    return json.loads((DEMO / name).read_text(encoding="utf-8"))


@pytest.mark.slow
@pytest.mark.parametrize("path", sorted(ENDPOINTS))
def test_calc_endpoint_matches_the_layer_function(client, path):
    module, name, file = ENDPOINTS[path]
    spec = demo(file)
    response = client.post(path, json=spec)
    if layer_state(module, name) != "present":
        assert response.status_code == 503
        assert response.json["error"] == "layer not available"
        return
    assert response.status_code == 200, response.json
    import importlib

    direct = getattr(importlib.import_module(module), name)(spec)
    # The API answers exactly what the CLI prints (JSON round trip of the same function's result).
    assert response.json == json.loads(json.dumps(direct))


def test_model_contract_fields(client):
    if layer_state("fieldkit.antenna", "model_json") != "present":
        pytest.skip("fieldkit.antenna.model_json has not landed")
    body = client.post("/api/model", json=demo("dipole-model.json")).json
    first = body["results"][0]
    assert {"frequency_mhz", "impedance_ohm", "swr", "zenith_gain_dbi"} <= set(first)
    # An array of specs answers an array in the same order (ARCHITECTURE.md, model contract).
    pair = client.post("/api/model", json=[demo("dipole-model.json")] * 2)
    assert pair.status_code == 200 and isinstance(pair.json, list) and len(pair.json) == 2


@pytest.mark.parametrize(
    ("path", "change", "field_prefix"),
    [
        ("/api/model", {"ground": "marsh-of-doom"}, "ground"),
        ("/api/model", {"wires": "none"}, "wires"),
        ("/api/sky", {"channels_mhz": [-1]}, "channels_mhz"),
        ("/api/sky", {"date": "yesterday"}, "date"),
    ],
)
def test_bad_input_is_422_naming_the_field(client, path, change, field_prefix):
    module, name, file = ENDPOINTS[path]
    if layer_state(module, name) != "present":
        pytest.skip(f"{module}.{name} has not landed")
    response = client.post(path, json={**demo(file), **change})
    assert response.status_code == 422, response.json
    assert response.json["field"].startswith(field_prefix)
    assert response.json["detail"]


def test_plan_bad_input_is_422(client):
    if layer_state("fieldkit.planning", "plan") != "present":
        pytest.skip("fieldkit.planning has not landed")
    spec = {k: v for k, v in json.loads(paths.demo_plan_path().read_text()).items() if k != "name"}
    response = client.post("/api/plan", json={**spec, "form": "spiral"})
    assert response.status_code == 422
    assert response.json["field"] == "form"
