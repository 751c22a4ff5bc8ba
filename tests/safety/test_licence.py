"""Licence notes beside the channels (the 60 m band)."""

from __future__ import annotations

from fieldkit.safety.licence import licence_notes


def test_a_60m_channel_gets_the_licence_note_with_the_power():
    # ITU RR 5.133B: 5351.5–5366.5 kHz, 15 W EIRP (from memory); 5.3715 MHz is a US channel centre
    (note,) = licence_notes((3.605e6, 5.357e6, 5.3715e6), power_w=1000)
    assert note.startswith("5.357, 5.3715 MHz are in the 60 m band")
    assert "15 W EIRP" in note and "1000 W" in note


def test_no_note_outside_the_60m_band():
    # 80 m and 40 m are worldwide amateur allocations (ITU RR Article 5, from memory)
    assert licence_notes((3.605e6, 7.1e6), power_w=100) == ()
