"""Reading JSON input for the CLI: from a file or stdin, with errors that say where."""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import Any

from fieldkit.errors import InputError

MAX_INPUT_BYTES = 16 * 1024 * 1024  # a plan input is a few kB; refuse anything absurd


def _reject_constant(name: str) -> Any:
    raise ValueError(f"{name} is not valid JSON (use a finite number)")


def loads(text: str, source: str = "input") -> Any:
    """Parse JSON text; malformed JSON becomes an InputError with line and column."""
    try:
        return json.loads(text, parse_constant=_reject_constant)
    except json.JSONDecodeError as exc:
        raise InputError(
            source, f"malformed JSON at line {exc.lineno}, column {exc.colno}: {exc.msg}"
        ) from None
    except ValueError as exc:
        raise InputError(source, str(exc)) from None
    except RecursionError:
        raise InputError(source, "JSON nested too deeply") from None


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
