"""How to move a bar or a sawn piece: the lifting equation applied to what the piece is.

The revised NIOSH lifting equation (``sawplan.handling``) rates a two-handed
lift of a compact load.  A saw shop lifts bars that roll, sections that tip,
sawn ends that cut, and bars several metres long.  This module says which:

- **Reach (H) from the piece.**  When the hands' reach is not given, the
  NIOSH applications manual (Pub. 94-110 §1.3.1, from memory) estimates it
  from the object's width W in the sagittal plane: H = 20 + W/2 cm with the
  hands 25 cm or more above the floor, H = 25 + W/2 cm below.  A short piece
  is taken with its narrowest side to the body (W = the smaller of its
  length and its section's width); a long bar is gripped at its end, the
  hands either side of the section (W = the section's width).
- **Long bars** (common practice).  From about 2 m (6½ ft) a bar bends and
  swings and one person cannot hold it level at its middle: two people, one
  at each end, lift and walk together.  Each carries half a uniform bar, so
  the team rule of ``sawplan.handling`` applies to the whole weight.  UK HSE
  guidance on manual handling (L23, from memory) already counts a load with
  any side over about 75 cm as bulky and unwieldy.  On a crane, a bar from
  about 3 m hangs from a lifting beam (spreader) with two slings so it stays
  level and cannot slide out of a single sling, with a tag line to steer it
  (common practice).
- **Shape** (common practice).  Rounds, tubes, hexagons and octagons roll;
  angles, channels and I-beams tip over on their legs and flanges; every
  sawn end is sharp and burred.

None of this replaces the shop's rules, the crane's and slings' ratings or
local regulations.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from sawplan.display import Phrase, Q, say
from sawplan.handling import Handling, LiftConditions, assess_lift, team_limit_kg

LONG_PIECE_MM = 2000.0  # two people, one at each end (common practice)
LIFTING_BEAM_MM = 3000.0  # on a crane: a lifting beam and two slings (common practice)
LOW_HANDS_CM = 25.0  # below this the manual's estimate of H adds 5 cm (Pub. 94-110 §1.3.1)

ROLLS = frozenset({"round", "tube", "hex", "octagon"})
TIPS = frozenset({"angle", "channel", "ibeam"})

ROLL_CAUTION = (
    "it rolls: chock it or lay it in a vee block, and keep hands and feet out of its path"
)
TIP_CAUTION = "it tips over on its legs or flanges: set it down on a flat face or block it"
EDGE_CAUTION = (
    "sawn ends are sharp and burred: deburr them and carry the piece in cut-resistant "
    "gloves (never near a moving blade)"
)


@dataclass(frozen=True)
class Piece:
    """A bar or a sawn piece, as far as moving it goes (sizes in mm)."""

    shape: str  # a sections shape key: round, tube, flat, angle, ibeam...
    length_mm: float
    width_mm: float  # the section's width as it lies

    @property
    def long(self) -> bool:
        return self.length_mm >= LONG_PIECE_MM


def reach_cm(piece: Piece, vertical_cm: float) -> float:
    """H estimated from the piece's width in the sagittal plane (Pub. 94-110 §1.3.1)."""
    width_cm = (piece.width_mm if piece.long else min(piece.width_mm, piece.length_mm)) / 10
    return (20.0 if vertical_cm >= LOW_HANDS_CM else 25.0) + width_cm / 2


def assess_piece(
    mass_kg: float,
    piece: Piece,
    conditions: LiftConditions | None = None,
    *,
    reach_given: bool = False,
) -> Handling:
    """The handling class, advice and cautions for one piece.

    Without ``reach_given`` the hands' reach comes from the piece's size
    (:func:`reach_cm`), never closer than the conditions' own value.
    """
    c = conditions or LiftConditions()
    if not reach_given:
        c = replace(c, horizontal_cm=max(c.horizontal_cm, reach_cm(piece, c.vertical_cm)))
    lift = assess_lift(mass_kg, c)
    handling, advice = lift.handling, lift.advice
    if piece.long and handling != "lift-aid":
        handling = "two-person"
        team = team_limit_kg(lift.rwl_kg)
        advice = say(
            "two people, one at each end, lifting together (a {} bar is too long for one): "
            "{} is within a two-person team's {}",
            Q("bar_length", piece.length_mm),
            Q("mass", mass_kg),
            Q("mass", team),
        )
    return replace(lift, handling=handling, advice=advice, cautions=cautions(piece, handling))


def cautions(piece: Piece, handling: str) -> tuple[Phrase | str, ...]:
    """What this piece needs besides its weight: it rolls or tips, it is long, its ends cut."""
    out: list[Phrase | str] = []
    if piece.shape in ROLLS:
        out.append(ROLL_CAUTION)
    elif piece.shape in TIPS:
        out.append(TIP_CAUTION)
    if piece.long:
        if handling == "lift-aid" and piece.length_mm >= LIFTING_BEAM_MM:
            out.append(
                say(
                    "a {} bar on a crane: lift it with a lifting beam and two slings so it "
                    "hangs level, and steer it with a tag line",
                    Q("bar_length", piece.length_mm),
                )
            )
        else:
            out.append(
                "a long bar bends and swings: clear the path and agree the signals before you lift"
            )
    out.append(EDGE_CAUTION)
    return tuple(out)
