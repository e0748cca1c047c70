"""Checks of a job's parts against its stock, with one-line errors naming the part.

At load time every part needs stock of its material and section that it fits
on; once the kerf is known, the bars on hand must hold all the pieces.
"""

from __future__ import annotations

import math

from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.types import Job
from sawplan.errors import BadDataError, SawplanError


def _mm(v: float) -> str:
    return f"{v:.6g} mm"


def check_parts_have_stock(job: Job, lines: TomlLines) -> None:
    """Fail unless each part has stock of its material and section that it fits on.

    The part must fit on the longest bar on hand once trim and grip are taken off.
    """
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
