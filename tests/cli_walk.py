"""The command walk the bad-input tests share: every command of the Typer app, a small
shop to run them in, and a valid invocation of each to start from.

``LEAVES`` is read from the app itself, so a command added later is walked too
(``test_every_command_has_a_baseline`` asks for a baseline).  ``check_answer``
is what DEVELOPERS.md promises of any answer: no traceback, never the internal
error code 1, and on failure one line on stderr with an exit code of
``sawplan.errors.ExitCode``.
"""

from __future__ import annotations

import contextlib
import csv
import io
import shutil
import sqlite3
from pathlib import Path

import typer

from sawplan.cli.app import app, run
from sawplan.cli.boundary import run_guarded
from sawplan.errors import ExitCode

# what a refusal may exit with: every documented code but success, the internal error and
# "plan incomplete" (which prints a plan); 130 is Ctrl-C, which no walk presses
DOCUMENTED_FAILURES = {int(c) for c in ExitCode} - {0, 1, int(ExitCode.PLAN_INCOMPLETE)}


def invoke(args: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, args)
    return code, out.getvalue(), err.getvalue()


def _walk(command, path=()):
    if isinstance(getattr(command, "commands", None), dict):
        for name, sub in command.commands.items():
            yield from _walk(sub, (*path, name))
    else:
        yield path, command


LEAVES = list(_walk(typer.main.get_command(app)))


# --- the shop the walk starts from --------------------------------------------------------


def build_shop(root: Path) -> dict[str, Path]:
    """A blade log with a saw, two blades (one fitted) and cuts; a job; a CSV folder."""
    log = root / "template.sqlite"

    def ok(*args: str, db: Path = log) -> None:
        code, _out, err = invoke([*args, "--db", str(db)])
        assert code == 0, (args, err)

    ok("saw", "add", "bay 2", "--like", "mid-production")
    ok("blade", "add", "B-017", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
       "--price", "60")  # fmt: skip
    ok(
        "blade",
        "add",
        "B-018",
        "--pitch",
        "4/6",
        "--blade-width",
        "27mm",
        "--blade-thickness",
        "0.9mm",
    )
    ok("blade", "fit", "B-017", "--saw", "bay 2")
    for _ in range(3):
        ok("log", "cut", "304", "round", "60mm", "--cuts", "5", "--time", "10min")
    ok("log", "event", "B-017", "teeth-lost", "--teeth", "2", "--note", "hard spot")
    station_rows(log)
    other = root / "other.sqlite"
    ok("blade", "add", "B-900", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
       db=other)  # fmt: skip
    code, _out, err = invoke(["export", str(root / "csv-in"), "--db", str(other)])
    assert code == 0, err
    job = root / "job.toml"
    shutil.copy(Path(__file__).parent / "data" / "plan_small.toml", job)
    foreign = root / "foreign.sqlite"
    conn = sqlite3.connect(foreign)
    conn.execute("CREATE TABLE invoices (id INTEGER PRIMARY KEY)")
    conn.close()
    garbage = root / "garbage.sqlite"
    garbage.write_bytes(b"SQLite format 3\x00" + bytes(range(256)) * 16)
    ok("backup", str(root / "backup.sqlite"))
    return {"root": root, "log": log, "job": job, "csv": root / "csv-in", "foreign": foreign,
            "garbage": garbage, "backup": root / "backup.sqlite"}  # fmt: skip


def station_rows(log: Path) -> None:
    """A remnant, a note and two taps (one a correction), so the station's columns are walked."""
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.station_rows import RemnantEntry, Saved, add_note, once, rack_remnant

    day = parse_day(None)
    with connect(log) as db:
        rack_remnant(db, RemnantEntry(length_mm=420.0, racked_on=day, saw="bay 2", heat="H-1",
                                      rack="R2", note="kept"))  # fmt: skip

        def note() -> Saved:
            add_note(db, "bay 2", "coolant low", on=day)
            return Saved("Note saved: coolant low")

        once(db, "a" * 32, "note", note, at=f"{day}T08:00:00+00:00", saw_name="bay 2")
        once(db, "b" * 32, "fix", lambda: Saved("Corrected", 1, None, '{"time_min":[10.0,9.5]}'),
             at=f"{day}T08:05:00+00:00", saw_name="bay 2")  # fmt: skip


def baselines(shop: dict[str, Path]) -> dict[tuple[str, ...], dict[str, object]]:
    """A valid invocation of every command: parameter name -> value."""
    return {
        ("plan",): {"jobfile": str(shop["job"])},
        ("cut",): {"material": "4140", "section": ["round", "60mm"]},
        ("weigh",): {"material": "4140", "section": ["round", "60mm"], "length": "1m"},
        ("materials",): {},
        ("life",): {},
        ("forecast",): {"area": "5m2"},
        ("export",): {"csvdir": "out"},
        ("import",): {"csvdir": str(shop["csv"])},
        ("backup",): {"file": "copy.sqlite"},
        ("check",): {},
        ("restore",): {"file": str(shop["backup"]), "db": "restored.sqlite"},
        ("db", "copy"): {"source": str(shop["log"]), "target": "copied.sqlite"},
        ("db", "upgrade"): {},
        ("saw", "add"): {"name": "bay 9", "like": "mid-production"},
        ("saw", "list"): {},
        ("blade", "add"): {"tag": "B-100", "pitch": "3/4", "width": "27mm", "thickness": "0.9mm"},
        ("blade", "fit"): {"tag": "B-018", "saw": "bay 2"},
        ("blade", "remove"): {"tag": "B-017"},
        ("blade", "retire"): {"tag": "B-017", "cause": "dull"},
        ("blade", "list"): {},
        ("blade", "show"): {"tag": "B-017"},
        ("log", "cut"): {"material": "304", "section": ["round", "60mm"]},
        ("log", "event"): {"tag": "B-017", "kind": "teeth-lost"},
        ("log", "list"): {},
        ("chart", "wear"): {"tag": "B-017"},
        ("chart", "weibull"): {},
        ("chart", "modes"): {},
        ("chart", "cost"): {},
        ("config", "show"): {},
        ("config", "set"): {"key": "units", "value": "us"},
        ("config", "unset"): {"key": "units"},
        ("serve",): {},  # served on 127.0.0.1; the walks never start uvicorn (see run_server)
    }


def argv(path: tuple[str, ...], command, values: dict[str, object]) -> list[str]:
    options: list[str] = []
    positional: list[str] = []
    for param in command.params:
        if param.name not in values:
            continue
        value = values[param.name]
        if param.param_type_name == "option":
            options += [param.opts[0], str(value)]
        else:
            positional += value if isinstance(value, list) else [str(value)]
    # "--" so a positional value such as "-5" is read as a value, not an option
    return [*path, *options, "--", *positional] if positional else [*path, *options]


def check_answer(code: int, err: str, what: str) -> None:
    assert "Traceback" not in err, what
    assert code != 1, f"{what}: internal error: {err}"
    if code != 0:
        assert code in DOCUMENTED_FAILURES, f"{what}: exit {code}: {err}"
        assert err.endswith("\n") and err.count("\n") == 1, f"{what}: not one line: {err!r}"
        assert err.startswith("error: "), f"{what}: {err!r}"
        assert len(err) <= 600, f"{what}: a {len(err)}-character line"


def set_first_cell(path: Path, column: str, cell: str) -> None:
    """Write ``cell`` into ``column`` of the first data row of the CSV file ``path``."""
    with path.open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    rows[0][column] = cell
    with path.open("w", encoding="utf-8", newline="") as handle:
        writer = csv.DictWriter(handle, list(rows[0]))
        writer.writeheader()
        writer.writerows(rows)
