"""Which ground class the measured antenna fits best: the hung wire solved over each class.

The measured resonance and R at resonance are compared with the engine's, over each ground preset,
for the wire as it hangs (the option's hang; the measured leg's difference from the model's moved
along the engine's sensitivity). Each class gets a misfit

    m = √[((f_g − f)/f / 1.5 %)² + ((R_g − R)/R / 10 %)²],

the smallest wins. 1.5 %: how far trees, the coax's outer and the real heights usually move a raised
dipole's resonance from any model (common practice, the same "a percent or two" as the cut list's
spare); 10 %: an analyser's R near 50 Ω and the day's soil moisture (from memory). It is a guide:
one antenna cannot tell two close classes apart.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

FREQUENCY_SPREAD = 0.015  # fraction (common practice: model-to-field resonance spread)
R_SPREAD = 0.10  # fraction (from memory: analyser accuracy near 50 Ω and soil moisture)
PROBE_FRACTION = 0.01  # X is close to linear within ±1 % of a half-wave resonance (engine runs)


@dataclass(frozen=True)
class GroundClassFit:
    """The model over one ground class: resonance [Hz], R there [Ω] and the misfit [-]."""

    ground: str
    resonance_hz: float
    r_ohm: float
    misfit: float


def _over(res, ground_name: str, *, engine, wire) -> tuple[float, float]:
    """Resonance and R of the option's hang over one ground class (two solves, X linear)."""
    from fieldkit.antenna import parse_ground

    f0 = res.resonant_frequency_hz
    fs = [f0 * (1 - PROBE_FRACTION), f0 * (1 + PROBE_FRACTION)]
    a, b = engine.solve(res.hung, wire, frequencies_hz=fs, ground=parse_ground(ground_name))
    za, zb = a.impedance_ohm, b.impedance_ohm
    t = -za.imag / (zb.imag - za.imag)
    return fs[0] + t * (fs[1] - fs[0]), za.real + t * (zb.real - za.real)


def fit_ground(
    res, *, engine, wire, resonance_hz: float, r_ohm: float, leg_now_m: float
) -> tuple[GroundClassFit, ...]:
    """Every ground class with its misfit to the measurement, best first.

    Parameters
    ----------
    res : the option's :class:`fieldkit.rigging.cut.Resonance`
    resonance_hz : measured resonance at the feedpoint [Hz]
    r_ohm : measured R at resonance [Ω]
    leg_now_m : the leg as measured [m]
    """
    from fieldkit.antenna.grounds import GROUND_PRESETS

    # the measured antenna as if its legs were the model's (the hang the engine has)
    f_meas = resonance_hz - (leg_now_m - res.leg_m) * res.dfres_dleg_hz_per_m
    rows = []
    for name in GROUND_PRESETS:
        f_g, r_g = _over(res, name, engine=engine, wire=wire)
        misfit = (
            ((f_g - f_meas) / f_meas / FREQUENCY_SPREAD) ** 2
            + ((r_g - r_ohm) / r_ohm / R_SPREAD) ** 2
        ) ** 0.5
        rows.append(GroundClassFit(name, f_g, r_g, misfit))
    return tuple(sorted(rows, key=lambda r: r.misfit))


def ground_fit_json(
    fits: tuple[GroundClassFit, ...], *, resonance_hz: float, r_ohm: float, site_ground: str
) -> dict[str, Any]:
    """The re-trim's ``ground_fit`` block: the best class in words and the offer to keep it.

    ``site_ground`` is the site's ground in words ("sea water"), as the plan names it.
    """
    best, *rest = fits
    words = best.ground.replace("-", " ")
    said = (
        f"the measurement ({r_ohm:.0f} Ω at {resonance_hz / 1e6:.3f} MHz) fits {words} ground best: "
        f"the model over it gives {best.r_ohm:.0f} Ω at {best.resonance_hz / 1e6:.3f} MHz"
    )
    if rest:
        said += f"; next {rest[0].ground.replace('-', ' ')} ground"
    said += ". A guide only: trees, the coax and the real heights move one antenna's figures too"
    same = words == site_ground
    return {
        "best": best.ground,
        "words": said,
        "site_ground": site_ground,
        "same_as_site": same,
        "keep": None if same else {"site": {"ground": best.ground}},
        "keep_words": (
            "the site's ground already is this class"
            if same
            else f"keep {words} ground for the next plan at this site (it sets site.ground)"
        ),
        "classes": [
            {
                "ground": f.ground,
                "resonance_mhz": round(f.resonance_hz / 1e6, 5),
                "r_ohm": round(f.r_ohm, 1),
                "misfit": round(f.misfit, 2),
            }
            for f in fits
        ],
        "method": (
            "the hung wire solved over each ground class; misfit combines the resonance (±1.5 %, "
            "the usual model-to-field spread) and R at resonance (±10 %)"
        ),
    }
