"""The one cut instruction and the tape-measure roundings it is written with.

Outside references: the international inch and foot (exactly 25.4 mm and 0.3048 m, 1959 agreement;
NIST Handbook 44, Appendix C); conversions below are computed from those definitions by hand.
"""

from __future__ import annotations

import json
import re
from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldkit.readable import (
    distance_text,
    power_text,
    round_sig,
    tape_both,
    tape_imperial,
    tape_metric,
)
from fieldkit.rigging.instruction import cut_instruction

INCH_M = Fraction(254, 10000)  # exact by definition (NIST Handbook 44, App. C)
FRACTION_VALUE = {"": 0, "¼": Fraction(1, 4), "½": Fraction(1, 2), "¾": Fraction(3, 4)}
NBSP = "\u00a0"  # tape readings keep number and unit together with no-break spaces


def plain(text: str) -> str:
    return text.replace(NBSP, " ")


def parse_imperial(text: str) -> Fraction:
    """Metres from "67 ft 4½ in" / "23¼ in" / "2 ft ¾ in", exactly."""
    m = re.fullmatch(r"(?:(\d+) ft )?(\d*)([¼½¾]?) in", plain(text))
    assert m, text
    feet = int(m.group(1) or 0)
    inches = int(m.group(2) or 0) + FRACTION_VALUE[m.group(3)]
    return (feet * 12 + inches) * INCH_M


def parse_metric(text: str) -> Fraction:
    m = re.fullmatch(r"(\d+)\.(\d\d) m|(\d+) cm", plain(text))
    assert m, text
    if m.group(3) is not None:
        return Fraction(int(m.group(3)), 100)
    return Fraction(int(m.group(1)) * 100 + int(m.group(2)), 100)


@pytest.mark.parametrize(
    ("metres", "metric", "imperial"),
    [
        # 1 m = 39.370 in (computed): nearest quarter 39¼ in = 3 ft 3¼ in
        (1.0, "1.00 m", "3 ft 3¼ in"),
        # 20.534 m = 808.43 in (computed): 808½ in = 67 ft 4½ in
        (20.534, "20.53 m", "67 ft 4½ in"),
        # 0.15 m = 5.906 in (computed): 6 in
        (0.15, "15 cm", "6 in"),
        # 19.795 m is held as 19.79499… in binary: the tape still reads 19.80 m; 779.33 in → 779¼ in
        (19.795, "19.80 m", "64 ft 11¼ in"),
        # 0.6096 m = 24 in exactly = 2 ft 0 in (definition)
        (0.6096, "61 cm", "2 ft 0 in"),
        # just under 2 ft (23.99 in) carries into the next foot, never "1 ft 12 in"
        (0.6094, "61 cm", "2 ft 0 in"),
        # 0.01 m = 0.394 in (computed) → ½ in
        (0.01, "1 cm", "½ in"),
        # 12 ft 0⅛ in: halves of a quarter round up
        (12 * 0.3048 + 0.125 * 0.0254, "3.66 m", "12 ft ¼ in"),
    ],
)
def test_tape_readings(metres, metric, imperial):
    assert plain(tape_metric(metres)) == metric
    assert plain(tape_imperial(metres)) == imperial
    assert plain(tape_both(metres)) == f"{metric} ({imperial})"
    # the reading never breaks across lines: no ordinary space inside it
    assert " " not in tape_metric(metres) + tape_imperial(metres)


@given(st.floats(min_value=0.0, max_value=200.0, allow_nan=False))
def test_tape_strings_read_back_within_half_a_step(metres):
    # the rounding step is 1 cm and ¼ in: the string read back is within half a step (computed)
    assert abs(parse_metric(tape_metric(metres)) - Fraction(metres)) <= Fraction(1, 200) + Fraction(
        1, 10**8
    )
    assert abs(parse_imperial(tape_imperial(metres)) - Fraction(metres)) <= INCH_M / 8 + Fraction(
        1, 10**8
    )


def test_readable_numbers():
    # the example: 133162 W is read as about 130 kW (two significant figures)
    assert power_text(133162.0) == "130 kW"
    assert power_text(100.0) == "100 W"
    assert power_text(1530.0) == "1.5 kW"
    assert round_sig(0.04567, 2) == 0.046
    assert distance_text(2.43) == "2.4 m" and distance_text(35.04) == "35 m"


def test_dipole_instruction_is_one_length_per_piece():
    # demo leg (3.605 MHz, Larch Basin): 19.645 m, wrap 0.15 m, spare 3 % of the leg = 0.589 m
    ci = cut_instruction(legs_m=[19.645, 19.645], wrap_allowance_m=0.15, spare_m=0.589)
    (piece,) = ci.pieces  # legs A and B are cut and marked alike: one line
    assert piece.legs == ("A", "B") and piece.count == 2
    # cut = leg + wrap at both ends + spare = 19.645 + 0.30 + 0.589 = 20.534 m (computed)
    assert piece.cut.m == pytest.approx(20.534)
    assert plain(piece.cut.metric) == "20.53 m"
    assert plain(piece.electrical.metric) == "19.65 m"  # the model's figure stays visible
    # marks from the feedpoint end: feedpoint fold 0.15, end insulator 19.795, spare start 19.945
    assert [(mk.kind, plain(mk.at.metric)) for mk in piece.marks] == [
        ("feedpoint", "15 cm"),
        ("end insulator", "19.80 m"),
        ("spare", "19.95 m"),
    ]
    assert plain(ci.total_metric) == "41.06 m"  # two pieces as cut, 2 × 20.53 m
    text = plain(ci.text("metric"))
    # the spare is what lies between the last mark and the cut end, as the tape reads them:
    # 20.53 m − 19.95 m = 58 cm (the exact 0.589 m would read 59 cm on its own; the marks win)
    assert "20.53 m" in text and "19.80 m" in text and "58 cm spare" in text
    assert "67 ft 4½ in" in plain(ci.text("imperial")) and "67 ft 4½ in" in plain(ci.text_both)
    # one number to cut: the instruction names no other length for the whole piece
    assert re.findall(r"Cut \d pieces \([^)]*\) of ([^,]+?) each", text) == ["20.53 m"]


@given(
    st.floats(min_value=2.0, max_value=40.0),
    st.floats(min_value=0.0, max_value=0.5),
    st.floats(min_value=0.0, max_value=2.0),
)
def test_the_parts_add_up_to_the_cut_in_either_unit(leg, wrap, spare):
    # a reader who adds the parts as shown gets the cut length as shown (positions are rounded, parts
    # are differences of positions)
    (piece,) = cut_instruction(legs_m=[leg, leg], wrap_allowance_m=wrap, spare_m=spare).pieces
    parts = [piece.wrap, piece.electrical, piece.wrap]
    parts_m = [parse_metric(p.metric) for p in parts]
    parts_in = [parse_imperial(p.imperial) for p in parts]
    # the outer wrap is read from the marks too: end insulator → start of the spare (or the cut end)
    marks_m = [parse_metric(mk.at.metric) for mk in piece.marks]
    marks_in = [parse_imperial(mk.at.imperial) for mk in piece.marks]
    assert marks_m[0] == parts_m[0] and marks_m[1] == parts_m[0] + parts_m[1]
    assert marks_in[0] == parts_in[0] and marks_in[1] == parts_in[0] + parts_in[1]
    if piece.spare is not None:
        assert marks_m[2] + parse_metric(piece.spare.metric) == parse_metric(piece.cut.metric)
        assert marks_in[2] + parse_imperial(piece.spare.imperial) == parse_imperial(
            piece.cut.imperial
        )


def test_json_carries_both_unit_strings_made_once():
    made = cut_instruction(legs_m=[10.0, 10.0], wrap_allowance_m=0.15, spare_m=0.3).to_json()
    out = json.loads(plain(json.dumps(made, ensure_ascii=False)))
    piece = out["pieces"][0]
    assert piece["cut"] == {"m": 10.6, "metric": "10.60 m", "imperial": "34 ft 9¼ in"}
    # 10.6 m = 417.32 in (computed) → 417¼ in = 34 ft 9¼ in
    assert out["text"]["metric"].count("10.60 m") == 1
    assert out["text"]["imperial"].count("34 ft 9¼ in") == 1


def test_linked_dipole_pieces_by_section():
    # sections feedpoint outward: 9.8 m to the link, 9.845 m beyond; the spare only on the outer one
    ci = cut_instruction(
        legs_m=[19.645, 19.645], wrap_allowance_m=0.15, spare_m=0.589, sections_m=[9.8, 9.845]
    )
    inner, outer = ci.pieces
    assert inner.count == outer.count == 2
    assert inner.spare is None and outer.spare is not None
    assert plain(inner.cut.metric) == "10.10 m"  # 9.8 + 2 × 0.15
    assert plain(outer.cut.metric) == "10.73 m"  # 9.845 + 0.30 + 0.589 = 10.734
    assert [mk.kind for mk in inner.marks] == ["feedpoint", "link"]
    assert [mk.kind for mk in outer.marks] == ["link", "end insulator", "spare"]


def test_refuses_negative_allowances():
    with pytest.raises(ValueError):
        cut_instruction(legs_m=[10.0, 10.0], wrap_allowance_m=-0.1, spare_m=0.0)
