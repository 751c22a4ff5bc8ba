"""The kit's antenna wire: diameter (or AWG gauge), conductor, insulation jacket, mass per metre.

References
----------
.. [1] ASTM B258, Standard Specification for Standard Nominal Diameters and Cross-Sectional Areas of
   AWG Sizes of Solid Round Wires Used as Electrical Conductors.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, choice, join, require_mapping
from fieldkit.fields import Record, flag, nested, num, string

TEMPERS = ("soft", "hard")  # copper as drawn: annealed or hard-drawn (fieldkit.rigging.strength)
CONDUCTORS = ("perfect", "copper", "aluminium", "copper-clad-steel", "steel")
# Densities [kg/m³]: copper 8890 (REFERENCES.md, from memory); aluminium 2700, steel 7850, PVC jacket
# 1400 (from memory, handbook values). Copper-clad steel taken as steel (the cladding is thin).
DENSITY_KG_M3 = {
    "perfect": 8890.0,
    "copper": 8890.0,
    "aluminium": 2700.0,
    "copper-clad-steel": 7850.0,
    "steel": 7850.0,
}
JACKET_DENSITY_KG_M3 = 1400.0  # PVC, from memory


def awg_diameter_m(gauge: int) -> float:
    """Nominal diameter of AWG gauge n: d = 0.127 mm × 92^((36 − n)/39) (ASTM B258) [m]."""
    return 0.127e-3 * 92.0 ** ((36 - gauge) / 39)


@dataclass(frozen=True)
class KitWire:
    """Antenna wire from the kit.

    Attributes
    ----------
    diameter_m : conductor diameter [m]
    conductor : conductor material name
    insulation_thickness_m : jacket thickness, 0 for bare wire [m]
    insulation_permittivity : relative permittivity of the jacket [-]
    spool_m : wire on the spool, None if not stated [m]
    temper : "soft" or "hard" for copper, None if not stated (the strength takes soft-drawn)
    stranded : a stranded wire of this overall diameter (the strength counts less metal)
    """

    diameter_m: float
    conductor: str
    insulation_thickness_m: float = 0.0
    insulation_permittivity: float = 1.0
    spool_m: float | None = None
    temper: str | None = None
    stranded: bool = False

    @property
    def mass_kg_per_m(self) -> float:
        """Conductor (treated as solid) plus jacket [kg/m]."""
        a = self.diameter_m / 2
        b = a + self.insulation_thickness_m
        return math.pi * (
            a * a * DENSITY_KG_M3[self.conductor] + (b * b - a * a) * JACKET_DENSITY_KG_M3
        )

    def to_json(self) -> dict[str, Any]:
        out: dict[str, Any] = {
            "diameter_mm": round(self.diameter_m * 1e3, 4),
            "conductor": self.conductor,
        }
        if self.insulation_thickness_m > 0:
            out["insulation"] = {
                "thickness_mm": round(self.insulation_thickness_m * 1e3, 4),
                "relative_permittivity": self.insulation_permittivity,
            }
        if self.temper is not None:
            out["temper"] = self.temper
        if self.stranded:
            out["stranded"] = True
        return out


INSULATION = Record(
    "WireInsulation",
    (
        num("thickness_mm", "mm", 0, 10, required=True),
        num("relative_permittivity", "", 1, 20, required=True),
    ),
    "the wire's jacket",
)
WIRE = Record(
    "KitWire",
    (
        num("diameter_mm", "mm", 0.2, 20, description="conductor diameter (or awg)"),
        num(
            "awg",
            "",
            0,
            40,
            integer=True,
            description="AWG gauge (ASTM B258), instead of diameter_mm",
        ),
        string("conductor", *CONDUCTORS, description="default copper"),
        nested("insulation", INSULATION, nullable=True),
        num("spool_m", "m", 0, exclusive_minimum=True, description="wire on the spool"),
        string(
            "temper",
            *TEMPERS,
            description="copper only: soft- or hard-drawn (the breaking load); default soft",
        ),
        flag(
            "stranded",
            description="a stranded wire of this overall diameter (default solid)",
        ),
        string("note"),
    ),
    "the kit's antenna wire: diameter_mm or awg",
    one_of=(("diameter_mm", "awg"),),
)


def parse_wire(value: Any, field: str = "kit.wire") -> KitWire:
    """Validate the kit wire: ``diameter_mm`` or ``awg``, ``conductor``, optional ``insulation``, ``spool_m``."""
    obj = require_mapping(value, field)
    WIRE.check(obj, field)
    if "diameter_mm" in obj and "awg" in obj:
        raise InputError(join(field, "awg"), "give either diameter_mm or awg, not both")
    if "awg" in obj:
        diameter = awg_diameter_m(int(WIRE.number(obj, field, "awg")))
    elif "diameter_mm" in obj:
        diameter = WIRE.number(obj, field, "diameter_mm") * 1e-3
    else:
        raise InputError(join(field, "diameter_mm"), "required: the wire diameter in mm (or awg)")
    conductor = choice(obj.get("conductor", "copper"), join(field, "conductor"), CONDUCTORS)
    thickness, eps = 0.0, 1.0
    if obj.get("insulation") is not None:
        ifield = join(field, "insulation")
        ins = require_mapping(obj["insulation"], ifield)
        INSULATION.check(ins, ifield)
        if "thickness_mm" not in ins or "relative_permittivity" not in ins:
            raise InputError(ifield, "expected thickness_mm and relative_permittivity")
        thickness = INSULATION.number(ins, ifield, "thickness_mm") * 1e-3
        eps = INSULATION.number(ins, ifield, "relative_permittivity")
    spool = None
    if obj.get("spool_m") is not None:
        spool = WIRE.number(obj, field, "spool_m")
    temper = None
    if "temper" in obj:
        temper = choice(obj["temper"], join(field, "temper"), TEMPERS)
        if conductor != "copper":
            raise InputError(
                join(field, "temper"),
                f"soft or hard applies to copper wire only, not {conductor}: leave it out",
            )
    stranded = obj.get("stranded", False)
    if not isinstance(stranded, bool):
        raise InputError(join(field, "stranded"), "expected true or false", value=stranded)
    return KitWire(diameter, conductor, thickness, eps, spool, temper, stranded)
