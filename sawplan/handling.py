"""Can a person lift this piece?  The revised NIOSH lifting equation.

Waters, Putz-Anderson, Garg & Fine (1993), *Ergonomics* 36:749; NIOSH
Applications Manual for the Revised NIOSH Lifting Equation, DHHS (NIOSH)
Pub. 94-110 (1994, revised 2021).  Metric form:

    RWL = LC · HM · VM · DM · AM · FM · CM,   LI = load / RWL

with LC = 23 kg, HM = 25/H, VM = 1 − 0.003·|V − 75|, DM = 0.82 + 4.5/D,
AM = 1 − 0.0032·A (H, V, D in cm, A in degrees), FM from Table 5 and CM from
Table 7 of the manual.  The equation's own limits apply: H below 25 cm counts
as 25 cm and beyond 63 cm gives HM = 0; V beyond 175 cm gives VM = 0; D below
25 cm counts as 25 cm and beyond 175 cm gives DM = 0; A beyond 135° gives
AM = 0; F below 0.2 lifts/min counts as 0.2 (Pub. 94-110 §1.3).

The handling class on top of the lifting index is shop practice, not part of
the standard: see :func:`assess_lift`.  What the piece is (it rolls, it is
long, its edges cut) is applied in ``sawplan.piece_handling``.  The estimate
never replaces the shop's own rules or local regulations.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from dataclasses import dataclass, fields

from sawplan.display import Q, say
from sawplan.errors import BadDataError

LOAD_CONSTANT_KG = 23.0
H_MIN_CM, H_MAX_CM = 25.0, 63.0
V_OPTIMUM_CM, V_MAX_CM = 75.0, 175.0
D_MIN_CM, D_MAX_CM = 25.0, 175.0
A_MAX_DEG = 135.0
F_MIN_PER_MIN = 0.2
DURATION_MAX_H = 8.0

# Pub. 94-110 Table 5 (frequency multiplier), laid out as printed.  Rows:
# lifts/min.  Columns: work duration <= 1 h, <= 2 h, <= 8 h, each for
# V < 75 cm and V >= 75 cm (the table's 30 in).  Above 15 lifts/min FM = 0.
_FM_DURATIONS_H = (1.0, 2.0, 8.0)
_FM_ROWS: tuple[tuple[float, tuple[float, ...]], ...] = (
    # F      <=1h V<75, V>=75   <=2h V<75, V>=75   <=8h V<75, V>=75
    (0.2, (1.00, 1.00, 0.95, 0.95, 0.85, 0.85)),
    (0.5, (0.97, 0.97, 0.92, 0.92, 0.81, 0.81)),
    (1.0, (0.94, 0.94, 0.88, 0.88, 0.75, 0.75)),
    (2.0, (0.91, 0.91, 0.84, 0.84, 0.65, 0.65)),
    (3.0, (0.88, 0.88, 0.79, 0.79, 0.55, 0.55)),
    (4.0, (0.84, 0.84, 0.72, 0.72, 0.45, 0.45)),
    (5.0, (0.80, 0.80, 0.60, 0.60, 0.35, 0.35)),
    (6.0, (0.75, 0.75, 0.50, 0.50, 0.27, 0.27)),
    (7.0, (0.70, 0.70, 0.42, 0.42, 0.22, 0.22)),
    (8.0, (0.60, 0.60, 0.35, 0.35, 0.18, 0.18)),
    (9.0, (0.52, 0.52, 0.30, 0.30, 0.00, 0.15)),
    (10.0, (0.45, 0.45, 0.26, 0.26, 0.00, 0.13)),
    (11.0, (0.41, 0.41, 0.00, 0.23, 0.00, 0.00)),
    (12.0, (0.37, 0.37, 0.00, 0.21, 0.00, 0.00)),
    (13.0, (0.00, 0.34, 0.00, 0.00, 0.00, 0.00)),
    (14.0, (0.00, 0.31, 0.00, 0.00, 0.00, 0.00)),
    (15.0, (0.00, 0.28, 0.00, 0.00, 0.00, 0.00)),
)
_FM_FREQUENCIES = tuple(f for f, _ in _FM_ROWS)

# Pub. 94-110 Table 7 (coupling multiplier): (V < 75 cm, V >= 75 cm).
COUPLINGS: dict[str, tuple[float, float]] = {
    "good": (1.00, 1.00),
    "fair": (0.95, 1.00),
    "poor": (0.90, 0.90),
}

# Team lifting: a team of two may lift about 2/3 of the sum of their
# individual capacities (UK HSE guidance INDG143, from memory); and two people
# at ideal conditions handle up to about 35 kg (common practice).
TEAM_SHARE = 2.0 / 3.0
TEAM_IDEAL_KG = 35.0

CAUTION = "Know the weight before lifting; the shop's rules and local regulations govern."


@dataclass(frozen=True)
class LiftConditions:
    """Where and how often the piece is lifted.

    Defaults are the standard lifting location of the equation: hands 25 cm
    out and 75 cm up, 25 cm of travel, no twist, occasional lifts (0.2/min for
    up to an hour) and a good grip, where RWL = 23 kg.
    """

    horizontal_cm: float = 25.0  # H: ankles' mid-point to the hands, horizontally
    vertical_cm: float = 75.0  # V: floor to the hands at the origin
    travel_cm: float = 25.0  # D: vertical travel of the lift
    asymmetry_deg: float = 0.0  # A: twist away from straight ahead
    frequency_per_min: float = 0.2  # F: lifts per minute
    duration_h: float = 1.0  # continuous lifting session (<= 1, <= 2 or <= 8 h)
    coupling: str = "good"  # hand-to-object grip: good, fair, poor


@dataclass(frozen=True)
class LiftMultipliers:
    """The six multipliers of the equation, each between 0 and 1."""

    hm: float
    vm: float
    dm: float
    am: float
    fm: float
    cm: float

    @property
    def product(self) -> float:
        return self.hm * self.vm * self.dm * self.am * self.fm * self.cm


@dataclass(frozen=True)
class Handling:
    """How to move a piece of the given mass, and why."""

    mass_kg: float
    rwl_kg: float
    lifting_index: float  # mass / RWL; infinite when RWL is 0
    handling: str  # "one-person" / "two-person" / "lift-aid"
    advice: str
    caution: str
    horizontal_cm: float = H_MIN_CM  # H the limit was worked out for
    cautions: tuple[str, ...] = ()  # what this piece needs (sawplan.piece_handling)


def _check(c: LiftConditions) -> None:
    """Reject conditions the equation cannot take: one line naming the field."""
    for f in fields(c):
        if f.name == "coupling":
            continue
        value = getattr(c, f.name)
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise BadDataError(f"expected a number, got {value!r}", field=f.name)
        if not math.isfinite(value):
            raise BadDataError(f"expected a finite number, got {value}", field=f.name)
        if value < 0:
            raise BadDataError(f"must not be negative, got {value:g}", field=f.name)
    if c.duration_h <= 0:
        raise BadDataError("must be more than 0 h", field="duration_h")
    if c.duration_h > DURATION_MAX_H:
        raise BadDataError(
            f"the lifting equation covers sessions of at most 8 h, got {c.duration_h:g} h",
            field="duration_h",
        )
    if not isinstance(c.coupling, str) or c.coupling.strip().lower() not in COUPLINGS:
        raise BadDataError(
            f"expected one of {', '.join(COUPLINGS)}, got {c.coupling!r}", field="coupling"
        )


def frequency_multiplier(frequency_per_min: float, duration_h: float, vertical_cm: float) -> float:
    """FM from Pub. 94-110 Table 5, linear between rows (manual §1.3).

    Below 0.2 lifts/min the 0.2 row applies.  Beyond the last non-zero row of
    a column the table gives 0 and so do we (no interpolation towards zero:
    the conservative reading).
    """
    duration_index = next(i for i, h in enumerate(_FM_DURATIONS_H) if duration_h <= h)
    col = 2 * duration_index + (1 if vertical_cm >= V_OPTIMUM_CM else 0)
    column = [values[col] for _, values in _FM_ROWS]
    f = max(frequency_per_min, F_MIN_PER_MIN)
    i = bisect_right(_FM_FREQUENCIES, f) - 1
    if _FM_FREQUENCIES[i] == f:
        return column[i]
    if i + 1 >= len(_FM_FREQUENCIES) or column[i + 1] == 0:
        return 0.0
    f0, f1 = _FM_FREQUENCIES[i], _FM_FREQUENCIES[i + 1]
    return column[i] + (column[i + 1] - column[i]) * (f - f0) / (f1 - f0)


def lift_multipliers(c: LiftConditions) -> LiftMultipliers:
    """The six multipliers for conditions ``c`` (validated)."""
    _check(c)
    h = max(c.horizontal_cm, H_MIN_CM)
    hm = 0.0 if h > H_MAX_CM else H_MIN_CM / h
    vm = 0.0 if c.vertical_cm > V_MAX_CM else 1.0 - 0.003 * abs(c.vertical_cm - V_OPTIMUM_CM)
    d = max(c.travel_cm, D_MIN_CM)
    dm = 0.0 if d > D_MAX_CM else 0.82 + 4.5 / d
    am = 0.0 if c.asymmetry_deg > A_MAX_DEG else 1.0 - 0.0032 * c.asymmetry_deg
    fm = frequency_multiplier(c.frequency_per_min, c.duration_h, c.vertical_cm)
    low, high = COUPLINGS[c.coupling.strip().lower()]
    cm = high if c.vertical_cm >= V_OPTIMUM_CM else low
    return LiftMultipliers(hm=hm, vm=vm, dm=dm, am=am, fm=fm, cm=cm)


def recommended_weight_limit_kg(c: LiftConditions) -> float:
    """RWL in kg: the load nearly all healthy workers can lift for up to 8 h."""
    return LOAD_CONSTANT_KG * lift_multipliers(c).product


def team_limit_kg(rwl_kg: float) -> float:
    """Two-person limit: 2/3 of two people's RWL, and at most 35 kg scaled by RWL/23."""
    return min(TEAM_SHARE * 2.0 * rwl_kg, TEAM_IDEAL_KG * rwl_kg / LOAD_CONSTANT_KG)


def assess_lift(mass_kg: float, c: LiftConditions = LiftConditions()) -> Handling:
    """Classify the lift of one piece (common practice).

    - one-person: lifting index LI = mass/RWL ≤ 1 (the NIOSH design goal);
    - two-person: mass ≤ the team limit, the smaller of 2/3 of two people's
      combined RWL (team-lifting guidance, e.g. UK HSE) and about 35 kg at
      ideal conditions scaled by RWL/23 kg; the 2/3 rule is the smaller, so
      the team limit is 4/3 · RWL (30.7 kg at the standard location);
    - lift-aid: anything heavier, or any lift whose conditions give RWL = 0
      (out of the equation's range): hoist, crane, lift table.
    """
    if isinstance(mass_kg, bool) or not isinstance(mass_kg, int | float):
        raise BadDataError(f"expected a number, got {mass_kg!r}", field="mass_kg")
    if not (math.isfinite(mass_kg) and mass_kg > 0):
        raise BadDataError(f"expected a positive mass, got {mass_kg}", field="mass_kg")
    rwl = recommended_weight_limit_kg(c)
    if rwl <= 0:
        return Handling(
            mass_kg=mass_kg,
            rwl_kg=0.0,
            lifting_index=math.inf,
            handling="lift-aid",
            advice=(
                "use a hoist, crane or lift table: these lifting conditions are outside "
                "what the lifting equation allows for manual lifting"
            ),
            caution=CAUTION,
            horizontal_cm=c.horizontal_cm,
        )
    li = mass_kg / rwl
    team = team_limit_kg(rwl)
    mass, limit, team_q = Q("mass", mass_kg), Q("mass", rwl), Q("mass", team)
    if li <= 1.0:
        handling = "one-person"
        advice = say("one person: {} is within the recommended limit of {}", mass, limit)
    elif mass_kg <= team:
        handling = "two-person"
        advice = say(
            "two people, or a lift aid: {} is over one person's limit of {} but within "
            "a two-person team's {}",
            mass,
            limit,
            team_q,
        )
    else:
        handling = "lift-aid"
        advice = say(
            "use a hoist, crane or lift table: {} is over a two-person team's {}", mass, team_q
        )
    return Handling(
        mass_kg=mass_kg,
        rwl_kg=rwl,
        lifting_index=li,
        handling=handling,
        advice=advice,
        caution=CAUTION,
        horizontal_cm=c.horizontal_cm,
    )
