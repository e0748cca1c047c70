"""Running the station: checks before the first request, then uvicorn."""

from __future__ import annotations

import ipaddress

from sawplan.errors import UsageError


def is_loopback(host: str) -> bool:
    name = host.strip().strip("[]").lower()
    if name == "localhost":
        return True
    try:
        return ipaddress.ip_address(name).is_loopback
    except ValueError:
        return False


def make_keys_text() -> str:
    """New keys for both roles, as the one text that shows them."""
    from sawplan.station.access import keys_path, make_keys

    made = make_keys()
    return "\n".join(
        [
            f"new keys (stored hashed in {keys_path()}; the old keys stop working):",
            f"  station key: {made['station']}   (log work at the saws)",
            f"  office key:  {made['office']}   (also change saws, blades and jobs)",
            "They are shown only now: write them down for the tablets and the office.",
        ]
    )


def serve(
    *, db: str | None, host: str, port: int, units: object = None, proxied: bool = False
) -> None:
    """Check the log and the keys, then serve until Ctrl-C.

    ``proxied``: a reverse proxy on this computer forwards every request, so
    no request is taken for this computer and keys must exist.
    """
    from sawplan import fields
    from sawplan.station.access import keys_path, load_keys
    from sawplan.station.app import create_app
    from sawplan.store import connect

    fields.check_text("host", host)
    if not host.strip():
        raise UsageError("expected an address, got nothing", field="host", hint="e.g. 0.0.0.0")
    keys = load_keys()
    if proxied and not keys.any:
        raise UsageError(
            f"--proxied makes every request need a key, and there are none in {keys_path()}",
            field="proxied",
            hint="make them once with: sawplan serve --keys",
        )
    if not is_loopback(host) and not keys.any:
        raise UsageError(
            f"serving the network ({host}) needs keys, and there are none in {keys_path()}",
            field="host",
            hint="make them once with: sawplan serve --keys",
        )
    with connect(db) as log:  # refuse a damaged or newer log now, not at the first tap
        where = log.location.label
    app = create_app(db, keys=keys, units=units, host=host, proxied=proxied)
    shown = f"[{host}]" if ":" in host else host
    print(f"serving the station for {where} on http://{shown}:{port}/ (Ctrl-C stops)")
    if proxied:
        print("  behind a reverse proxy: every request needs the station or office key")
    elif not is_loopback(host):
        print("  network requests need the station or office key; put TLS in front (README)")
    run_server(app, host, port)


def run_server(app: object, host: str, port: int) -> None:
    """uvicorn until Ctrl-C: no access log (it would hold addresses, never keys), no
    server banner, and proxy headers left to the guard (``access``)."""
    import uvicorn

    uvicorn.run(
        app,  # type: ignore[arg-type]
        host=host,
        port=port,
        log_level="warning",
        access_log=False,
        server_header=False,
        proxy_headers=False,
    )
