"""`python -m fieldkit.antenna FILE|-`: the model contract without the full CLI (same JSON)."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from fieldkit.errors import InputError

from .spec import model_json


def main(argv: list[str] | None = None) -> int:
    args = sys.argv[1:] if argv is None else argv
    source = args[0] if args else "-"
    try:
        text = sys.stdin.read() if source == "-" else Path(source).read_text(encoding="utf-8")
        spec = json.loads(text)
    except (OSError, ValueError) as err:
        print(f"error: cannot read JSON from {source}: {err}", file=sys.stderr)
        return 2
    try:
        result = model_json(spec)
    except InputError as err:
        print(f"error: {err}", file=sys.stderr)
        return 2
    json.dump(result, sys.stdout)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
