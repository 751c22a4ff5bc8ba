"""The coax as a transmission line: a reading taken at the radio end moved to the feedpoint.

The run is a uniform 50 Ω line of the kit's length with propagation constant γ = α + jβ:
α from the class's matched loss at the frequency (``Coax.matched_loss_db``, taken as attenuation),
β = 2πf / (v c) with the class's velocity factor v. scikit-rf does the de-embedding (the line's
inverse network cascaded with the reading); it is imported only here, and only when a reading is
taken at the radio end (its import costs more than numpy's: ``benchmarks/bench_skrf_import.py``).

References
----------
.. [1] R. A. Chipman, *Schaum's Outline of Transmission Lines*, McGraw-Hill 1968, ch. 4–5: input
   impedance of a line, Z_in = Z0 (Z_L + Z0 tanh γl)/(Z0 + Z_L tanh γl); |Γ_in| = |Γ_L| e^(−2αl).
.. [2] scikit-rf, ``skrf.media.DefinedGammaZ0`` and ``Network.inv`` (de-embedding by cascading the
   inverse of a two-port).
"""

from __future__ import annotations

import math

import numpy as np

from fieldkit.constants import SPEED_OF_LIGHT_M_S as C0
from fieldkit.errors import InputError
from fieldkit.readable import given_both
from fieldkit.rigging.feedline import Coax

NEPER_DB = 20 / math.log(10)  # 1 Np = 8.686 dB (definition of the neper)
LINE_IMPEDANCE_OHM = (
    50.0  # every class of the table is a 50 Ω cable (makers' datasheets, from memory)
)
MEASURED_AT = ("feedpoint", "radio")

DIP_WORDS = (
    "the SWR dip is taken as the antenna's own: a 50 Ω line leaves the frequency of the lowest SWR "
    "where it is (the SWR along a lossless line is the same at both ends; loss only lowers it), "
    "so the dip needs no moving through the coax"
)


def _need_velocity_factor(coax: Coax) -> float:
    if coax.velocity_factor is None:
        raise InputError(
            "kit.coax.velocity_factor",
            "required to move a reading taken at the radio end to the feedpoint: the coax's "
            "velocity factor (0.66 for solid polyethylene, about 0.8 for foam; see its datasheet)",
        )
    return coax.velocity_factor


def propagation_constant(coax: Coax, *, frequencies_hz: np.ndarray) -> np.ndarray:
    """γ = α + jβ of the run per metre: α from the matched loss, β from the velocity factor [1/m].

    Parameters
    ----------
    coax : the kit's coax (class or explicit loss, with a velocity factor)
    frequencies_hz : frequencies [Hz]
    """
    vf = _need_velocity_factor(coax)
    f = np.asarray(frequencies_hz, dtype=float)
    loss_db = np.array([coax.matched_loss_db(x) for x in f])
    alpha = loss_db / NEPER_DB / coax.length_m
    beta = 2 * math.pi * f / (vf * C0)
    return alpha + 1j * beta


def wavelengths(coax: Coax, *, frequency_hz: float) -> float:
    """Electrical length of the run at a frequency [wavelengths in the cable]."""
    return coax.length_m * frequency_hz / (_need_velocity_factor(coax) * C0)


def _line(coax: Coax, frequencies_hz: np.ndarray):
    import skrf
    from skrf.media import DefinedGammaZ0

    freq = skrf.Frequency.from_f(np.asarray(frequencies_hz, dtype=float), unit="hz")
    gamma = propagation_constant(coax, frequencies_hz=frequencies_hz)
    media = DefinedGammaZ0(frequency=freq, z0=LINE_IMPEDANCE_OHM, gamma=gamma)
    return skrf, freq, media.line(coax.length_m, unit="m")


def feedpoint_impedance(z_radio_ohm, *, frequencies_hz, coax: Coax) -> np.ndarray:
    """Impedances read at the radio end moved to the feedpoint through the coax [Ω].

    Parameters
    ----------
    z_radio_ohm : R + jX at the radio end of the coax, one per frequency [Ω]
    frequencies_hz : the reading's frequencies [Hz]
    coax : the run between the radio and the feedpoint
    """
    z = np.atleast_1d(np.asarray(z_radio_ohm, dtype=complex))
    f = np.atleast_1d(np.asarray(frequencies_hz, dtype=float))
    skrf, freq, line = _line(coax, f)
    reading = skrf.Network(frequency=freq, z=z.reshape(-1, 1, 1), z0=LINE_IMPEDANCE_OHM)
    return (line.inv**reading).z[:, 0, 0]


def radio_impedance(z_feed_ohm, *, frequencies_hz, coax: Coax) -> np.ndarray:
    """What an analyser at the radio end reads for a feedpoint impedance (the forward line) [Ω]."""
    z = np.atleast_1d(np.asarray(z_feed_ohm, dtype=complex))
    f = np.atleast_1d(np.asarray(frequencies_hz, dtype=float))
    skrf, freq, line = _line(coax, f)
    load = skrf.Network(frequency=freq, z=z.reshape(-1, 1, 1), z0=LINE_IMPEDANCE_OHM)
    return (line**load).z[:, 0, 0]


def feedpoint_swr(swr_radio, *, frequencies_hz, coax: Coax) -> np.ndarray:
    """SWR read at the radio end as it is at the feedpoint: |Γ_L| = |Γ_in| e^(2αl) (Chipman) [-].

    A reading the line's loss cannot explain (|Γ_L| ≥ 1) is kept at the largest SWR shown, 99.
    """
    s = np.asarray(swr_radio, dtype=float)
    f = np.asarray(frequencies_hz, dtype=float)
    loss_db = np.array([coax.matched_loss_db(x) for x in f])
    gamma = (s - 1) / (s + 1) * 10 ** (loss_db / 10)  # two passes of the matched loss, in amplitude
    gamma = np.minimum(gamma, 0.98)  # SWR 99
    return (1 + gamma) / (1 - gamma)


def line_words(coax: Coax, *, frequency_hz: float) -> str:
    """How the reading was moved to the feedpoint, in words."""
    return (
        f"moved from the radio end to the feedpoint through {given_both(coax.length_m)} of "
        f"{coax.words} coax "
        f"(velocity factor {coax.velocity_factor:.2f}, matched loss "
        f"{coax.matched_loss_db(frequency_hz):.2f} dB): the run is "
        f"{wavelengths(coax, frequency_hz=frequency_hz):.2f} wavelength long, so R and X at the "
        "radio differ from the antenna's"
    )
