"""Tooth form and set: chosen from the material group, the section and the pitch.

Common practice, in one line each: a positive rake (hook) for large solids
and gummy or work-hardening materials, regular teeth for general work, skip
teeth for soft non-ferrous metals and plastics, a wavy set for thin walls and
whenever fewer than three teeth are in the cut.
"""

from __future__ import annotations

from dataclasses import dataclass

from sawplan.cutting import constants as K
from sawplan.cutting.pitch import Pitch
from sawplan.display import Q, say

SKIP_MAX_TPI = 6.0  # memory: skip-tooth blades are made in coarse pitches only
HOOK_MAX_TPI = 10.0  # memory: positive-rake forms are made up to about 10 TPI


@dataclass(frozen=True)
class TeethChoice:
    tooth_form: str  # regular | hook | skip
    tooth_set: str  # raker | wavy | alternate
    form_why: str
    set_why: str

    @property
    def gullet_factor(self) -> float:
        """c in A_g = c·p² for this form (memory; data/cutting_constants.toml)."""
        return K.number("gullet", f"c_{self.tooth_form}")


def choose_teeth(
    group: str,
    pitch: Pitch,
    *,
    is_solid: bool,
    widest_chord_mm: float,
    fewest_teeth: float,
    thin_wall: bool,
) -> TeethChoice:
    """Form and set with one line of why each (common practice)."""
    soft = group in K.value("teeth", "soft_groups")
    gummy = group in K.value("teeth", "gummy_groups")
    large = is_solid and widest_chord_mm >= K.number("teeth", "large_solid_mm")
    name = group.replace("-", " ")
    if soft and pitch.tpi_fine <= SKIP_MAX_TPI and not thin_wall:
        form, form_why = "skip", f"skip teeth: wide gullets clear the long soft chips of {name}"
    elif gummy and pitch.tpi_fine <= HOOK_MAX_TPI:
        form, form_why = (
            "hook",
            f"hook (positive rake) teeth: they bite under {name} instead of rubbing it",
        )
    elif large and pitch.tpi_fine <= HOOK_MAX_TPI:
        form, form_why = (
            "hook",
            say(
                "hook (positive rake) teeth: deeper gullets and a cleaner bite across the {} chord",
                Q("length", widest_chord_mm),
            ),
        )
    else:
        form, form_why = (
            "regular",
            "regular teeth: the general-purpose form for this pitch and section",
        )
    min_teeth = K.number("bite", "min_teeth")
    if thin_wall or fewest_teeth < min_teeth:
        where = "the widest chord" if is_solid else "the metal at the thinnest depth"
        tooth_set, set_why = (
            "wavy",
            f"wavy set: with {fewest_teeth:.1f} teeth over {where}, groups of teeth share each bite",
        )
    elif soft:
        tooth_set, set_why = "alternate", "alternate set: a free-cutting set for soft material"
    else:
        tooth_set, set_why = "raker", "raker set: the general-purpose set for solids and sections"
    return TeethChoice(form, tooth_set, form_why, set_why)
