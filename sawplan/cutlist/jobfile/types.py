"""What a validated job is: the job file's keys, defaults and limits, and its dataclasses.

``jobfile`` reads and checks a job file into these; planning reads them.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from sawplan.cutlist.jobfile.lines import Where

JOB_KEYS = (
    "name", "kerf", "trim", "grip", "min_remnant", "saw", "shop_rate", "handling_time",
    "blade_price", "currency", "customer", "due", "stock_file", "remnant_credit",
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
MAX_LENGTH_MM = 100_000.0  # a 100 m bar is a typing mistake (the field table's piece length)
MAX_FILE_BYTES = 5_000_000
MAX_TEXT = 200  # a text key without a field of its own
# The largest job accepted (its plan's time and memory are measured in bench/bench_limits.py):
MAX_PIECES = 100_000  # pieces in one job: a cut sheet longer than this is split into jobs
MAX_PARTS = 1_000  # [[part]] entries in one job
# distinct piece lengths × stock lines of one section: the optimiser's first columns, and
# its memory (a column per pair, a number per length in each column)
MAX_SECTION_PAIRS = 10_000
REMNANT_CREDIT = ("bar-price", "none")  # quote policy for remnants that go back on the rack


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
    # Quote: "bar-price" credits remnants put back on the rack at their bar's price
    # per length (the job pays for the length it uses); "none" charges whole bars.
    remnant_credit: str = "bar-price"


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
