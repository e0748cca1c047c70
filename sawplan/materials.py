"""The materials catalogue: density, hardness and cutting data of common stock.

The packaged table ``data/materials.csv`` carries a source beside every
number (MH31, ASM, Kalpakjian, common practice, memory, derived).  A user may
add or override materials with a CSV of the same columns, named by the
argument of :func:`load_catalogue` or by the environment variable
``SAWPLAN_MATERIALS`` (the argument wins).  Every row is validated on load, so
the rest of the program can trust a :class:`Material`.

Reference conditions of the cutting columns: bi-metal blade with coolant;
band speed at 4 in (100 mm) width of cut; cutting rate at 100 mm width.
"""

from __future__ import annotations

import csv
import difflib
import math
import os
from collections.abc import Iterator
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from types import MappingProxyType

from sawplan.errors import BadDataError, NotFoundError
from sawplan.paths import data_file

ENV_VAR = "SAWPLAN_MATERIALS"
CATALOGUE_ORIGIN = "catalogue"
USER_SOURCE = "user file"

GROUPS: tuple[str, ...] = (
    "carbon-steel",
    "alloy-steel",
    "tool-steel",
    "high-speed-steel",
    "austenitic-stainless",
    "martensitic-stainless",  # ferritic grades too
    "ph-stainless",
    "aluminium",
    "copper-alloy",
    "cast-iron",
    "titanium",
    "nickel-alloy",
    "plastic",
)

# numeric column -> its source column
NUMERIC_COLUMNS: dict[str, str] = {
    "density_kg_m3": "density_source",
    "hardness_hb": "hardness_source",
    "band_speed_m_min": "band_speed_source",
    "unit_energy_j_mm3": "unit_energy_source",
    "cutting_rate_cm2_min": "cutting_rate_source",
}
TEXT_COLUMNS = ("uns", "standard", "notes")
REQUIRED_COLUMNS = ("key", "designation", "group", *NUMERIC_COLUMNS, "work_hardens")
ALL_COLUMNS = (
    "key",
    "designation",
    "uns",
    "standard",
    "group",
    *(col for pair in NUMERIC_COLUMNS.items() for col in pair),
    "work_hardens",
    "notes",
)

_YES = {"yes", "y", "true", "1"}
_NO = {"no", "n", "false", "0"}


@dataclass(frozen=True)
class Material:
    """One stock material; numbers in core units, each with its source text."""

    key: str
    designation: str
    uns: str
    standard: str
    group: str
    density_kg_m3: float
    density_source: str
    hardness_hb: float
    hardness_source: str
    band_speed_m_min: float  # bi-metal, coolant, 4 in width of cut
    band_speed_source: str
    unit_energy_j_mm3: float  # specific cutting energy at saw-tooth bites
    unit_energy_source: str
    cutting_rate_cm2_min: float  # bi-metal, coolant, 100 mm width
    cutting_rate_source: str
    work_hardens: bool
    notes: str
    origin: str  # "catalogue" or the user file's path

    @property
    def cutting_rate_mm2_min(self) -> float:
        """The cutting rate in the core unit (mm²/min)."""
        return self.cutting_rate_cm2_min * 100.0


@dataclass(frozen=True)
class Alias:
    """Another name of a catalogue material, and how close it is.

    ``relation``: ``same`` (the same alloy in another naming system),
    ``corresponding`` (the grade a standard pairs with it) or ``near`` (a
    near equivalent: same density and sawing data for our purposes).
    """

    alias: str
    key: str
    relation: str
    source: str

    def note(self) -> str:
        kind = {"same": "another name of", "corresponding": "the grade corresponding to"}
        return f"{self.alias} is {kind.get(self.relation, 'a near equivalent of')} {self.key} ({self.source})"


# words a shop puts around a designation: "AISI 304", "SS 304", "304 stainless", "UNS S30400"
_PREFIXES = ("stainless", "werkstoffnr.", "werkstoff", "w.nr.", "wnr.", "wnr", "alloy", "astm",
             "aisi", "type", "sae", "uns", "din", "jis", "sst", "aa", "en", "ss")  # fmt: skip
_SUFFIXES = ("stainlesssteel", "stainless", "steel", "sst", "ss")


def normalise_key(key: str) -> str:
    """Lookup form of a key: case, spaces, hyphens and underscores ignored.

    So ``17-4 PH``, ``17-4ph`` and ``174PH`` all find the same material.
    """
    return "".join(ch for ch in key.casefold() if ch not in " -_\t")


class Catalogue:
    """Immutable set of materials looked up by key (case-insensitive) or UNS number.

    Iterating yields the materials in table order (packaged rows first, user
    additions after); ``keys()`` gives their keys as written.
    """

    def __init__(
        self, materials: list[Material] | tuple[Material, ...], aliases: tuple[Alias, ...] = ()
    ):
        by_key: dict[str, Material] = {}
        for material in materials:
            by_key[normalise_key(material.key)] = material
        self._by_key = MappingProxyType(by_key)
        by_uns: dict[str, Material] = {}
        for material in by_key.values():
            if material.uns:
                by_uns.setdefault(normalise_key(material.uns), material)
        self._by_uns = MappingProxyType(by_uns)
        by_alias = {
            normalise_key(a.alias): a
            for a in aliases
            if normalise_key(a.key) in by_key and normalise_key(a.alias) not in by_key
        }
        self._by_alias = MappingProxyType(by_alias)

    def get(self, key: str) -> Material:
        """The material called ``key``: its key, UNS number or a trade alias.

        Raises NotFoundError naming the closest keys when there is none.
        """
        return self.resolve(key)[0]

    def resolve(self, key: str) -> tuple[Material, Alias | None]:
        """The material ``key`` names and, when it was an alias, the alias with its source.

        Accepts what a shop writes: ``304``, ``ss304``, ``AISI 304``, ``304 stainless``,
        ``S30400``, ``UNS S30400``, ``1.4301``, ``X5CrNi18-10``, ``17-4 PH``.
        """
        wanted = normalise_key(key)
        for candidate in _bare_forms(wanted):
            found = self._exact(candidate)
            if found is not None:
                return found
        raise NotFoundError(f"unknown material '{key}'", field="material", hint=self._hint(wanted))

    def _exact(self, wanted: str) -> tuple[Material, Alias | None] | None:
        found = self._by_key.get(wanted) or self._by_uns.get(wanted)
        if found is not None:
            return found, None
        alias = self._by_alias.get(wanted)
        if alias is not None:
            return self._by_key[normalise_key(alias.key)], alias
        return None

    def _hint(self, wanted: str) -> str:
        """The closest keys: swapped characters (4410 for 4140) first, then difflib's."""
        names_of = {k: m.key for k, m in self._by_key.items()}
        names_of.update({a: self._by_alias[a].key for a in self._by_alias})
        swapped = [k for k in self._by_key if sorted(k) == sorted(wanted)]
        close = difflib.get_close_matches(wanted, list(names_of), n=5, cutoff=0.6)
        names = list(dict.fromkeys(names_of[c] for c in swapped + close))[:3]
        hint = "see `sawplan materials`"
        return f"did you mean {_or_list(names)}? {hint}" if names else hint

    __getitem__ = get

    def __contains__(self, key: object) -> bool:
        if not isinstance(key, str):
            return False
        wanted = normalise_key(key)
        return any(self._exact(c) is not None for c in _bare_forms(wanted))

    def aliases_of(self, key: str) -> list[Alias]:
        """The trade aliases of the material ``key``, in table order."""
        material = self.get(key)
        return [
            a
            for a in self._by_alias.values()
            if normalise_key(a.key) == normalise_key(material.key)
        ]

    def __iter__(self) -> Iterator[Material]:
        return iter(self._by_key.values())

    def __len__(self) -> int:
        return len(self._by_key)

    def keys(self) -> list[str]:
        """Material keys as written in the tables, in table order."""
        return [m.key for m in self._by_key.values()]

    def groups(self) -> list[str]:
        """Groups that have at least one material, in the canonical order."""
        present = {m.group for m in self}
        return [g for g in GROUPS if g in present]

    def in_group(self, group: str) -> list[Material]:
        """Materials of one group, in table order; unknown group is an error."""
        if group not in GROUPS:
            raise BadDataError(
                f"unknown group '{group}'; expected one of {', '.join(GROUPS)}", field="group"
            )
        return [m for m in self if m.group == group]


def _bare_forms(wanted: str) -> list[str]:
    """``wanted`` and the same with one trade prefix and/or suffix taken off."""
    forms = [wanted]
    for prefix in ("", *_PREFIXES):
        if prefix and not (wanted.startswith(prefix) and len(wanted) > len(prefix)):
            continue
        rest = wanted[len(prefix) :]
        forms.append(rest)
        forms += [rest[: -len(s)] for s in _SUFFIXES if rest.endswith(s) and len(rest) > len(s)]
    return list(dict.fromkeys(forms))


def _or_list(names: list[str]) -> str:
    if len(names) == 1:
        return names[0]
    return f"{', '.join(names[:-1])} or {names[-1]}"


def load_catalogue(user_csv: str | Path | None = None) -> Catalogue:
    """The packaged catalogue, with a user file's rows added or overriding.

    The user file is ``user_csv`` or else ``$SAWPLAN_MATERIALS``; a user row
    whose key matches a packaged one replaces it.  Source columns may be left
    out or blank in a user file: they default to "user file".
    """
    field = "materials file"
    if user_csv is None:
        user_csv = os.environ.get(ENV_VAR) or None
        field = ENV_VAR
    if user_csv is None:
        return _packaged_catalogue()
    path = Path(user_csv)
    try:
        user_rows = _read_table(path, label=str(user_csv), origin=str(user_csv), user=True)
    except FileNotFoundError:
        raise NotFoundError(f"no such file: {user_csv}", field=field) from None
    merged = {normalise_key(m.key): m for m in _packaged_materials()}
    for material in user_rows:
        merged[normalise_key(material.key)] = material
    return Catalogue(list(merged.values()), packaged_aliases())


@lru_cache(maxsize=1)
def _packaged_materials() -> tuple[Material, ...]:
    path = data_file("materials.csv")
    return tuple(_read_table(path, label=path.name, origin=CATALOGUE_ORIGIN, user=False))


@lru_cache(maxsize=1)
def _packaged_catalogue() -> Catalogue:
    return Catalogue(_packaged_materials(), packaged_aliases())


ALIAS_RELATIONS = ("same", "corresponding", "near")


@lru_cache(maxsize=1)
def packaged_aliases() -> tuple[Alias, ...]:
    """The trade aliases of ``data/material_aliases.csv``, each with its source."""
    path = data_file("material_aliases.csv")
    with path.open(newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    aliases = []
    for line, row in enumerate(rows, start=2):
        alias = Alias(**{k: (v or "").strip() for k, v in row.items()})
        if (
            not (alias.alias and alias.key and alias.source)
            or alias.relation not in ALIAS_RELATIONS
        ):
            raise BadDataError(
                "needs alias, key, relation and source", field=f"{path.name} row {line}"
            )
        aliases.append(alias)
    return tuple(aliases)


def _read_table(path: Path, *, label: str, origin: str, user: bool) -> list[Material]:
    """Read and validate one materials CSV (stdlib csv; UTF-8, BOM allowed).

    A missing file raises FileNotFoundError for the caller to name.
    """
    from sawplan.user_files import MB, open_text_limited

    try:
        with open_text_limited(
            path, 5 * MB, "materials file", why="a materials file is a short text file", shown=label
        ) as handle:
            text_rows = list(csv.reader(handle))
    except NotFoundError:
        raise FileNotFoundError(path) from None
    except UnicodeDecodeError:
        raise BadDataError("not a UTF-8 text file (save the CSV as UTF-8)", field=label) from None
    if not text_rows:
        raise BadDataError("empty file, expected a header row of material columns", field=label)
    header = [name.strip() for name in text_rows[0]]
    needed = REQUIRED_COLUMNS if user else ALL_COLUMNS
    missing = [col for col in needed if col not in header]
    if missing:
        raise BadDataError(f"missing columns: {', '.join(missing)}", field=label)

    materials: list[Material] = []
    first_line: dict[str, int] = {}
    for line_no, cells in enumerate(text_rows[1:], start=2):
        if not any(cell.strip() for cell in cells):
            continue  # blank line
        row = {name: (cells[i].strip() if i < len(cells) else "") for i, name in enumerate(header)}
        material = _parse_row(row, where=f"{label} row {line_no}", origin=origin, user=user)
        norm = normalise_key(material.key)
        if norm in first_line:
            raise BadDataError(
                f"duplicate key '{material.key}' (first on row {first_line[norm]})",
                field=f"{label} row {line_no}, key",
            )
        first_line[norm] = line_no
        materials.append(material)
    return materials


def _parse_row(row: dict[str, str], *, where: str, origin: str, user: bool) -> Material:
    from sawplan.fields import Field, check_text, field_for

    def text(column: str, *, required: bool) -> str:
        value = row.get(column, "")
        if required and not value:
            raise BadDataError("must not be empty", field=f"{where}, {column}")
        rule = field_for(f"materials.{column}") or Field(column, column, dimension="text")
        check_text(rule, value, words=f"{where}, {column}", collapse=False)
        return value

    key = text("key", required=True)
    group = text("group", required=True)
    if group not in GROUPS:
        raise BadDataError(
            f"expected one of {', '.join(GROUPS)}, got '{group}'", field=f"{where}, group"
        )
    numbers: dict[str, float] = {}
    sources: dict[str, str] = {}
    for column, source_column in NUMERIC_COLUMNS.items():
        numbers[column] = _plausible(row.get(column, ""), column, field=f"{where}, {column}")
        source = text(source_column, required=False)
        if not source:
            if not user:
                raise BadDataError("must name a source", field=f"{where}, {source_column}")
            source = USER_SOURCE
        sources[source_column] = source
    hardens = row.get("work_hardens", "").casefold()
    if hardens not in _YES | _NO:
        raise BadDataError(
            f"expected yes or no, got '{row.get('work_hardens', '')}'",
            field=f"{where}, work_hardens",
        )
    return Material(
        key=key,
        designation=text("designation", required=True),
        uns=text("uns", required=False),
        standard=text("standard", required=False),
        group=group,
        work_hardens=hardens in _YES,
        notes=text("notes", required=False),
        origin=origin,
        **numbers,
        **sources,
    )


def _plausible(raw: str, column: str, *, field: str) -> float:
    """A number of the row inside its field's range (``sawplan.fields``, ``materials.*``)."""
    from sawplan.fields import check, field_for

    try:
        value = float(raw)
    except ValueError:
        value = math.nan
    if not (math.isfinite(value) and value > 0):
        raise BadDataError(f"expected a positive number, got '{raw}'", field=field)
    rule = field_for(f"materials.{column}")
    scale = 100.0 if column == "cutting_rate_cm2_min" else 1.0  # the field's unit: mm²/min
    check(rule, value * scale, words=f"{field} ({rule.words})")
    return value
