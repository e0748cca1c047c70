"""The terminal guard: text stored in the log never sends the terminal a command.

A log written before the store refused control characters (or edited by hand)
can hold ESC sequences (colour, cursor moves, ECMA-48 §8.3), OSC 8 hyperlinks,
BEL, backspace and the bidirectional overrides of Unicode UAX #9 (which make
text read in another order than it is stored).  Every command that prints
stored text is walked on such a log, in its text, JSON and CSV forms; nothing it
prints to stdout or stderr may carry a raw character of ``fields.CONTROL`` but
the line feed.  The characters are read with the standard ``unicodedata``
module (categories Cc and Cf), not with the code's own pattern.
"""

from __future__ import annotations

import shutil
import sqlite3
import unicodedata
from pathlib import Path

import pytest
from cli_walk import LEAVES, argv, baselines, build_shop, check_answer, invoke

HOSTILE = (
    "\x1b[31mred\x1b[0m \x1b]8;;http://evil.example/\x07link\x1b]8;;\x07 "
    "\u202eesrever\u202c \u2066iso\u2069 bell\x07 back\x08space \x9b2J csi"
)
# free text of the log: table -> columns (keys and names in the second walk)
FREE_TEXT = {
    "saws": ("notes", "source"),
    "blades": ("grade", "supplier", "lot", "notes"),
    "fittings": ("break_in_how",),
    "cuts": ("job", "heat", "note", "feed_setting"),
    "events": ("location", "note"),
    "jobs": ("name", "file", "customer"),
    "queue": ("mark", "part", "heat", "stock", "location"),
    "remnants": ("heat", "rack", "note"),
    "saw_notes": ("note",),
    "taps": ("said",),
}
NAMES = {"blades": ("tag",), "saws": ("name",)}


def raw_controls(text: str) -> list[str]:
    """Format and control characters (Unicode categories Cf, Cc) other than LF and the
    invisible joiners ordinary text uses (ZWJ, ZWNJ in scripts; none is stored here)."""
    return sorted({f"U+{ord(c):04X}" for c in text
                   if c != "\n" and unicodedata.category(c) in ("Cc", "Cf")})  # fmt: skip


@pytest.fixture(scope="module")
def shop(tmp_path_factory) -> dict[str, Path]:
    """The walk's shop, with a retired blade (lives to group) and a fitted one."""
    shop = build_shop(tmp_path_factory.mktemp("shop"))
    for args in (["blade", "retire", "B-017", "--cause", "dull"],
                 ["blade", "fit", "B-018", "--saw", "bay 2"],
                 ["log", "cut", "304", "round", "60mm", "--cuts", "3"]):  # fmt: skip
        code, _out, err = invoke([*args, "--db", str(shop["log"])])
        assert code == 0, (args, err)
    return shop


def poisoned(shop, folder: Path, columns: dict[str, tuple[str, ...]]) -> Path:
    log = folder / "log.sqlite"
    shutil.copyfile(shop["log"], log)
    conn = sqlite3.connect(log)
    with conn:  # as an older log could hold it: straight into the file
        for table, names in columns.items():
            for column in names:
                if column in ("tag", "name"):
                    conn.execute(f"UPDATE {table} SET {column} = {column} || ?", (HOSTILE,))
                else:
                    conn.execute(f"UPDATE {table} SET {column} = ?", (HOSTILE,))
    conn.close()
    return log


EXTRA = [
    ["life", "--group-by", "supplier"],
    ["life", "--group-by", "lot"],
    ["life", "--group-by", "saw"],
    ["life", "--group-by", "blade-type,lot"],
    ["life", "--chart"],
    ["forecast", "--area", "5m2"],
    ["blade", "show", "B-017", "--chart"],
    ["blade", "list", "--status", "retired"],
    ["chart", "weibull"],
    ["chart", "modes"],
    ["chart", "cost"],
    ["chart", "wear", "B-017"],
    ["log", "list", "--limit", "3"],
    ["blade", "fit", "B-0", "--saw", "bay"],  # did you mean ...?
    ["blade", "show", "B-01"],
    ["log", "cut", "304", "round", "60mm", "--saw", "bay"],
    ["cut", "304", "round", "60mm", "--economics"],
    ["cut", "304", "round", "60mm", "--economics", "--json"],
    ["forecast", "--area", "5m2", "--json"],
]


def commands(shop) -> list[list[str]]:
    """Every command's valid invocation, with --json and --csv where it has them, and the
    extras."""
    out = []
    values = baselines(shop)
    for path, command in LEAVES:
        if path in (("serve",), ("config", "set"), ("config", "unset")):
            continue  # serve would serve; config holds no stored text
        args = argv(path, command, values[path])
        out.append(args)
        for form in ("--json", "--csv"):
            if any(form in p.opts for p in command.params):
                out.append([*args[: len(path)], form, *args[len(path) :]])
    return out + EXTRA


SHOWN = "\\x1b]8;;http://evil.example/\\x07link"  # the hostile text as the guard shows it


def walk(shop, tmp_path, monkeypatch, columns) -> tuple[list[str], set[str]]:
    """What leaked a raw control character, and which commands showed the text escaped."""
    found, shown = [], set()
    for i, args in enumerate(commands(shop)):
        folder = tmp_path / f"run{i}"
        folder.mkdir()
        monkeypatch.chdir(folder)  # what a command writes (export, backup, copy) lands here
        log = poisoned(shop, folder, columns)
        cut = args.index("--") if "--" in args else len(args)  # options before the "--"
        code, out, err = invoke([*args[:cut], "--db", str(log), *args[cut:]])
        check_answer(code, err, " ".join(args))
        for stream, text in (("stdout", out), ("stderr", err)):
            if raw_controls(text):
                found.append(f"{' '.join(args)} ({stream}): {raw_controls(text)}")
            if SHOWN in text:
                shown.add(" ".join(a for a in args if not a.startswith("/")))
    return found, shown


def test_stored_free_text_sends_the_terminal_nothing(shop, tmp_path, monkeypatch):
    found, shown = walk(shop, tmp_path, monkeypatch, FREE_TEXT)
    assert found == [], "\n".join(found)
    # the walk reached the text: these show it, escaped
    assert {"blade show -- B-017", "blade list", "life --group-by supplier",
            "life --group-by lot", "log list", "saw list", "chart cost"} <= shown  # fmt: skip


def test_stored_tags_and_saw_names_send_the_terminal_nothing(shop, tmp_path, monkeypatch):
    found, shown = walk(shop, tmp_path, monkeypatch, NAMES)
    assert found == [], "\n".join(found)
    assert {"blade list", "log cut -- 304 round 60mm", "life --group-by saw", "saw list"} <= shown


def test_did_you_mean_shows_a_stored_tag_escaped(shop, tmp_path):
    """A suggestion repeats a stored tag: it goes through the same escape as a table."""
    log = tmp_path / "log.sqlite"
    shutil.copyfile(shop["log"], log)
    conn = sqlite3.connect(log)
    with conn:
        conn.execute("UPDATE blades SET tag = ? WHERE tag = 'B-018'", ("B-18\x1b[2J",))
        conn.execute("UPDATE saws SET name = ?", ("bay\u202e2",))
    conn.close()
    code, out, err = invoke(["blade", "show", "B-18", "--db", str(log)])
    assert code == 4 and out == ""
    assert "did you mean B-18\\x1b[2J?" in err and raw_controls(err) == []
    code, out, err = invoke(["log", "cut", "304", "round", "60mm", "--db", str(log)])
    assert code == 0, err
    assert "(bay\\u202e2)" in out and raw_controls(out) == []


def test_a_fitted_blade_names_the_stored_saw_escaped(shop, tmp_path):
    log = tmp_path / "log.sqlite"
    shutil.copyfile(shop["log"], log)
    conn = sqlite3.connect(log)
    with conn:  # a blade on the saw, whose tag the log holds with an ESC sequence
        conn.execute("UPDATE blades SET tag = 'B-18\x1b]0;owned\x07' WHERE tag = 'B-018'")
    conn.close()
    code, out, err = invoke(["blade", "add", "B-30", "--pitch", "3/4", "--blade-width", "27mm",
                             "--blade-thickness", "0.9mm", "--db", str(log)])  # fmt: skip
    assert code == 0, err
    code, out, err = invoke(["blade", "fit", "B-30", "--saw", "BAY 2", "--db", str(log)])
    assert code == 0, err
    assert "blade B-18\\x1b]0;owned\\x07 was taken off bay 2" in out
    assert raw_controls(out + err) == []


def test_json_escapes_what_a_terminal_would_run_and_keeps_the_text():
    import json

    from sawplan.fields import CONTROL
    from sawplan.render import to_json

    every = "".join(chr(c) for c in range(0x3000) if CONTROL.match(chr(c)))
    text = to_json({"note": HOSTILE, "every": every}, kind="test")
    assert raw_controls(text) == []
    assert json.loads(text)["note"] == HOSTILE and json.loads(text)["every"] == every
