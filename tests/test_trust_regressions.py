"""Regressions found by the fuzzers, pinned as plain cases."""

from __future__ import annotations

import pytest


def test_import_of_a_saw_row_without_its_profile_is_one_line(cli, tmp_path):
    # found by test_a_mangled_export_imports_whole_or_not_at_all: a stray "[" line in
    # saws.csv became a saw named "[" with no sizes and crashed the import
    source, target = tmp_path / "a.sqlite", tmp_path / "b.sqlite"
    assert cli("saw", "add", "bay 2", "--like", "mid-production", "--db", str(source)).code == 0
    assert cli("export", str(tmp_path / "csv"), "--db", str(source)).code == 0
    with (tmp_path / "csv" / "saws.csv").open("a", encoding="utf-8") as handle:
        handle.write("[\n")
    result = cli("import", str(tmp_path / "csv"), "--db", str(target))
    assert result.code == 3
    assert "saws.csv row 2" in result.err and "kind" in result.err
    assert "Traceback" not in result.err and "internal error" not in result.err
    listing = cli("saw", "list", "--db", str(target))
    assert "bay 2" not in listing.out  # all rows or none


@pytest.mark.parametrize(
    ("args", "words"),
    [
        pytest.param(("log", "list", "--limit", "abc"), "expected a whole number", id="limit"),
        pytest.param(
            ("chart", "wear", "--chart-height", "x"), "expected a whole number", id="height"
        ),
        pytest.param(
            ("plan", "job.toml", "--time-limit", "1.2.3"), "expected a number", id="limit-s"
        ),
        pytest.param(("cut", "304", "round", "50mm", "-u", "imperial"), "not one of", id="units"),
    ],
)
def test_number_option_refusal_speaks_plainly(cli, args, words) -> None:
    """typer's validator words ("Input should be a valid integer...") become the shop's."""
    result = cli(*args)
    assert result.code == 2
    assert words in result.err
    assert "Input should be" not in result.err and "Value error" not in result.err
    assert len(result.err.strip().splitlines()) == 1


def test_imported_cell_refusal_names_its_column_once(cli, tmp_path) -> None:
    """A stored-value rule refusing an imported cell: 'supplier: supplier: ...' once said it twice."""
    import csv

    source = str(tmp_path / "a.sqlite")
    blade = ("B-1", "--pitch", "4/6", "--blade-width", "27mm", "--blade-thickness", "0.9mm")
    blade += ("--blade-length", "3505mm", "--supplier", "Ashfold", "--db", source)
    assert cli("blade", "add", *blade).code == 0
    assert cli("export", str(tmp_path / "set"), "--db", source).code == 0
    blades = tmp_path / "set" / "blades.csv"
    with blades.open(newline="", encoding="utf-8") as handle:
        rows = list(csv.reader(handle))
    rows[1][rows[0].index("supplier")] = "a\rb"
    with blades.open("w", newline="", encoding="utf-8") as handle:
        csv.writer(handle).writerows(rows)
    result = cli("import", str(tmp_path / "set"), "--db", str(tmp_path / "b.sqlite"))
    assert result.code == 3
    assert "supplier: supplier" not in result.err
    assert "supplier: must not hold control characters" in result.err


@pytest.mark.parametrize("kind", ["pipe", "device"])
def test_a_pipe_or_device_named_as_the_log_is_refused_before_sqlite_opens_it(cli, tmp_path, kind):
    """A FIFO as --db once gave SQLite's "disk I/O error" (exit 7); /dev/null the same."""
    import os

    if kind == "pipe":
        target = tmp_path / "log.sqlite"
        os.mkfifo(target)
    else:
        target = "/dev/null"
    result = cli("blade", "list", "--db", str(target))
    assert result.code == 2
    assert f"is a {kind}, not a log file" in result.err
    assert len(result.err.strip().splitlines()) == 1
