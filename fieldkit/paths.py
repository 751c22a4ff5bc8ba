"""Where fieldkit keeps its files.

Data (deployments): the platform's user data directory, or FIELDKIT_HOME. Caches (tables rebuilt
from installed packages whenever missing): the user cache directory, or FIELDKIT_CACHE_DIR.
"""

from __future__ import annotations

import os
from pathlib import Path

APP_NAME = "fieldkit"


def _user_dir(variable: str, platform_dir: str) -> Path:
    override = os.environ.get(variable)
    if override:
        path = Path(override).expanduser()
    else:
        import platformdirs

        path = Path(getattr(platformdirs, platform_dir)(APP_NAME, appauthor=False))
    path.mkdir(parents=True, exist_ok=True)
    return path


def data_dir() -> Path:
    """The data directory, created if missing. FIELDKIT_HOME overrides the platform default."""
    return _user_dir("FIELDKIT_HOME", "user_data_dir")


def cache_dir() -> Path:
    """The cache directory, created if missing. FIELDKIT_CACHE_DIR overrides the platform default.

    Only derived files live here (the compact IRI tables of :mod:`fieldkit.sky.iri_tables`, fitted
    ground images): deleting it costs one rebuild on next use, never data.
    """
    return _user_dir("FIELDKIT_CACHE_DIR", "user_cache_dir")


def project_root() -> Path:
    """The source tree's top level (web/ and assets/ live beside the package)."""
    return Path(__file__).resolve().parent.parent


def web_dir() -> Path:
    return project_root() / "web"


def assets_dir() -> Path:
    return project_root() / "assets"


def demo_plan_path() -> Path:
    return assets_dir() / "demo" / "larch-basin-plan.json"
