"""One-variable root finding and minimisation, a log-sum-exp and χ²₁ quantiles.

The Weibull fit needs a root of a function of one variable, the minimum of one
on an interval and the χ²₁ quantile of its confidence, nothing more; importing
``scipy.optimize`` for them costs about half a second of every ``sawplan plan
--db``.  The root finder and the minimiser are Brent's methods (R. P. Brent,
*Algorithms for Minimization without Derivatives*, 1973, chapters 4 and 5) in
the variants scipy runs (``brentq``, and ``minimize_scalar`` with
``method="bounded"``), step for step, so a fit made here agrees with the fit
scipy made to the last digits (``tests/test_life_scalar.py`` compares them on
many censored samples).  ``log_sum_exp`` is ``scipy.special.logsumexp`` for one
array, in the same numpy operations.
"""

from __future__ import annotations

import math
from collections.abc import Callable

EPS = 2.220446049250313e-16  # the spacing of floats at 1 (IEEE 754 double)
ROOT_RTOL = 4 * EPS  # the smallest relative tolerance the root finder takes (scipy's too)

# χ²₁ quantiles, keyed by confidence: the value at 1 − confidence of the upper tail,
# worked out as scipy.special.chdtri(1, 1.0 - confidence) does (checked in the tests
# against scipy.stats.chi2.ppf and printed tables: χ²₁(0.95) = 3.841, χ²₁(0.99) = 6.635).
CHI2_1: dict[float, float] = {
    0.5: 0.4549364231195724,
    0.8: 1.6423744151497899,
    0.9: 2.705543454095414,
    0.95: 3.841458820694124,
    0.99: 6.6348966010212145,
}


def chi2_1_quantile(confidence: float) -> float:
    """The χ² quantile with one degree of freedom at ``confidence`` (0.9 → 2.7055)."""
    stored = CHI2_1.get(confidence)
    if stored is not None:
        return stored
    from scipy.special import chdtri  # a confidence not stored: scipy.special, not scipy.stats

    return float(chdtri(1, 1.0 - confidence))


def find_root(
    f: Callable[[float], float],
    a: float,
    b: float,
    *,
    xtol: float = 2e-12,
    rtol: float = ROOT_RTOL,
    maxiter: int = 100,
) -> float:
    """A root of ``f`` between ``a`` and ``b`` (where ``f`` changes sign), by Brent's method.

    Each step interpolates (secant, or inverse quadratic through three points)
    when that shrinks the bracket fast enough, and bisects otherwise; it stops
    when the bracket is narrower than ``xtol + rtol·|x|``.
    """
    if xtol <= 0.0 or rtol < ROOT_RTOL:
        raise ValueError(f"tolerances too small: xtol {xtol:g}, rtol {rtol:g}")
    x_last, x_now = float(a), float(b)
    f_last, f_now = _value(f, x_last), _value(f, x_now)
    if f_last * f_now > 0.0:
        raise ValueError("f(a) and f(b) must have different signs")
    if f_last == 0.0:
        return x_last
    if f_now == 0.0:
        return x_now
    x_far = f_far = 0.0  # the other end of the bracket
    step_before = step = 0.0
    for _ in range(maxiter):
        if f_last != 0.0 and f_now != 0.0 and (f_last < 0.0) != (f_now < 0.0):
            # the root lies between the last two points (signs compared, not a product
            # of two tiny values that could round to zero)
            x_far, f_far = x_last, f_last
            step_before = step = x_now - x_last
        if abs(f_far) < abs(f_now):  # keep the best point in x_now
            x_last, x_now, x_far = x_now, x_far, x_now
            f_last, f_now, f_far = f_now, f_far, f_now
        tol = (xtol + rtol * abs(x_now)) / 2
        half = (x_far - x_now) / 2
        if f_now == 0.0 or abs(half) < tol:
            return x_now
        if abs(step_before) > tol and abs(f_now) < abs(f_last):
            if x_last == x_far:  # two points: secant
                trial = -f_now * (x_now - x_last) / (f_now - f_last)
            else:  # three points: inverse quadratic
                slope_last = (f_last - f_now) / (x_last - x_now)
                slope_far = (f_far - f_now) / (x_far - x_now)
                trial = (
                    -f_now
                    * (f_far * slope_far - f_last * slope_last)
                    / (slope_far * slope_last * (f_far - f_last))
                )
            if 2 * abs(trial) < min(abs(step_before), 3 * abs(half) - tol):
                step_before, step = step, trial
            else:
                step_before = step = half
        else:
            step_before = step = half
        x_last, f_last = x_now, f_now
        if abs(step) > tol:
            x_now += step
        else:
            x_now += tol if half > 0 else -tol
        f_now = _value(f, x_now)
    raise RuntimeError(f"no root within {maxiter} steps (last at {x_now!r})")


def minimise_bounded(
    f: Callable[[float], float],
    lower: float,
    upper: float,
    *,
    xatol: float = 1e-5,
    maxiter: int = 500,
) -> tuple[float, float]:
    """(x, f(x)) at a minimum of ``f`` on [lower, upper], by Brent's method.

    Golden-section steps, replaced by a parabola through the three best points
    when that parabola's minimum lies inside and the step keeps shrinking;
    ``xatol`` is the absolute tolerance in x.  Stops after ``maxiter``
    evaluations with the best point found.
    """
    if not (math.isfinite(lower) and math.isfinite(upper)) or lower > upper:
        raise ValueError(f"bounds must be finite and in order, got {lower}, {upper}")
    sqrt_eps = math.sqrt(2.2e-16)
    golden = 0.5 * (3.0 - math.sqrt(5.0))
    a, b = lower, upper
    # best point so far, the second best and the one before that, with their values
    x = w = v = a + golden * (b - a)
    fx = fw = fv = f(x)
    step = moved = 0.0  # the last step taken, and the one before
    calls = 1
    mid = 0.5 * (a + b)
    tol1 = sqrt_eps * abs(x) + xatol / 3.0
    tol2 = 2.0 * tol1
    while abs(x - mid) > tol2 - 0.5 * (b - a):
        use_golden = True
        if abs(moved) > tol1:  # try a parabola through x, w, v
            use_golden = False
            r = (x - w) * (fx - fv)
            q = (x - v) * (fx - fw)
            p = (x - v) * q - (x - w) * r
            q = 2.0 * (q - r)
            if q > 0.0:
                p = -p
            q = abs(q)
            before = moved
            moved = step
            if abs(p) < abs(0.5 * q * before) and q * (a - x) < p < q * (b - x):
                step = (p + 0.0) / q
                u = x + step
                if (u - a) < tol2 or (b - u) < tol2:
                    step = tol1 * (1.0 if mid - x >= 0 else -1.0)
            else:
                use_golden = True
        if use_golden:
            moved = (a - x) if x >= mid else (b - x)
            step = golden * moved
        u = x + (1.0 if step >= 0 else -1.0) * max(abs(step), tol1)
        fu = f(u)
        calls += 1
        if fu <= fx:
            if u >= x:
                a = x
            else:
                b = x
            v, fv = w, fw
            w, fw = x, fx
            x, fx = u, fu
        else:
            if u < x:
                a = u
            else:
                b = u
            if fu <= fw or w == x:
                v, fv = w, fw
                w, fw = u, fu
            elif fu <= fv or v in (x, w):
                v, fv = u, fu
        mid = 0.5 * (a + b)
        tol1 = sqrt_eps * abs(x) + xatol / 3.0
        tol2 = 2.0 * tol1
        if calls >= maxiter:
            break
    return x, fx


def log_sum_exp(values):
    """ln Σ exp(values) for a 1-d numpy array, as ``scipy.special.logsumexp`` works it.

    The largest term is taken out of the sum (ln(1 + rest/m) + ln m + max, m the
    number of terms equal to the largest), so nothing overflows; an infinite
    answer falls back to the plain sum, as scipy's does.
    """
    import numpy as np

    a = np.atleast_1d(np.asarray(values, dtype=np.float64))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        top = np.max(a, axis=0, keepdims=True)
        is_top = a == top
        count = np.sum(is_top.astype(np.float64), axis=0, keepdims=True)
        rest = np.sum(np.exp(np.where(is_top, -np.inf, a) - top), axis=0, keepdims=True)
        rest = np.where(rest == 0, rest, rest / count)
        out = np.log1p(rest) + np.log(count) + top
        if not np.isfinite(out[0]):
            out = np.log(np.sum(np.exp(a), axis=0, keepdims=True))
    return out[0]


def _value(f: Callable[[float], float], x: float) -> float:
    fx = f(x)
    if math.isnan(fx):
        raise ValueError(f"the function value at x={x} is NaN; the root search cannot go on")
    return fx
