"""Calling the layers below the service, imported when first needed.

A layer that is not there (its module does not exist, or lacks the function) makes the endpoint answer
503 ``{"error": "layer not available"}``; an import error from *inside* a layer that exists is a bug
and propagates (500).
"""

from __future__ import annotations

import importlib
from collections.abc import Callable
from typing import Any

from fieldkit.errors import InputError


class LayerUnavailable(InputError):
    """The module implementing an endpoint is not installed in this build (HTTP 503)."""

    def __init__(self, module: str, name: str) -> None:
        super().__init__("(service)", f"{module}.{name} is not part of this build yet", status=503)
        self.module = module

    def to_json(self) -> dict[str, Any]:
        return {"error": "layer not available", "field": None, "detail": self.detail}


def layer_function(module: str, name: str) -> Callable[..., Any]:
    """``module.name``, or :class:`LayerUnavailable` when that module or name does not exist."""
    try:
        loaded = importlib.import_module(module)
    except ModuleNotFoundError as exc:
        if exc.name is not None and (exc.name == module or module.startswith(exc.name + ".")):
            raise LayerUnavailable(module, name) from None
        raise
    function = getattr(loaded, name, None)
    if function is None:
        raise LayerUnavailable(module, name)
    return function
