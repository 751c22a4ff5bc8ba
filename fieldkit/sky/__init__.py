"""Sky layer: which channel works at which hour, and how far it reaches from the site.

Public entry points
-------------------
sky_json(spec) -> dict
    The `fieldkit sky` contract (ARCHITECTURE.md): monthly-median sky estimate from IRI (PyIRI),
    optional sounding, reach per channel per hour, sunrise/sunset and the channel day.
elevation_deg(*, ground_range_km, virtual_height_km), ground_range_km(*, elevation_deg, virtual_height_km)
    One-hop spherical-earth geometry for the other layers.
"""

from fieldkit.sky.day import sky_json
from fieldkit.sky.path_geometry import elevation_deg, ground_range_km

__all__ = ["elevation_deg", "ground_range_km", "sky_json"]
