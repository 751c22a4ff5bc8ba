"""The JSON edge of the API: strict body parsing, the error JSON of the contract, the JSON provider.

Every error leaves as ``{"error", "field", "detail"}``; bad input is a 4xx, never a traceback.
"""

from __future__ import annotations

import json
from typing import Any

from flask import Flask, Response, current_app, jsonify, request
from flask.json.provider import DefaultJSONProvider
from werkzeug.exceptions import HTTPException, RequestEntityTooLarge

from fieldkit import jsonio
from fieldkit.errors import InputError

# Deepest JSON nesting accepted. The deepest real input (a plan with a sky block and a model spec
# inside) is about 6 levels; the bound keeps recursive validators far from Python's recursion limit.
MAX_JSON_DEPTH = 32
WRITE_METHODS = frozenset({"POST", "PUT", "PATCH"})


class StrictJSONProvider(DefaultJSONProvider):
    """Flask's provider, but a NaN or infinity in a response is an error, not invalid JSON."""

    def dumps(self, obj: Any, **kwargs: Any) -> str:
        kwargs.setdefault("allow_nan", False)
        return super().dumps(obj, **kwargs)


def error_response(status: int, error: str, detail: str, field: str | None = None) -> Response:
    response = jsonify({"error": error, "field": field, "detail": detail})
    response.status_code = status
    return response


class BadBody(InputError):
    """A body that is not acceptable JSON at all (HTTP 400)."""

    def __init__(self, detail: str) -> None:
        super().__init__("(body)", detail, status=400)

    def to_json(self) -> dict[str, Any]:
        return {"error": "malformed request", "field": self.field, "detail": self.detail}


def json_body(*, allow_array: bool = False) -> Any:
    """The request's JSON body: an object (or an array where the endpoint allows one).

    Refuses non-JSON content types (415), bodies over the size limit (413), malformed or non-finite
    JSON and nesting deeper than :data:`MAX_JSON_DEPTH` (400), an integer beyond what JSON carries
    exactly (422, naming its field) and a wrong top-level type (422).
    """
    if request.mimetype != "application/json":
        raise UnsupportedMedia()
    raw = request.get_data(cache=True)
    if not raw.strip():
        raise BadBody("expected a JSON body, got an empty one")
    try:
        value = jsonio.parse(raw)
    except RecursionError:
        raise BadBody(f"JSON nested deeper than {MAX_JSON_DEPTH} levels") from None
    except ValueError as exc:  # JSONDecodeError and UnicodeDecodeError are ValueErrors
        raise BadBody(f"not valid JSON: {exc}"[:300]) from None
    if not jsonio.refuse_unrepresentable(value, MAX_JSON_DEPTH):
        raise BadBody(f"JSON nested deeper than {MAX_JSON_DEPTH} levels")
    try:  # a lone surrogate escape ("\ud800") is valid JSON but not text: SQLite would fail on it
        json.dumps(value, ensure_ascii=False).encode("utf-8")
    except UnicodeEncodeError:
        raise BadBody(
            "a string holds a lone UTF-16 surrogate escape; expected Unicode text"
        ) from None
    if isinstance(value, dict) or (allow_array and isinstance(value, list)):
        return value
    expected = "a JSON object or array" if allow_array else "a JSON object"
    raise InputError("(top level)", f"expected {expected}, got {type(value).__name__}")


class UnsupportedMedia(InputError):
    def __init__(self) -> None:
        super().__init__(
            "Content-Type", "expected Content-Type: application/json for this request", status=415
        )

    def to_json(self) -> dict[str, Any]:
        return {"error": "unsupported media type", "field": self.field, "detail": self.detail}


def register_errors(app: Flask) -> None:
    """JSON for every error: input errors, HTTP errors (404, 405, 413 …) and unexpected ones (500)."""

    @app.errorhandler(InputError)
    def input_error(exc: InputError) -> Response:
        response = jsonify(exc.to_json())
        response.status_code = exc.status
        retry_after = getattr(exc, "retry_after_s", None)
        if retry_after is not None:  # a full plan queue (503): when to try again [s]
            response.headers["Retry-After"] = str(int(retry_after))
        return response

    @app.errorhandler(RequestEntityTooLarge)
    def too_large(exc: RequestEntityTooLarge) -> Response:
        limit = current_app.config.get("MAX_CONTENT_LENGTH")
        return error_response(
            413,
            "request too large",
            f"the body is larger than the limit of {limit} bytes",
            "(body)",
        )

    @app.errorhandler(HTTPException)
    def http_error(exc: HTTPException) -> Response:
        response = error_response(
            exc.code or 500, (exc.name or "error").lower(), exc.description or ""
        )
        if exc.code == 405 and exc.valid_methods:
            response.headers["Allow"] = ", ".join(exc.valid_methods)
        return response

    @app.errorhandler(Exception)
    def unexpected(exc: Exception) -> Response:
        # Logged with the path only (query strings and headers may carry the access key), quoted
        # with repr: a newline in the path cannot forge a log line.
        current_app.logger.exception("unexpected error in %s %r", request.method, request.path)
        return error_response(
            500, "internal error", "an unexpected error; the service log has the details"
        )
