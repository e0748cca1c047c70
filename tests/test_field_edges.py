"""Every command driven with values at the edges of the field table and beyond them.

The walk is built from ``sawplan.fields`` and the Typer app: each option of each
command whose field has a range (or a text length), each section size and each
blade tag is given values drawn from its field's edges (the bounds themselves,
a hair inside and outside them, zero, negatives, 1e308, 1e-300, ±inf, nan, a
400-digit number, control characters, text one character too long) and from
inside the range.  The same is done to every column of an exported log that
the field table rules, read back with ``sawplan import``.

Whatever the value, the answer keeps DEVELOPERS.md's promises: no traceback, an
exit code from ``sawplan.errors.ExitCode``, one line on a refusal, and nothing
written on a refusal (the log file's bytes are unchanged).  A value outside its field's range is never accepted, and
a value inside it is never refused with that field's own range (two rules for
one field would disagree there).
"""

from __future__ import annotations

import math
import shutil
from pathlib import Path

import pytest
from cli_walk import LEAVES, argv, baselines, build_shop, check_answer, invoke, set_first_cell
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sawplan import fields
from sawplan.errors import BadDataError, ExitCode
from sawplan.store.exchange import TABLES

# the core unit of each dimension as the command line spells it (DEVELOPERS.md, units)
CORE_UNIT = {"length": "mm", "area": "mm2", "time": "min", "speed": "m/min", "feed": "mm/min",
             "force": "N", "power": "W", "stress": "MPa"}  # fmt: skip
WALK = settings(
    max_examples=12,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
CONTROL_TEXTS = ("a\x00b", "B\x1b[2J", "\u202eevil", "del\x7f", "c1\x85", "line\u2028two")


def _rule_of(param) -> fields.Field | None:
    """The field a parameter's values obey: its option's, or a section's size, or a tag's."""
    if param.param_type_name == "argument":
        return {"section": fields.field("size"), "tag": fields.field("tag")}.get(param.name)
    long = next((o for o in param.opts if o.startswith("--")), None)
    f = fields.BY_OPTION.get(long) if long else None
    if f is None or f.choices or (f.low is None and f.high is None):
        return None
    return f


EDGES = [
    (path, command, param, rule)
    for path, command in LEAVES
    for param in command.params
    if (rule := _rule_of(param)) is not None
]
COMMANDS = sorted({path for path, *_ in EDGES})


# --- values at the edges -------------------------------------------------------------------


def _outside_numbers(f: fields.Field) -> list[float | int]:
    values: list[float | int] = [math.inf, -math.inf, math.nan, 1e308, -1.0]
    if f.low is not None:
        values.append(f.low - max(abs(f.low) * 1e-6, 1e-9) if not f.above else f.low)
    if f.high is not None:
        values.append(f.high * (1 + 1e-6) + 1e-9)
    if f.integer:
        values += [10**400, 1.5]
    return values


def _edge_numbers(f: fields.Field) -> list[float | int]:
    inside = [v for v in (f.low, f.high) if v is not None and not (v == f.low and f.above)]
    if f.integer:
        inside = [int(v) for v in inside]
    return [*inside, *_outside_numbers(f), 0, 1e-300]


def _numbers(f: fields.Field) -> st.SearchStrategy:
    low = f.low if f.low is not None else 0.0
    high = f.high if f.high is not None else 1e6
    if f.integer:
        inside: st.SearchStrategy = st.integers(int(low), int(high))
    else:
        inside = st.floats(low, high, exclude_min=f.above, allow_nan=False)
    return st.sampled_from(_edge_numbers(f)) | inside


def _edge_texts(f: fields.Field) -> list[str]:
    high = int(f.high or 300)
    return ["x" * high, "x" * (high + 1), *CONTROL_TEXTS]


def _texts(f: fields.Field) -> st.SearchStrategy:
    return st.sampled_from(_edge_texts(f)) | st.text(min_size=1, max_size=int(f.high or 300) + 2)


def values_of(f: fields.Field) -> st.SearchStrategy:
    return _texts(f) if f.is_text else _numbers(f)


def inside(f: fields.Field, value: object) -> bool:
    """Whether the field table takes ``value`` (text: once its white space is collapsed)."""
    try:
        if f.is_text:
            fields.check_text(f, value)  # type: ignore[arg-type]
        else:
            fields.check(f, value)  # type: ignore[arg-type]
    except BadDataError:
        return False
    return True


def spelled(f: fields.Field, value: object) -> str:
    """The value as a user types it: a number with the field's core unit (``0.1mm``)."""
    if f.is_text:
        return str(value)
    text = repr(value) if isinstance(value, float) else str(value)
    if f.key == "capacity_rect":
        return f"{text}x{text}mm"
    return text + CORE_UNIT.get(f.dimension or "", "")


# --- the command line ----------------------------------------------------------------------


@pytest.fixture(scope="module")
def shop(tmp_path_factory) -> dict[str, Path]:
    return build_shop(tmp_path_factory.mktemp("shop"))


@pytest.fixture(autouse=True)
def _never_serve(monkeypatch):
    """`sawplan serve` checks its options and builds its application, then would serve."""
    monkeypatch.setattr("sawplan.station.serve.run_server", lambda app, host, port: None)


def attempt(shop, work: Path, path, command, param, f: fields.Field, value: object) -> None:
    """Run the command with ``value`` for ``param`` and hold the answer to the promises."""
    db = work / "log.sqlite"
    shutil.copyfile(shop["log"], db)
    before = db.read_bytes()
    text = spelled(f, value)
    values = dict(baselines(shop)[path])
    if param.name == "section":
        values["section"] = ["round", text]
    else:
        values[param.name] = text
    args = argv(path, command, values)
    if any(p.name == "db" for p in command.params) and "db" not in values:
        args[len(path) : len(path)] = ["--db", str(db)]
    code, _out, err = invoke(args)
    what = f"sawplan {' '.join(path)} {param.name}={text[:60]!r}"
    check_answer(code, err, what)
    assert code in {int(c) for c in ExitCode}, what
    if inside(f, value):
        assert f"{f.words}: must be {f.range_text()}" not in err, f"{what}: refused inside"
    else:
        assert code != 0, f"{what}: a value outside {f.words} {f.range_text()} was accepted"
    if code not in (0, ExitCode.PLAN_INCOMPLETE):
        assert db.read_bytes() == before, f"{what}: refused, yet the log was written"


def test_the_walk_reaches_every_ranged_option():
    keys = {f.key for *_, f in EDGES}
    ranged = {f.key for f in fields.FIELDS.values() if f.option and (f.low or f.high)}
    used = {
        f.key
        for _p, command in LEAVES
        for param in command.params
        if (f := fields.BY_OPTION.get(param.opts[0])) is not None
    }
    assert (ranged & used) - keys == set()
    assert {"size", "tag", "band_speed", "blade_price", "count", "limit"} <= keys


@pytest.mark.parametrize(
    ("path", "command", "param", "f"),
    EDGES,
    ids=[f"{' '.join(p)} {param.name}" for p, _c, param, _f in EDGES],
)
def test_each_edge_of_each_option(shop, tmp_path, monkeypatch, path, command, param, f):
    monkeypatch.chdir(tmp_path)
    values = _edge_texts(f) if f.is_text else _edge_numbers(f)
    for value in values:
        attempt(shop, tmp_path, path, command, param, f, value)


@pytest.mark.parametrize("path", COMMANDS, ids=[" ".join(p) for p in COMMANDS])
@WALK
@given(data=st.data())
def test_values_drawn_from_the_field_table(shop, tmp_path, monkeypatch, path, data):
    monkeypatch.chdir(tmp_path)
    _p, command, param, f = data.draw(st.sampled_from([e for e in EDGES if e[0] == path]))
    attempt(shop, tmp_path, path, command, param, f, data.draw(values_of(f)))


# --- an import -----------------------------------------------------------------------------

# every column of an export that a field rules, but a cut's area (its rule is one cut's:
# the area divided by the count, tested in test_plausible_ranges)
COLUMNS = [
    (table, column, rule)
    for table, columns in TABLES.items()
    for column in columns
    if (rule := fields.field_for(f"{table}.{column}")) is not None
    and not rule.choices
    and (rule.low is not None or rule.high is not None)
    and (table, column) != ("cuts", "area_mm2")
]


@pytest.fixture(scope="module")
def exported(shop, tmp_path_factory) -> Path:
    """An export of the shop's log, and beside it an empty log to import it into."""
    from sawplan.store import connect

    root = tmp_path_factory.mktemp("exported")
    code, _out, err = invoke(["export", str(root / "csv"), "--db", str(shop["log"])])
    assert code == 0, err
    with connect(str(root / "empty.sqlite")):
        pass
    return root


def import_with(exported: Path, work: Path, table: str, column: str, cell: str) -> None:
    folder = work / "csv"
    shutil.rmtree(folder, ignore_errors=True)
    shutil.copytree(exported / "csv", folder)
    set_first_cell(folder / f"{table}.csv", column, cell)


@pytest.mark.parametrize(
    ("table", "column", "f"), COLUMNS, ids=[f"{t}.{c}" for t, c, _f in COLUMNS]
)
def test_each_edge_of_each_imported_column(exported, tmp_path, table, column, f):
    values = _edge_texts(f) if f.is_text else _edge_numbers(f)
    for n, value in enumerate(values):
        cell = str(value) if f.is_text or isinstance(value, int) else repr(value)
        import_with(exported, tmp_path, table, column, cell)
        target = tmp_path / f"log-{n}.sqlite"
        shutil.copyfile(exported / "empty.sqlite", target)
        before = target.read_bytes()
        code, _out, err = invoke(["import", str(tmp_path / "csv"), "--db", str(target)])
        what = f"import {table}.{column}={cell[:60]!r}"
        check_answer(code, err, what)
        if not inside(f, value):
            assert code != 0, f"{what}: a value outside {f.words} {f.range_text()} was imported"
        if code != 0:
            assert target.read_bytes() == before, f"{what}: refused, yet the log was written"


# --- what a value at an edge does to the commands that read it later ------------------------

# each writer, the blade its value lands on, and the steps that give that blade a life
_USE = [["log", "cut", "304", "round", "60mm", "--cuts", "5", "--time", "10min", "--blade"]]
LATER: dict[tuple[str, ...], tuple[str, list[list[str]]]] = {
    ("saw", "add"): ("B-018", [["blade", "fit", "B-018", "--saw", "bay 9"], [*_USE[0], "B-018"]]),
    ("blade", "add"): ("B-100", [["blade", "fit", "B-100", "--saw", "bay 2"], [*_USE[0], "B-100"]]),
    ("blade", "fit"): ("B-018", [[*_USE[0], "B-018"]]),
    ("log", "cut"): ("B-017", []),
    ("log", "event"): ("B-017", []),
}
IDENTITIES = {"tag", "blade", "saw", "name", "section"}  # values other steps look blades up by


def _stored_cases() -> list[tuple[tuple[str, ...], object, dict[str, str], str]]:
    """(command, its click command, values, label): each number at each end of its range
    alone, and every text option of a command at its longest at once."""
    cases = []
    for path in LATER:
        edges = [e for e in EDGES if e[0] == path and e[2].name not in IDENTITIES]
        command = next(c for p, c in LEAVES if p == path)
        for _p, _c, param, f in edges:
            if f.is_text:
                continue
            for end, value in (("low", f.low), ("high", f.high)):
                if value is not None:
                    number = int(value) if f.integer else value
                    cases.append((path, command, {param.name: spelled(f, number)},
                                  f"{' '.join(path)} {param.name} {end}"))  # fmt: skip
        texts = {param.name: "x" * int(f.high or 300) for _p, _c, param, f in edges if f.is_text}
        if texts:
            cases.append((path, command, texts, f"{' '.join(path)} longest text"))
    return cases


STORED = _stored_cases()


def _readers(tag: str, job: Path, work: Path) -> list[list[str]]:
    return [
        ["blade", "show", tag], ["life"], ["chart", "cost"], ["chart", "wear", tag],
        ["forecast", "--area", "5m2"], ["cut", "304", "round", "60mm", "--economics"],
        ["plan", str(job)], ["export", str(work / "again")],
    ]  # fmt: skip


@pytest.mark.parametrize(
    ("path", "command", "edge"), [c[:3] for c in STORED], ids=[c[3] for c in STORED]
)
def test_a_stored_edge_value_keeps_later_commands_working(
    shop, exported, tmp_path, monkeypatch, path, command, edge
):
    monkeypatch.chdir(tmp_path)
    tag, steps = LATER[path]
    db = tmp_path / "log.sqlite"
    shutil.copyfile(shop["log"], db)
    values = {**baselines(shop)[path], **edge}
    if path == ("saw", "add"):
        values["name"] = "bay 9"
    args = argv(path, command, values)
    args[len(path) : len(path)] = ["--db", str(db)]
    code, _out, err = invoke(args)
    what = f"sawplan {' '.join(path)} {', '.join(f'{k}={v[:20]!r}' for k, v in edge.items())}"
    check_answer(code, err, what)
    for key in edge:
        f = next(f for p, _c, param, f in EDGES if p == path and param.name == key)
        assert f"{f.words}: must be {f.range_text()}" not in err, f"{what}: refused inside"
    if code != 0:  # refused by a rule between values (a cut's area beyond its section)
        return
    for step in [*steps, ["blade", "retire", tag, "--failure", "dull"]]:
        check_answer(*invoke([*step, "--db", str(db)])[::2], f"{what}, then {step}")
    for reader in _readers(tag, shop["job"], tmp_path):
        code, _out, err = invoke([*reader, "--db", str(db)])
        check_answer(code, err, f"{what}, then sawplan {' '.join(reader)}")
        assert code in (0, ExitCode.PLAN_INCOMPLETE) or reader[0] == "forecast", (
            f"{what}, then sawplan {' '.join(reader)}: {err}"
        )
    target = tmp_path / "again.sqlite"
    shutil.copyfile(exported / "empty.sqlite", target)
    code, _out, err = invoke(["import", str(tmp_path / "again"), "--db", str(target)])
    assert code == 0, f"{what}: its export does not import: {err}"
