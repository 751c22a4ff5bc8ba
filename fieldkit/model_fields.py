"""The field tables of the `fieldkit model` input (and of a ground), below every layer.

The engine's parser (:mod:`fieldkit.antenna.spec`, :mod:`fieldkit.antenna.grounds`) reads its keys,
required fields and bounds from these tables; the sky and plan inputs refer to them (a sky block's
antenna, every ``ground``); the API's JSON Schema is written from them. This module imports no
engine code, so referring to it costs nothing at start-up.
"""

from __future__ import annotations

from fieldkit.fields import Field, Record, arr, nested, num, ref, string

#: Ground names the engine knows (its table, with the constants and sources, is
#: fieldkit.antenna.grounds.GROUND_PRESETS; a test keeps the two lists the same).
GROUND_CHOICES = (
    "free-space",
    "perfect",
    "sea-water",
    "fresh-water",
    "wet",
    "medium-dry",
    "very-dry",
    "very-good",
    "average",
    "poor",
    "very-poor",
)
CONDUCTOR_CHOICES = ("perfect", "copper", "aluminium", "copper-clad-steel", "steel")
MAX_WIRES = 100
MAX_COORDINATE_M = 10_000.0
MAX_NEAR_FIELD_POINTS = 20_000
MIN_FREQUENCY_MHZ = 0.1  # the engine's range (thin-wire kernel and ground tables)
MAX_FREQUENCY_MHZ = 60.0

GROUND_CONSTANTS = Record(
    "GroundConstants",
    (
        num("relative_permittivity", "", 1.0, 100.0, required=True),
        num("conductivity_s_m", "S/m", 0.0, 10.0, required=True),
    ),
    "a real ground's constants",
)


def ground_field(name: str = "ground", **kw) -> Field:
    """A ground field: a preset name or the ground's constants."""
    return Field(
        name,
        schema={"oneOf": [{"type": "string", "enum": list(GROUND_CHOICES)}, ref(GROUND_CONSTANTS)]},
        refers=(GROUND_CONSTANTS,),
        **kw,
    )


_POINT = {
    "type": "array",
    "minItems": 3,
    "maxItems": 3,
    "items": {"type": "number", "minimum": -MAX_COORDINATE_M, "maximum": MAX_COORDINATE_M},
}
MODEL_INSULATION = Record(
    "ModelInsulation",
    (
        num("thickness_mm", "mm", 0, 50, required=True),
        num("relative_permittivity", "", 1, 20, required=True),
    ),
    "a wire's dielectric jacket",
)
MODEL_WIRE = Record(
    "ModelWire",
    (
        arr(
            "points_m",
            required=True,
            description="polyline [x, y, z] in metres",
            schema={"minItems": 2, "maxItems": 2000, "items": _POINT},
        ),
        num("diameter_mm", "mm", 0, 100, required=True, exclusive_minimum=True),
        string("conductor", *CONDUCTOR_CHOICES, description="default copper"),
        nested("insulation", MODEL_INSULATION, nullable=True),
    ),
    "one wire of the model",
)
FEED = Record(
    "ModelFeed",
    (
        num("wire", "", 0, integer=True, required=True, description="index into wires"),
        num("distance_m", "m", 0, required=True, description="along that wire's polyline"),
    ),
    "where the source is",
)
PATTERN = Record(
    "ModelPattern",
    (
        num(
            "elevation_deg",
            "deg",
            -90,
            90,
            many=True,
            required=True,
            missing="required: a list of angles in degrees",
            description="0-90 over ground, -90-90 in free space",
        ),
        num(
            "azimuth_deg",
            "deg",
            -360,
            360,
            many=True,
            required=True,
            missing="required: a list of angles in degrees",
        ),
    ),
    "directions of the far-field pattern",
)
NEAR_FIELD = Record(
    "ModelNearField",
    (
        arr(
            "points_m",
            required=True,
            missing="required: a list of [x, y, z] points in metres",
            schema={"minItems": 1, "maxItems": MAX_NEAR_FIELD_POINTS, "items": _POINT},
        ),
    ),
    "points where E and H are wanted",
)
MODEL = Record(
    "ModelSpec",
    (
        num(
            "frequency_mhz",
            "MHz",
            MIN_FREQUENCY_MHZ,
            MAX_FREQUENCY_MHZ,
            description="or frequencies_mhz",
        ),
        num(
            "frequencies_mhz",
            "MHz",
            MIN_FREQUENCY_MHZ,
            MAX_FREQUENCY_MHZ,
            many=True,
            schema={"minItems": 1, "maxItems": 200},
        ),
        ground_field(
            required=True,
            missing="required: a ground name or {relative_permittivity, conductivity_s_m}",
        ),
        arr(
            "wires",
            MODEL_WIRE,
            required=True,
            missing="required: a list of wires",
            schema={"minItems": 1, "maxItems": MAX_WIRES},
        ),
        nested("feed", FEED, required=True, missing="required: {wire, distance_m}"),
        num("power_w", "W", 0, 1e6, exclusive_minimum=True, description="default 1 W"),
        num(
            "reference_impedance_ohm",
            "ohm",
            0,
            1e4,
            exclusive_minimum=True,
            description="default 50",
        ),
        nested("pattern", PATTERN, nullable=True),
        nested("near_field", NEAR_FIELD, nullable=True),
    ),
    "the `fieldkit model` input: wires over ground, fed at one point",
    one_of=(("frequency_mhz", "frequencies_mhz"),),
)

MODEL_SOLUTION = Record(
    "ModelSolution",
    (
        num("frequency_mhz", "MHz", required=True),
        nested("impedance_ohm", required=True, description="r and x at the feed [Ω]"),
        num("swr", "", required=True, nullable=True, description="against reference_impedance_ohm"),
        num("radiation_efficiency", "", 0, 1, required=True),
        num("zenith_gain_dbi", "dBi", required=True),
        num("max_gain_dbi", "dBi", required=True),
        num("max_gain_elevation_deg", "deg", required=True),
        num("max_gain_azimuth_deg", "deg", required=True),
        nested("beamwidth_deg", required=True),
        num("wire_azimuth_deg", "deg", required=True),
        nested(
            "power_w", required=True, description="input, radiated, conductor and ground loss [W]"
        ),
        num("segments", "", 1, integer=True, required=True),
        num("feed_current_a", "A", required=True),
        nested("pattern", description="with a pattern input: the directions"),
        arr("gain_dbi", description="total gain per elevation, azimuth [dBi]"),
        arr("gain_dbi_horizontal"),
        arr("gain_dbi_vertical"),
        nested("near_field", description="with a near_field input: E and H at the points"),
    ),
    "the engine's answer at one frequency",
)
MODEL_RESULT = Record(
    "ModelResult",
    (arr("results", MODEL_SOLUTION, required=True),),
    "the `fieldkit model` result: one entry per frequency",
)
