"""Errors the store raises; both are :class:`fieldkit.errors.InputError` so every edge maps them."""

from __future__ import annotations

from typing import Any

from fieldkit.errors import InputError


class NotFound(InputError):
    """The named record does not exist (HTTP 404)."""

    def __init__(self, field: str, detail: str, *, value: Any = None) -> None:
        super().__init__(field, detail, value=value, status=404)

    def to_json(self) -> dict[str, Any]:
        return {"error": "not found", "field": self.field, "detail": self.detail}


class Conflict(InputError):
    """The request contradicts what is stored, e.g. a reused client id with other content (HTTP 409)."""

    def __init__(self, field: str, detail: str, *, value: Any = None) -> None:
        super().__init__(field, detail, value=value, status=409)

    def to_json(self) -> dict[str, Any]:
        return {"error": "conflict", "field": self.field, "detail": self.detail}
