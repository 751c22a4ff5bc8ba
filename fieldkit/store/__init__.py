"""SQLite persistence of deployments, the kit inventory and checklist acknowledgements.

Standard-library ``sqlite3`` only. :func:`migrate` brings the database to the current schema at start;
each request then opens its own connection with :func:`connect` and writes inside
:func:`transaction`. Modules: ``deployments``, ``acknowledgements`` (append-only), ``kit``,
``transfer`` (JSON export/import, checklist CSV).
"""

from fieldkit.store.schema import SCHEMA_VERSION, SchemaTooNew, migrate
from fieldkit.store.sqlite import connect, database_path, transaction
from fieldkit.store.store_errors import Conflict, NotFound

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
