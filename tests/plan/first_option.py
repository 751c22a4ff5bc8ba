"""The demo plan's first option as a reference, and the comparison at its printed precision.

The reference ``reference/demo_first_option.json`` is the first option of the demo plan
(assets/demo/larch-basin-plan.json) as fieldkit printed it when it was last regenerated. Speed
work (issue 17) must leave it unchanged; a change of the advice on purpose regenerates it with

    .venv/bin/python -m tests.plan.first_option

and the diff of that file is then reviewed like any other change of the plan's numbers.
"""

from __future__ import annotations

import copy
import json
from decimal import Decimal
from pathlib import Path

from fieldkit.paths import assets_dir

REFERENCE = Path(__file__).resolve().parent / "reference" / "demo_first_option.json"


def demo_first_option() -> dict:
    """Plan the demo now and return its first option (JSON round trip: what a user reads)."""
    from fieldkit.planning import plan

    with open(assets_dir() / "demo" / "larch-basin-plan.json") as fh:
        demo = json.load(fh)
    return json.loads(json.dumps(plan(copy.deepcopy(demo))["options"][0]))


def last_digit(x: float) -> float:
    """One unit of the last printed digit of x (0.001 for 12.737, 0.1 for 10.0)."""
    return float(Decimal(1).scaleb(Decimal(repr(float(x))).as_tuple().exponent))


def differences(got, want, path: str = "options[0]") -> list[str]:
    """Where ``got`` differs from ``want`` by more than one unit of the last printed digit.

    The unit is that of the more precise of the two as printed (10.0 against 10.01: 0.01), so a
    number may only flip in its last digit, as a rounding of an unchanged value can.

    Strings, booleans, null and integers must be equal; lists and objects must have the same
    length and keys.
    """
    if isinstance(want, dict):
        if not isinstance(got, dict) or set(got) != set(want):
            return [
                f"{path}: keys {sorted(got) if isinstance(got, dict) else got!r} != {sorted(want)}"
            ]
        return [d for k in want for d in differences(got[k], want[k], f"{path}.{k}")]
    if isinstance(want, list):
        if not isinstance(got, list) or len(got) != len(want):
            return [f"{path}: {got!r} != {want!r}"]
        return [
            d
            for i, (g, w) in enumerate(zip(got, want, strict=True))
            for d in differences(g, w, f"{path}[{i}]")
        ]
    if isinstance(want, float) and isinstance(got, (int, float)) and not isinstance(got, bool):
        ok = abs(got - want) <= min(last_digit(got), last_digit(want)) * (1 + 1e-9)
        return [] if ok else [f"{path}: {got!r} != {want!r}"]
    return [] if (got == want and type(got) is type(want)) else [f"{path}: {got!r} != {want!r}"]


if __name__ == "__main__":
    REFERENCE.write_text(json.dumps(demo_first_option(), indent=1, ensure_ascii=False) + "\n")
    print(f"wrote {REFERENCE}")
