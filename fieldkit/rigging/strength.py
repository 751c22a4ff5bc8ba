"""Breaking loads of the antenna wire and the rope, the working loads they allow, and the weak link.

The wire's breaking load is its metal cross-section times the tensile strength of its conductor and
temper; a stranded wire of a stated overall diameter has less metal and loses a little more to the
lay. The jacket of an insulated wire is not counted (it stretches away long before the metal breaks).
A working load is the breaking load over a stated safety factor; the maker's working load of a rope is
used as given.

Tensile strengths are minimum or typical values of the usual wire standards, recalled (from memory —
confirm against the standard before tightening a check):

| conductor | temper | strength [MPa] | standard (from memory) |
|---|---|---|---|
| copper | soft-drawn (annealed) | 220 | ASTM B3; annealed C11000 ~210–250 MPa |
| copper | hard-drawn | 400 | ASTM B1, ~380–450 MPa for 1–3 mm wire |
| copper-clad steel | (high-strength grade) | 700 | ASTM B227/B910, 40 % conductivity grades ~690–1100 MPa |
| aluminium | hard (1350-H19) | 160 | ASTM B230, ~160–200 MPa |
| steel | galvanised fence wire | 350 | low-carbon galvanised wire ~350–550 MPa |

With these, soft-drawn copper of 1.6 mm breaks at 0.44 kN (issue 14: "roughly 0.45 kN").

References
----------
.. [1] ASTM B3 (soft or annealed copper wire), ASTM B1 (hard-drawn copper wire), ASTM B227 and B910
   (copper-clad steel wire), ASTM B230 (aluminium 1350-H19 wire) — values recalled, from memory.
.. [2] Cordage Institute, *CI 1303 / CI 2003*: a rope's working load is its minimum breaking strength
   over a design factor of 5 to 12 (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from fieldkit.rigging.wire import KitWire

MPA = 1e6
#: Tensile strength by conductor and temper [Pa] (module table, from memory).
TENSILE_STRENGTH_PA: dict[tuple[str, str], float] = {
    ("copper", "soft"): 220 * MPA,
    ("copper", "hard"): 400 * MPA,
    ("copper-clad-steel", "hard"): 700 * MPA,
    ("aluminium", "hard"): 160 * MPA,
    ("steel", "hard"): 350 * MPA,
}
#: Copper of unknown temper is taken as soft-drawn: the weaker, and what most spools of plain copper
#: antenna wire are (common practice).
DEFAULT_COPPER_TEMPER = "soft"
#: A stranded wire of overall diameter d: 7 strands of d/3 fill 7/9 of the circle (geometry), and the
#: lay costs about 7 % of the strands' sum (from memory: stranding efficiency 0.90–0.95).
STRANDED_METAL_FRACTION = 7 / 9
STRANDING_EFFICIENCY = 0.93
#: The wire may carry half its breaking load (common practice, no single source): the margin covers
#: gusts beyond the design wind, kinks and nicks at the insulators, and the plan's own simplifications.
WIRE_SAFETY_FACTOR = 2.0
#: Soft-drawn copper stretches for good above about a third of its breaking load (its yield is
#: ~70 MPa against ~220 MPa: from memory), so a hard pull lengthens the cut.
SOFT_COPPER_STRETCH_FRACTION = 1 / 3
#: Laid polyester rope, minimum breaking load ≈ 0.155 kN × d² (d in mm; from memory of maker
#: tables: 6 mm ~5.6 kN, 8 mm ~10 kN, 10 mm ~15 kN) and a design factor of 5 (Cordage Institute, the
#: low end of 5–12, from memory) when the kit does not give the maker's working load.
ROPE_BREAK_N_PER_MM2 = 155.0
ROPE_DESIGN_FACTOR = 5.0
#: Laid polyester stretches about 15 % before it breaks (from memory: 12–18 %); taken as linear, its
#: stiffness EA is the breaking load over that strain.
ROPE_STRAIN_AT_BREAK = 0.15
#: Young's modulus [Pa] (from memory, handbook values): copper 117 GPa (soft and hard alike),
#: copper-clad steel 160 GPa, aluminium 69 GPa, steel 200 GPa.
YOUNG_MODULUS_PA = {
    "copper": 117e9,
    "copper-clad-steel": 160e9,
    "aluminium": 69e9,
    "steel": 200e9,
}


@dataclass(frozen=True)
class WireStrength:
    """The wire's breaking load and the working load it allows [N], and where the figure comes from."""

    breaking_n: float
    safety_factor: float
    source: str
    soft_copper: bool
    kind: str = "the wire"  # "1.6 mm soft-drawn copper", as the warnings name it
    stiffness_n: float = math.inf  # EA: the force that would double its length [N]

    @property
    def working_n(self) -> float:
        return self.breaking_n / self.safety_factor


@dataclass(frozen=True)
class RopeStrength:
    """A rope's working load [N]: the maker's (``given``), or estimated from its diameter."""

    working_n: float
    given: bool
    source: str
    short: str = ""  # the source in a few words, for the warnings


def wire_temper(wire: KitWire) -> str:
    """The temper the strength table is read with: copper's given or default temper; other metals
    have one row ("hard")."""
    if wire.conductor in ("copper", "perfect"):
        return wire.temper or DEFAULT_COPPER_TEMPER
    return "hard"


def wire_strength(wire: KitWire) -> WireStrength:
    """Breaking load of the kit wire: metal area × tensile strength (module table) [N].

    A "perfect" conductor (a modelling choice) is taken as copper.
    """
    conductor = "copper" if wire.conductor == "perfect" else wire.conductor
    temper = wire_temper(wire)
    strength = TENSILE_STRENGTH_PA[(conductor, temper)]
    area = math.pi * (wire.diameter_m / 2) ** 2
    kind = f"{temper}-drawn {conductor}" if conductor == "copper" else conductor
    if wire.stranded:
        area *= STRANDED_METAL_FRACTION * STRANDING_EFFICIENCY
        kind = f"stranded {kind}"
    source = f"{kind}, {strength / MPA:.0f} MPa (ASTM wire tables, from memory)"
    return WireStrength(
        breaking_n=area * strength,
        safety_factor=WIRE_SAFETY_FACTOR,
        source=source,
        soft_copper=conductor == "copper" and temper == "soft",
        kind=f"{wire.diameter_m * 1e3:.3g} mm {kind}",
        stiffness_n=area * YOUNG_MODULUS_PA[conductor],
    )


def rope_stiffness_n(*, diameter_mm: float) -> float:
    """EA of laid polyester rope of this diameter: its breaking load over its strain at break [N]."""
    return ROPE_BREAK_N_PER_MM2 * diameter_mm**2 / ROPE_STRAIN_AT_BREAK


def rope_strength(*, diameter_mm: float, working_load_n: float | None) -> RopeStrength:
    """The rope's working load: the maker's when given, else laid polyester of this diameter over the
    design factor [N]."""
    if working_load_n is not None:
        return RopeStrength(working_load_n, True, "the maker's working load (kit)", "the maker's")
    breaking = ROPE_BREAK_N_PER_MM2 * diameter_mm**2
    return RopeStrength(
        breaking / ROPE_DESIGN_FACTOR,
        False,
        f"estimated for {diameter_mm:g} mm laid polyester: about {breaking / 1000:.1f} kN breaking "
        f"over a design factor of {ROPE_DESIGN_FACTOR:g} (from memory); give kit.rope.working_load_n "
        "from the maker's label",
        f"estimated for {diameter_mm:g} mm polyester; give kit.rope.working_load_n",
    )
