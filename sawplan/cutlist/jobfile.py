"""Job files: what to cut (``[[part]]``) from what is on the rack (``[[stock]]``).

A job file is TOML read with the standard library's ``tomllib``::

    [job]
    name = "pump shafts"
    kerf = "1.6mm"          # default: the kerf of the recommended blade
    trim = "5mm"            # squaring cut at the head, its kerf included
    grip = "0mm"            # what the vise keeps at the tail, the last kerf included
    min_remnant = "300mm"   # shorter tails are scrap, longer ones go back on the rack
    stock_file = "rack.csv" # more [[stock]] lines as CSV (same columns), beside the job file

    [[stock]]
    material = "4140"
    section = "round 60mm"
    length = "3m"
    count = 4               # leave out for "as many as needed"
    price = 182.0           # per bar (or price_per_kg)

    [[part]]
    name = "shaft"
    material = "4140"
    section = "round 60mm"
    length = "450mm"
    count = 12

Every error names the file, the line and the entry, in one line, e.g.
``job.toml line 23 ([[part]] "flange blank"): length: expected a length with
its unit, e.g. "250mm", got 12``.  Lines are found by scanning the text for
the n-th ``[[part]]`` header (and the key inside its block); tomllib's own
syntax errors already carry a line and column.

``stock_file`` is resolved relative to the job file's folder and must stay
inside it: an absolute path, a ``..`` that climbs out or a symlink that leads
out is refused (one line naming the key and its line) unless the caller
allows it (``sawplan plan JOB --allow``), so a job file received from someone
else cannot make sawplan read files elsewhere on the machine.
"""

from __future__ import annotations

import csv
import difflib
import io
import math
import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from sawplan.errors import BadDataError, NotFoundError, SawplanError, UsageError

JOB_KEYS = (
    "name", "kerf", "trim", "grip", "min_remnant", "saw", "shop_rate", "handling_time",
    "blade_price", "currency", "customer", "due", "stock_file",
)  # fmt: skip
STOCK_KEYS = (
    "material", "section", "length", "count", "price", "price_per_kg", "heat", "location",
    "remnant",
)  # fmt: skip
PART_KEYS = ("name", "material", "section", "length", "count", "tolerance", "drawing")
TABLES = ("job", "stock", "part")

# Defaults when the [job] table leaves a value out (our choices, shown on the sheet).
DEFAULT_TRIM_MM = 0.0  # bar ends taken as square
DEFAULT_GRIP_MM = 0.0  # a saw that can part the last piece (no vise tail)
DEFAULT_MIN_REMNANT_MM = 300.0  # common practice: tails under about a foot are scrap
DEFAULT_HANDLING_TIME_MIN = 0.5  # common practice: advance, clamp and unload, per cut
MAX_LENGTH_MM = 100_000.0  # a 100 m bar is a typing mistake
MAX_FILE_BYTES = 5_000_000


@dataclass(frozen=True)
class Where:
    """An entry's place in the job file, for error messages."""

    file: str
    table: str  # "[job]", "[[stock]]", "[[part]]" or "" for the file as a whole
    line: int | None = None
    label: str | None = None

    def describe(self) -> str:
        place = f"{self.file} line {self.line}" if self.line else self.file
        if not self.table:
            return place
        what = f"{self.table} {self.label}" if self.label else self.table
        return f"{place} ({what})"


def located(err: SawplanError, where: Where) -> SawplanError:
    """The same kind of error, its message prefixed with the file, line and entry."""
    new = type(err)(f"{where.describe()}: {err.one_line()}")
    new.__cause__ = err
    return new


@dataclass(frozen=True)
class JobHeader:
    name: str
    kerf_mm: float | None  # None: take the recommended blade's kerf
    trim_mm: float
    grip_mm: float
    min_remnant_mm: float
    saw: str | None
    shop_rate_per_h: float | None
    handling_time_min: float
    blade_price: float | None
    currency: str
    customer: str
    due: str
    stock_file: str = ""  # as written in [job]; its lines are in Job.stock


@dataclass(frozen=True)
class StockLine:
    """One ``[[stock]]`` entry: bars of one length (and heat) on the rack."""

    index: int  # 1-based position among the [[stock]] entries
    line: int | None
    material: str  # catalogue key as the catalogue writes it
    section: str  # canonical section spec
    section_text: str  # as written in the file
    length_mm: float
    count: int | None  # None: as many as needed
    price: float | None  # per bar
    price_per_kg: float | None
    heat: str
    location: str
    remnant: bool
    label: str  # "4140 round 60mm 3m", as written, for messages
    source: str = field(default="", metadata={"json": False})  # the stock_file, or "" (job file)

    @property
    def group(self) -> tuple[str, str]:
        return (self.material, self.section)


@dataclass(frozen=True)
class PartLine:
    """One ``[[part]]`` entry: ``count`` pieces of one length."""

    index: int
    line: int | None
    name: str
    material: str
    section: str
    section_text: str
    length_mm: float
    count: int
    tolerance: str
    drawing: str

    @property
    def group(self) -> tuple[str, str]:
        return (self.material, self.section)


@dataclass(frozen=True)
class Job:
    """A validated job: every material known, every section parsed, every part cuttable."""

    file: str  # the file's name, used in messages
    header: JobHeader
    stock: tuple[StockLine, ...]
    parts: tuple[PartLine, ...]
    materials: Mapping[str, Any] = field(metadata={"json": False}, repr=False, compare=False)
    sections: Mapping[str, Any] = field(metadata={"json": False}, repr=False, compare=False)
    job_lines: Mapping[str, int | None] = field(
        default_factory=dict, metadata={"json": False}, repr=False, compare=False
    )  # [job] key -> its line, for messages about values used later (saw)

    def groups(self) -> list[tuple[str, str]]:
        """(material, section) pairs that have parts, in the order parts first name them."""
        seen: dict[tuple[str, str], None] = {}
        for part in self.parts:
            seen.setdefault(part.group, None)
        return list(seen)

    def where(self, entry: StockLine | PartLine) -> Where:
        if isinstance(entry, StockLine):
            if entry.source:
                return Where(entry.source, "stock row", entry.line, entry.label)
            return Where(self.file, "[[stock]]", entry.line, entry.label)
        return Where(self.file, "[[part]]", entry.line, f'"{entry.name}"')


def _mm(v: float) -> str:
    return f"{v:.6g} mm"


# --- locating entries in the text ---------------------------------------------------

_ARRAY_HEADER = re.compile(r"^\s*\[\[\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]\]")
_TABLE_HEADER = re.compile(r"^\s*\[\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]")


class _Lines:
    """Header and key lines of a TOML text, found by scanning (outside multi-line strings)."""

    def __init__(self, text: str):
        self.lines = text.splitlines()
        self.blocks: list[tuple[str, int]] = []  # (header name, 1-based line)
        inside = None
        for number, line in enumerate(self.lines, start=1):
            if inside is None:
                m = _ARRAY_HEADER.match(line)
                if m:
                    self.blocks.append((f"[[{m.group(1).strip()}]]", number))
                else:
                    m = _TABLE_HEADER.match(line)
                    if m:
                        self.blocks.append((f"[{m.group(1).strip()}]", number))
            for quote in ('"""', "'''"):
                if inside in (None, quote) and line.count(quote) % 2 == 1:
                    inside = None if inside == quote else quote

    def header_line(self, table: str, index: int = 0) -> int | None:
        """Line of the ``index``-th (0-based) header called ``table`` ("[[part]]")."""
        found = [line for name, line in self.blocks if name == table]
        return found[index] if index < len(found) else None

    def key_line(self, table: str, index: int, key: str) -> int | None:
        """Line where ``key`` is set inside that entry's block, else the header's line."""
        start = self.header_line(table, index)
        if start is None:
            return None
        following = [line for _, line in self.blocks if line > start]
        end = min(following) if following else len(self.lines) + 1
        pattern = re.compile(rf"^\s*[\"']?{re.escape(key)}[\"']?\s*=")
        for number in range(start + 1, end):
            if pattern.match(self.lines[number - 1]):
                return number
        return start


# --- reading values -------------------------------------------------------------------


class _Entry:
    """One table of the file with a helper per kind of value; errors carry the key's line."""

    def __init__(
        self, data: dict, table: str, index: int, lines: _Lines, file: str, label: str | None
    ):
        self.data = data
        self.table = table
        self.index = index
        self.lines = lines
        self.file = file
        self.label = label

    def where(self, key: str | None = None) -> Where:
        line = (
            self.lines.key_line(self.table, self.index, key)
            if key
            else self.lines.header_line(self.table, self.index)
        )
        return Where(self.file, self.table, line, self.label)

    def fail(self, err: SawplanError, key: str | None = None) -> SawplanError:
        return located(err, self.where(key))

    def check_keys(self, allowed: tuple[str, ...]) -> None:
        for key in self.data:
            if key not in allowed:
                close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.6)
                hint = f"did you mean {close[0]}?" if close else "expected " + ", ".join(allowed)
                raise self.fail(UsageError(f"unknown key {key!r}", hint=hint), key)

    def text(self, key: str, *, required: bool = False, default: str = "") -> str:
        value = self.data.get(key)
        if value is None:
            if required:
                raise self.fail(BadDataError("is missing", field=key))
            return default
        if isinstance(value, bool) or not isinstance(value, str | int):
            if hasattr(value, "isoformat"):  # a TOML date or time
                return value.isoformat()
            raise self.fail(BadDataError(f"expected text, got {value!r}", field=key), key)
        value = str(value).strip()
        if required and not value:
            raise self.fail(BadDataError("must not be empty", field=key), key)
        if len(value) > 200:
            raise self.fail(
                BadDataError(f"is {len(value)} characters, at most 200", field=key), key
            )
        return value

    def quantity(self, key: str, dimension: str, example: str, *, positive: bool) -> float | None:
        from sawplan.units import to_core

        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, str):
            err = UsageError(
                f"expected {'an' if dimension[0] in 'aeiou' else 'a'} {dimension} with its unit, "
                f'e.g. "{example}", got {value!r}',
                field=key,
            )
            raise self.fail(err, key)
        try:
            core = to_core(value, dimension, field=key)
        except SawplanError as err:
            raise self.fail(err, key) from None
        if positive and not core > 0:
            raise self.fail(BadDataError(f"must be more than 0, got {value!r}", field=key), key)
        if core < 0:
            raise self.fail(BadDataError(f"must not be negative, got {value!r}", field=key), key)
        if dimension == "length" and core > MAX_LENGTH_MM:
            raise self.fail(BadDataError(f"must be at most 100 m, got {value!r}", field=key), key)
        return core

    def count(self, key: str, *, minimum: int) -> int | None:
        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int):
            err = BadDataError(f"expected a whole number, got {value!r}", field=key)
            raise self.fail(err, key)
        if value < minimum:
            what = "must not be negative" if minimum == 0 else f"must be at least {minimum}"
            raise self.fail(BadDataError(f"{what}, got {value}", field=key), key)
        if value > 1_000_000:
            raise self.fail(BadDataError(f"must be at most 1,000,000, got {value}", field=key), key)
        return value

    def money(self, key: str) -> float | None:
        value = self.data.get(key)
        if value is None:
            return None
        if (
            isinstance(value, bool)
            or not isinstance(value, int | float)
            or not math.isfinite(value)
        ):
            err = BadDataError(f"expected a number (money), e.g. 120.50, got {value!r}", field=key)
            raise self.fail(err, key)
        if value < 0:
            raise self.fail(BadDataError(f"must not be negative, got {value:g}", field=key), key)
        return float(value)

    def flag(self, key: str) -> bool:
        value = self.data.get(key, False)
        if not isinstance(value, bool):
            raise self.fail(BadDataError(f"expected true or false, got {value!r}", field=key), key)
        return value


# --- the loader -------------------------------------------------------------------------

SectionParser = Callable[[str], Any]


def load_job(
    path: str | Path,
    catalogue: Any,
    *,
    parse_section: SectionParser | None = None,
    allow_outside: bool = False,
) -> Job:
    """Read and validate the job file at ``path`` (see :func:`parse_job`).

    ``allow_outside`` lets ``stock_file`` name a file outside the job's folder.
    """
    path = Path(path)
    try:
        if path.stat().st_size > MAX_FILE_BYTES:
            raise BadDataError("is over 5 MB; a job file is a short text file", field=path.name)
        raw = path.read_bytes()
    except FileNotFoundError:
        raise NotFoundError(f"no such file: {path}", field="job file") from None
    except IsADirectoryError:
        raise BadDataError(
            f"{path} is a folder, expected a TOML job file", field="job file"
        ) from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise BadDataError(
            "is not UTF-8 text (save the job file as UTF-8)", field=path.name
        ) from None
    return parse_job(
        text,
        catalogue,
        file=path.name,
        parse_section=parse_section,
        folder=path.parent,
        allow_outside=allow_outside,
    )


def parse_job(
    text: str,
    catalogue: Any,
    *,
    file: str = "job.toml",
    parse_section: SectionParser | None = None,
    folder: str | Path | None = None,
    allow_outside: bool = False,
) -> Job:
    """Validate a job file's text against the materials ``catalogue``.

    ``folder`` is where the job file lies: ``stock_file`` is read from there
    (and only from there unless ``allow_outside``).

    Checks every key and value, that each part has stock of the same material
    and section (canonical section spec and catalogue key), and that each part
    fits on the longest such bar once trim and grip are taken off.  Whether there
    is *enough* stock depends on the kerf, so that check is :func:`check_supply`.
    """
    if parse_section is None:
        from sawplan.sections import parse_section
    lines = _Lines(text)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise UsageError(f"{file}: not valid TOML: {err}") from None
    except RecursionError:
        raise UsageError(f"{file}: not valid TOML: arrays or tables nested too deeply") from None

    for key, value in data.items():
        if key not in TABLES:
            close = difflib.get_close_matches(key, TABLES, n=1, cutoff=0.5)
            hint = f"did you mean {close[0]}?" if close else "expected [job], [[stock]], [[part]]"
            line = lines.header_line(f"[[{key}]]") or lines.header_line(f"[{key}]")
            raise located(UsageError(f"unknown table {key!r}", hint=hint), Where(file, "", line))
        shape_ok = isinstance(value, dict) if key == "job" else _is_array_of_tables(value)
        if not shape_ok:
            want = "a table [job]" if key == "job" else f"an array of tables [[{key}]]"
            raise located(BadDataError(f"{key!r} must be {want}"), Where(file, ""))

    header = _read_header(data.get("job", {}), lines, file, default_name=Path(file).stem)
    sections: dict[str, Any] = {}
    materials: dict[str, Any] = {}

    def resolve(entry: _Entry) -> tuple[str, str, str]:
        material_text = entry.text("material", required=True)
        section_text = entry.text("section", required=True)
        try:
            material = catalogue.get(material_text)
        except SawplanError as err:
            raise entry.fail(err, "material") from None
        try:
            section = parse_section(section_text)
        except SawplanError as err:
            raise entry.fail(_with_field(err, "section"), "section") from None
        if section.pieces > 1:
            err = UsageError("a job file lists single bars; leave out --bundle", field="section")
            raise entry.fail(err, "section")
        # Stock and parts match on shape and sizes; the orientation only says how
        # the bar lies in the vise, so the group key is the default-orientation spec.
        key = stock_key(section)
        materials[material.key] = material
        sections.setdefault(key, section)
        return material.key, key, section_text

    stock: list[StockLine] = []
    for i, item in enumerate(data.get("stock", [])):
        entry = _Entry(item, "[[stock]]", i, lines, file, _raw_stock_label(item, i))
        stock.append(_stock_line(entry, len(stock) + 1, resolve))
    if header.stock_file:
        where = Where(file, "[job]", lines.key_line("[job]", 0, "stock_file"))
        if folder is None:
            err = UsageError("needs the job file's folder to be read", field="stock_file")
            raise located(err, where)
        try:
            path = resolve_stock_file(header.stock_file, Path(folder), allow_outside=allow_outside)
        except SawplanError as err:
            raise located(err, where) from None
        for entry in _stock_file_entries(path, header.stock_file, where):
            stock.append(_stock_line(entry, len(stock) + 1, resolve, source=header.stock_file))

    parts: list[PartLine] = []
    names: dict[str, int | None] = {}
    for i, item in enumerate(data.get("part", [])):
        entry = _Entry(item, "[[part]]", i, lines, file, _raw_part_label(item, i))
        entry.check_keys(PART_KEYS)
        name = entry.text("name", required=True)
        if name.casefold() in names:
            first = names[name.casefold()]
            err = BadDataError(
                f"{name!r} is already used by the part on line {first}", field="name"
            )
            raise entry.fail(err, "name")
        names[name.casefold()] = entry.where().line
        material, spec, section_text = resolve(entry)
        length = entry.quantity("length", "length", "250mm", positive=True)
        if length is None:
            raise entry.fail(BadDataError("is missing", field="length"))
        count = entry.count("count", minimum=1)
        parts.append(
            PartLine(
                index=i + 1,
                line=entry.where().line,
                name=name,
                material=material,
                section=spec,
                section_text=section_text,
                length_mm=length,
                count=1 if count is None else count,
                tolerance=entry.text("tolerance"),
                drawing=entry.text("drawing"),
            )
        )
    if not parts:
        raise located(BadDataError("has no [[part]] entries: nothing to cut"), Where(file, ""))

    job_table = data.get("job", {})
    job_lines = {key: lines.key_line("[job]", 0, key) for key in job_table}
    job = Job(file, header, tuple(stock), tuple(parts), materials, sections, job_lines)
    _check_parts_have_stock(job, lines)
    return job


def _stock_line(
    entry: _Entry,
    index: int,
    resolve: Callable[[_Entry], tuple[str, str, str]],
    *,
    source: str = "",
) -> StockLine:
    """One stock entry, from a [[stock]] table or a row of the stock file."""
    entry.check_keys(STOCK_KEYS)
    material, spec, section_text = resolve(entry)
    price = entry.money("price")
    per_kg = entry.money("price_per_kg")
    if price is not None and per_kg is not None:
        err = UsageError("give price (per bar) or price_per_kg, not both", field="price_per_kg")
        raise entry.fail(err, "price_per_kg")
    length = entry.quantity("length", "length", "6m", positive=True)
    if length is None:
        raise entry.fail(BadDataError("is missing", field="length"))
    return StockLine(
        index=index,
        line=entry.where().line,
        material=material,
        section=spec,
        section_text=section_text,
        length_mm=length,
        count=entry.count("count", minimum=0),
        price=price,
        price_per_kg=per_kg,
        heat=entry.text("heat"),
        location=entry.text("location"),
        remnant=entry.flag("remnant"),
        label=entry.label or f"#{index}",
        source=source,
    )


# --- the stock file -------------------------------------------------------------------------


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


def _stock_file_entries(path: Path, shown: str, where: Where) -> list[_Entry]:
    """The stock file's rows as entries whose errors name the CSV file and line."""
    try:
        if path.stat().st_size > MAX_FILE_BYTES:
            raise BadDataError("is over 5 MB; a stock list is a short text file", field=shown)
        text = path.read_bytes().decode("utf-8-sig")
    except FileNotFoundError:
        raise located(NotFoundError(f"no such file: {path}", field="stock_file"), where) from None
    except IsADirectoryError:
        err = BadDataError(f"{path} is a folder, expected a CSV file", field="stock_file")
        raise located(err, where) from None
    except UnicodeDecodeError:
        raise BadDataError("is not UTF-8 text (save it as UTF-8 CSV)", field=shown) from None
    except OSError as err:
        msg = f"cannot read {path}: {err.strerror or err}"
        raise located(BadDataError(msg, field="stock_file"), where) from None
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
        label = _raw_stock_label(cells, n - 1)
        entry = _CsvEntry(cells, shown, line, label)
        entry.data = entry.typed()
        entries.append(entry)
    return entries


class _CsvEntry(_Entry):
    """A stock-file row: CSV text typed like TOML values; errors name the CSV line."""

    def __init__(self, data: dict, file: str, line: int, label: str):
        super().__init__(data, "stock row", 0, _Lines(""), file, label)
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


def stock_key(section: Any) -> str:
    """Canonical spec of a bar's shape and sizes (default orientation, one piece)."""
    return type(section)(section.shape, section.dims_mm).spec()


def _with_field(err: SawplanError, name: str) -> SawplanError:
    if err.field:
        return err
    return type(err)(err.message, field=name, hint=err.hint)


def _is_array_of_tables(value: Any) -> bool:
    return isinstance(value, list) and all(isinstance(v, dict) for v in value)


def _raw_stock_label(item: dict, i: int) -> str:
    parts = [item.get(k) for k in ("material", "section", "length")]
    if all(isinstance(p, str) for p in parts):
        return " ".join(p.strip() for p in parts)  # type: ignore[union-attr]
    return f"#{i + 1}"


def _raw_part_label(item: dict, i: int) -> str:
    name = item.get("name")
    return f'"{name.strip()}"' if isinstance(name, str) and name.strip() else f"#{i + 1}"


def _read_header(table: dict, lines: _Lines, file: str, *, default_name: str) -> JobHeader:
    entry = _Entry(table, "[job]", 0, lines, file, None)
    entry.check_keys(JOB_KEYS)

    def length(key: str, default: float | None, *, positive: bool = False) -> float | None:
        value = entry.quantity(key, "length", "1.6mm", positive=positive)
        return default if value is None else value

    handling = entry.quantity("handling_time", "time", "0.5min", positive=False)
    return JobHeader(
        name=entry.text("name", default=default_name) or default_name,
        kerf_mm=length("kerf", None, positive=True),
        trim_mm=length("trim", DEFAULT_TRIM_MM) or 0.0,
        grip_mm=length("grip", DEFAULT_GRIP_MM) or 0.0,
        min_remnant_mm=length("min_remnant", DEFAULT_MIN_REMNANT_MM) or 0.0,
        saw=entry.text("saw") or None,
        shop_rate_per_h=entry.money("shop_rate"),
        handling_time_min=DEFAULT_HANDLING_TIME_MIN if handling is None else handling,
        blade_price=entry.money("blade_price"),
        currency=entry.text("currency"),
        customer=entry.text("customer"),
        due=entry.text("due"),
        stock_file=entry.text("stock_file"),
    )


def _check_parts_have_stock(job: Job, lines: _Lines) -> None:
    h = job.header
    for part in job.parts:
        where = job.where(part)
        same = [s for s in job.stock if s.group == part.group]
        if not same:
            same_material = sorted(
                {s.section_text for s in job.stock if s.material == part.material}
            )
            hint = (
                f"{part.material} on hand: {', '.join(same_material)}"
                if same_material
                else f'add a [[stock]] with material = "{part.material}" and '
                f'section = "{part.section_text}"'
            )
            err = BadDataError(
                f"no stock of {part.material} {part.section_text} in the job", hint=hint
            )
            raise located(err, where)
        on_hand = [s for s in same if s.count != 0]
        longest = max((s.length_mm for s in on_hand), default=0.0)
        usable = longest - h.trim_mm - h.grip_mm
        if part.length_mm > usable:
            if not on_hand:
                msg = f"no bars of {part.material} {part.section_text} on hand (every count is 0)"
            else:
                msg = (
                    f"{_mm(part.length_mm)} is longer than any {part.material} "
                    f"{part.section_text} stock can give: longest bar {_mm(longest)} less trim "
                    f"{_mm(h.trim_mm)} and grip {_mm(h.grip_mm)} leaves {_mm(max(usable, 0.0))}"
                )
            line = lines.key_line("[[part]]", part.index - 1, "length")
            raise located(
                BadDataError(msg, field="length"),
                Where(job.file, "[[part]]", line, f'"{part.name}"'),
            )


def check_supply(job: Job, group: tuple[str, str], kerf_mm: float) -> None:
    """Fail when the group's bars on hand cannot hold its pieces, whatever the layout.

    A bar of length L holds pieces with Σ(ℓ + k) ≤ L − trim − grip + k
    (reference §9), so the parts need at least Σ count·(ℓ + k) of that
    capacity; unlimited stock always suffices.
    """
    h = job.header
    stock = [s for s in job.stock if s.group == group]
    if any(s.count is None for s in stock):
        return
    parts = [p for p in job.parts if p.group == group]
    need = sum(p.count * (p.length_mm + kerf_mm) for p in parts)
    have = sum(
        s.count * max(s.length_mm - h.trim_mm - h.grip_mm + kerf_mm, 0.0) for s in stock if s.count
    )
    if need <= have + 1e-6:
        return
    short = need - have
    longest = max(stock, key=lambda s: s.length_mm)
    per_bar = longest.length_mm - h.trim_mm - h.grip_mm + kerf_mm
    bars = math.ceil(short / per_bar - 1e-9)
    raise not_enough(job, group, short, bars, longest.length_mm)


def not_enough(
    job: Job, group: tuple[str, str], short_mm: float, bars: int, bar_mm: float
) -> SawplanError:
    """The one-line error for a group whose stock on hand is too little."""
    stock = [s for s in job.stock if s.group == group]
    first = stock[0]
    pieces = sum(p.count for p in job.parts if p.group == group)
    on_hand = sum(s.count or 0 for s in stock)
    err = BadDataError(
        f"not enough {first.material} {first.section_text} on hand for {pieces} pieces: "
        f"{on_hand} bar(s) in the job, short by at least {short_mm / 1000:.3g} m "
        f"(about {bars} more bar(s) of {_mm(bar_mm)})",
        hint="add stock or raise a count",
    )
    return located(err, job.where(first))
