"""RF exposure limits: FCC 47 CFR §1.1310 and ICNIRP 2020 whole-body reference levels.

Every limit fieldkit compares a field with lives in this module, with its source beside it. Limits are
RMS field strengths averaged over the averaging time (and, for the whole-body levels, over the body).

References
----------
.. [1] 47 CFR §1.1310(e)(1), Table 1 — Limits for maximum permissible exposure (MPE): (A) occupational/
   controlled exposure (averaged over 6 minutes), (B) general population/uncontrolled exposure
   (averaged over 30 minutes). Frequency f in MHz.
.. [2] ICNIRP, "Guidelines for limiting exposure to electromagnetic fields (100 kHz to 300 GHz)",
   Health Physics 118(5):483–524, 2020, Table 5 (whole-body exposure, averaged over 30 minutes and the
   whole body). Values recalled from memory; confirm against the original before tightening tests.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

from fieldkit.constants import ETA0
from fieldkit.errors import InputError, choice

LimitSetName = Literal["fcc-uncontrolled", "fcc-controlled", "icnirp-public", "icnirp-occupational"]
LIMIT_SETS: tuple[str, ...] = (
    "fcc-uncontrolled",
    "fcc-controlled",
    "icnirp-public",
    "icnirp-occupational",
)

#: The limit sets in the words every text uses (the codes stay in the JSON's ``limit_set``).
LIMIT_SET_WORDS = {
    "fcc-uncontrolled": "US general public limits (47 CFR 1.1310)",
    "fcc-controlled": "US occupational limits (47 CFR 1.1310)",
    "icnirp-public": "ICNIRP 2020 general public limits",
    "icnirp-occupational": "ICNIRP 2020 occupational limits",
}

#: Impedance of free space [ohm] (μ0·c, fieldkit.constants) — plane-wave equivalent power density S = E²/η0.
FREE_SPACE_IMPEDANCE_OHM = ETA0
#: 1 mW/cm² in W/m² (unit conversion).
W_PER_M2_PER_MW_PER_CM2 = 10.0

_FCC_SOURCE = "47 CFR §1.1310 Table 1"
_ICNIRP_SOURCE = "ICNIRP 2020, Health Phys. 118(5), Table 5 (from memory)"

#: Averaging times [s]: FCC controlled 6 min, uncontrolled 30 min [1]; ICNIRP whole body 30 min [2].
AVERAGING_S = {
    "fcc-controlled": 6 * 60.0,
    "fcc-uncontrolled": 30 * 60.0,
    "icnirp-occupational": 30 * 60.0,
    "icnirp-public": 30 * 60.0,
}

_Fn = Callable[[float], float]
_Band = tuple[
    float, float, _Fn, _Fn, _Fn | None
]  # f_low_mhz, f_high_mhz, E(f) V/m, H(f) A/m, S(f) mW/cm²


def _const(v: float) -> _Fn:
    return lambda f: v


# 47 CFR §1.1310 Table 1 (A) occupational/controlled; S of the 0.3–30 MHz rows is plane-wave equivalent.
_FCC_CONTROLLED: tuple[_Band, ...] = (
    (0.3, 3.0, _const(614.0), _const(1.63), _const(100.0)),
    (3.0, 30.0, lambda f: 1842.0 / f, lambda f: 4.89 / f, lambda f: 900.0 / f**2),
    (30.0, 300.0, _const(61.4), _const(0.163), _const(1.0)),
)
# 47 CFR §1.1310 Table 1 (B) general population/uncontrolled.
_FCC_UNCONTROLLED: tuple[_Band, ...] = (
    (0.3, 1.34, _const(614.0), _const(1.63), _const(100.0)),
    (1.34, 30.0, lambda f: 824.0 / f, lambda f: 2.19 / f, lambda f: 180.0 / f**2),
    (30.0, 300.0, _const(27.5), _const(0.073), _const(0.2)),
)
# ICNIRP 2020 Table 5, occupational (no S given below 30 MHz; S in W/m² there converted to mW/cm²).
_ICNIRP_OCCUPATIONAL: tuple[_Band, ...] = (
    (0.1, 30.0, lambda f: 660.0 / f**0.7, lambda f: 4.9 / f, None),
    (30.0, 400.0, _const(61.0), _const(0.16), _const(10.0 / W_PER_M2_PER_MW_PER_CM2)),
)
# ICNIRP 2020 Table 5, general public.
_ICNIRP_PUBLIC: tuple[_Band, ...] = (
    (0.1, 30.0, lambda f: 300.0 / f**0.7, lambda f: 2.2 / f, None),
    (30.0, 400.0, _const(27.7), _const(0.073), _const(2.0 / W_PER_M2_PER_MW_PER_CM2)),
)

_TABLES: dict[str, tuple[tuple[_Band, ...], str]] = {
    "fcc-controlled": (_FCC_CONTROLLED, _FCC_SOURCE),
    "fcc-uncontrolled": (_FCC_UNCONTROLLED, _FCC_SOURCE),
    "icnirp-occupational": (_ICNIRP_OCCUPATIONAL, _ICNIRP_SOURCE),
    "icnirp-public": (_ICNIRP_PUBLIC, _ICNIRP_SOURCE),
}


@dataclass(frozen=True)
class ExposureLimit:
    """One limit set evaluated at one frequency (RMS, time-averaged)."""

    limit_set: str
    frequency_hz: float
    e_v_per_m: float
    h_a_per_m: float
    #: power density [W/m²]: the table's value, or the plane-wave equivalent E²/η0 where none is given
    s_w_per_m2: float
    s_from_table: bool
    averaging_s: float
    source: str

    def to_json(self) -> dict:
        return {
            "limit_set": self.limit_set,
            "frequency_mhz": self.frequency_hz / 1e6,
            "e_v_per_m": round(self.e_v_per_m, 4),
            "h_a_per_m": round(self.h_a_per_m, 5),
            "s_w_per_m2": round(self.s_w_per_m2, 4),
            "s_is_plane_wave_equivalent": not self.s_from_table,
            "averaging_min": self.averaging_s / 60.0,
            "source": self.source,
        }


def parse_limit_set(value, field: str = "limit_set") -> str:
    """Validate a limit-set name (one of :data:`LIMIT_SETS`)."""
    return choice(value, field, LIMIT_SETS)


def exposure_limit(
    limit_set: str,
    *,
    frequency_hz: float,
    field: str = "limit_set",
    frequency_field: str = "frequency_mhz",
) -> ExposureLimit:
    """Maximum permissible exposure of a limit set at a frequency.

    Parameters
    ----------
    limit_set : {"fcc-uncontrolled", "fcc-controlled", "icnirp-public", "icnirp-occupational"}
    frequency_hz : float
        Frequency [Hz]; the tables cover 0.3–300 MHz (FCC) and 0.1–400 MHz (ICNIRP).

    Returns
    -------
    ExposureLimit
        E [V/m RMS], H [A/m RMS], S [W/m²], averaging time [s] and the source.

    References
    ----------
    47 CFR §1.1310 Table 1; ICNIRP 2020 Table 5.
    """
    name = parse_limit_set(limit_set, field)
    bands, source = _TABLES[name]
    f_mhz = frequency_hz / 1e6
    if not math.isfinite(f_mhz) or f_mhz <= 0:
        raise InputError(frequency_field, f"expected a positive frequency, got {f_mhz!r}")
    for low, high, e_fn, h_fn, s_fn in bands:
        if low <= f_mhz <= high:
            e = e_fn(f_mhz)
            s = (
                s_fn(f_mhz) * W_PER_M2_PER_MW_PER_CM2
                if s_fn is not None
                else e**2 / FREE_SPACE_IMPEDANCE_OHM
            )
            return ExposureLimit(
                limit_set=name,
                frequency_hz=frequency_hz,
                e_v_per_m=e,
                h_a_per_m=h_fn(f_mhz),
                s_w_per_m2=s,
                s_from_table=s_fn is not None,
                averaging_s=AVERAGING_S[name],
                source=source,
            )
    raise InputError(
        frequency_field,
        f"{f_mhz:g} MHz is outside the {name} table ({bands[0][0]:g}–{bands[-1][1]:g} MHz)",
        value=f_mhz,
    )
