"""The `fieldkit` command: desktop window (default), serve, model, sky, plan.

Every subcommand that reads JSON takes FILE or '-' for stdin and prints JSON on stdout. Bad input
ends with exit code 2 and one line on stderr naming the field and what is expected.
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Callable, Sequence
from typing import Any, NoReturn

from fieldkit import __version__
from fieldkit.errors import InputError

# One OpenBLAS thread for the whole process, set before anything imports numpy: the engine's systems
# are small, and BLAS worker threads only add start-up and spin-wait time (docs/engine.md).
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3


# Each command imports only the layer it runs, when it runs: `fieldkit model` pays for numpy and the
# engine, never for the sky model, Flask or the desktop window.
def _model(spec: Any) -> Any:
    from fieldkit.antenna import model_json

    return model_json(spec)


def _sky(spec: Any) -> Any:
    from fieldkit.sky import sky_json

    return sky_json(spec)


def _plan(spec: Any) -> Any:
    from fieldkit.planning import plan

    return plan(spec)


CALCULATORS: dict[str, Callable[[Any], Any]] = {"model": _model, "sky": _sky, "plan": _plan}


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="fieldkit",
        description="Plan a low wire dipole for NVIS: channel, rope heights, cut lengths, mast, checks.",
    )
    p.add_argument("--version", action="version", version=f"fieldkit {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    d = sub.add_parser("desktop", help="open the desktop window (the default)")
    d.add_argument(
        "--data-dir",
        help="where deployments are stored (default: FIELDKIT_HOME or the user data dir)",
    )

    s = sub.add_parser("serve", help="serve the app and API with waitress")
    s.add_argument(
        "--host", default=None, help="address to listen on (default 127.0.0.1; 0.0.0.0 with --lan)"
    )
    s.add_argument("--port", type=int, default=8765, help="port (default 8765)")
    s.add_argument("--data-dir", help="where deployments are stored")
    s.add_argument(
        "--lan",
        action="store_true",
        help="listen on the local network; prints the access key and a QR code",
    )

    helps = {
        "model": "solve a wire antenna over ground (JSON spec or array of specs)",
        "sky": "channel day: which channel reaches which distances at each hour",
        "plan": "cut-and-hang plan: options with rope heights, cut list, mast, safety",
    }
    for name, text in helps.items():
        c = sub.add_parser(name, help=text)
        c.add_argument("file", metavar="FILE", help="JSON input file, or - for stdin")
        if name == "plan":
            c.add_argument(
                "--sweep",
                metavar="ANALYSER_FILE",
                help="an analyser sweep of the raised antenna (.s1p Touchstone, or .csv with "
                "frequency_mhz and r_ohm, x_ohm or swr): re-trim from it (retrim.sweep)",
            )
            c.add_argument(
                "--at",
                choices=("feedpoint", "radio"),
                help="where the sweep was taken (default feedpoint; radio: moved through kit.coax)",
            )
    return p


SWEEP_SUFFIXES = {".s1p": "touchstone", ".csv": "csv", ".txt": "csv"}


def _with_sweep(spec: Any, path: str, at: str | None) -> Any:
    """The plan input with the analyser file as ``retrim.sweep`` (the channel: retrim's, else the
    first of ``channels_mhz``)."""
    from pathlib import Path

    from fieldkit.rigging.analyser import MAX_TEXT_BYTES

    file = Path(path)
    fmt = SWEEP_SUFFIXES.get(file.suffix.lower())
    if fmt is None:
        raise InputError("--sweep", f"expected a .s1p or .csv file, got {file.name!r}")
    try:
        if file.stat().st_size > MAX_TEXT_BYTES:
            raise InputError("--sweep", f"{file.name} is larger than {MAX_TEXT_BYTES} bytes")
        text = file.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise InputError("--sweep", f"cannot read {path}: {exc.strerror}") from None
    except UnicodeDecodeError:
        raise InputError("--sweep", f"{file.name} is not UTF-8 text") from None
    if not isinstance(spec, dict):
        return spec  # the plan's own parser names the problem
    retrim = dict(spec.get("retrim") or {})
    if "frequency_mhz" not in retrim and isinstance(spec.get("channels_mhz"), list):
        retrim["frequency_mhz"] = spec["channels_mhz"][0] if spec["channels_mhz"] else None
    retrim["sweep"] = {"format": fmt, "text": text, "name": file.name}
    if at is not None:
        retrim["at"] = at
    return {**spec, "retrim": retrim}


def _calculate(command: str, path: str, args: argparse.Namespace | None = None) -> int:
    from fieldkit import jsonio

    spec = jsonio.read(path)
    if getattr(args, "sweep", None) is not None:
        spec = _with_sweep(spec, args.sweep, args.at)
    elif getattr(args, "at", None) is not None:
        raise InputError("--at", "only with --sweep (in the input file: retrim.at)")
    from fieldkit import disk_cache

    disk_cache.keep_image_fits()
    if command != "model":  # the engine alone needs no sky layer
        disk_cache.keep_default_gains()
    result = CALCULATORS[command](spec)
    # indented for a person at a terminal; compact (and fast) when piped to a script
    sys.stdout.write(jsonio.dumps(result, pretty=sys.stdout.isatty()) + "\n")
    return 0


def _serve(args: argparse.Namespace) -> int:
    if not 0 < args.port < 65536:
        raise InputError("--port", f"expected a port number 1-65535, got {args.port}")
    host = args.host or ("0.0.0.0" if args.lan else "127.0.0.1")
    from fieldkit import disk_cache
    from fieldkit.service import serve

    disk_cache.keep_image_fits()
    serve(host=host, port=args.port, data_dir=args.data_dir, lan=args.lan)
    return 0


def _desktop(args: argparse.Namespace) -> int:
    from fieldkit import disk_cache
    from fieldkit.desktop import run

    disk_cache.keep_image_fits()
    return int(run(data_dir=getattr(args, "data_dir", None)) or 0)


def main(argv: Sequence[str] | None = None) -> int:
    """Run a command; ``argv`` None means the process's own arguments (the `fieldkit` program).

    Run as the program, a calculator command (model, sky, plan) then ends the process at once
    (:func:`_end_now`); called with ``argv`` (tests, scripts) it returns the exit code.
    """
    args = _parser().parse_args(argv)
    command = args.command or "desktop"
    code = _run(command, args)
    if argv is None and command in CALCULATORS:
        _end_now(code)
    return code


def _run(command: str, args: argparse.Namespace) -> int:
    try:
        if command in CALCULATORS:
            return _calculate(command, args.file, args)
        if command == "serve":
            return _serve(args)
        return _desktop(args)
    except InputError as exc:
        print(f"fieldkit {command}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return 0


def _end_now(code: int) -> NoReturn:
    """Exit without the interpreter's teardown of numpy and the layers (~20 ms of CPU, a tenth of
    a 47-height sweep job). Output is flushed first; a calculator holds nothing else to close
    (the cache files it wrote are complete: they are written atomically before use)."""
    try:
        sys.stdout.flush()
    except BrokenPipeError:  # the reader went away: as before, not an error
        code = 0
    try:
        sys.stderr.flush()
    finally:
        os._exit(code)


if __name__ == "__main__":
    sys.exit(main())
