"""Reading JSON input (CLI and service): from text, a file or stdin, with errors that say where.

Numbers are checked before they become Python numbers: an integer literal beyond what a JSON number
carries exactly, or a literal too large for a finite double, is refused naming its field path
(``site.supports[0].height_m``), so no layer ever meets ``int too large to convert to float``.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path
from typing import Any

from fieldkit.errors import MAX_EXACT_INTEGER, InputError, join

MAX_INPUT_BYTES = 16 * 1024 * 1024  # a plan input is a few kB; refuse anything absurd
_MAX_INTEGER_DIGITS = len(str(MAX_EXACT_INTEGER))


class _Unrepresentable:
    """A number literal kept as text while parsing, so that it can be refused with its field path."""

    __slots__ = ("literal", "integer")

    def __init__(self, literal: str, *, integer: bool) -> None:
        self.literal = literal
        self.integer = integer


class UnrepresentableNumber(InputError):
    """A JSON number that no field can hold: an integer beyond :data:`MAX_EXACT_INTEGER` (HTTP 422),
    or a literal beyond a finite double, which is not a usable JSON number at all (HTTP 400)."""

    def __init__(self, field: str, found: _Unrepresentable) -> None:
        field = field if len(field) <= 200 else field[:197] + "..."
        digits = len(found.literal.lstrip("-"))
        shown = found.literal if len(found.literal) <= 24 else found.literal[:20] + "..."
        if found.integer:
            detail = (
                f"expected a number; got an integer of {digits} digits ({shown}), beyond "
                f"±{MAX_EXACT_INTEGER}, the largest integer JSON carries exactly"
            )
        else:
            detail = f"expected a finite number; {shown} is too large for a double"
        super().__init__(field, detail, value=found.literal, status=422 if found.integer else 400)

    def to_json(self) -> dict[str, Any]:
        error = "invalid input" if self.status == 422 else "malformed request"
        return {"error": error, "field": self.field, "detail": self.detail}


def _parse_int(literal: str) -> int | _Unrepresentable:
    if len(literal.lstrip("-")) <= _MAX_INTEGER_DIGITS:  # never int() of a huge literal
        value = int(literal)
        if abs(value) <= MAX_EXACT_INTEGER:
            return value
    return _Unrepresentable(literal, integer=True)


def _parse_float(literal: str) -> float | _Unrepresentable:
    value = float(literal)
    return value if math.isfinite(value) else _Unrepresentable(literal, integer=False)


def _reject_constant(name: str) -> Any:
    raise ValueError(f"{name} is not valid JSON (use a finite number)")


def parse(text: str | bytes) -> Any:
    """``json.loads`` refusing NaN/Infinity; unrepresentable numbers are kept for :func:`refuse_unrepresentable`.

    Raises the ``ValueError`` (``JSONDecodeError``) or ``RecursionError`` of the json module.
    """
    return json.loads(
        text, parse_constant=_reject_constant, parse_int=_parse_int, parse_float=_parse_float
    )


def refuse_unrepresentable(value: Any, max_depth: int | None = None) -> bool:
    """Raise :class:`UnrepresentableNumber` naming the first such number; False when deeper than ``max_depth``."""
    stack: list[tuple[Any, str, int]] = [(value, "", 1)]
    while stack:
        item, field, depth = stack.pop()
        if max_depth is not None and depth > max_depth:
            return False
        if isinstance(item, _Unrepresentable):
            raise UnrepresentableNumber(field or "(top level)", item)
        if isinstance(item, dict):
            stack.extend((child, join(field, key), depth + 1) for key, child in item.items())
        elif isinstance(item, list):
            stack.extend((child, join(field, i), depth + 1) for i, child in enumerate(item))
    return True


def loads(text: str, source: str = "input") -> Any:
    """Parse JSON text; malformed JSON becomes an InputError with line and column."""
    try:
        value = parse(text)
    except json.JSONDecodeError as exc:
        raise InputError(
            source, f"malformed JSON at line {exc.lineno}, column {exc.colno}: {exc.msg}"
        ) from None
    except ValueError as exc:
        raise InputError(source, str(exc)) from None
    except RecursionError:
        raise InputError(source, "JSON nested too deeply") from None
    refuse_unrepresentable(value)
    return value


def read(path: str) -> Any:
    """Read one JSON document from PATH, or from stdin when PATH is '-'."""
    if path == "-":
        data = sys.stdin.buffer.read(MAX_INPUT_BYTES + 1)
        source = "stdin"
    else:
        p = Path(path)
        if not p.is_file():
            raise InputError("FILE", f"no such file: {path}")
        with p.open("rb") as fh:
            data = fh.read(MAX_INPUT_BYTES + 1)
        source = path
    if len(data) > MAX_INPUT_BYTES:
        raise InputError(source, f"input larger than {MAX_INPUT_BYTES // (1024 * 1024)} MiB")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(source, f"input is not UTF-8 text (byte {exc.start})") from None
    if not text.strip():
        raise InputError(source, "empty input; expected a JSON object or array")
    return loads(text, source)


def dumps(obj: Any, *, pretty: bool = True) -> str:
    """JSON out; NaN/Infinity are refused (they are not JSON) so a bug cannot leak them silently.

    Compact output (``pretty=False``) uses the C encoder: several times faster for a long sweep.
    """
    if pretty:
        return json.dumps(obj, allow_nan=False, indent=2)
    return json.dumps(obj, allow_nan=False, separators=(",", ":"))
