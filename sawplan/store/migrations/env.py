"""Alembic's entry point for the blade log's migrations.

sawplan runs migrations on a connection it has already opened and locked
(``sawplan.store.upgrade``), passed in ``config.attributes["connection"]``;
everything runs inside that connection's transaction.  Offline SQL and
autogenerate are not used: each revision is written by hand so it runs the
same on SQLite and PostgreSQL.
"""

from __future__ import annotations

from alembic import context

from sawplan.store.schema import VERSION_TABLE

connection = context.config.attributes["connection"]
context.configure(
    connection=connection,
    version_table=VERSION_TABLE,
    transactional_ddl=True,
)
with context.begin_transaction():
    context.run_migrations()
