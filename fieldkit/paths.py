"""Where fieldkit keeps its data: the platform's user data directory, or FIELDKIT_HOME."""

from __future__ import annotations

import os
from pathlib import Path

APP_NAME = "fieldkit"


def data_dir() -> Path:
    """The data directory, created if missing. FIELDKIT_HOME overrides the platform default."""
    override = os.environ.get("FIELDKIT_HOME")
    if override:
        path = Path(override).expanduser()
    else:
        import platformdirs

        path = Path(platformdirs.user_data_dir(APP_NAME, appauthor=False))
    path.mkdir(parents=True, exist_ok=True)
    return path


def project_root() -> Path:
    """The source tree's top level (web/ and assets/ live beside the package)."""
    return Path(__file__).resolve().parent.parent


def web_dir() -> Path:
    return project_root() / "web"


def assets_dir() -> Path:
    return project_root() / "assets"


def demo_plan_path() -> Path:
    return assets_dir() / "demo" / "larch-basin-plan.json"
