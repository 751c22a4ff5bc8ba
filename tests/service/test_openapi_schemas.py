"""The calculators' schemas in /api/openapi.json against their parsers: a body with every documented
top-level field is accepted; the parser and the schema require the same fields; the bodies and the
plan result validate against the schemas with the jsonschema reference validator (JSON Schema
2020-12, the dialect of OpenAPI 3.1); and a few values the parser refuses are refused by the schema
too (bounds, choices, unknown fields)."""

from __future__ import annotations

import copy
import json

import jsonschema
import pytest

from fieldkit.antenna.grounds import GROUND_NAMES
from fieldkit.antenna.spec import parse_spec
from fieldkit.errors import InputError
from fieldkit.model_fields import GROUND_CHOICES
from fieldkit.planning import parse_plan
from fieldkit.sky.inputs import parse_sky_spec
from tests.rigging.cases import spec, two_trees

WIRE = {
    "points_m": [[-10.0, 0.0, 10.0], [10.0, 0.0, 10.0]],
    "diameter_mm": 2.0,
    "conductor": "copper",
    "insulation": {"thickness_mm": 0.5, "relative_permittivity": 3.0},
}
MODEL_ALL = {
    "frequency_mhz": 7.1,
    "ground": "average",
    "wires": [WIRE],
    "feed": {"wire": 0, "distance_m": 10.0},
    "power_w": 100.0,
    "reference_impedance_ohm": 50.0,
    "pattern": {"elevation_deg": [45.0, 90.0], "azimuth_deg": [0.0]},
    "near_field": {"points_m": [[0.0, 0.0, 2.0]]},
}
SKY_ALL = {
    "site": {"lat_deg": 46.8, "lon_deg": 8.2, "utc_offset_h": 1},
    "date": "2026-12-01",
    "solar": {"f107": 120},
    "channels_mhz": [7.1, "80m"],
    "sounding": {
        "hour_utc": 12,
        "fof2_mhz": 6.0,
        "virtual_height_km": 250,
        "hmf2_km": 300,
        "muf3000_mhz": 18,
    },
    "antenna": {k: v for k, v in MODEL_ALL.items() if k in ("ground", "wires", "feed")},
    "power_w": 100,
    "mode": "ssb",
    "noise_environment": "rural",
    "bandwidth_hz": 2400,
    "required_snr_db": 8,
    "schedule": {"start_utc": "16:00", "end_utc": "20:00", "distances_km": [50, 150]},
}


def _plan_all() -> dict:
    s = spec(supports=two_trees(40, 10.0), channel_mhz=7.1, ground="perfect")
    s.update(
        name="schema walk",
        form="flat",
        sky={
            "site": {"lat_deg": 46.8, "lon_deg": 8.2},
            "date": "2026-12-01",
            "solar": {"f107": 120},
        },
        schedule={"start_utc": "16:00", "end_utc": "20:00"},
        limit_set="icnirp-public",
        retrim={"frequency_mhz": 7.1, "dip_mhz": 7.02},
        date="2026-12-01",
    )
    s["site"].update(min_end_height_m=3.0, clearing_radius_m=200.0, mast_xy_m=[0.0, 5.0])
    s["site"]["supports"][0]["trunk_radius_m"] = 0.4
    return s


PARSERS = {"ModelSpec": parse_spec, "SkySpec": parse_sky_spec, "PlanInput": parse_plan}
BODIES = {"ModelSpec": MODEL_ALL, "SkySpec": SKY_ALL, "PlanInput": _plan_all()}
ENDPOINTS = {"ModelSpec": "/api/model", "SkySpec": "/api/sky", "PlanInput": "/api/plan"}


@pytest.fixture(scope="module")
def doc():
    from fieldkit.service.openapi import document

    return document()


def _validator(doc, name):
    schema = {**doc["components"]["schemas"][name], "components": doc["components"]}
    resolvable = jsonschema.Draft202012Validator(
        schema, registry=_registry(doc), format_checker=jsonschema.FormatChecker()
    )
    return resolvable


def _registry(doc):
    from referencing import Registry, Resource

    root = Resource.from_contents(
        {"components": doc["components"]}, default_specification=_dialect()
    )
    return Registry().with_resource("", root)


def _dialect():
    from referencing.jsonschema import DRAFT202012

    return DRAFT202012


def _one_of_groups(schema) -> list[set[str]]:
    return [
        {r["required"][0] for r in part["oneOf"]}
        for part in schema.get("allOf", [])
        if "oneOf" in part
    ]


def _parser_required(name, body) -> set[str]:
    """The top-level fields the parser cannot do without (removing one names it in the error)."""
    out = set()
    for key in body:
        smaller = {k: v for k, v in body.items() if k != key}
        try:
            PARSERS[name](copy.deepcopy(smaller))
        except InputError as e:
            assert e.field == key, (key, e.field, e.detail)
            out.add(key)
    return out


def test_the_ground_names_of_the_schema_are_the_engines():
    assert GROUND_CHOICES == GROUND_NAMES


def test_the_calculators_schemas_are_valid_json_schema(doc):
    for name in (
        "ModelSpec",
        "ModelResult",
        "SkySpec",
        "SkyResult",
        "PlanInput",
        "PlanResult",
        "DeploymentInput",
    ):
        jsonschema.Draft202012Validator.check_schema(doc["components"]["schemas"][name])


@pytest.mark.parametrize("name", sorted(PARSERS))
def test_the_body_holds_every_documented_top_level_field(doc, name):
    schema = doc["components"]["schemas"][name]
    documented = set(schema["properties"])
    if name == "ModelSpec":  # one of the two frequency fields at a time
        documented -= {"frequencies_mhz"}
    assert set(BODIES[name]) == documented
    _validator(doc, name).validate(BODIES[name])


@pytest.mark.parametrize("name", sorted(PARSERS))
def test_parser_and_schema_require_the_same_fields(doc, name):
    schema = doc["components"]["schemas"][name]
    one_of = set().union(*_one_of_groups(schema))
    needed = _parser_required(name, BODIES[name])
    assert needed - one_of == set(schema.get("required", []))
    assert needed & one_of <= one_of  # a field of a one-of group is needed only when alone
    validator = _validator(doc, name)
    for key in BODIES[name]:
        smaller = {k: v for k, v in BODIES[name].items() if k != key}
        assert validator.is_valid(smaller) == (key not in needed), key


def test_the_demo_results_validate(doc):
    from fieldkit.antenna import model_json
    from fieldkit.paths import assets_dir
    from fieldkit.sky import sky_json

    demo = assets_dir() / "demo"
    model = model_json(json.loads((demo / "dipole-model.json").read_text()))
    _validator(doc, "ModelResult").validate(model)
    _validator(doc, "SkyResult").validate(sky_json(json.loads((demo / "sky.json").read_text())))


def test_the_other_frequency_field_is_accepted_alone(doc):
    body = {k: v for k, v in MODEL_ALL.items() if k != "frequency_mhz"}
    body["frequencies_mhz"] = [7.0, 7.1]
    parse_spec(body)
    _validator(doc, "ModelSpec").validate(body)
    both = {**body, "frequency_mhz": 7.1}
    with pytest.raises(InputError):
        parse_spec(both)
    assert not _validator(doc, "ModelSpec").is_valid(both)


@pytest.mark.parametrize("name", sorted(ENDPOINTS))
def test_posting_every_documented_field(client, doc, name):
    response = client.post(ENDPOINTS[name], json=BODIES[name])
    assert response.status_code == 200, response.json
    result = {"ModelSpec": "ModelResult", "SkySpec": "SkyResult", "PlanInput": "PlanResult"}[name]
    _validator(doc, result).validate(response.json)
    if name == "PlanInput":
        assert response.json["options"][0]["retrim"]["change_cm_per_leg"] < 0
    for key in doc["components"]["schemas"][name].get("required", []):
        smaller = {k: v for k, v in BODIES[name].items() if k != key}
        refused = client.post(ENDPOINTS[name], json=smaller)
        assert refused.status_code == 422 and refused.json["field"] == key, refused.json


def test_deployment_body_every_documented_field(client, doc):
    schema = doc["components"]["schemas"]["DeploymentInput"]
    body = {**_plan_all(), "name": "schema walk", "client_id": "schema-walk-1"}
    assert set(body) == set(schema["properties"])
    _validator(doc, "DeploymentInput").validate(body)
    assert client.post("/api/deployments", json=body).status_code == 201
    assert set(schema["required"]) == {"name", "site", "channels_mhz", "kit", "radio"}
    for key in schema["required"]:
        smaller = {k: v for k, v in body.items() if k not in (key, "client_id")}
        refused = client.post("/api/deployments", json=smaller)
        assert refused.status_code == 422 and refused.json["field"] == key, refused.json


@pytest.mark.parametrize(
    ("change", "field"),
    [
        (lambda s: s["site"]["supports"][0].update(height_m=0.2), "site.supports[0].height_m"),
        (lambda s: s["site"]["supports"][0].update(kind="cliff"), "site.supports[0].kind"),
        (lambda s: s.update(channels_mhz=[40.0]), "channels_mhz[0]"),
        (lambda s: s["kit"].update(tension_n=2), "kit.tension_n"),
        (lambda s: s["kit"]["coax"].update(length_m=900), "kit.coax.length_m"),
        (lambda s: s["radio"].update(mode="smoke"), "radio.mode"),
        (lambda s: s["radio"].update(transmit_fraction=1.5), "radio.transmit_fraction"),
        (lambda s: s.update(limit_set="none"), "limit_set"),
        (lambda s: s["retrim"].update(dip_mhz=0.5), "retrim.dip_mhz"),
        (lambda s: s["site"].update(lat_deg=91), "site.lat_deg"),
        (lambda s: s["sky"]["solar"].update(f107=1000), "sky.solar.f107"),
        (lambda s: s["kit"]["wire"].update(colour="red"), "kit.wire.colour"),
        (lambda s: s.update(colour="red"), "colour"),
    ],
)
def test_what_the_parser_refuses_the_schema_refuses(doc, change, field):
    body = _plan_all()
    change(body)
    with pytest.raises(InputError) as e:
        parse_plan(body)
    assert e.value.field == field
    assert not _validator(doc, "PlanInput").is_valid(body)
