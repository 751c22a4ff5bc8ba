"""Package build step: compile the engine's C kernel (fieldkit/antenna/native/build.py).

hatchling runs this on every wheel and editable install (``[tool.hatch.build.hooks.custom]`` in
pyproject.toml). The library is built into the source tree (an editable install uses it there) and
a wheel carries it as a platform wheel. Without a C compiler the install goes on with a warning and
fieldkit runs the numpy kernels (the same numbers, a plan ~1.5× slower).
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

from hatchling.builders.hooks.plugin.interface import BuildHookInterface

BUILD_SCRIPT = Path(__file__).resolve().parent / "fieldkit" / "antenna" / "native" / "build.py"
IN_WHEEL = "fieldkit/antenna/native/_kernels.so"


def _build_module():
    """fieldkit/antenna/native/build.py by path: the package itself is not importable here."""
    spec = importlib.util.spec_from_file_location("fieldkit_native_build", BUILD_SCRIPT)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


class CustomBuildHook(BuildHookInterface):
    """Compile the kernel before the files are collected."""

    def initialize(self, version: str, build_data: dict) -> None:
        if self.target_name not in ("wheel",):
            return
        try:
            library = _build_module().build()
        except (RuntimeError, OSError) as exc:
            print(f"fieldkit: {exc}; fieldkit will use its numpy kernels", file=sys.stderr)
            return
        if version != "editable":
            build_data["force_include"][str(library)] = IN_WHEEL
            build_data["pure_python"] = False
            build_data["infer_tag"] = True
