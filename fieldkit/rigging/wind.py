"""Wind and ice on a hung wire, its ropes, the coax and a mast: loads per metre and what they do to
the tension of a tied-off span.

The wind's drag on a round wire, rope, coax or mast tube is q·C_d·D per metre with q = ½ρv²; radial
ice of thickness t adds its weight and widens D by 2t. A span whose halyards are tied off keeps its
unstretched length: loaded harder, its tension grows until the added sag and the stretch of wire
and ropes make up the length (Irvine's cable equation, :func:`tied_off_tension_n`).

References
----------
.. [1] H. M. Irvine, *Cable Structures*, MIT Press 1981, ch. 1 (the shallow cable's length) and
   §2.2 (the cable equation of a suspended elastic cable under added load).
.. [2] S. F. Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3: a circular cylinder across the flow below the
   critical Reynolds number has C_d ≈ 1.2 (from memory).
.. [3] ISO 2533 (International Standard Atmosphere): air density 1.225 kg/m³ at sea level, 15 °C.
.. [4] ASCE 7, ch. 10 (ice loads due to freezing rain): glaze ice density 900 kg/m³ (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from fieldkit.constants import STANDARD_GRAVITY_M_S2
from fieldkit.rigging.roots import brent

AIR_DENSITY_KG_M3 = 1.225  # ISO 2533, sea level, 15 °C
CYLINDER_DRAG_COEFFICIENT = 1.2  # Hoerner 1965, circular cylinder, subcritical (from memory)
ICE_DENSITY_KG_M3 = 900.0  # glaze ice, ASCE 7 ch. 10 (from memory)
#: The wind a wire left up should ride out when the kit states none: 17.2 m/s, where Beaufort 8
#: (gale) begins (WMO Beaufort scale; common practice for a field rig left up overnight).
DEFAULT_DESIGN_WIND_M_S = 17.2
#: A telescopic mast tube when the kit gives no diameter: 40 mm (from memory: fibreglass and aluminium
#: push-up masts are 25–60 mm across, widest at the foot).
DEFAULT_MAST_DIAMETER_M = 0.040
#: Outer diameter of the coax classes [m] (nominal datasheets, from memory); an explicit line is taken
#: as the widest, 10.3 mm.
COAX_DIAMETER_M = {"rg-58": 0.0050, "rg-8x": 0.0061, "rg-213": 0.0103, "lmr-400": 0.0103}
WIDEST_COAX_M = 0.0103


def dynamic_pressure_pa(*, wind_m_s: float) -> float:
    """q = ½ρv² [Pa] (ISO 2533 air)."""
    return 0.5 * AIR_DENSITY_KG_M3 * wind_m_s**2


def drag_n_per_m(*, diameter_m: float, wind_m_s: float, ice_m: float = 0.0) -> float:
    """Wind force per metre on a round member across the wind, q·C_d·(D + 2t) [N/m]."""
    return (
        dynamic_pressure_pa(wind_m_s=wind_m_s)
        * CYLINDER_DRAG_COEFFICIENT
        * (diameter_m + 2 * ice_m)
    )


def ice_weight_n_per_m(*, diameter_m: float, ice_m: float) -> float:
    """Weight per metre of radial ice of thickness t on a member of diameter D [N/m]."""
    a = diameter_m / 2
    return ICE_DENSITY_KG_M3 * math.pi * ((a + ice_m) ** 2 - a * a) * STANDARD_GRAVITY_M_S2


def coax_diameter_m(class_code: str | None) -> float:
    """The outer diameter of a coax class ("rg-58"); the widest class for an explicit line [m]."""
    return COAX_DIAMETER_M.get(class_code or "", WIDEST_COAX_M)


@dataclass(frozen=True)
class Weather:
    """What the rig is checked for: wind speed [m/s] and radial ice [m]; ``stated`` when the kit
    gave the wind (else the default gale)."""

    wind_m_s: float
    ice_m: float = 0.0
    stated: bool = False

    def words(self) -> str:
        ice = f" with {self.ice_m * 1e3:g} mm of ice" if self.ice_m > 0 else ""
        return f"a {self.wind_m_s:g} m/s wind{ice}"


@dataclass(frozen=True)
class SpanLoad:
    """The loads of a span per metre along its chord and at its middle, in one direction [N/m], [N]."""

    per_m: float
    mid_n: float

    def shear_integral(self, span_m: float) -> float:
        """∫Q² dx over the span [N² m], Q the shear of a simply supported beam under these loads:
        w²L³/12 + wPL²/4 + P²L/4 (statics, computed)."""
        w, p, L = self.per_m, self.mid_n, span_m
        return w * w * L**3 / 12 + w * p * L * L / 4 + p * p * L / 4


def tied_off_tension_n(
    *,
    span_m: float,
    tension_n: float,
    still: SpanLoad,
    down: SpanLoad,
    across: SpanLoad,
    compliance_m_per_n: float,
) -> float:
    """The tension of a tied-off span once loaded harder: still-air weight → weight and ice ``down``
    plus the wind ``across`` [N].

    A shallow cable's length exceeds its chord by D/(2T²), D = ∫Q² dx (the loads' shear, both
    directions added), and stretches by T·C (C = Σ length/EA of wire and ropes). Its unstretched
    length does not change when it is loaded (the halyards are tied off), so the new tension T′
    solves Irvine's cable equation

        D′/(2T′²) − C·T′ = D/(2T²) − C·T,

    between T (no added load) and T·√(D′/D) (an inextensible cable, C = 0).

    References
    ----------
    .. [1] H. M. Irvine, *Cable Structures*, MIT Press 1981, §2.2 (the suspended elastic cable under
       added load: the cable equation) and ch. 1 (the inextensible, shallow-cable length).

    Notes
    -----
    For a sloping span or an inverted-V leg the chord and the loads across it stand in for the level
    span's (shallow-cable approximation); point loads are taken at mid-span.
    """
    d0 = still.shear_integral(span_m)
    d1 = down.shear_integral(span_m) + across.shear_integral(span_m)
    t0 = tension_n
    if d1 <= d0 or d0 <= 0:
        return t0
    top = t0 * math.sqrt(d1 / d0)
    c = compliance_m_per_n
    if c <= 0:
        return top
    before = d0 / (2 * t0 * t0) - c * t0
    return brent(lambda t: d1 / (2 * t * t) - c * t - before, t0, top, xtol=1e-9 * t0)
