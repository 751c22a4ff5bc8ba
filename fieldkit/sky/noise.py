"""Radio noise at the receiving site: man-made and galactic noise by ITU-R P.372.

The external noise factor is ``Fa = c - d log10(f_MHz)`` dB above kT0b for each environment class.
The noise power in a bandwidth ``b`` is ``N = Fa + 10 log10(b) - 204`` dBW (kT0 = -204 dBW/Hz).

References
----------
.. [1] ITU-R P.372-16 (2022), "Radio noise", §5 Table 2 (man-made noise, median values, c and d for
   business, residential, rural and quiet rural areas; galactic noise). Constants from memory:
   check against the Recommendation before tightening tolerances.
"""

from __future__ import annotations

from typing import Literal

import numpy as np

NoiseEnvironment = Literal["quiet-rural", "rural", "residential", "business"]

# (c, d) of Fa = c - d log10(f_MHz); ITU-R P.372, Table 2 (from memory)
MAN_MADE_NOISE_CD: dict[str, tuple[float, float]] = {
    "business": (76.8, 27.7),
    "residential": (72.5, 27.7),
    "rural": (67.2, 27.7),
    "quiet-rural": (53.6, 28.6),
}
GALACTIC_NOISE_CD = (52.0, 23.0)  # ITU-R P.372, Table 2 (from memory)
KT0_DBW_PER_HZ = -204.0  # 10 log10(k T0), T0 = 288 K; ITU-R P.372 §2

NOISE_ENVIRONMENTS: tuple[str, ...] = tuple(MAN_MADE_NOISE_CD)


def man_made_fa_db(*, frequency_mhz, environment: NoiseEnvironment):
    """Median man-made noise factor Fa [dB above kT0b] for an environment (ITU-R P.372, Table 2)."""
    c, d = MAN_MADE_NOISE_CD[environment]
    return c - d * np.log10(np.asarray(frequency_mhz, dtype=float))


def galactic_fa_db(*, frequency_mhz):
    """Median galactic noise factor Fa [dB above kT0b] (ITU-R P.372, Table 2)."""
    c, d = GALACTIC_NOISE_CD
    return c - d * np.log10(np.asarray(frequency_mhz, dtype=float))


def total_fa_db(*, frequency_mhz, environment: NoiseEnvironment, galactic_reaches_ground):
    """Power sum of man-made and (when not screened by the ionosphere) galactic noise [dB].

    Parameters
    ----------
    frequency_mhz : float or array_like
        Frequency [MHz].
    environment : {"quiet-rural", "rural", "residential", "business"}
        ITU-R P.372 environment class of the receiving site.
    galactic_reaches_ground : bool or array_like of bool
        True where the frequency is above foF2, so cosmic noise passes the ionosphere.

    Notes
    -----
    Atmospheric (lightning) noise is not included: ITU-R P.372 gives it as world maps by season and
    time block, which fieldkit does not carry. At night in summer on the lower channels it can exceed
    the man-made noise of a quiet site, so the reach there is optimistic.
    """
    man = 10.0 ** (man_made_fa_db(frequency_mhz=frequency_mhz, environment=environment) / 10.0)
    gal = 10.0 ** (galactic_fa_db(frequency_mhz=frequency_mhz) / 10.0)
    gal = np.where(np.asarray(galactic_reaches_ground, dtype=bool), gal, 0.0)
    return 10.0 * np.log10(man + gal)


def noise_power_dbw(*, fa_db, bandwidth_hz: float):
    """Noise power available from a lossless antenna in a bandwidth [dBW] (ITU-R P.372 §2)."""
    return np.asarray(fa_db, dtype=float) + 10.0 * np.log10(bandwidth_hz) + KT0_DBW_PER_HZ
