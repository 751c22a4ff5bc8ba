"""Weather and rigging rules: lightning, wind on masts, and the habits that keep the raise safe.

References
----------
.. [1] US National Weather Service, lightning safety: "When thunder roars, go indoors"; stay sheltered
   until 30 minutes after the last thunder; if you can hear thunder you are within striking distance.
   The older 30-30 rule: a flash-to-bang time of 30 s or less means shelter now.
.. [2] Speed of sound in air at 20 °C: 343 m/s (physics handbooks; √(γRT/M)).
"""

from __future__ import annotations

from dataclasses import dataclass

from fieldkit.errors import number

#: NWS: wait this long after the last thunder before going back out [s].
WAIT_AFTER_THUNDER_S = 30 * 60.0
#: 30-30 rule: flash-to-bang at or under this means shelter now [s].
FLASH_TO_BANG_SHELTER_S = 30.0
#: Speed of sound in air at 20 °C [m/s].
SPEED_OF_SOUND_M_S = 343.0
#: Gust speed above which a guyed telescopic mast comes down, when the kit gives no rating [m/s]:
#: Beaufort 6 (strong breeze, 10.8–13.8 m/s) starts at 10.8 m/s (common practice, no single source).
DEFAULT_MAST_WIND_LIMIT_M_S = 10.8


def lightning_distance_m(*, flash_to_bang_s: float) -> float:
    """Distance to a lightning strike from the flash-to-bang time [m] (sound at 343 m/s)."""
    t = number(flash_to_bang_s, "flash_to_bang_s", unit="s", minimum=0.0)
    return t * SPEED_OF_SOUND_M_S


def lightning_advice(*, flash_to_bang_s: float | None, minutes_since_thunder: float | None) -> str:
    """Plain-words lightning decision per the US National Weather Service guidance.

    Parameters
    ----------
    flash_to_bang_s : float or None
        Seconds between the last flash and its thunder [s]; None if no flash was seen.
    minutes_since_thunder : float or None
        Minutes since the last thunder was heard [min]; None if none has been heard today.
    """
    if flash_to_bang_s is not None:
        t = number(flash_to_bang_s, "flash_to_bang_s", unit="s", minimum=0.0)
        if t <= FLASH_TO_BANG_SHELTER_S:
            km = t * SPEED_OF_SOUND_M_S / 1000
            return f"Lightning about {km:.1f} km away: stop work, lower nothing by hand, go to shelter now."
    if minutes_since_thunder is not None:
        m = number(minutes_since_thunder, "minutes_since_thunder", unit="min", minimum=0.0)
        if m < WAIT_AFTER_THUNDER_S / 60:
            left = WAIT_AFTER_THUNDER_S / 60 - m
            return f"Thunder heard {m:.0f} min ago: stay sheltered another {left:.0f} min."
    return "No thunder in the last 30 minutes: work may go on; stop at the first thunder."


@dataclass(frozen=True)
class MastWind:
    id: str
    limit_m_s: float
    rated: bool  # the kit gave the maker's rating


def mast_wind_limits(masts) -> list[MastWind]:
    """Wind limit per kit mast: ``wind_limit_m_s`` from the kit, or the common-practice default."""
    out = []
    for i, m in enumerate(masts or []):
        if not isinstance(m, dict) or "id" not in m:
            continue
        if "wind_limit_m_s" in m:
            lim = number(
                m["wind_limit_m_s"], f"kit.masts[{i}].wind_limit_m_s", unit="m/s", minimum=0.0
            )
            out.append(MastWind(str(m["id"]), lim, True))
        else:
            out.append(MastWind(str(m["id"]), DEFAULT_MAST_WIND_LIMIT_M_S, False))
    return out


def mast_wind_ok(*, gust_m_s: float, limit_m_s: float) -> bool:
    """True when the gusts are within the mast's limit."""
    return number(gust_m_s, "gust_m_s", unit="m/s", minimum=0.0) <= limit_m_s
