"""Wire conductors and insulation jackets: the series impedance they add per metre of wire.

A round wire's internal impedance with skin effect and a dielectric jacket's inductance are added to
the moment-method matrix as distributed series loading (impedance per metre along the wire).

References
----------
.. [1] S. Ramo, J. R. Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*, 3rd ed.,
   Wiley 1994, §5.12 (internal impedance of a round wire, Bessel-function form and skin depth).
.. [2] J. H. Richmond, E. H. Newman, "Dielectric coated wire antennas", Radio Science 11(1), 1976,
   pp. 13-20, doi:10.1029/RS011i001p00013 (jacket as series inductance per length).
.. [3] IEC 60028:1925, International standard of resistance for copper (annealed copper 1.7241e-8 ohm m).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np

from fieldkit.constants import MU0

Conductor = Literal["perfect", "copper", "aluminium", "copper-clad-steel", "steel"]
CONDUCTORS: tuple[str, ...] = ("perfect", "copper", "aluminium", "copper-clad-steel", "steel")

# Conductivity [S/m] and relative permeability of each conductor.
CONDUCTIVITY_S_M = {
    "copper": 1.0 / 1.7241e-8,  # annealed copper, 20 °C (IEC 60028)
    "aluminium": 3.77e7,  # EC-grade (1350) aluminium, 61 % IACS, 20 °C (ASTM B230; from memory)
    "steel": 6.0e6,  # galvanised mild steel wire, ~10 % IACS (from memory)
}
RELATIVE_PERMEABILITY = {
    "copper": 1.0,
    "aluminium": 1.0,
    # Mild steel at HF and small fields: effective mu_r of order 100 (from memory; it varies widely).
    "steel": 100.0,
}
# Copper-clad steel: a copper skin over a steel core. For 30-40 % IACS wire the copper layer is about
# 10 % of the radius (ASTM B452; from memory); at HF the current flows mostly in that layer.
CCS_CLADDING_FRACTION = 0.10


@dataclass(frozen=True)
class Insulation:
    """A dielectric jacket over the wire.

    Parameters
    ----------
    thickness_m : float
        Radial thickness of the jacket [m].
    relative_permittivity : float
        Relative permittivity of the jacket material [-] (PVC ~3-4, PE ~2.3).
    """

    thickness_m: float
    relative_permittivity: float


def skin_depth_m(
    *, frequency_hz: float, conductivity_s_m: float, relative_permeability: float = 1.0
):
    """Skin depth delta = sqrt(1/(pi f mu sigma)) [m] (Ramo, Whinnery & Van Duzer §5.12)."""
    return 1.0 / math.sqrt(math.pi * frequency_hz * MU0 * relative_permeability * conductivity_s_m)


def _round_wire_impedance(
    *, frequency_hz: float, radius_m: float, sigma: float, mu_r: float
) -> complex:
    """Internal impedance per length of a solid round wire [ohm/m], exact Bessel form.

    Z' = k J0(k a) / (2 pi a sigma J1(k a)), k = sqrt(-j omega mu sigma) (Ramo et al. §5.12, eq. 5.12(6)).
    The Bessel ratio comes from a backward recurrence that stays finite for a >> delta.
    """
    omega = 2 * math.pi * frequency_hz
    k = complex(np.sqrt(-1j * omega * MU0 * mu_r * sigma))
    ratio = bessel_j0_over_j1(k * radius_m)
    return complex(k * ratio / (2 * math.pi * radius_m * sigma))


def bessel_j0_over_j1(z: complex) -> complex:
    """J0(z)/J1(z) by the backward recurrence ρn = 1/(2n/z − ρn+1), ρn = Jn/Jn−1 [-].

    Miller's backward recurrence for Bessel-function ratios (Abramowitz & Stegun 9.12; Gautschi,
    SIAM Review 9(1), 1967) is stable for any complex z; started |z| + 40 orders up.
    """
    rho = 0j
    for n in range(int(abs(z)) + 40, 0, -1):
        rho = 1.0 / (2 * n / z - rho)
    return 1.0 / rho


def conductor_impedance_per_m(*, conductor: str, frequency_hz: float, radius_m: float) -> complex:
    """Series internal impedance per metre of wire [ohm/m] (0 for ``"perfect"``).

    Parameters
    ----------
    conductor : str
        One of :data:`CONDUCTORS`.
    frequency_hz : float
        Frequency [Hz].
    radius_m : float
        Wire radius [m].

    Notes
    -----
    Copper-clad steel is treated as copper when the copper skin depth is less than the cladding
    (true above ~1 MHz for common HF wire); below that the steel core's share is blended in by the
    fraction of current that penetrates the cladding, exp(-t/delta). This is an approximation.
    """
    if conductor == "perfect":
        return 0j
    if conductor == "copper-clad-steel":
        z_cu = _round_wire_impedance(
            frequency_hz=frequency_hz, radius_m=radius_m, sigma=CONDUCTIVITY_S_M["copper"], mu_r=1.0
        )
        z_st = _round_wire_impedance(
            frequency_hz=frequency_hz,
            radius_m=radius_m,
            sigma=CONDUCTIVITY_S_M["steel"],
            mu_r=RELATIVE_PERMEABILITY["steel"],
        )
        delta = skin_depth_m(frequency_hz=frequency_hz, conductivity_s_m=CONDUCTIVITY_S_M["copper"])
        share = math.exp(-CCS_CLADDING_FRACTION * radius_m / delta)
        return (1 - share) * z_cu + share * z_st
    return _round_wire_impedance(
        frequency_hz=frequency_hz,
        radius_m=radius_m,
        sigma=CONDUCTIVITY_S_M[conductor],
        mu_r=RELATIVE_PERMEABILITY[conductor],
    )


def insulation_impedance_per_m(
    *, insulation: Insulation | None, frequency_hz: float, radius_m: float
) -> complex:
    """Series reactance per metre of a dielectric jacket [ohm/m].

    j omega L', L' = (mu0 / 2 pi) (1 - 1/eps_r) ln(b/a), b = a + thickness (Richmond & Newman 1976).
    The added inductance lowers the resonant frequency of the wire.
    """
    if insulation is None or insulation.thickness_m == 0:
        return 0j
    b = radius_m + insulation.thickness_m
    inductance = (
        MU0 / (2 * math.pi) * (1 - 1 / insulation.relative_permittivity) * math.log(b / radius_m)
    )
    return 1j * 2 * math.pi * frequency_hz * inductance
