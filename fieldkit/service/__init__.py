"""The local service: Flask API and the field app's files, served by waitress.

``create_app(config)`` builds the Flask app; ``serve(host=…, port=…, data_dir=…, lan=…)`` runs it.
Blueprints, one per area (``*_api`` modules): ``health``, ``calc`` (model, sky, plan), ``deployments``, ``checks``,
``kit``, ``lan``, ``openapi``; ``static_files`` serves web/.
"""

from fieldkit.service.app import create_app
from fieldkit.service.server import serve

__all__ = ["create_app", "serve"]
