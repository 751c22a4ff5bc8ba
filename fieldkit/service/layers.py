"""Calling the layers below the service, imported when first needed.

A layer that is not there makes the endpoint answer 503 ``{"error": "layer not available"}``: its
module does not exist, lacks the function, or needs a fieldkit module that does not exist in this
build (a layer that has only partly landed). Any other import error (a missing third-party package)
is a broken installation and propagates (500).
"""

from __future__ import annotations

import importlib
from collections.abc import Callable
from typing import Any

from fieldkit.errors import InputError


class LayerUnavailable(InputError):
    """The module implementing an endpoint is not installed in this build (HTTP 503)."""

    def __init__(self, module: str, name: str, missing: str | None = None) -> None:
        detail = f"{module}.{name} is not part of this build yet"
        if missing and missing != module:
            detail += f" (it needs {missing}, which does not exist yet)"
        super().__init__("(service)", detail, status=503)
        self.module = module

    def to_json(self) -> dict[str, Any]:
        return {"error": "layer not available", "field": None, "detail": self.detail}


def layer_function(module: str, name: str) -> Callable[..., Any]:
    """``module.name``, or :class:`LayerUnavailable` when that module or name does not exist."""
    try:
        loaded = importlib.import_module(module)
    except ModuleNotFoundError as exc:
        if _own_module(exc):
            raise LayerUnavailable(module, name, exc.name) from None
        raise
    function = getattr(loaded, name, None)
    if function is None:
        raise LayerUnavailable(module, name)
    return function


def _own_module(exc: ModuleNotFoundError) -> bool:
    return exc.name is not None and (exc.name == "fieldkit" or exc.name.startswith("fieldkit."))


def call_layer(module: str, name: str, *args: Any) -> Any:
    """Call ``module.name(*args)``; a fieldkit module missing on the way is :class:`LayerUnavailable`."""
    function = layer_function(module, name)
    try:
        return function(*args)
    except ModuleNotFoundError as exc:  # imported lazily inside the layer
        if _own_module(exc):
            raise LayerUnavailable(module, name, exc.name) from None
        raise


def warm_up() -> None:
    """Load the calculators in a background thread, so the first plan after a start is not slow.

    Importing the plan chain and PyIRI's coefficient reader costs 1-2 s of CPU; done at start, the
    first request from the window or a phone does not pay it. Failures are left for the request
    itself to report.
    """

    def load() -> None:
        try:
            importlib.import_module("fieldkit.planning")
            iri = importlib.import_module("fieldkit.sky.iri")
            iri._library()
        except Exception:  # noqa: BLE001 - the request that needs the layer reports it properly
            pass

    import threading

    threading.Thread(target=load, name="fieldkit-warm-up", daemon=True).start()
