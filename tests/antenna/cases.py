"""Dipole test cases built identically for fieldkit and for NEC-2 (tests.reference.nec)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from fieldkit.antenna import Antenna, Feed, Wire
from tests.reference.nec import Piece

C0 = 299_792_458.0
DROOP_DEG = 30.0  # inverted-V legs below horizontal
SLOPE_DEG = 15.0  # sloping dipole tilt
NEC_SEGMENTS_PER_WAVELENGTH = 84  # 41 segments on a 0.48 λ dipole


@dataclass(frozen=True)
class Case:
    form: str
    frequency_mhz: float
    height_wl: float
    antenna: Antenna
    pieces: list
    nec_feed: tuple[int, int]
    radius_m: float

    def __str__(self) -> str:
        return f"{self.form}-{self.frequency_mhz:g}MHz-{self.height_wl:g}wl"


def lowest_allowed_wl(form: str, length_wl: float = 0.48) -> float:
    """Lowest feed height [λ] that keeps the whole wire at least 0.03 λ above ground."""
    tilt = {"flat": 0.0, "sloping": SLOPE_DEG, "inverted-v": DROOP_DEG}[form]
    return 0.03 + length_wl / 2 * math.sin(math.radians(tilt))


def _nseg(length_m: float, lam: float, odd: bool) -> int:
    n = max(1, round(length_m / lam * NEC_SEGMENTS_PER_WAVELENGTH))
    if odd and n % 2 == 0:
        n += 1
    return n


def dipole(
    form: str,
    frequency_mhz: float,
    height_wl: float,
    *,
    radius_m: float = 1e-3,
    conductor: str = "perfect",
    length_wl: float = 0.48,
) -> Case:
    """A centre-fed dipole: 'flat', 'sloping' (tilted about its centre) or 'inverted-v' (apex height)."""
    lam = C0 / (frequency_mhz * 1e6)
    half = length_wl * lam / 2
    height_wl = max(height_wl, lowest_allowed_wl(form, length_wl))
    h = height_wl * lam
    if form in ("flat", "sloping"):
        s = math.radians(SLOPE_DEG if form == "sloping" else 0.0)
        a = np.array([-half * math.cos(s), 0, h - half * math.sin(s)])
        b = np.array([half * math.cos(s), 0, h + half * math.sin(s)])
        n = _nseg(2 * half, lam, odd=True)
        pieces = [Piece(tuple(a), tuple(b), n)]
        ant = Antenna((Wire(np.array([a, b]), radius_m, conductor),), Feed(0, half))
        return Case(form, frequency_mhz, height_wl, ant, pieces, (0, n // 2), radius_m)
    if form == "inverted-v":
        c = lam / NEC_SEGMENTS_PER_WAVELENGTH  # one-segment centre piece carrying the feed
        d = math.radians(DROOP_DEG)
        leg = half - c / 2
        p1 = np.array([-c / 2 - leg * math.cos(d), 0, h - leg * math.sin(d)])
        p2 = np.array([-c / 2, 0, h])
        p3 = np.array([c / 2, 0, h])
        p4 = np.array([c / 2 + leg * math.cos(d), 0, h - leg * math.sin(d)])
        n = _nseg(leg, lam, odd=False)
        pieces = [
            Piece(tuple(p1), tuple(p2), n),
            Piece(tuple(p2), tuple(p3), 1),
            Piece(tuple(p3), tuple(p4), n),
        ]
        ant = Antenna(
            (Wire(np.array([p1, p2, p3, p4]), radius_m, conductor),), Feed(0, leg + c / 2)
        )
        return Case(form, frequency_mhz, height_wl, ant, pieces, (1, 0), radius_m)
    raise ValueError(form)


def nec_ground(ground) -> tuple:
    if ground.kind == "lossy":
        return ("lossy", ground.relative_permittivity, ground.conductivity_s_m)
    return (ground.kind,)
