"""Numbers as a person reads them: tape-measure lengths in metres and in feet and inches, and values
rounded to the significant figures a reader acts on.

Every text that tells someone what to cut, mark, hoist or keep away from is made with these helpers, so
that the same length reads the same wherever it appears (Wire, Card, checklist, CLI JSON). The app's
``web/js/units.js`` repeats only the two tape roundings, with the same arithmetic, for the lengths it
works out itself (the re-trim from a measured dip); ``e2e/test_words.py`` checks that both give the same
strings.

Rounding rules
--------------
* Metres to the whole centimetre, feet and inches to the nearest quarter inch: what a tape measure
  reads (common practice). Halves round up; the rounding works on ``floor(x·n + 0.5 + 1e-9)`` so that a
  value such as 19.795 m, which binary floating point holds as 19.79499…, still reads 19.80 m.
* Other quantities keep two or three significant figures (a power of 133 162 W reads "130 kW").
"""

from __future__ import annotations

import math

from fieldkit.constants import FOOT_M, INCH_M

#: Below one metre a tape length reads in centimetres ("59 cm"), from one metre on in metres ("19.80 m").
CM_BELOW_M = 1.0
QUARTERS_PER_INCH = (
    4  # ¼ in: the finest mark a person reads on a tape at arm's length (common practice)
)
INCHES_PER_FOOT = 12
_FRACTIONS = {0: "", 1: "¼", 2: "½", 3: "¾"}
_EPS = 1e-9  # absorbs binary representation error at exact halves
#: No-break space inside a tape reading: "67 ft 4½ in" never breaks across lines on a phone or a card.
NBSP = "\u00a0"


def _half_up(x: float) -> int:
    return math.floor(x + 0.5 + _EPS)


def fixed(value: float, digits: int) -> str:
    """``value`` with ``digits`` decimals, halves up: the app's ``fixed`` in web/js/units.js, so a
    height both write reads the same (Python's format rounds 9.25 to "9.2", the app to "9.3")."""
    n = _half_up(abs(value) * 10**digits)
    text = f"{n // 10**digits}.{n % 10**digits:0{digits}d}" if digits > 0 else str(n)
    return f"-{text}" if value < 0 and n != 0 else text


def tape_cm(length_m: float) -> int:
    """A length rounded to the whole centimetre, as a tape measure reads it [cm]."""
    return _half_up(length_m * 100.0)


def tape_quarter_inches(length_m: float) -> int:
    """A length rounded to the nearest quarter inch [¼ in]."""
    return _half_up(length_m / INCH_M * QUARTERS_PER_INCH)


def metric_from_cm(cm: int) -> str:
    """59 cm below one metre, 19.80 m from one metre on (centimetres as an integer; the space is a
    no-break space)."""
    if abs(cm) < CM_BELOW_M * 100:
        return f"{cm}{NBSP}cm"
    sign = "-" if cm < 0 else ""
    cm = abs(cm)
    return f"{sign}{cm // 100}.{cm % 100:02d}{NBSP}m"


def imperial_from_quarters(quarters: int) -> str:
    """ "67 ft 4½ in", "23¼ in" or "65 ft 0 in" from a count of quarter inches."""
    sign = "-" if quarters < 0 else ""
    q = abs(quarters)
    feet, rest = divmod(q, INCHES_PER_FOOT * QUARTERS_PER_INCH)
    inches, quarter = divmod(rest, QUARTERS_PER_INCH)
    frac = _FRACTIONS[quarter]
    inch_text = f"{frac}{NBSP}in" if inches == 0 and frac else f"{inches}{frac}{NBSP}in"
    if feet == 0:
        return f"{sign}{inch_text}"
    return f"{sign}{feet}{NBSP}ft{NBSP}{inch_text}"


def tape_metric(length_m: float) -> str:
    """A length as a metric tape reads it: "20.53 m", "59 cm"."""
    return metric_from_cm(tape_cm(length_m))


def tape_imperial(length_m: float) -> str:
    """A length as an imperial tape reads it: "67 ft 4½ in", "23¼ in"."""
    return imperial_from_quarters(tape_quarter_inches(length_m))


def tape_both(length_m: float) -> str:
    """ "20.53 m (67 ft 4½ in)": for texts the service writes once for readers of either unit."""
    return f"{tape_metric(length_m)} ({tape_imperial(length_m)})"


def round_sig(value: float, figures: int = 2) -> float:
    """``value`` rounded to ``figures`` significant figures (0 stays 0)."""
    if value == 0 or not math.isfinite(value):
        return value
    digits = figures - 1 - math.floor(math.log10(abs(value)))
    return round(value, digits)


def _plain(value: float) -> str:
    """A rounded float without a trailing ".0" or exponent: 130.0 → "130", 1.5 → "1.5"."""
    text = f"{value:.6f}".rstrip("0").rstrip(".")
    return text if text not in ("", "-0") else "0"


def power_text(power_w: float) -> str:
    """A transmitter power a person reads: "100 W", "1.5 kW", "130 kW" (two significant figures)."""
    p = round_sig(power_w, 2)
    if abs(p) >= 1000:
        return f"{_plain(round_sig(p / 1000, 2))} kW"
    return f"{_plain(p)} W"


def distance_text(distance_m: float) -> str:
    """A distance to keep or to check in metres: one decimal below 10 m ("2.4 m"), whole metres from
    10 m on ("35 m")."""
    if abs(distance_m) < 10:
        return f"{distance_m:.1f} m"
    return f"{distance_m:.0f} m"


def feet_text(distance_m: float) -> str:
    """The same distance in feet, whole feet ("8 ft", "115 ft")."""
    return f"{distance_m / FOOT_M:.0f} ft"


def distance_both(distance_m: float) -> str:
    """ "2.4 m (8 ft)": a distance in both units for texts the service writes once."""
    return f"{distance_text(distance_m)} ({feet_text(distance_m)})"


def whole_both(length_m: float) -> str:
    """ "35 m (115 ft)": a span, a run of wire, rope or coax in whole metres and whole feet, for the
    texts that compare it with another (each unit rounded once, halves as Python's format rounds)."""
    return f"{length_m:.0f} m ({feet_text(length_m)})"


def given_both(length_m: float) -> str:
    """ "30 m (98 ft)", "0.5 m (2 ft)": a length as the kit or site gives it (the metres as entered,
    ``:g``) and in whole feet, for the texts that quote an input back beside a figure of the plan."""
    return f"{length_m:g} m ({feet_text(length_m)})"


def droop_both(length_m: float) -> str:
    """ "0.37 m (1 ft 2½ in)": a short length to the centimetre with its tape reading in feet and
    inches (quarter inch), for a piece of wire a person measures off by hand."""
    return f"{length_m:.2f} m ({tape_imperial(length_m)})"


def length_both(length_m: float) -> str:
    """ "13.1 m (43 ft)": a clearance or reach in metres to 0.1 m and whole feet, for the safety texts
    the service writes once (read in either unit; the decision is made on the metres)."""
    return f"{length_m:.1f} m ({feet_text(length_m)})"


#: Heights travel in the plan's JSON to the centimetre; the app converts that value to feet, so the
#: texts do too (9.2812 m read directly would say 30.5 ft where the app, from 9.28 m, says 30.4 ft).
JSON_HEIGHT_DECIMALS = 2


def height_both(height_m: float, *, aside: str = "") -> str:
    """ "13.5 m (44.3 ft)": a rope or feedpoint height in both units, as the app shows each; ``aside``
    joins the feet inside the one pair of brackets ("9.3 m (30.4 ft, 0.11 wavelength)")."""
    h = round(height_m, JSON_HEIGHT_DECIMALS)
    more = f", {aside}" if aside else ""
    return f"{height_text(h)} ({height_feet_text(h)}{more})"


def height_text(height_m: float) -> str:
    """A rope or feedpoint height in metres to 0.1 m ("13.5 m"), as the app shows it (from the value
    the JSON carries, so that it reads as the metres of :func:`height_both`)."""
    return f"{fixed(round(height_m, JSON_HEIGHT_DECIMALS), 1)} m"


def height_feet_text(height_m: float) -> str:
    """The same height in feet to 0.1 ft ("44.3 ft"), as the app shows it in feet."""
    return f"{fixed(height_m / FOOT_M, 1)} ft"
