"""``sawplan serve``: the shop-floor station and office pages in a browser."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import DbOpt, UnitsOpt, command, opt

HELP = """Serve the station: a page at each saw that fills the blade log.

Open http://127.0.0.1:8470 on this computer: it needs no key. To serve the
shop network, make keys once with --keys (a station key for the saws, an
office key for the office; shown once, stored hashed), then serve with
--host 0.0.0.0 (or the computer's address). Put TLS in front with a reverse
proxy on this computer and serve with --proxied, so that every request needs a
key (see the README); never expose the station to the internet.

\b
Examples:
  sawplan serve
  sawplan serve --keys
  sawplan serve --host 0.0.0.0 --port 8470 --db shop-log.sqlite
  sawplan serve --proxied

Estimates only: the saw maker's manual, the blade maker's data, shop rules and
local regulations govern.
"""


def serve_command(
    host: Annotated[str, opt("host", show_default=True)] = "127.0.0.1",
    port: Annotated[int, opt("port", show_default=True)] = 8470,
    keys: Annotated[bool, opt("keys")] = False,
    proxied: Annotated[bool, opt("proxied")] = False,
    units: UnitsOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.station.serve import make_keys_text, serve

    if keys:
        print(make_keys_text())
        return
    serve(db=db, host=host, port=port, units=units, proxied=proxied)


def register(app: typer.Typer) -> None:
    command(app, "serve", HELP)(serve_command)
