"""SQLite persistence of deployments, the kit inventory and checklist acknowledgements.

Standard-library ``sqlite3`` only. :func:`migrate` brings the database to the current schema at start;
each request then opens its own connection with :func:`connect` and writes inside
:func:`transaction`. Modules: ``deployments``, ``checks`` (append-only acknowledgements), ``kit``,
``transfer`` (JSON export/import, checklist CSV).
"""

from fieldkit.store.db import connect, database_path, transaction
from fieldkit.store.errors import Conflict, NotFound
from fieldkit.store.schema import SCHEMA_VERSION, SchemaTooNew, migrate

__all__ = [
    "SCHEMA_VERSION",
    "Conflict",
    "NotFound",
    "SchemaTooNew",
    "connect",
    "database_path",
    "migrate",
    "transaction",
]
