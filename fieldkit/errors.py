"""The one error type for bad input, shared by every layer.

A layer that refuses input raises :class:`InputError` naming the field (a dotted/indexed path such as
``wires[0].points_m[1]``), the value it got and what it expected. The CLI turns it into one line on
stderr and exit code 2; the service turns it into ``{"error", "field", "detail"}`` with status 400/422.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from typing import Any

# The largest integer a JSON number carries exactly between programs: ±(2**53 - 1), RFC 8259 §6 and
# I-JSON, RFC 7493 §2.2. No fieldkit field needs more (counts, ids and revisions stay far below).
MAX_EXACT_INTEGER = 2**53 - 1


class InputError(ValueError):
    """Bad input: names the field, the value and what is expected."""

    def __init__(self, field: str, detail: str, *, value: Any = None, status: int = 422) -> None:
        self.field = field
        self.detail = detail
        self.value = value
        self.status = status
        super().__init__(f"{field}: {detail}" if field else detail)

    def to_json(self) -> dict[str, Any]:
        return {"error": "invalid input", "field": self.field, "detail": self.detail}


class TooLargeError(InputError):
    """Input over a size limit inside a body the service accepted (HTTP 413, like a body over the
    service's own limit: the same error word)."""

    def __init__(self, field: str, detail: str) -> None:
        super().__init__(field, detail, status=413)

    def to_json(self) -> dict[str, Any]:
        return {"error": "request too large", "field": self.field, "detail": self.detail}


def join(prefix: str, name: str | int) -> str:
    """Field path: join('wires', 0) -> 'wires[0]'; join('feed', 'wire') -> 'feed.wire'."""
    if isinstance(name, int):
        return f"{prefix}[{name}]"
    return f"{prefix}.{name}" if prefix else name


def _show(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def require_mapping(value: Any, field: str) -> Mapping[str, Any]:
    if not isinstance(value, Mapping):
        raise InputError(
            field or "(top level)", f"expected a JSON object, got {_show(value)}", value=value
        )
    return value


def check_keys(obj: Mapping[str, Any], field: str, allowed: Iterable[str]) -> None:
    """Refuse unknown fields by name (a typo must not become a silent default)."""
    allowed = set(allowed)
    for key in obj:
        if key not in allowed:
            raise InputError(
                join(field, key) if key else join(field, '""'),
                f"unknown field; expected one of: {', '.join(sorted(allowed))}",
                value=key,
            )


def number(
    value: Any,
    field: str,
    *,
    unit: str = "",
    minimum: float | None = None,
    maximum: float | None = None,
    exclusive_minimum: bool = False,
    integer: bool = False,
) -> float:
    """A finite JSON number within bounds (bool is not a number)."""
    what = f"a number{f' in {unit}' if unit else ''}"
    if integer:
        what = "an integer"
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise InputError(field, f"expected {what}, got {_show(value)}", value=value)
    if isinstance(value, int) and abs(value) > MAX_EXACT_INTEGER:  # before any float() of it
        raise InputError(
            field,
            f"expected {what}; got an integer beyond ±{MAX_EXACT_INTEGER}, the largest JSON carries "
            "exactly",
            value=None,
        )
    if integer and not float(value).is_integer():
        raise InputError(field, f"expected {what}, got {_show(value)}", value=value)
    if not math.isfinite(value):
        raise InputError(field, f"expected a finite number, got {_show(value)}", value=value)
    u = f" {unit}" if unit else ""
    if minimum is not None:
        if exclusive_minimum and value <= minimum:
            raise InputError(
                field, f"expected more than {minimum:g}{u}, got {value:g}", value=value
            )
        if not exclusive_minimum and value < minimum:
            raise InputError(field, f"expected at least {minimum:g}{u}, got {value:g}", value=value)
    if maximum is not None and value > maximum:
        raise InputError(field, f"expected at most {maximum:g}{u}, got {value:g}", value=value)
    return int(value) if integer else float(value)


def choice(value: Any, field: str, options: Iterable[str]) -> str:
    options = list(options)
    if not isinstance(value, str) or value not in options:
        raise InputError(
            field, f"expected one of: {', '.join(options)}; got {_show(value)}", value=value
        )
    return value


def text(value: Any, field: str, *, max_length: int = 200) -> str:
    if not isinstance(value, str) or not value.strip():
        raise InputError(field, f"expected a non-empty string, got {_show(value)}", value=value)
    if len(value) > max_length:
        raise InputError(
            field, f"expected at most {max_length} characters, got {len(value)}", value=value
        )
    return value


def array(value: Any, field: str, *, min_items: int = 0, max_items: int | None = None) -> list[Any]:
    if not isinstance(value, list):
        raise InputError(field, f"expected a JSON array, got {_show(value)}", value=value)
    if len(value) < min_items:
        raise InputError(
            field, f"expected at least {min_items} item(s), got {len(value)}", value=value
        )
    if max_items is not None and len(value) > max_items:
        raise InputError(
            field, f"expected at most {max_items} items, got {len(value)}", value=value
        )
    return value
