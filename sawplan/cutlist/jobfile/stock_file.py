"""The job's ``stock_file``: more ``[[stock]]`` lines as a CSV file beside the job file.

The path must stay inside the job file's folder unless the caller allows
otherwise, so a job file received from someone else cannot make sawplan read
files elsewhere on the machine.  Rows are read as entries with the ``[[stock]]``
keys as columns; their errors name the CSV file and line.
"""

from __future__ import annotations

import csv
import difflib
import io
from pathlib import Path
from typing import Any

from sawplan.cutlist.jobfile.entry import JobEntry, raw_stock_label
from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.types import MAX_FILE_BYTES, STOCK_KEYS
from sawplan.errors import BadDataError, NotFoundError, UsageError


def resolve_stock_file(value: str, folder: Path, *, allow_outside: bool = False) -> Path:
    """Where ``stock_file = value`` points, refusing paths that leave the job's folder.

    Refused unless ``allow_outside``: an absolute path, ``..`` that climbs out
    of the folder, and a symlink (anywhere on the way) that leads out of it.
    """
    hint = "name a file in the job's folder, or run `sawplan plan JOBFILE --allow`"
    raw = Path(value)
    if raw.is_absolute() and not allow_outside:
        raise UsageError(
            f"{value!r} is an absolute path; the job file may only name files in its own folder",
            field="stock_file",
            hint=hint,
        )
    target = folder / raw
    if allow_outside:
        return target
    try:
        base = folder.resolve()
        real = target.resolve()  # follows every symlink on the way
    except (ValueError, OSError) as err:  # a NUL byte, a name too long, a symlink loop
        raise UsageError(
            f"cannot use {value!r} as a file name ({err})", field="stock_file"
        ) from None
    if not real.is_relative_to(base):
        how = "with '..'" if ".." in raw.parts else "through a symlink"
        raise UsageError(
            f"{value!r} leads outside the job's folder {how} (to {real})",
            field="stock_file",
            hint=hint,
        )
    return real  # the checked path itself, not the text that led there


def stock_file_entries(path: Path, shown: str, where: Where) -> list[JobEntry]:
    """The stock file's rows as entries whose errors name the CSV file and line."""
    from sawplan.user_files import read_text_limited

    try:
        text = read_text_limited(
            path, MAX_FILE_BYTES, "stock file", why="a stock list is a short text file",
            what="it", shown=shown,
        )  # fmt: skip
    except NotFoundError as err:
        raise located(NotFoundError(err.message, field="stock_file"), where) from None
    except BadDataError as err:
        raise located(err, where) from None
    try:
        reader = csv.reader(io.StringIO(text, newline=""))
        rows = [(reader.line_num, row) for row in reader]
    except csv.Error as err:
        raise BadDataError(f"is not readable CSV ({err})", field=shown) from None
    rows = [(n, r) for n, r in rows if any(c.strip() for c in r)]
    if not rows:
        raise BadDataError("is empty; expected a header row and stock rows", field=shown)
    header_line, header = rows[0]
    names = [h.strip() for h in header]
    for name in names:
        if name not in STOCK_KEYS:
            close = difflib.get_close_matches(name, STOCK_KEYS, n=1, cutoff=0.6)
            hint = f"did you mean {close[0]}?" if close else "columns: " + ", ".join(STOCK_KEYS)
            err = UsageError(f"unknown column {name!r}", hint=hint)
            raise located(err, Where(shown, "", header_line))
    entries = []
    for n, (line, row) in enumerate(rows[1:], start=1):
        if len(row) > len(names):
            err = BadDataError(f"has {len(row)} cells, the header names {len(names)}")
            raise located(err, Where(shown, "", line))
        cells = {k: v.strip() for k, v in zip(names, row, strict=False) if v.strip()}
        label = raw_stock_label(cells, n - 1)
        entry = CsvStockRow(cells, shown, line, label)
        entry.data = entry.typed()
        entries.append(entry)
    return entries


class CsvStockRow(JobEntry):
    """A stock-file row: CSV text typed like TOML values; errors name the CSV line."""

    def __init__(self, data: dict, file: str, line: int, label: str):
        super().__init__(data, "stock row", 0, TomlLines(""), file, label)
        self.line = line

    def where(self, key: str | None = None) -> Where:
        return Where(self.file, "stock row", self.line, self.label)

    def typed(self) -> dict[str, Any]:
        out: dict[str, Any] = dict(self.data)
        for key in ("count",):
            if key in out:
                try:
                    out[key] = int(out[key])
                except ValueError:
                    err = BadDataError(f"expected a whole number, got {out[key]!r}", field=key)
                    raise self.fail(err, key) from None
        for key in ("price", "price_per_kg"):
            if key in out:
                try:
                    out[key] = float(out[key])
                except ValueError:
                    err = BadDataError(f"expected a number, got {out[key]!r}", field=key)
                    raise self.fail(err, key) from None
        if "remnant" in out:
            word = out["remnant"].lower()
            if word not in ("yes", "no", "true", "false", "1", "0"):
                err = BadDataError(f"expected yes or no, got {out['remnant']!r}", field="remnant")
                raise self.fail(err, "remnant")
            out["remnant"] = word in ("yes", "true", "1")
        return out
