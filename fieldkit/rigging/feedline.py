"""Feedline: coax classes with nominal matched loss versus frequency, mass, and loss at an SWR.

Class values are nominal, one maker's datasheet each (REFERENCES.md, "Wire and cable"; from memory):
real cables of a class differ by maker, age and connectors, so treat the figures as a guide.

References
----------
.. [1] P. C. Magnusson et al., *Transmission Lines and Wave Propagation*, and R. A. Chipman,
   *Schaum's Outline of Transmission Lines*, 1968: total loss of a mismatched line,
   L = 10 log[(a² − |Γ|²)/(a(1 − |Γ|²))], a = 10^(ML/10).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from fieldkit.errors import InputError, choice, join, number, require_mapping
from fieldkit.fields import Record, nested, num, string

DB_PER_100FT_TO_DB_PER_100M = 3.281  # 1 dB/100 ft = 3.281 dB/100 m (REFERENCES.md)

# Nominal matched loss [dB/100 ft] at 1 and 10 MHz and mass [kg/m] (REFERENCES.md, from memory).
COAX_CLASSES: dict[str, tuple[float, float, float]] = {
    "rg-58": (0.35, 1.2, 0.04),
    "rg-8x": (0.3, 1.0, 0.06),
    "rg-213": (0.2, 0.6, 0.15),
    "lmr-400": (0.12, 0.39, 0.10),
}
# Velocity factor by class: the wave's speed in the cable over c (makers' nominal figures, from memory;
# the dielectric sets it: solid polyethylene 0.66, foamed polyethylene 0.78–0.85).
VELOCITY_FACTORS: dict[str, tuple[float, str]] = {
    "rg-58": (0.66, "solid polyethylene dielectric, makers' datasheets (from memory)"),
    "rg-8x": (0.78, "foamed polyethylene; makers give 0.75–0.82 (from memory)"),
    "rg-213": (0.66, "solid polyethylene dielectric, MIL-C-17 type (from memory)"),
    "lmr-400": (0.85, "foamed polyethylene, the maker's datasheet (from memory)"),
}


@dataclass(frozen=True)
class Coax:
    """A coax run: loss model A(f) = k1·√f + k2·f [dB/100 m, f in MHz], mass per metre, length."""

    name: str
    k_sqrt: float
    k_lin: float
    mass_kg_per_m: float
    length_m: float
    velocity_factor: float | None = None  # None: an explicit line that does not give it
    class_code: str | None = None  # the class of COAX_CLASSES ("rg-58"); None: an explicit line

    @property
    def words(self) -> str:
        """The coax as a person reads it: "RG-58 class", or an explicit line's name."""
        return f"{self.class_code.upper()} class" if self.class_code else self.name

    def matched_loss_db(self, frequency_hz: float) -> float:
        """Matched loss of the whole run at a frequency [dB]."""
        f = frequency_hz / 1e6
        return (self.k_sqrt * math.sqrt(f) + self.k_lin * f) * self.length_m / 100.0


def _fit(f1_mhz: float, a1: float, f2_mhz: float, a2: float) -> tuple[float, float]:
    """Conductor (√f) plus dielectric (f) loss terms through two datasheet points [dB/100 m]."""
    # a = k1√f + k2 f at two frequencies: a 2×2 linear system
    det = math.sqrt(f1_mhz) * f2_mhz - math.sqrt(f2_mhz) * f1_mhz
    k1 = (a1 * f2_mhz - a2 * f1_mhz) / det
    k2 = (math.sqrt(f1_mhz) * a2 - math.sqrt(f2_mhz) * a1) / det
    return k1, k2


COAX = Record(
    "Coax",
    (
        string("class", *COAX_CLASSES, description="a coax class, or explicit loss and mass"),
        num("length_m", "m", 0.5, 500, required=True, missing="required: coax length in m"),
        nested(
            "loss_db_per_100m_at_mhz",
            description='matched loss [dB/100 m] by frequency in MHz, e.g. {"1": 1.1, "10": 3.9}',
            schema={"additionalProperties": {"type": "number", "minimum": 0, "maximum": 100}},
        ),
        num("mass_kg_per_m", "kg/m", 0, 2),
        num(
            "velocity_factor",
            "",
            0.5,
            1.0,
            description="the wave's speed in the cable over c (default from the class table); "
            "used to move a reading taken at the radio end to the feedpoint",
        ),
        string("note"),
    ),
    "the feedline: a class and length, or explicit loss and mass",
)


def parse_coax(value: Any, field: str = "kit.coax") -> Coax:
    """A coax class name and length, or an explicit line:
    ``{"loss_db_per_100m_at_mhz": {"1": 1.1, "10": 3.9}, "mass_kg_per_m": 0.04, "length_m": 25}``."""
    obj = require_mapping(value, field)
    COAX.check(obj, field)
    COAX.require(obj, field)
    length = COAX.number(obj, field, "length_m")
    if "class" in obj:
        if "loss_db_per_100m_at_mhz" in obj:
            raise InputError(
                join(field, "loss_db_per_100m_at_mhz"), "give a class or explicit loss, not both"
            )
        name = choice(str(obj["class"]).lower(), join(field, "class"), COAX_CLASSES)
        a1, a10, mass = COAX_CLASSES[name]
        k1, k2 = _fit(
            1.0, a1 * DB_PER_100FT_TO_DB_PER_100M, 10.0, a10 * DB_PER_100FT_TO_DB_PER_100M
        )
        if "mass_kg_per_m" in obj:
            mass = COAX.number(obj, field, "mass_kg_per_m")
        vf = _velocity_factor(obj, field, VELOCITY_FACTORS[name][0])
        return Coax(f"{name} class (nominal)", k1, k2, mass, length, vf, class_code=name)
    lf = join(field, "loss_db_per_100m_at_mhz")
    if "loss_db_per_100m_at_mhz" not in obj:
        raise InputError(
            join(field, "class"), f"required: one of {', '.join(COAX_CLASSES)}, or {lf}"
        )
    table = require_mapping(obj[lf.split(".")[-1]], lf)
    points = []
    for key, val in table.items():
        try:
            f = float(key)
        except ValueError:
            raise InputError(join(lf, key), 'keys are frequencies in MHz, e.g. "10"') from None
        if not 0.1 <= f <= 1000:
            raise InputError(join(lf, key), "frequency key expected between 0.1 and 1000 MHz")
        points.append((f, number(val, join(lf, key), unit="dB/100 m", minimum=0, maximum=100)))
    if not points:
        raise InputError(lf, "expected at least one frequency: loss pair")
    points.sort()
    if len(points) == 1:
        ((f1, a1_),) = points
        k1, k2 = a1_ / math.sqrt(f1), 0.0  # one point: conductor loss only (scales as √f)
    else:
        k1, k2 = _fit(points[0][0], points[0][1], points[-1][0], points[-1][1])
    if "mass_kg_per_m" not in obj:
        raise InputError(
            join(field, "mass_kg_per_m"), "required with explicit loss: coax mass in kg/m"
        )
    mass = COAX.number(obj, field, "mass_kg_per_m")
    return Coax("explicit", k1, k2, mass, length, _velocity_factor(obj, field, None))


def _velocity_factor(obj: Any, field: str, default: float | None) -> float | None:
    """The kit's velocity factor, else the class's."""
    if "velocity_factor" in obj:
        return COAX.number(obj, field, "velocity_factor")
    return default


def mismatch_loss_db(swr: float) -> float:
    """Mismatch loss −10 log(1 − |Γ|²), |Γ| = (SWR − 1)/(SWR + 1) [dB]."""
    g = (swr - 1) / (swr + 1)
    return -10 * math.log10(1 - g * g)


def total_loss_db(*, matched_loss_db: float, swr: float) -> float:
    """Loss of a line with matched loss ML terminated at a load of the given SWR (Chipman 1968) [dB].

    Total = 10 log[(a² − |Γ|²)/(a(1 − |Γ|²))], a = 10^(ML/10), |Γ| the load's reflection coefficient.
    """
    g2 = ((swr - 1) / (swr + 1)) ** 2
    a = 10 ** (matched_loss_db / 10)
    return 10 * math.log10((a * a - g2) / (a * (1 - g2)))


def feedline_json(coax: Coax, *, frequency_hz: float, swr: float) -> dict[str, Any]:
    """The option's feedline block."""
    ml = coax.matched_loss_db(frequency_hz)
    total = total_loss_db(matched_loss_db=ml, swr=swr)
    out = {
        "coax": coax.name,
        "length_m": coax.length_m,
        "matched_loss_db": round(ml, 3),
        "total_loss_db": round(total, 3),
        "loss_from_swr_db": round(total - ml, 3),
        "mass_kg": round(coax.mass_kg_per_m * coax.length_m, 3),
        "note": "nominal class figures (one maker's datasheet); real cable and connectors add loss",
    }
    if coax.velocity_factor is not None:  # the one a radio-end reading is moved with
        out["velocity_factor"] = coax.velocity_factor
    return out
