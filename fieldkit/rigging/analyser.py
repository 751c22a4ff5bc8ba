"""Analyser files: a measured sweep of the raised antenna, read from its text.

Two formats:

* **Touchstone** ``.s1p`` (an open standard, one-port S, Z or Y data in any of its number formats),
  read by scikit-rf, imported only when such a file is given.
* **CSV** with a header line naming the columns (any order; separator ``,`` ``;`` or tab, the
  header's own): ``frequency_mhz`` (or ``frequency_khz`` / ``frequency_hz``) and either ``r_ohm``
  with ``x_ohm``, or ``swr`` (or all three). Case, spaces, brackets and Ω are read as in
  ``Frequency (MHz), R (Ω), X (Ω)``. Lines starting with ``#`` and blank lines are skipped.
  Frequencies rise from line to line.

Either file holds 3 to :data:`MAX_POINTS` points and at most :data:`MAX_TEXT_BYTES`. A bad file is
refused with the line and column of the first fault.
"""

from __future__ import annotations

import io
import re
import warnings
from dataclasses import dataclass

import numpy as np

from fieldkit.errors import InputError, TooLargeError

MAX_POINTS = 2001  # a long analyser sweep (many analysers stop at 1001 or 2001 points)
MIN_POINTS = 3  # a dip needs a point either side
MAX_TEXT_BYTES = 256 * 1024  # 2001 points of R, X and SWR at full precision fit in ~120 KiB
FREQUENCY_COLUMNS = {"frequency_mhz": 1e6, "frequency_khz": 1e3, "frequency_hz": 1.0}
VALUE_COLUMNS = ("r_ohm", "x_ohm", "swr")
SWEEP_FORMATS = ("csv", "touchstone")
MAX_REFLECTION = 0.9999  # |S11| of SWR ~20 000: beyond it a point is an open or a short
MIN_SWEEP_HZ, MAX_SWEEP_HZ = 0.5e6, 60e6  # HF and a margin: an NVIS dipole resonates 1.8–30 MHz


@dataclass(frozen=True)
class Sweep:
    """A measured sweep as read, before any move through the coax.

    Attributes
    ----------
    frequencies_hz : rising frequencies [Hz]
    z_ohm : R + jX per frequency [Ω], or None for an SWR-only file
    swr : SWR per frequency (on 50 Ω) [-], or None when the file gives R and X only
    source : "csv" or "touchstone"
    """

    frequencies_hz: np.ndarray
    z_ohm: np.ndarray | None
    swr: np.ndarray | None
    source: str


def read_sweep(text: str, *, format: str, field: str = "retrim.sweep") -> Sweep:
    """Read an analyser file's text.

    Raises
    ------
    fieldkit.errors.InputError
        413 for a file over :data:`MAX_TEXT_BYTES`; otherwise naming the line and column at fault.
    """
    size = len(text.encode("utf-8"))
    if size > MAX_TEXT_BYTES:
        raise TooLargeError(
            f"{field}.text",
            f"the file is {size} bytes; at most {MAX_TEXT_BYTES} bytes ({MAX_POINTS} points) "
            "are read: export a narrower sweep around the channel",
        )
    sweep = read_touchstone(text, field) if format == "touchstone" else read_csv(text, field)
    _check_frequencies(sweep.frequencies_hz, field)
    return sweep


def _check_frequencies(f: np.ndarray, field: str) -> None:
    if not MIN_POINTS <= len(f) <= MAX_POINTS:
        raise InputError(
            f"{field}.text", f"{len(f)} points; expected {MIN_POINTS} to {MAX_POINTS} points"
        )
    if not (f[0] >= MIN_SWEEP_HZ and f[-1] <= MAX_SWEEP_HZ):
        raise InputError(
            f"{field}.text",
            f"the sweep runs {f[0] / 1e6:g}–{f[-1] / 1e6:g} MHz; expected HF, 0.5 to 60 MHz "
            "(is the frequency column in the unit its header says?)",
        )


def _column_name(cell: str) -> str:
    """A header cell as its column's name: "Frequency (MHz)" and "frequency_mhz" are the same."""
    text = cell.strip().lower().replace("ω", "ohm").replace("ohms", "ohm")
    return re.sub(r"[\s\-()\[\]_]+", "_", text).strip("_")


def _columns(header: str, line_no: int, field: str) -> tuple[str, list[str]]:
    sep = next((s for s in (",", ";", "\t") if s in header), ",")
    names = [_column_name(c) for c in header.split(sep)]
    for i, name in enumerate(names):
        if name not in FREQUENCY_COLUMNS and name not in VALUE_COLUMNS:
            raise InputError(
                f"{field}.text",
                f"line {line_no}, column {i + 1}: unknown column {name!r}; expected a header of "
                "frequency_mhz (or frequency_khz, frequency_hz) with r_ohm and x_ohm, or swr",
            )
        if names.count(name) > 1:
            raise InputError(f"{field}.text", f"line {line_no}: column {name!r} given twice")
    freq = [n for n in names if n in FREQUENCY_COLUMNS]
    has_z = "r_ohm" in names and "x_ohm" in names
    if len(freq) != 1 or not (has_z or "swr" in names) or ("r_ohm" in names) != ("x_ohm" in names):
        raise InputError(
            f"{field}.text",
            f"line {line_no}: the header names {', '.join(names)}; expected one frequency column "
            "(frequency_mhz, frequency_khz or frequency_hz) with r_ohm and x_ohm, or swr",
        )
    return sep, names


def _cell(text: str, line_no: int, col: int, name: str, field: str) -> float:
    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    lo = {"r_ohm": 0.0, "swr": 1.0}.get(name, -1e9)
    if not np.isfinite(value) or value < lo or (name in FREQUENCY_COLUMNS and value <= 0):
        what = {"r_ohm": "R ≥ 0 Ω", "swr": "an SWR ≥ 1", "x_ohm": "X in Ω"}.get(name, "a frequency")
        raise InputError(
            f"{field}.text",
            f"line {line_no}, column {col + 1} ({name}): expected {what}, got {text.strip()!r}",
        )
    return value


def read_csv(text: str, field: str = "retrim.sweep") -> Sweep:
    """Read the CSV form (see the module's docstring)."""
    rows: list[list[float]] = []
    names: list[str] | None = None
    sep = ","
    for line_no, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        if names is None:
            sep, names = _columns(line, line_no, field)
            continue
        cells = line.split(sep)
        if len(cells) != len(names):
            raise InputError(
                f"{field}.text",
                f"line {line_no}: {len(cells)} columns; the header has {len(names)} ({', '.join(names)})",
            )
        rows.append([_cell(c, line_no, i, names[i], field) for i, c in enumerate(cells)])
        fi = next(i for i, n in enumerate(names) if n in FREQUENCY_COLUMNS)
        if len(rows) >= 2 and not rows[-1][fi] > rows[-2][fi]:
            raise InputError(
                f"{field}.text", f"line {line_no}: the frequency does not rise from the line before"
            )
        if len(rows) > MAX_POINTS:
            raise InputError(f"{field}.text", f"line {line_no}: more than {MAX_POINTS} points")
    if names is None:
        raise InputError(f"{field}.text", "empty file: expected a header line and the points")
    data = np.array(rows, dtype=float).reshape(-1, len(names))
    col = {n: data[:, i] for i, n in enumerate(names)}
    (fname,) = (n for n in names if n in FREQUENCY_COLUMNS)
    z = col["r_ohm"] + 1j * col["x_ohm"] if "r_ohm" in col else None
    return Sweep(col[fname] * FREQUENCY_COLUMNS[fname], z, col.get("swr"), "csv")


def read_touchstone(text: str, field: str = "retrim.sweep") -> Sweep:
    """Read a one-port Touchstone file with scikit-rf (S, Z or Y; RI, MA or DB)."""
    import skrf

    buf = io.StringIO(text)
    buf.name = "sweep.s1p"
    try:
        # scikit-rf's parse warnings and the arithmetic of an open or short (Z = ∞) are checked below
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore")
            net = skrf.Network(buf)
            z = np.asarray(net.z[:, 0, 0], dtype=complex) if net.nports == 1 else None
            s11 = np.abs(net.s[:, 0, 0]) if net.nports == 1 else None
    except (
        Exception
    ) as exc:  # scikit-rf raises several types for a bad file; all mean the same here
        raise InputError(
            f"{field}.text", f"not a readable Touchstone one-port file: {exc}"[:300]
        ) from None
    if net.nports != 1:
        raise InputError(f"{field}.text", f"a {net.nports}-port file; expected a one-port (.s1p)")
    f = np.asarray(net.f, dtype=float)
    if len(f) >= 2 and not np.all(np.diff(f) > 0):
        raise InputError(f"{field}.text", "the frequencies do not rise from point to point")
    bad = ~np.isfinite(z) | ~(s11 < MAX_REFLECTION)
    if np.any(bad):
        i = int(np.argmax(bad))
        what = "R < 0, an active load" if s11[i] > 1 else "an open or short (no finite impedance)"
        raise InputError(
            f"{field}.text",
            f"point {i + 1} ({f[i] / 1e6:g} MHz) has |S11| = {s11[i]:.3g}: {what}, not an antenna",
        )
    return Sweep(f, z, None, "touchstone")
