"""Blade pitch: the packaged catalogue and reading pitch text such as ``3/4``.

A variable pitch "a/b" alternates tooth spacings of a and b teeth per inch; the
coarse number a sets the three-tooth check, the fine number b the gullet check
(the smallest gullet fills first), and the mean (a+b)/2 the down-feed.
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass
from functools import lru_cache

from sawplan.errors import BadDataError, DamagedFileError, UsageError
from sawplan.paths import data_file

MM_PER_IN = 25.4
EXAMPLES = "e.g. 3/4, 4/6, 10-14, 14, 0.75/1.25"


def fmt_tpi(tpi: float) -> str:
    """0.75 -> '0.75', 1.4 -> '1.4', 3.0 -> '3'."""
    return f"{tpi:.2f}".rstrip("0").rstrip(".")


@dataclass(frozen=True)
class Pitch:
    """Teeth per inch of a band-saw blade (constant when coarse == fine)."""

    tpi_coarse: float
    tpi_fine: float
    tpi_mean: float
    kind: str  # "constant" | "variable"
    min_blade_width_mm: float = 0.0
    max_blade_width_mm: float = math.inf
    source: str = "given"

    @classmethod
    def of(
        cls, tpi_coarse: float, tpi_fine: float | None = None, *, source: str = "given"
    ) -> Pitch:
        fine = tpi_coarse if tpi_fine is None else tpi_fine
        coarse, fine = min(tpi_coarse, fine), max(tpi_coarse, fine)
        kind = "constant" if coarse == fine else "variable"
        return cls(coarse, fine, (coarse + fine) / 2, kind, source=source)

    @property
    def label(self) -> str:
        if self.kind == "constant":
            return fmt_tpi(self.tpi_coarse)
        return f"{fmt_tpi(self.tpi_coarse)}/{fmt_tpi(self.tpi_fine)}"

    @property
    def spacing_mean_mm(self) -> float:
        """Mean tooth spacing p, which turns tooth bite into down-feed."""
        return MM_PER_IN / self.tpi_mean

    @property
    def spacing_fine_mm(self) -> float:
        """The smallest spacing: its gullet fills first."""
        return MM_PER_IN / self.tpi_fine

    def teeth_in(self, length_mm: float, *, coarse: bool = True) -> float:
        """Teeth in a chord of ``length_mm`` (coarse count for the three-tooth rule)."""
        return length_mm * (self.tpi_coarse if coarse else self.tpi_mean) / MM_PER_IN

    def fits_blade(self, width_mm: float) -> bool:
        return self.min_blade_width_mm <= width_mm <= self.max_blade_width_mm

    def same_teeth(self, other: Pitch) -> bool:
        return math.isclose(self.tpi_coarse, other.tpi_coarse) and math.isclose(
            self.tpi_fine, other.tpi_fine
        )


@lru_cache(maxsize=1)
def catalogue() -> tuple[Pitch, ...]:
    """The packaged pitches, coarsest mean first."""
    path = data_file("pitches.csv")
    pitches = []
    try:
        with path.open(newline="", encoding="utf-8") as handle:
            for row in csv.DictReader(handle):
                coarse, fine = float(row["tpi_coarse"]), float(row["tpi_fine"])
                pitches.append(
                    Pitch(
                        tpi_coarse=coarse,
                        tpi_fine=fine,
                        tpi_mean=float(row["tpi_mean"]),
                        kind=row["kind"],
                        min_blade_width_mm=float(row["min_blade_width_mm"]),
                        max_blade_width_mm=float(row["max_blade_width_mm"]),
                        source=row["source"],
                    )
                )
    except (OSError, KeyError, ValueError) as exc:
        raise DamagedFileError(f"cannot read the pitch table ({exc})", field=str(path)) from None
    return tuple(sorted(pitches, key=lambda p: (p.tpi_mean, p.tpi_coarse)))


def find(pitch: Pitch) -> Pitch:
    """The catalogue entry with the same teeth, or ``pitch`` itself."""
    for entry in catalogue():
        if entry.same_teeth(pitch):
            return entry
    return pitch


_NUM = r"(\d+(?:\.\d*)?|\.\d+)"
_PATTERN = re.compile(rf"^\s*{_NUM}\s*(?:[/\-]\s*{_NUM})?\s*(?:tpi)?\s*$", re.IGNORECASE)


def parse_pitch(text: str, *, field: str = "pitch") -> Pitch:
    """Read ``3/4``, ``4/6``, ``10-14``, ``14``, ``0.75/1.25`` (optionally "TPI")."""
    match = _PATTERN.match(str(text))
    if not match:
        raise UsageError(
            f"expected a pitch in teeth per inch, got {text!r}", field=field, hint=EXAMPLES
        )
    from sawplan.fields import check

    first = float(match.group(1))
    second = float(match.group(2)) if match.group(2) else None
    for tpi in (first, second):
        if tpi is not None:
            try:
                check("pitch", tpi, words=field)  # the field table's range of teeth per inch
            except BadDataError as err:
                raise BadDataError(err.message, field=field, hint=EXAMPLES) from None
    return find(Pitch.of(first, second))
