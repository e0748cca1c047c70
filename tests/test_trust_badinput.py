"""Every command, every argument and option, fed the values people really mistype.

The list of commands is read from the Typer app itself, so a command added
later is walked too (and ``test_every_command_has_a_baseline`` asks for a
valid invocation to start from).  For each parameter the walk swaps in each
bad value and asserts what DEVELOPERS.md promises: no traceback, never the
"internal error" code 1, and on failure exactly one line on stderr with one
of the documented exit codes (2 usage, 3 bad data, 4 not found, 5 conflict,
6 damaged file, 7 storage).  A value that is clearly invalid for that kind of
parameter (a mass for a length, a negative count, ``nan``, ``1e308mm``, an
empty date, digits of another script...) must never exit 0.

Runs in-process through the real error boundary, in a sandbox folder eight
levels deep so the path-traversal value lands on a planted ``etc/passwd``
inside the test's own temporary folder.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from cli_walk import LEAVES, argv, baselines, build_shop, check_answer, invoke

from sawplan.cli.app import run
from sawplan.cli.boundary import run_guarded

DEPTH = 8
TRAVERSAL = "/".join([".."] * DEPTH) + "/etc/passwd"
LONG = "x" * 10_000
BAD_VALUES: dict[str, str] = {
    "wrong unit": "7kg",
    "negative": "-5",
    "zero": "0",
    "huge": "1e308mm",
    "nan": "nan",
    "empty": "",
    "diameter sign": "⌀60mm",
    "other script digits": "६०mm",
    "10k characters": LONG,
    "path traversal": TRAVERSAL,
}

# Parameters whose values are the user's own words: anything short may be accepted.
FREE_TEXT = {"note", "notes", "job", "heat", "location", "supplier", "lot", "grade", "break_in_how"}
NEW_NAMES = {("saw", "add", "name"), ("blade", "add", "tag")}
FILTERS = {("log", "list", "saw"), ("log", "list", "job")}  # an unknown value matches nothing
OUTPUT_PATHS = {
    "csv_dir",
    "sheet",
    ("export", "csvdir"),
    ("backup", "file"),
    ("db", "copy", "target"),
}
# "0" is meaningful here: a free blade, an occasional lift, "all entries"
ZERO_OK = {
    ("blade", "add", "price"),
    ("weigh", "lifts_per_min"),
    ("weigh", "twist"),  # no twist: the standard lift
    ("log", "list", "limit"),
}


@pytest.fixture(scope="module")
def shop(tmp_path_factory) -> dict[str, Path]:
    return build_shop(tmp_path_factory.mktemp("shop"))


def may_succeed(path: tuple[str, ...], name: str, label: str, value: str) -> bool:
    """Whether exit 0 is an acceptable answer to this value for this parameter."""
    key = (*path, name)
    if key in FILTERS:
        return True
    if name in FREE_TEXT or key in NEW_NAMES:
        return label != "10k characters"  # stored text has a length limit
    if name in OUTPUT_PATHS or key in OUTPUT_PATHS:
        return label != "10k characters"  # any other name is a file the user may want
    if name == "section" and label == "diameter sign":
        return True  # "round ⌀60mm" and "⌀60mm" are a 60 mm round, as the tool prints it
    if name == "db":  # a new name starts a new log (or reads as an empty one)
        return label not in ("10k characters", "empty", "path traversal")
    return label == "zero" and key in ZERO_OK


def test_every_command_has_a_baseline(shop):
    missing = [" ".join(path) for path, _cmd in LEAVES if path not in baselines(shop)]
    assert missing == [], (
        f"add a valid invocation of `sawplan {', '.join(missing)}` to baselines() so the "
        "bad-input walk starts from a command that works"
    )


@pytest.mark.parametrize(("path", "command"), LEAVES, ids=[" ".join(p) for p, _c in LEAVES])
def test_bad_values_get_one_line_and_a_documented_code(shop, tmp_path, monkeypatch, path, command):
    work = tmp_path.joinpath(*[f"d{i}" for i in range(DEPTH)])
    work.mkdir(parents=True)
    (tmp_path / "etc").mkdir()
    (tmp_path / "etc" / "passwd").write_text("root:x:0:0:root:/root:/bin/sh\n", encoding="utf-8")
    monkeypatch.chdir(work)
    # `sawplan serve` builds its application and checks its options, then would serve forever
    monkeypatch.setattr("sawplan.station.serve.run_server", lambda app, host, port: None)
    db = work / "log.sqlite"
    takes_db = any(p.name == "db" for p in command.params)
    base = dict(baselines(shop).get(path, {}))

    def attempt(values: dict[str, object]) -> tuple[int, str, str]:
        shutil.copyfile(shop["log"], db)
        args = argv(path, command, values)
        if takes_db and "db" not in values:
            args[len(path) : len(path)] = ["--db", str(db)]
        return invoke(args)

    if path in baselines(shop):
        code, _out, err = attempt(base)
        assert code == 0, f"the baseline of `sawplan {' '.join(path)}` fails: {err}"

    for param in command.params:
        if getattr(param, "is_flag", False) or param.name in ("help",):
            continue
        cases: list[tuple[str, object]] = list(BAD_VALUES.items())
        if param.nargs == -1:  # a section: the bad value as a size, and alone
            cases = [(label, ["round", v]) for label, v in BAD_VALUES.items()]
            cases += [(f"{label} alone", [v]) for label, v in BAD_VALUES.items()]
        if param.name == "db":
            cases += [
                ("a folder", str(shop["root"])),
                ("a job file", str(shop["job"])),
                ("another program's database", str(shop["foreign"])),
                ("a damaged database", str(shop["garbage"])),
            ]
        for label, value in cases:
            code, _out, err = attempt({**base, param.name: value})
            what = f"sawplan {' '.join(path)} {param.opts[0]} <{label}>"
            check_answer(code, err, what)
            text = value if isinstance(value, str) else " ".join(value)
            if code == 0 and not may_succeed(path, param.name, label.removesuffix(" alone"), text):
                pytest.fail(f"{what} was accepted (exit 0); a clearly invalid value")


def test_the_long_value_is_shortened_in_the_message(tmp_path):
    code, _out, err = invoke(["blade", "show", LONG, "--db", str(tmp_path / "log.sqlite")])
    assert code == 4
    assert err.count("\n") == 1 and len(err) < 300
    assert "10,002 characters" in err  # the 10,000 x's and the quotes around them


def test_a_value_naming_no_real_unit_says_what_to_type(cli):
    result = cli("weigh", "4140", "round", "60mm", "--length", "7kg")
    assert result.code == 2
    assert result.err == (
        "error: piece length: expected a length, got '7kg' (e.g. 60mm, 2.5in, 7-1/4 in, 3' 6\")\n"
    )


def test_digits_of_another_script_are_refused_not_guessed(cli):
    result = cli("weigh", "4140", "round", "६०mm", "--length", "1m")
    assert result.code == 2
    assert "digits 0-9" in result.err


def test_debug_shows_the_traceback():
    with pytest.raises(Exception, match="expected a length"):
        run_guarded(run, ["weigh", "4140", "round", "60mm", "--length", "7kg", "--debug"])
