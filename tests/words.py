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
