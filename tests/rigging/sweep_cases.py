"""An analyser sweep of a hung dipole for the sweep tests: the plan's own wire solved by NEC-2
(PyNEC), written as the CSV an analyser exports (tests only)."""

from __future__ import annotations

import numpy as np

from fieldkit.planning import plan
from tests.rigging.cases import spec, two_trees
from tests.rigging.nec_hung import nec_impedance

GROUNDS_NEC = {"average": (13.0, 0.005), "poor": (13.0, 0.002), "very-good": (20.0, 0.0303)}


def sweep_site(ground: str = "average") -> dict:
    """The bug case of issue 14: 3.65 MHz, 12.5 m of RG-58 (≈ λ/4)."""
    s = spec(supports=two_trees(46, 8.0), channel_mhz=3.65, ground=ground)
    s["form"] = "flat"
    s["kit"]["coax"] = {"class": "rg-58", "length_m": 12.5}
    return s


def nec_sweep(option: dict, *, ground: str, f_mhz: np.ndarray) -> np.ndarray:
    """NEC-2's feed impedance of the option's hung wire at each frequency [Ω]."""
    return np.array(
        [
            nec_impedance(
                option["hung_wire_m"],
                feed_distance_m=option["feed_distance_m"],
                frequency_mhz=float(f),
                radius_m=option["wire"]["diameter_mm"] * 0.5e-3,
                ground=("lossy", *GROUNDS_NEC[ground]),
            )
            for f in f_mhz
        ]
    )


def csv_text(f_mhz, z) -> str:
    rows = "\n".join(f"{f:.5f},{v.real:.3f},{v.imag:.3f}" for f, v in zip(f_mhz, z, strict=True))
    return "# exported sweep\nfrequency_mhz,r_ohm,x_ohm\n" + rows + "\n"


def planned(site: dict) -> dict:
    return plan(site)["options"][0]
