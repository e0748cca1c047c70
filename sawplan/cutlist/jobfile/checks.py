"""Checks of a job's parts against its stock, with one-line errors naming the part.

At load time every part needs stock of its material and section that it fits
on.  Whether the bars on hand hold every piece is the planner's business: a
short job is planned with what there is, and the rest goes on an order list.
"""

from __future__ import annotations

from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.types import Job
from sawplan.errors import BadDataError


def _mm(v: float) -> str:
    return f"{v:.6g} mm"


def check_parts_have_stock(job: Job, lines: TomlLines) -> None:
    """Fail unless each part has stock of its material and section that it fits on.

    The part must fit on the longest bar of the job (on hand, or listed with
    count 0 as a length to buy) once trim and grip are taken off.
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
        # Lines with count 0 are lengths to buy: a part that fits only those is short, not wrong.
        longest = max((s.length_mm for s in same), default=0.0)
        usable = longest - h.trim_mm - h.grip_mm
        if part.length_mm > usable:
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
