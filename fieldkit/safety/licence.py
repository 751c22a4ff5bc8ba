"""Licence notes a plan gives beside its channels: bands whose rules differ from country to country.

fieldkit does not know the operator's licence (amateur, agency, military), so it never refuses a
channel on these grounds; it says where the usual rules are tighter than the rest of HF.

References
----------
.. [1] ITU Radio Regulations, footnote 5.133B (WRC-15): 5 351.5–5 366.5 kHz to the amateur service
   on a secondary basis, at most 15 W EIRP (20–25 W in some countries). From memory.
.. [2] 47 CFR §97.303(h): in the US, five 60 m channels (5 332, 5 348, 5 358.5, 5 373, 5 405 kHz
   centres), at most 100 W PEP ERP over a half-wave dipole. From memory.
"""

from __future__ import annotations

#: The 60 m region where administrations grant amateur channels [Hz] (widest of [1] and [2] with
#: the national channels of other countries near it, from memory).
BAND_60M_HZ = (5.25e6, 5.45e6)


def licence_notes(channels_hz: tuple[float, ...], *, power_w: float) -> tuple[str, ...]:
    """Plain-word notes for channels in bands with country-by-country rules (the 60 m band)."""
    low, high = BAND_60M_HZ
    inside = sorted(f for f in channels_hz if low <= f <= high)
    if not inside:
        return ()
    named = ", ".join(f"{f / 1e6:g}" for f in inside)
    return (
        f"{named} MHz {'is' if len(inside) == 1 else 'are'} in the 60 m band: under an amateur "
        "licence its channels, bandwidth and power differ by country (the ITU band 5351.5–5366.5 kHz "
        "at up to 15 W EIRP; the US five channels at up to 100 W ERP) — check your "
        f"licence before transmitting at {power_w:g} W; agency and military assignments follow "
        "their own rules",
    )
