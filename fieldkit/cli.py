"""The `fieldkit` command: desktop window (default), serve, model, sky, plan.

Every subcommand that reads JSON takes FILE or '-' for stdin and prints JSON on stdout. Bad input
ends with exit code 2 and one line on stderr naming the field and what is expected.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Callable, Sequence
from typing import Any

from fieldkit import __version__
from fieldkit.errors import InputError

EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

# subcommand -> (module, function); imported only when used so `fieldkit model` starts fast
CALCULATORS = {
    "model": ("fieldkit.antenna", "model_json"),
    "sky": ("fieldkit.sky", "sky_json"),
    "plan": ("fieldkit.planning", "plan"),
}


class LayerMissing(RuntimeError):
    """A layer of fieldkit that this command needs is not part of this build."""


def _load(module: str, name: str) -> Callable[..., Any]:
    try:
        mod = importlib.import_module(module)
    except ModuleNotFoundError as exc:
        if exc.name and (exc.name == module or module.startswith(exc.name + ".")):
            raise LayerMissing(f"{module} is not available in this build of fieldkit") from None
        raise
    fn = getattr(mod, name, None)
    if fn is None:
        raise LayerMissing(f"{module}.{name} is not available in this build of fieldkit")
    return fn


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
    return p


def _calculate(command: str, path: str) -> int:
    from fieldkit import jsonio

    module, name = CALCULATORS[command]
    spec = jsonio.read(path)  # input errors are reported even where a layer is missing
    fn = _load(module, name)
    result = fn(spec)
    # indented for a person at a terminal; compact (and fast) when piped to a script
    sys.stdout.write(jsonio.dumps(result, pretty=sys.stdout.isatty()) + "\n")
    return 0


def _serve(args: argparse.Namespace) -> int:
    serve = _load("fieldkit.service", "serve")
    if not 0 < args.port < 65536:
        raise InputError("--port", f"expected a port number 1-65535, got {args.port}")
    host = args.host or ("0.0.0.0" if args.lan else "127.0.0.1")
    serve(host=host, port=args.port, data_dir=args.data_dir, lan=args.lan)
    return 0


def _desktop(args: argparse.Namespace) -> int:
    run = _load("fieldkit.desktop", "run")
    return int(run(data_dir=getattr(args, "data_dir", None)) or 0)


def main(argv: Sequence[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    command = args.command or "desktop"
    try:
        if command in CALCULATORS:
            return _calculate(command, args.file)
        if command == "serve":
            return _serve(args)
        return _desktop(args)
    except InputError as exc:
        print(f"fieldkit {command}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except LayerMissing as exc:
        print(f"fieldkit {command}: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return 0


if __name__ == "__main__":
    sys.exit(main())
