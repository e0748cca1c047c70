"""The plain option conversions (``sawplan.cli.coercion``) against typer's own.

Typer's conversion (through pydantic) is the reference: on every option of
every command, a value the plain layer converts must come out of typer's
conversion equal and of the same type, and a value the layer hands on must
give typer's own answer or typer's own error, word for word.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.cli import coercion

ODD_TEXT = [
    "",
    " ",
    "0",
    "-0",
    "007",
    "+5",
    "1_000",
    "1e3",
    ".5",
    "5.",
    " 12 ",
    "inf",
    "nan",
    "-1.25",
    "99999999999999999999999",
    "3.14159265358979323846264338327950288",
    "US",
    "Metric",
    "metric",
    "us ",
    "a\udcffb",  # an undecodable byte on the command line (surrogate escape)
    "tab\there",
    "nul\x00byte",
    "ünïcode ⌀",
    "-",
    "~/x",
    "/tmp",
    "a/b/../c",
]


def _parameters():
    import typer

    from sawplan.cli.app import make_app

    command = typer.main.get_command(make_app())
    found = []

    def walk(node, path):
        for param in node.params:
            found.append((" ".join(path) or "sawplan", node, param))
        for name, sub in sorted(getattr(node, "commands", {}).items()):
            walk(sub, [*path, name])

    walk(command, [])
    return found


PARAMETERS = _parameters()
PLAIN = [
    pytest.param(node, param, id=f"{where} {param.name}")
    for where, node, param in PARAMETERS
    if coercion.plain_conversion(param.type_descriptor) is not None
]


def _typer_answer(param, ctx, value):
    from typer._coercion import build_runtime_param

    runtime = build_runtime_param(param.type_descriptor)
    try:
        return "ok", runtime.coerce(value, param=param, ctx=ctx)
    except Exception as err:  # noqa: BLE001 - the error is the answer compared
        return type(err).__name__, str(err)


def _plain_answer(param, ctx, value):
    convert = coercion.plain_conversion(param.type_descriptor)
    if value is None or ((param.multiple or param.nargs == -1) and isinstance(value, str)):
        return "declined", None  # typer's coerce() answers these before any conversion
    try:
        return "ok", convert(value, param, ctx)
    except coercion.Declined:
        return "declined", None


def _hooked_answer(param, ctx, value):
    from typer import core

    assert coercion.install()
    runtime = core.build_runtime_param(param.type_descriptor)
    try:
        return "ok", runtime.coerce(value, param=param, ctx=ctx)
    except Exception as err:  # noqa: BLE001
        return type(err).__name__, str(err)


def _same(a, b) -> bool:
    """Equal and of one type (NaN equal to NaN: typer passes 'nan' through as a float)."""
    if type(a) is not type(b):
        return False
    return a == b or (isinstance(a, float) and a != a and b != b)


def _check(node, param, value):
    from typer._click import Context

    ctx = Context(node)
    want = _typer_answer(param, ctx, value)
    plain = _plain_answer(param, ctx, value)
    if plain[0] == "ok":
        assert want[0] == "ok", (value, want)
        assert _same(plain[1], want[1]), (value, plain, want)
    got = _hooked_answer(param, ctx, value)
    assert got[0] == want[0] and _same(got[1], want[1]), (value, got, want)


def test_most_options_convert_plainly():
    assert coercion.install()
    assert len(PLAIN) == len(PARAMETERS)  # every option sawplan has today


@pytest.mark.parametrize(("node", "param"), PLAIN)
def test_odd_values_and_defaults_convert_as_typer_converts_them(node, param):
    values = [*ODD_TEXT, param.default, [*ODD_TEXT[:4]], (), True, False, 3, 2.5, None]
    for value in values:
        _check(node, param, value)


@settings(max_examples=150, deadline=None)
@given(
    st.sampled_from([(n, p) for _, n, p in PARAMETERS]),
    st.one_of(
        st.text(max_size=12),
        st.from_regex(r"-?[0-9]{1,22}(\.[0-9]{0,22})?", fullmatch=True),
        st.integers().map(str),
        st.floats().map(repr),
        st.lists(st.text(max_size=6), max_size=3),
    ),
)
def test_any_typed_value_converts_as_typer_converts_it(where, value):
    node, param = where
    _check(node, param, value)


def test_a_refused_number_is_refused_by_typer_in_the_shop_s_words(cli):
    refused = cli("plan", "job.toml", "--time-limit", "soon")
    assert refused.code == 2
    assert "Invalid value for '--time-limit'" in refused.err  # typer's refusal...
    assert "expected a number" in refused.err  # ...its validator's words made plain by the boundary
