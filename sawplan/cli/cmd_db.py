"""``sawplan db copy|upgrade``: move a whole log between a file and a server; upgrade it."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import DbOpt, command, opt

HELP = """Move the blade log to and from PostgreSQL; upgrade its schema.

\b
Examples:
  sawplan db copy --from shop-log.sqlite --to postgresql://office@saw-server/sawplan
  sawplan db upgrade --db postgresql://office@saw-server/sawplan
"""

COPY_HELP = """Copy a whole blade log into a new file or an empty database.

Either side may be a log file or a postgresql:// URL. Every row keeps its
id; the whole copy is one transaction. Afterwards each table is read back
and compared with the source: row count and checksum. The source is not
changed (an old log file is upgraded first, with a backup).

\b
Examples:
  sawplan db copy --from shop-log.sqlite --to postgresql://office@saw-server/sawplan
  sawplan db copy --from postgresql://office@saw-server/sawplan --to copy.sqlite
"""

UPGRADE_HELP = """Bring a blade log to the schema this sawplan uses.

A log file is upgraded when it is opened anyway (after a check and a copy
into backups/); a shared PostgreSQL log only with this command, run once
from one PC: it first writes a backup (see `sawplan backup`) into the
backups folder of your data folder, then upgrades in one transaction.

\b
Examples:
  sawplan db upgrade --db postgresql://office@saw-server/sawplan
  sawplan db upgrade --db old-log.sqlite
"""


def copy_command(
    source: Annotated[str, opt("copy_from")],
    target: Annotated[str, opt("copy_to")],
) -> None:
    from sawplan.store.transfer import copy_log

    result = copy_log(source, target)
    print(f"copied {result.source} to {result.target}, every table verified:")
    for t in result.tables:
        print(f"  {t.table:9s} {t.rows:9,} rows  sha256 {t.checksum[:16]}")


def upgrade_command(db: DbOpt = None) -> None:
    from sawplan.store.upgrade import upgrade_log

    outcome = upgrade_log(db)
    if outcome.from_version == outcome.to_version:
        print(f"{outcome.where} is at schema {outcome.to_version} already; nothing to do")
        return
    print(f"upgraded {outcome.where} from schema {outcome.from_version} to {outcome.to_version}")
    if outcome.backup:
        print(f"  backup made first: {outcome.backup} ({outcome.backup_kind})")


def register(app: typer.Typer) -> None:
    group = typer.Typer(
        help=HELP, no_args_is_help=True, rich_markup_mode=None, add_completion=False
    )
    command(group, "copy", COPY_HELP)(copy_command)
    command(group, "upgrade", UPGRADE_HELP)(upgrade_command)
    app.add_typer(group, name="db", help=HELP)
