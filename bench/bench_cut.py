"""Time of the cutting model through a 180 mm round of 1045 and a 3×4 bundle of tubes.

Goals: one integration (time through the section for one pitch) under 5 ms on
the round; the bundle's integration, chord profile included (parse, sample,
integrate), under 10 ms.  Also shown: evaluating one blade, and full
recommendations (every catalogue pitch; the bundle also against one tube cut
alone).  Run: python bench/bench_cut.py
"""

from __future__ import annotations

import statistics
import time
from collections.abc import Callable

from sawplan.cutting import evaluate, recommend
from sawplan.cutting.feed import integrate, sample
from sawplan.cutting.pitch import parse_pitch
from sawplan.cutting.plan import make_plan, score
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

GOAL_MS = 5.0
MATERIAL, SECTION = "1045", "round 180mm"  # a heavy solid: the most chord samples
BUNDLE_GOAL_MS = 10.0
BUNDLE = "tube 60mm 3mm --bundle 3x4"


def per_call_ms(fn: Callable[[], object], rounds: int = 7, calls: int = 50) -> float:
    fn()  # warm caches (tables, cached properties)
    times = []
    for _ in range(rounds):
        start = time.perf_counter()
        for _ in range(calls):
            fn()
        times.append((time.perf_counter() - start) / calls)
    return statistics.median(times) * 1000


def main() -> int:
    material = load_catalogue().get(MATERIAL)
    saw = get_saw("mid-production")
    pitch = parse_pitch("2/3")
    plan = make_plan(
        material,
        parse_section(SECTION),
        saw,
        dry=False,
        blade_material="bi-metal",
        band_speed_m_min=None,
        calibration=1.0,
    )
    constant = not saw.force_limited

    def fresh_section_integration() -> object:
        # a new Section each time, so the chord profile is really computed
        section = parse_section(SECTION)
        return integrate(pitch, sample(section), plan.base, constant_feed=constant)

    cases = [
        (
            "integrate one pitch (samples reused)",
            lambda: integrate(pitch, plan.quad, plan.base, constant_feed=constant),
        ),
        ("parse + sample + integrate", fresh_section_integration),
        ("score one pitch (tooth form + integrate)", lambda: score(plan, pitch)),
        (
            "evaluate 2/3 (whole result)",
            lambda: evaluate(material, parse_section(SECTION), saw, "2/3"),
        ),
        (
            "recommend (all pitches, whole result)",
            lambda: recommend(material, parse_section(SECTION), saw),
        ),
    ]
    worst_integration = 0.0
    for label, fn in cases:
        ms = per_call_ms(fn)
        if label.startswith(("integrate", "parse")):
            worst_integration = max(worst_integration, ms)
        print(f"{label:42s} {ms:7.3f} ms")
    flag = "ok" if worst_integration < GOAL_MS else "SLOW"
    print(
        f"integration through a {SECTION}: {worst_integration:.3f} ms (goal < {GOAL_MS:g} ms) {flag}"
    )
    tube = load_catalogue().get("1018")
    bundle_plan = make_plan(
        tube,
        parse_section(BUNDLE),
        saw,
        dry=False,
        blade_material="bi-metal",
        band_speed_m_min=None,
        calibration=1.0,
    )
    four_six = parse_pitch("4/6")

    def fresh_bundle_integration() -> object:
        section = parse_section(BUNDLE)
        return integrate(four_six, sample(section), bundle_plan.base, constant_feed=constant)

    bundle_ms = per_call_ms(fresh_bundle_integration)
    print(f"{'bundle 3x4 tubes: parse + sample + integrate':42s} {bundle_ms:7.3f} ms")
    rec_ms = per_call_ms(lambda: recommend(tube, parse_section(BUNDLE), saw), rounds=3, calls=5)
    print(f"{'recommend bundle 3x4 (with single tube)':42s} {rec_ms:7.3f} ms")
    flag = "ok" if bundle_ms < BUNDLE_GOAL_MS else "SLOW"
    print(f"bundle integration: {bundle_ms:.3f} ms (goal < {BUNDLE_GOAL_MS:g} ms) {flag}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
