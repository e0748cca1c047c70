"""The attempts of the adversarial pass (bench/adversarial_pass.py): what to run and what
a held answer is.

An ``Attempt`` is a command line run in a fresh copy of a small shop (a blade
log, a job, a CSV folder, backups), after an optional ``prep`` that makes the
copy hostile (a damaged log, a FIFO, a job file with a hostile value...).
``expect`` says what holding means: ``"refuse"`` (a documented refusal),
``"ok"`` (a correct answer), or ``"any"`` (either, cleanly).  ``check`` looks
at an accepted answer or at the folder afterwards and names anything wrong.
``area`` names who fixes a break: ``store`` and ``input`` here, ``outputs``,
``bounds`` and ``escapes`` elsewhere.

Three groups: the list of the issue "trust, round two" (every attempt that
broke sawplan before), hostile files and damaged logs, and a seeded draw of
hostile values into every option and argument of every command.
"""

from __future__ import annotations

import csv
import os
import random
import sqlite3
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

from cli_walk import set_first_cell  # tests/ (on the pass's path)
from damage_kit import outside_check, overwrite, settle

Prep = Callable[[Path], None]
Check = Callable[[Path, str, str], str | None]  # (folder, stdout, stderr) -> what is wrong


@dataclass(frozen=True)
class Attempt:
    name: str
    args: tuple[str, ...]
    expect: str = "any"  # "refuse" | "ok" | "any"
    prep: Prep | None = None
    check: Check | None = None
    area: str = "input"
    timeout: float = 60.0
    env: dict[str, str] = field(default_factory=dict)
    fsize: int | None = None  # bytes a file may grow to (a full disk)
    umask: int | None = None


BLADE = ("--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm")

# --- hostile values ---------------------------------------------------------------------

NUMBERS = ["0", "-0", "-1", "1e-300", "1e-12", "1e308", "1e309", "inf", "-inf", "nan", "NaN",
           "9" * 400, "1e23", "0x1F", "1_000", "\u0661\u0662", "\u00bd", "1,5", " 12 ", "12abc",
           "", "99999999999999999999", "-1e308", "4.9e-324", "1e-7", "2147483648"]  # fmt: skip
QUANTITIES = ["1e-300mm", "1e308mm", "1e-12mm", "-5mm", "0mm", "infmm", "nanmm", "1e9 m/min",
              "5 furlongs", "3 kg", "60", "60 mm/min", "1e308", "99999999999999999999mm",
              "3' 6\"", "7-1/4 in", "1/0 in", "0/0 in", "mm", "1e999km", "1e-300 m2", "1e30m2",
              "60mm60mm", "\u0666\u0660mm"]  # fmt: skip
TEXTS = ["", " ", "a" * 5000, "\x1b[31mred", "\u202eevil", "=cmd|' /C calc'!A0", "\r=1+1",
         "../../../etc/passwd", "'; DROP TABLE blades; --", "\" OR 1=1 --", "%s%s%n",
         "{0.__class__}", "\uff21\uff22\uff23", "tag\nnewline", "null", "-", "--help",
         "\u2603", "\u0085next", "\u2028line", "\x7f", "\t", "B-017", "BAY 2"]  # fmt: skip
HOSTILE = NUMBERS + QUANTITIES + TEXTS


# --- preparations -----------------------------------------------------------------------


def _log(folder: Path) -> Path:
    return folder / "template.sqlite"


def damage_at(offset_fraction: float, length: int, seed: int, name: str = "") -> Prep:
    """Overwrite ``length`` bytes of the log ``name`` (the shop's log when not named; past
    its header) with seeded garbage."""

    def prep(folder: Path) -> None:
        log = folder / name if name else _log(folder)
        settle(log)
        size = log.stat().st_size
        rng = random.Random(seed)
        at = 100 + int((size - 100 - length) * offset_fraction)
        overwrite(log, at, bytes(rng.randrange(256) for _ in range(length)))
        (folder / ".integrity").write_text(outside_check(log), encoding="utf-8")

    return prep


def sql(statement: str) -> Prep:
    """Change the log behind sawplan's back (as another program would)."""

    def prep(folder: Path) -> None:
        conn = sqlite3.connect(_log(folder))
        try:
            conn.execute(statement)
            conn.commit()
        finally:
            conn.close()

    return prep


def job_with(section: str, key: str, value: str, *, raw: bool = False) -> Prep:
    """job.toml with ``key = value`` set in its first ``[section]`` (``[[section]]``)."""

    def prep(folder: Path) -> None:
        job = folder / "job.toml"
        lines = job.read_text(encoding="utf-8").splitlines()
        head = f"[{section}]" if section == "job" else f"[[{section}]]"
        at = lines.index(head) + 1
        lines = [ln for i, ln in enumerate(lines) if not (i >= at and ln.startswith(f"{key} ="))
                 or i > at + 12]  # fmt: skip
        lines.insert(at, f"{key} = {value if raw else toml_string(value)}")
        job.write_text("\n".join(lines) + "\n", encoding="utf-8")

    return prep


def toml_string(value: str) -> str:
    out = value.replace("\\", "\\\\").replace('"', '\\"')
    out = "".join(c if c.isprintable() else f"\\u{ord(c):04x}" for c in out)
    return f'"{out}"'


def csv_cell(name: str, column: str, cell: str) -> Prep:
    """Set ``column`` of the first row of ``csv-in/NAME.csv``."""

    def prep(folder: Path) -> None:
        set_first_cell(folder / "csv-in" / f"{name}.csv", column, cell)

    return prep


def fifo(name: str) -> Prep:
    def prep(folder: Path) -> None:
        os.mkfifo(folder / name)

    return prep


def both(*preps: Prep) -> Prep:
    def prep(folder: Path) -> None:
        for p in preps:
            p(folder)

    return prep


# --- checks -----------------------------------------------------------------------------


def unchanged(name: str) -> Check:
    """The input file ``name`` is as the template had it."""

    def check(folder: Path, _out: str, _err: str) -> str | None:
        template = folder.parents[3] / "template"
        if (folder / name).read_bytes() != (template / name).read_bytes():
            return f"{name} was overwritten"
        return None

    return check


def stored_count(sql_text: str, expected: int) -> Check:
    def check(folder: Path, _out: str, _err: str) -> str | None:
        conn = sqlite3.connect(_log(folder))
        try:
            got = conn.execute(sql_text).fetchone()[0]
        finally:
            conn.close()
        return None if got == expected else f"{sql_text} gave {got}, expected {expected}"

    return check


def no_raw_controls(_folder: Path, out: str, _err: str) -> str | None:
    bad = [c for c in out if (ord(c) < 32 and c not in "\n\t") or 0x7F <= ord(c) < 0xA0
           or c in "\u202e\u2028"]  # fmt: skip
    return f"raw control character {bad[0]!r} printed" if bad else None


def no_partials(folder: Path, _out: str, _err: str) -> str | None:
    left = [p.name for p in folder.rglob("*.partial*")]
    return f"left {left[0]}" if left else None


def mode_at_most(name: str, mode: int) -> Check:
    def check(folder: Path, _out: str, _err: str) -> str | None:
        got = (folder / name).stat().st_mode & 0o777
        return None if got & ~mode == 0 else f"{name} is {oct(got)}, wider than {oct(mode)}"

    return check


def csv_formula_guarded(name: str) -> Check:
    def check(folder: Path, _out: str, _err: str) -> str | None:
        path = folder / name
        if not path.exists():
            return None
        with path.open(encoding="utf-8", errors="replace", newline="") as handle:
            for row in csv.reader(handle):
                for cell in row:
                    if cell[:1] in ("=", "+", "-", "@", "\r", "\t") and not _number(cell):
                        return f"a cell a spreadsheet runs: {cell[:30]!r}"
        return None

    return check


def _number(cell: str) -> bool:
    try:
        float(cell)
    except ValueError:
        return False
    return True
