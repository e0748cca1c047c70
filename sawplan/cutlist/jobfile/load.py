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
its unit, e.g. "250mm", got 12`` (lines are found by ``lines``).

``stock_file`` is resolved relative to the job file's folder and must stay
inside it: an absolute path, a ``..`` that climbs out or a symlink that leads
out is refused (one line naming the key and its line) unless the caller
allows it (``sawplan plan JOB --allow``), so a job file received from someone
else cannot make sawplan read files elsewhere on the machine.

Modules beside this one: ``types`` (keys, defaults, the dataclasses),
``entry`` (reading values), ``stock_file`` (the CSV file and its path) and
``checks`` (parts against stock); their public names import from here too.
"""

from __future__ import annotations

import difflib
import tomllib
from collections.abc import Callable
from pathlib import Path
from typing import Any

from sawplan.cutlist.jobfile.checks import check_parts_have_stock
from sawplan.cutlist.jobfile.entry import JobEntry, raw_part_label, raw_stock_label
from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.stock_file import resolve_stock_file, stock_file_entries
from sawplan.cutlist.jobfile.types import (
    DEFAULT_GRIP_MM,
    DEFAULT_HANDLING_TIME_MIN,
    DEFAULT_MIN_REMNANT_MM,
    DEFAULT_TRIM_MM,
    JOB_KEYS,
    MAX_FILE_BYTES,
    MAX_LENGTH_MM,
    MAX_PARTS,
    MAX_PIECES,
    MAX_SECTION_PAIRS,
    PART_KEYS,
    REMNANT_CREDIT,
    STOCK_KEYS,
    TABLES,
    Job,
    JobHeader,
    PartLine,
    StockLine,
)
from sawplan.errors import BadDataError, SawplanError, UsageError

__all__ = [
    "DEFAULT_GRIP_MM",
    "DEFAULT_HANDLING_TIME_MIN",
    "DEFAULT_MIN_REMNANT_MM",
    "DEFAULT_TRIM_MM",
    "JOB_KEYS",
    "MAX_FILE_BYTES",
    "MAX_LENGTH_MM",
    "PART_KEYS",
    "STOCK_KEYS",
    "TABLES",
    "Job",
    "JobHeader",
    "PartLine",
    "SectionParser",
    "StockLine",
    "Where",
    "load_job",
    "located",
    "parse_job",
    "resolve_stock_file",
    "stock_key",
]

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
    from sawplan.user_files import read_text_limited

    path = Path(path)
    text = read_text_limited(
        path, MAX_FILE_BYTES, "job file", why="a job file is a short text file", what="the job file"
    )
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
    is *enough* stock on hand is found by planning (a short job is planned and
    its shortfall listed).
    """
    if parse_section is None:
        from sawplan.sections import parse_section
    lines = TomlLines(text)
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

    def resolve(entry: JobEntry) -> tuple[str, str, str]:
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
        entry = JobEntry(item, "[[stock]]", i, lines, file, raw_stock_label(item, i))
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
        for entry in stock_file_entries(path, header.stock_file, where):
            stock.append(_stock_line(entry, len(stock) + 1, resolve, source=header.stock_file))

    parts: list[PartLine] = []
    names: dict[str, int | None] = {}
    for i, item in enumerate(data.get("part", [])):
        entry = JobEntry(item, "[[part]]", i, lines, file, raw_part_label(item, i))
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
        length = entry.quantity("length", "length", "250mm")
        if length is None:
            raise entry.fail(BadDataError("is missing", field="length"))
        count = entry.count("count")
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
    _check_size(parts, file)

    job_table = data.get("job", {})
    job_lines = {key: lines.key_line("[job]", 0, key) for key in job_table}
    job = Job(file, header, tuple(stock), tuple(parts), materials, sections, job_lines)
    check_parts_have_stock(job, lines)
    _check_sections(job)
    return job


def _stock_line(
    entry: JobEntry,
    index: int,
    resolve: Callable[[JobEntry], tuple[str, str, str]],
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
    length = entry.quantity("length", "length", "6m")
    if length is None:
        raise entry.fail(BadDataError("is missing", field="length"))
    return StockLine(
        index=index,
        line=entry.where().line,
        material=material,
        section=spec,
        section_text=section_text,
        length_mm=length,
        count=entry.count("count"),
        price=price,
        price_per_kg=per_kg,
        heat=entry.text("heat"),
        location=entry.text("location"),
        remnant=entry.flag("remnant"),
        label=entry.label or f"#{index}",
        source=source,
    )


def stock_key(section: Any) -> str:
    """Canonical spec of a bar's shape and sizes (default orientation, one piece)."""
    return type(section)(section.shape, section.dims_mm).spec()


def _check_size(parts: list[PartLine], file: str) -> None:
    """The largest job accepted: its plan's time and memory are measured in bench/."""
    pieces = sum(p.count for p in parts)
    if len(parts) > MAX_PARTS:
        err = BadDataError(
            f"has {len(parts):,} [[part]] entries, at most {MAX_PARTS:,} in one job",
            hint="split it into several jobs",
        )
        raise located(err, Where(file, ""))
    if pieces > MAX_PIECES:
        err = BadDataError(
            f"asks for {pieces:,} pieces, at most {MAX_PIECES:,} in one job",
            hint="split it into several jobs",
        )
        raise located(err, Where(file, ""))


def _check_sections(job: Job) -> None:
    """Each section's distinct lengths × stock lines within the optimiser's budget."""
    for group in job.groups():
        lengths = {p.length_mm for p in job.parts if p.group == group}
        lines = sum(1 for s in job.stock if s.group == group)
        if len(lengths) * lines > MAX_SECTION_PAIRS:
            err = BadDataError(
                f"{group[0]} {group[1]} has {len(lengths):,} piece lengths and {lines:,} "
                f"stock lines ({len(lengths) * lines:,} pairs), at most {MAX_SECTION_PAIRS:,} "
                "in one section",
                hint="split the job, or merge stock lines of the same length",
            )
            raise located(err, Where(job.file, ""))


def _with_field(err: SawplanError, name: str) -> SawplanError:
    if err.field:
        return err
    return type(err)(err.message, field=name, hint=err.hint)


def _is_array_of_tables(value: Any) -> bool:
    return isinstance(value, list) and all(isinstance(v, dict) for v in value)


def _read_header(table: dict, lines: TomlLines, file: str, *, default_name: str) -> JobHeader:
    entry = JobEntry(table, "[job]", 0, lines, file, None)
    entry.check_keys(JOB_KEYS)

    def length(key: str, default: float | None) -> float | None:
        value = entry.quantity(key, "length", "1.6mm")
        return default if value is None else value

    handling = entry.quantity("handling_time", "time", "0.5min")
    return JobHeader(
        name=entry.text("name", default=default_name) or default_name,
        kerf_mm=length("kerf", None),
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
        stock_file=entry.text("stock_file", collapse=False),
        remnant_credit=_remnant_credit(entry),
    )


def _remnant_credit(entry: JobEntry) -> str:
    value = entry.text("remnant_credit", default=REMNANT_CREDIT[0])
    if value not in REMNANT_CREDIT:
        err = BadDataError(
            f"expected {' or '.join(repr(v) for v in REMNANT_CREDIT)}, got {value!r}",
            field="remnant_credit",
        )
        raise entry.fail(err, "remnant_credit")
    return value
