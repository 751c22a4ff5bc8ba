"""The one cut instruction: for each piece of wire, the one length to cut and where to mark it.

A piece is one leg of the dipole (or, on a linked dipole, one section of a leg). Measured from its
feedpoint end it holds, in order:

1. the wrap at the feedpoint: wire folded back through the centre insulator or balun terminal;
2. the electrical length (the model's figure): feedpoint to end insulator, or link to link;
3. the wrap at the end insulator (or at the link);
4. on the outermost piece only, the deliberate spare: the cut-long margin, folded back along the wire
   at the end insulator and only cut off after the first SWR check.

The length to cut is the sum of the four; the marks are the insulator fold point (after 1 + 2) and the
start of the spare (after 1 + 2 + 3). Every length is rounded once, here, to what a tape measure reads
(1 cm, ¼ in; :mod:`fieldkit.readable`), and both unit strings are made here, so the Wire section, the
Card, the checklist item and the plan JSON of the CLI show the same text, and switching units in the
app picks another string instead of converting a number again.

References
----------
.. [1] Cutting long and folding the spare back at the end insulator until the SWR dip is measured, and
   the wrap allowance at each insulator, are common practice in amateur handbooks (no single source).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from fieldkit.readable import (
    imperial_from_quarters,
    metric_from_cm,
    tape_cm,
    tape_imperial,
    tape_metric,
    tape_quarter_inches,
)

LEG_NAMES = ("A", "B")
MARK_NAMES = {"feedpoint": "feedpoint fold", "link": "link fold", "end insulator": "end insulator"}


@dataclass(frozen=True)
class TapeLength:
    """A length as it is measured: the exact value and the two strings a tape reads."""

    m: float
    metric: str
    imperial: str

    @classmethod
    def of(cls, length_m: float) -> TapeLength:
        return cls(length_m, tape_metric(length_m), tape_imperial(length_m))

    @property
    def both(self) -> str:
        return f"{self.metric} ({self.imperial})"

    def to_json(self) -> dict[str, Any]:
        return {"m": round(self.m, 4), "metric": self.metric, "imperial": self.imperial}


@dataclass(frozen=True)
class Mark:
    """A mark on a piece, measured from its feedpoint end."""

    kind: str  # "feedpoint" | "link" | "end insulator" | "spare"
    at: TapeLength
    what: str  # plain words: what to do at the mark

    def to_json(self) -> dict[str, Any]:
        return {"kind": self.kind, "from_feedpoint_end": self.at.to_json(), "what": self.what}


@dataclass(frozen=True)
class Piece:
    """One length of wire to cut, its marks, and what it is made of."""

    name: str  # "leg A", "leg B, outer section"
    legs: tuple[str, ...]  # the legs this piece is cut for ("A", "B")
    cut: TapeLength
    electrical: TapeLength  # the model's figure: feedpoint (or link) to end insulator (or link)
    wrap: TapeLength  # at each end
    spare: TapeLength | None  # the cut-long margin (outermost piece only)
    marks: tuple[Mark, ...]

    @property
    def count(self) -> int:
        return len(self.legs)

    def to_json(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "legs": list(self.legs),
            "count": self.count,
            "cut": self.cut.to_json(),
            "electrical": self.electrical.to_json(),
            "wrap_each_end": self.wrap.to_json(),
            "spare": None if self.spare is None else self.spare.to_json(),
            "marks": [mk.to_json() for mk in self.marks],
        }


@dataclass(frozen=True)
class CutInstruction:
    """Every piece to cut, the wire they take off the spool, and the instruction as text."""

    pieces: tuple[Piece, ...]
    total_metric: str  # the sum of the pieces as each is cut, in each unit
    total_imperial: str

    def text(self, units: str) -> str:
        """The whole instruction in one unit: "Cut 2 pieces of 20.53 m (legs A and B); ..."."""
        return ". ".join(_piece_sentence(p, units) for p in self.pieces) + "."

    @property
    def text_both(self) -> str:
        """The instruction with every length in metres and, in brackets, in feet and inches."""
        return self.text("both")

    def to_json(self) -> dict[str, Any]:
        return {
            "pieces": [p.to_json() for p in self.pieces],
            "total": {"metric": self.total_metric, "imperial": self.total_imperial},
            "text": {
                "metric": self.text("metric"),
                "imperial": self.text("imperial"),
                "both": self.text_both,
            },
            "rounding": "metres to 1 cm, feet and inches to ¼ in (what a tape measure reads)",
            "measured_from": "the feedpoint end of each piece",
            "electrical_is": "the model's figure: the length that resonates at the channel as it hangs",
        }


def _say(t: TapeLength, units: str) -> str:
    if units == "both":
        return t.both
    return t.imperial if units == "imperial" else t.metric


def _and(parts: list[str]) -> str:
    return parts[0] if len(parts) == 1 else ", ".join(parts[:-1]) + " and " + parts[-1]


def _mark_words(mk: Mark, p: Piece, units: str) -> str:
    at = _say(mk.at, units)
    if mk.kind == "spare" and p.spare is not None:
        return f"{at} where the {_say(p.spare, units)} spare starts"
    return f"{at} for the {MARK_NAMES[mk.kind]}"


def _piece_sentence(p: Piece, units: str) -> str:
    many = f"{p.count} pieces ({p.name})" if p.count > 1 else f"1 piece ({p.name})"
    each = " each" if p.count > 1 else ""
    marks = _and([_mark_words(mk, p, units) for mk in p.marks])
    end = "the feedpoint end" if p.marks[0].kind == "feedpoint" else "the end nearer the feedpoint"
    return f"Cut {many} of {_say(p.cut, units)}{each}, marked from {end} at {marks}"


def _between(a: TapeLength, b: TapeLength) -> TapeLength:
    """The length between two marks as the tape reads it: the difference of the two readings, so the
    parts of a piece add up to its cut length in either unit."""
    cm = tape_cm(b.m) - tape_cm(a.m)
    quarters = tape_quarter_inches(b.m) - tape_quarter_inches(a.m)
    return TapeLength(b.m - a.m, metric_from_cm(cm), imperial_from_quarters(quarters))


def _piece(
    *,
    name: str,
    legs: tuple[str, ...],
    electrical_m: float,
    wrap_m: float,
    spare_m: float,
    inner: str,
    outer: str,
) -> Piece:
    """One piece: wrap at the inner end, the electrical length, wrap at the outer end, the spare.

    The positions along the piece are rounded (not the parts), and each part is the difference of two
    rounded positions: the reader who adds the parts gets the marks and the cut length shown.
    """
    start = TapeLength(0.0, "0 cm", "0 in")
    inner_fold = TapeLength.of(wrap_m)
    outer_fold = TapeLength.of(wrap_m + electrical_m)
    wire_end = TapeLength.of(2 * wrap_m + electrical_m)
    cut = TapeLength.of(2 * wrap_m + electrical_m + spare_m)
    marks = [
        Mark(
            inner,
            inner_fold,
            "fold here through the centre insulator or balun terminal"
            if inner == "feedpoint"
            else "fold here through the link",
        ),
        Mark(
            outer,
            outer_fold,
            "pass through the end insulator here and fold back"
            if outer == "end insulator"
            else "fold here through the link",
        ),
    ]
    spare = None
    if spare_m > 0:
        spare = _between(wire_end, cut)
        marks.append(
            Mark(
                "spare",
                wire_end,
                f"the last {spare.metric} ({spare.imperial}) is the spare: fold it back along the wire "
                "and tape it; cut it off only after the SWR check says so",
            )
        )
    return Piece(
        name=name,
        legs=legs,
        cut=cut,
        electrical=_between(inner_fold, outer_fold),
        wrap=_between(start, inner_fold),
        spare=spare,
        marks=tuple(marks),
    )


def _grouped(pieces: list[Piece]) -> list[Piece]:
    """Pieces that are cut and marked alike are one line: "2 pieces (legs A and B)"."""
    out: list[Piece] = []
    for p in pieces:
        twin = next(
            (
                i
                for i, q in enumerate(out)
                if q.cut.metric == p.cut.metric
                and q.cut.imperial == p.cut.imperial
                and [m.at for m in q.marks] == [m.at for m in p.marks]
                and q.name.split(", ")[1:] == p.name.split(", ")[1:]
            ),
            None,
        )
        if twin is None:
            out.append(p)
        else:
            q = out[twin]
            legs = q.legs + p.legs
            rest = q.name.split(", ", 1)[1:] if ", " in q.name else []
            name = ", ".join([f"legs {' and '.join(legs)}", *rest])
            out[twin] = Piece(name, legs, q.cut, q.electrical, q.wrap, q.spare, q.marks)
    return out


def cut_instruction(
    *,
    legs_m: Sequence[float],
    wrap_allowance_m: float,
    spare_m: float,
    sections_m: Sequence[float] | None = None,
) -> CutInstruction:
    """The cut instruction of a centre-fed dipole (or of a linked dipole, by sections).

    Parameters
    ----------
    legs_m : electrical length of each leg, feedpoint to end insulator (the model's figure) [m]
    wrap_allowance_m : wire folded back at each end of each piece [m]
    spare_m : the deliberate cut-long spare on the outer end of each leg [m]
    sections_m : for a linked dipole, the electrical length of each section of a leg, feedpoint
        outward (summing to the leg) [m]; each section is a piece with a wrap at both of its ends

    Returns
    -------
    CutInstruction
        Pieces that are cut and marked alike grouped ("2 pieces, legs A and B").

    References
    ----------
    Common practice (module docstring).
    """
    if wrap_allowance_m < 0 or spare_m < 0:
        raise ValueError("wrap allowance and spare cannot be negative")
    pieces: list[Piece] = []
    for leg_name, leg in zip(LEG_NAMES, legs_m, strict=False):
        parts = list(sections_m) if sections_m else [leg]
        for k, part in enumerate(parts):
            first, last = k == 0, k == len(parts) - 1
            suffix = "" if len(parts) == 1 else f", section {k + 1} of {len(parts)}"
            pieces.append(
                _piece(
                    name=f"leg {leg_name}{suffix}",
                    legs=(leg_name,),
                    electrical_m=part,
                    wrap_m=wrap_allowance_m,
                    spare_m=spare_m if last else 0.0,
                    inner="feedpoint" if first else "link",
                    outer="end insulator" if last else "link",
                )
            )
    grouped = _grouped(pieces)
    total_cm = sum(tape_cm(p.cut.m) * p.count for p in grouped)
    total_q = sum(tape_quarter_inches(p.cut.m) * p.count for p in grouped)
    return CutInstruction(
        pieces=tuple(grouped),
        total_metric=metric_from_cm(total_cm),
        total_imperial=imperial_from_quarters(total_q),
    )
