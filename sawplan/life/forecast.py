"""How many blades a job needs: area to cut against blade life.

With a fitted Weibull life the count is random: blades are used one after
another until the sum of their lives covers the area, and the answer is the
smallest count k with P(L₁ + … + L_k ≥ area) ≥ confidence.  The probabilities
come from a seeded Monte-Carlo simulation (numpy ``Generator``, vectorised), so
the same inputs always give the same answer.  With a single known life L the
count is ⌈area / L⌉.

A blade already on the saw can be counted as the first one (``used_area_cm2``):
its remaining life is drawn from the life distribution given that it has
survived that far, (L/η)^β = (u/η)^β + E with E ~ Exp(1).

The work is bounded by lives drawn, not by blades: a run that needs n blades
draws about n lives, so the number of runs falls as n grows (at most
``MAX_DRAWS`` lives in all).  Past ``NORMAL_FROM`` blades per run the sum of
the lives is so close to normal (central limit theorem) that it is used
instead of drawing: the sum of k lives has mean kμ and variance kσ², with
μ = ηΓ(1+1/β) and σ² = η²(Γ(1+2/β) − Γ(1+1/β)²) (method "weibull-normal").
Past ``MAX_BLADES`` blades per run the forecast is refused: the area or the
lives are wrong.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from sawplan.errors import BadDataError
from sawplan.life.weibull import WeibullFit, WeibullNotFitted

DEFAULT_SEED = 20_240_611
MAX_BLADES = 100_000  # blades per run: more is a wrong area or a wrong life
MAX_DRAWS = 5_000_000  # lives drawn by one simulation (work, and memory per block)
NORMAL_FROM = 2_000  # blades per run from which the sum of lives is taken as normal
MIN_RUNS = 1_000  # the fewest simulated runs the work cap leaves
BLOCK_CELLS = 1_000_000  # lives drawn at once (8 MB of floats)


@dataclass(frozen=True)
class Forecast:
    """Blades needed to cut ``area_cm2`` at ``confidence``.

    ``blades_needed`` counts the partly used blade on the saw when
    ``used_area_cm2`` was given; ``new_blades_needed`` does not.
    ``probability_curve`` pairs a blade count k with P(k blades cut the area)
    (under the normal approximation, only from P ≈ 0.001 to 0.999).
    ``simulations`` is the number of simulated runs and ``draws`` the lives
    drawn for them (both 0 when nothing was drawn).
    """

    area_cm2: float
    blades_needed: int
    new_blades_needed: int
    expected_blades: float
    confidence: float
    achieved_probability: float
    method: Literal["weibull-simulation", "weibull-normal", "deterministic"]
    probability_curve: tuple[tuple[int, float], ...]
    used_area_cm2: float
    simulations: int
    seed: int | None
    draws: int = 0


def forecast_blades(
    area_cm2: float,
    fit: WeibullFit | WeibullNotFitted | None,
    *,
    deterministic_life_cm2: float | None = None,
    confidence: float = 0.9,
    simulations: int = 20_000,
    seed: int | None = DEFAULT_SEED,
    used_area_cm2: float = 0.0,
) -> Forecast:
    """Blades needed for ``area_cm2`` of cut at ``confidence``.

    A usable ``fit`` is simulated; otherwise ``deterministic_life_cm2`` is
    required and the count is ⌈area/life⌉.  ``deterministic_life_cm2`` wins when
    both are given (the caller chose a fixed life on purpose).
    """
    _require(area_cm2 > 0.0 and math.isfinite(area_cm2), "area_cm2", "a number above 0", area_cm2)
    _require(0.0 < confidence < 1.0, "confidence", "between 0 and 1 (exclusive)", confidence)
    _require(
        used_area_cm2 >= 0.0 and math.isfinite(used_area_cm2),
        "used_area_cm2",
        "0 or more",
        used_area_cm2,
    )
    has_fit = fit is not None and fit.fitted
    if deterministic_life_cm2 is not None:
        _require(
            deterministic_life_cm2 > 0.0 and math.isfinite(deterministic_life_cm2),
            "deterministic_life_cm2",
            "a number above 0",
            deterministic_life_cm2,
        )
        return _deterministic(area_cm2, deterministic_life_cm2, confidence, used_area_cm2)
    if not has_fit:
        reason = fit.reason if isinstance(fit, WeibullNotFitted) else "no life fit given"
        raise BadDataError(
            f"is needed when there is no Weibull fit ({reason})", field="deterministic_life_cm2"
        )
    _require(simulations >= 100, "simulations", "at least 100", simulations)
    assert isinstance(fit, WeibullFit)
    per_run = blades_per_run(area_cm2, fit, used_area_cm2)
    if per_run > MAX_BLADES:
        raise BadDataError(
            f"needs about {per_run:,.0f} blades, more than {MAX_BLADES:,}; "
            "check the area and the blade lives",
            field="area_cm2",
        )
    if per_run > NORMAL_FROM:
        return _normal(area_cm2, fit, confidence, seed, used_area_cm2)
    # fewer runs when each needs many blades: the work is the lives drawn
    runs = min(simulations, max(MIN_RUNS, MAX_DRAWS // math.ceil(per_run + 1)))
    return _simulate(area_cm2, fit, confidence, runs, seed, used_area_cm2)


def blades_per_run(area_cm2: float, fit: WeibullFit, used_area_cm2: float = 0.0) -> float:
    """About how many blades one run takes: area ÷ mean life, plus the blade on the saw."""
    return area_cm2 / fit.mean_life_cm2 + (1.0 if used_area_cm2 > 0.0 else 0.0)


def life_moments(shape: float, scale_cm2: float) -> tuple[float, float]:
    """Mean and variance of a Weibull life: ηΓ(1+1/β) and η²(Γ(1+2/β) − Γ(1+1/β)²)."""
    g1 = math.gamma(1.0 + 1.0 / shape)
    g2 = math.gamma(1.0 + 2.0 / shape)
    return scale_cm2 * g1, scale_cm2**2 * max(g2 - g1 * g1, 0.0)


def deterministic_count(area_cm2: float, life_cm2: float) -> int:
    """⌈area/life⌉, treating a quotient within 1e-9 of a whole number as whole.

    Floating division can put an exact multiple a hair above the integer
    (1.1/0.1 = 11.000000000000002); that must not cost an extra blade.
    """
    q = area_cm2 / life_cm2
    nearest = round(q)
    if math.isclose(q, nearest, rel_tol=1e-9, abs_tol=1e-12):
        return int(nearest)
    return math.ceil(q)


def _deterministic(
    area_cm2: float, life_cm2: float, confidence: float, used_area_cm2: float
) -> Forecast:
    if used_area_cm2 > 0.0:
        remaining = max(life_cm2 - used_area_cm2, 0.0)
        rest = area_cm2 - remaining
        new = 0 if rest <= 0.0 else deterministic_count(rest, life_cm2)
        needed = 1 + new
    else:
        new = needed = deterministic_count(area_cm2, life_cm2)
    curve = tuple((k, 1.0 if k >= needed else 0.0) for k in range(1, needed + 1))
    return Forecast(
        area_cm2=area_cm2,
        blades_needed=needed,
        new_blades_needed=new,
        expected_blades=float(needed),
        confidence=confidence,
        achieved_probability=1.0,
        method="deterministic",
        probability_curve=curve,
        used_area_cm2=used_area_cm2,
        simulations=0,
        seed=None,
    )


def _simulate(
    area_cm2: float,
    fit: WeibullFit,
    confidence: float,
    simulations: int,
    seed: int | None,
    used_area_cm2: float,
) -> Forecast:
    """Count, per simulated run, how many blades it takes to cover the area."""
    import numpy as np

    rng = np.random.default_rng(seed)
    beta, eta = fit.shape, fit.scale_cm2
    total = np.zeros(simulations)
    count = np.zeros(simulations, dtype=np.int64)
    if used_area_cm2 > 0.0:
        # remaining life of the blade on the saw, given it has lasted used_area_cm2
        base = (used_area_cm2 / eta) ** beta
        life = eta * (base + rng.standard_exponential(simulations)) ** (1.0 / beta)
        total += life - used_area_cm2
        count += 1
    open_runs = np.flatnonzero(total < area_cm2)
    block = max(4, min(256, math.ceil(1.25 * area_cm2 / fit.mean_life_cm2) + 2))
    draws = int(count.sum())
    while open_runs.size:
        block = max(4, min(block, BLOCK_CELLS // open_runs.size))
        lives = eta * rng.weibull(beta, size=(open_runs.size, block))
        draws += lives.size
        sums = total[open_runs, None] + np.cumsum(lives, axis=1)
        reached = sums >= area_cm2
        done = reached.any(axis=1)
        first = np.argmax(reached, axis=1)
        count[open_runs[done]] += first[done] + 1
        count[open_runs[~done]] += block
        total[open_runs[~done]] = sums[~done, -1]
        total[open_runs[done]] = sums[done, first[done]]
        open_runs = open_runs[~done]
        if open_runs.size and count[open_runs].min() > MAX_BLADES:
            raise BadDataError(
                f"needs more than {MAX_BLADES} blades for this area; check the area and lives",
                field="area_cm2",
            )
    start = 1
    top = int(count.max())
    # P(count ≤ k) = P(k blades cover the area)
    cdf = np.cumsum(np.bincount(count, minlength=top + 1))[start:] / simulations
    needed = int(np.searchsorted(cdf, confidence - 1e-12) + start)
    last = int(np.searchsorted(cdf, 0.999 - 1e-12) + start)
    last = min(max(last, needed), top)
    curve = tuple((k, float(cdf[k - start])) for k in range(start, last + 1))
    used = 1 if used_area_cm2 > 0.0 else 0
    return Forecast(
        area_cm2=area_cm2,
        blades_needed=needed,
        new_blades_needed=needed - used,
        expected_blades=float(count.mean()),
        confidence=confidence,
        achieved_probability=float(cdf[needed - start]),
        method="weibull-simulation",
        probability_curve=curve,
        used_area_cm2=used_area_cm2,
        simulations=simulations,
        seed=seed,
        draws=draws,
    )


def _normal(
    area_cm2: float, fit: WeibullFit, confidence: float, seed: int | None, used_area_cm2: float
) -> Forecast:
    """The count when runs need thousands of blades: the sum of k lives taken as normal.

    P(k blades cover A) = Φ((m_k − A)/s_k), m_k and s_k² the mean and variance
    of the sum.  A blade on the saw adds its remaining life, whose mean and
    variance are taken from draws of it (the conditional Weibull).
    """
    from statistics import NormalDist

    mu, var = life_moments(fit.shape, fit.scale_cm2)
    first_mean = first_var = 0.0
    draws = used = 0
    if used_area_cm2 > 0.0:
        import numpy as np

        rng = np.random.default_rng(seed)
        draws = 20_000
        base = (used_area_cm2 / fit.scale_cm2) ** fit.shape
        life = fit.scale_cm2 * (base + rng.standard_exponential(draws)) ** (1.0 / fit.shape)
        rest = life - used_area_cm2
        first_mean, first_var, used = float(rest.mean()), float(rest.var()), 1
    normal = NormalDist()

    def p_cover(k: int) -> float:
        new = k - used
        mean = first_mean + new * mu
        sd = math.sqrt(first_var + new * var)
        if sd == 0.0:
            return 1.0 if mean >= area_cm2 else 0.0
        return normal.cdf((mean - area_cm2) / sd)

    def first_k(p: float) -> int:
        """The smallest k with P(k blades cover A) ≥ p (P rises with k)."""
        lo, hi = used + 1, used + 1
        while p_cover(hi) < p:
            lo, hi = hi + 1, hi * 2
        while lo < hi:
            mid = (lo + hi) // 2
            lo, hi = (lo, mid) if p_cover(mid) >= p else (mid + 1, hi)
        return lo

    needed = first_k(confidence - 1e-12)
    start, last = first_k(0.001), max(first_k(0.999), needed)
    # renewal theory: E[count] ≈ (A − first)/μ + E[L²]/(2μ²) + (the blade on the saw)
    expected = (area_cm2 - first_mean) / mu + (var + mu * mu) / (2 * mu * mu) + used
    return Forecast(
        area_cm2=area_cm2,
        blades_needed=needed,
        new_blades_needed=needed - used,
        expected_blades=expected,
        confidence=confidence,
        achieved_probability=p_cover(needed),
        method="weibull-normal",
        probability_curve=tuple((k, p_cover(k)) for k in range(start, last + 1)),
        used_area_cm2=used_area_cm2,
        simulations=0,
        seed=seed if used else None,
        draws=draws,
    )


def _require(ok: bool, field: str, expected: str, got: object) -> None:
    if not ok:
        raise BadDataError(f"must be {expected}, got {got}", field=field)
