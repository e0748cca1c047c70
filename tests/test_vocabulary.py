"""One vocabulary: every option of every command comes from the field table.

A concept has one option name, one short flag and one placeholder everywhere;
placeholders never show Python types; old spellings still work for one release
with a note on stderr.
"""

from __future__ import annotations

import re

import pytest
import typer

from sawplan import fields
from sawplan.cli.app import app
from sawplan.cli.options import RENAMED

_PYTHON_TYPE = re.compile(r"<|>|\b(str|int|float|bool|path|list|dict|NoneType)\b")


def _walk(command, path=()):
    if isinstance(getattr(command, "commands", None), dict):
        for name, sub in command.commands.items():
            yield from _walk(sub, (*path, name))
    else:
        yield " ".join(path), command


COMMANDS = list(_walk(typer.main.get_command(app)))


def _options(command):
    return [p for p in command.params if p.param_type_name == "option" and p.name != "help"]


def test_the_table_spells_each_concept_once():
    seen: dict[str, str] = {}
    for f in fields.FIELDS.values():
        for spelling in (f.option, f.short, f.negative):
            if spelling:
                assert spelling not in seen, f"{spelling} means {seen[spelling]} and {f.key}"
                seen[spelling] = f.key
    words = [f.words for f in fields.FIELDS.values()]
    assert len(words) == len(set(words)), "two fields share the same words"


@pytest.mark.parametrize(("path", "command"), COMMANDS, ids=[p for p, _ in COMMANDS])
def test_every_option_is_declared_by_the_table(path, command):
    for param in _options(command):
        long = [o for o in param.opts if o.startswith("--")]
        assert len(long) == 1, f"`sawplan {path}` {param.opts}: one long name per option"
        f = fields.BY_OPTION.get(long[0])
        assert f is not None, f"`sawplan {path}` {long[0]} is not in sawplan.fields"
        shorts = [o for o in param.opts if not o.startswith("--")]
        assert shorts == ([f.short] if f.short else []), (
            f"`sawplan {path}` {long[0]} has short flag {shorts}, the table says {f.short}"
        )
        if f.negative:
            assert param.secondary_opts == [f.negative]
        assert (param.metavar or "") == f.placeholder, f"`sawplan {path}` {long[0]} placeholder"


@pytest.mark.parametrize(("path", "command"), COMMANDS, ids=[p for p, _ in COMMANDS])
def test_help_shows_placeholders_not_python_types(cli, path, command):
    text = cli(*path.split(), "--help").out
    usage = text.split(f"sawplan {path}", 1)[1].splitlines()[0]
    listed = text.split("\nArguments:", 1)[-1] if "\nArguments:" in text else ""
    for line in [usage, *listed.splitlines()]:
        name_column = line.strip().split("  ", 1)[0]
        assert not _PYTHON_TYPE.search(name_column), f"`sawplan {path} --help`: {line!r}"
    for param in command.params:
        if param.param_type_name == "argument":
            assert param.metavar and param.metavar.isupper(), f"`sawplan {path}` {param.name}"


def test_no_two_meanings_for_a_spelling_across_commands():
    meaning: dict[str, tuple[str, str]] = {}
    for path, command in COMMANDS:
        for param in _options(command):
            for spelling in param.opts + param.secondary_opts:
                key = fields.BY_OPTION[spelling].key
                first = meaning.setdefault(spelling, (key, path))
                assert first[0] == key, f"{spelling} is {first[0]} in {first[1]}, {key} in {path}"


def test_old_spellings_are_not_current_ones_in_the_same_command():
    by_path = dict(COMMANDS)
    for path, renames in RENAMED.items():
        command = by_path[path]
        current = {o for p in command.params for o in p.opts + p.secondary_opts}
        for old, new in renames.items():
            assert old not in current, f"`sawplan {path}` still declares {old}"
            assert new in current, f"`sawplan {path}` has no {new} (renamed from {old})"


@pytest.mark.parametrize(
    ("old", "new"),
    [
        pytest.param(
            ["cut", "4140", "round", "7in", "--blade-tpi", "3/4", "--json"],
            ["cut", "4140", "round", "7in", "--pitch", "3/4", "--json"],
            id="cut --blade-tpi",
        ),
        pytest.param(
            ["cut", "4140", "round", "7in", "-t", "3/4", "--json"],
            ["cut", "4140", "round", "7in", "-p", "3/4", "--json"],
            id="cut -t",
        ),
        pytest.param(
            ["cut", "4140", "round", "7in", "--blade-tpi=6/10", "--json"],
            ["cut", "4140", "round", "7in", "--pitch=6/10", "--json"],
            id="cut --blade-tpi=",
        ),
    ],
)
def test_old_spelling_works_with_a_note(cli, old, new):
    before = cli(*old)
    after = cli(*new)
    assert before.code == after.code == 0, before.err
    assert before.out == after.out
    notes = before.err.strip().splitlines()
    assert len(notes) == 1 and "is now --pitch" in notes[0], before.err
    assert after.err == ""


def test_old_blade_spellings_still_record_the_blade(cli):
    result = cli("blade", "add", "B-1", "--pitch", "3/4", "-w", "27mm", "--thickness", "0.9mm",
                 "--length", "3505mm", "--material", "carbon", "--notes", "old words", "--json")  # fmt: skip
    assert result.code == 0, result.err
    import json

    blade = json.loads(result.out)
    assert (blade["width_mm"], blade["thickness_mm"], blade["length_mm"]) == (27, 0.9, 3505)
    assert blade["blade_material"] == "carbon" and blade["notes"] == "old words"
    for old, new in [("-w", "--blade-width"), ("--thickness", "--blade-thickness"),
                     ("--length", "--blade-length"), ("--material", "--blade-material"),
                     ("--notes", "--note")]:  # fmt: skip
        assert f"{old} is now {new}" in result.err


def test_a_value_that_looks_like_an_old_option_is_left_alone(cli):
    assert cli("blade", "add", "B-1", "--pitch", "3/4", "--blade-width", "27mm",
               "--blade-thickness", "0.9mm", "--note", "--notes").code == 0  # fmt: skip
    shown = cli("blade", "show", "B-1").out
    assert "--notes" in shown
