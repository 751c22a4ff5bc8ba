"""What a reader must never meet in fieldkit's words: the program's own codes and false precision.

Used by the safety and sky tests (on the texts the service writes) and by the e2e walk (on the text the
app shows). A code is any option string of the JSON contract that is not a plain word by itself (it
holds a hyphen or an underscore: ``fcc-uncontrolled``, ``very-poor``, ``rg-58``, ``power_line``), or a
snake_case name. A number a person reads has at most four significant figures (a channel frequency is
exempt: it is dialled as given, e.g. 5.3715 MHz; and so is a clause number of a law, "47 CFR 1.1310").
"""

from __future__ import annotations

import re

from fieldkit.antenna.grounds import GROUND_NAMES
from fieldkit.antenna.materials import CONDUCTORS
from fieldkit.rigging.feedline import COAX_CLASSES
from fieldkit.safety.limits import LIMIT_SETS
from fieldkit.sky.noise import NOISE_ENVIRONMENTS

MAX_FIGURES = 4
CODES = tuple(
    sorted(
        {
            c
            for c in (
                *GROUND_NAMES,
                *CONDUCTORS,
                *COAX_CLASSES,
                *LIMIT_SETS,
                *NOISE_ENVIRONMENTS,
                "inverted-v",
                "power_line",
            )
            if "-" in c or "_" in c
        }
    )
)
SNAKE = re.compile(r"\b[a-z][a-z0-9]*_[a-z0-9_]+\b")
# a number not glued to letters, dots or another number's parts (versions and addresses are skipped)
NUMBER = re.compile(r"(?<![\w.])\d+(?:\.\d+)?(?![\w.]|\.\d)")
LAW = re.compile(r"CFR \s*$")


def figures(number: str) -> int:
    """Significant figures as written: leading zeros do not count, every other digit does."""
    digits = number.replace(".", "").lstrip("0")
    return len(digits) or 1


def problems(text: str, *, exempt_numbers: tuple[str, ...] = ()) -> list[str]:
    """Every code, snake_case name and over-precise number in ``text`` (empty when it reads well)."""
    out = []
    low = text
    for code in CODES:
        if re.search(rf"(?<![\w-]){re.escape(code)}(?![\w-])", low):
            out.append(f"code {code!r}")
    out += [f"snake_case {m!r}" for m in SNAKE.findall(text)]
    for m in NUMBER.finditer(text):
        n = m.group(0)
        if n in exempt_numbers or LAW.search(text[max(0, m.start() - 8) : m.start()]):
            continue
        if figures(n) > MAX_FIGURES:
            out.append(f"number {n!r} ({figures(n)} significant figures)")
    return out


FOOT_M = 0.3048  # international foot, exact (international yard and pound agreement, 1959)
QUARTER_INCH_FT = 1 / 48  # a quarter inch in feet: 12 in to the foot (common practice)
_FRACTIONS = {"": 0.0, "¼": 0.25, "½": 0.5, "¾": 0.75}
# "13.5 m (44.3 ft", "2.79 m (9 ft 2 in", "15 cm (6 in", "0.37 m (1 ft 2½ in" (no-break spaces made plain)
_PAIR = re.compile(
    r"(?<![\w.])(\d+(?:\.\d+)?) (m|cm) \("
    r"(?:(\d+(?:\.\d+)?) ft(?: (\d+)([¼½¾]?) in)?|(\d*)([¼½¾]?) in)(?=[),;])"
)
# a metre figure with no feet beside it; "13.5 m + 3.05 m (10 ft)" spells out a sum, "60 m band" names
# a band, "m/s" is a speed
_BARE = re.compile(r"(?<![\w.])(\d+(?:\.\d+)?) (?:m|cm)(?![\w/])(?! \([\d¼½¾])(?! \+ )(?! band)")


def _decimals(number: str) -> int:
    return len(number.partition(".")[2])


def feet_beside_metres(text: str) -> list[tuple[str, float, float, float, float]]:
    """Every "metres (feet" pair in ``text``: (as written, metres, metres step, feet, feet step), the
    steps being what each figure is rounded to [m, ft]."""
    out = []
    for m in _PAIR.finditer(text.replace("\u00a0", " ")):
        number, unit, feet, inches, frac, only_in, only_frac = m.groups()
        scale = 0.01 if unit == "cm" else 1.0
        metres, m_step = float(number) * scale, 10.0 ** -_decimals(number) * scale
        if feet is not None and inches is None:
            out.append((m.group(0), metres, m_step, float(feet), 10.0 ** -_decimals(feet)))
            continue
        inch = float(inches or only_in or 0) + _FRACTIONS[frac or only_frac or ""]
        whole = float(feet or 0.0) + inch / 12
        out.append((m.group(0), metres, m_step, whole, QUARTER_INCH_FT))
    return out


def feet_disagree(text: str) -> list[str]:
    """The pairs whose feet are not the metres / 0.3048 at the rounding of each: a length that reads
    m metres (to ±half its step) and f feet (to ±half its step) must be one length in both."""
    return [
        shown
        for shown, metres, m_step, feet, f_step in feet_beside_metres(text)
        if abs(metres / FOOT_M - feet) > m_step / 2 / FOOT_M + f_step / 2 + 1e-9
    ]


def bare_metres(text: str) -> list[str]:
    """Every metre figure in ``text`` without feet beside it."""
    return [m.group(0) for m in _BARE.finditer(text.replace("\u00a0", " "))]
