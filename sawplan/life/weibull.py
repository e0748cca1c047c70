"""Two-parameter Weibull fit of blade lives (area cut) with right-censoring.

A blade still on the saw, or taken off unworn, has a life of *at least* its area
so far (right-censored); throwing such blades away or counting them as failures
biases the life low.  The fit is maximum likelihood (the standard censored-data likelihood):

    log f(x) = ln β − ln η + (β − 1) ln(x/η) − (x/η)^β     (failure at x)
    log S(x) = −(x/η)^β                                     (still alive at x)

For a fixed shape β the scale has a closed form, η^β = Σ x_i^β / d (d failures),
so the fit reduces to one monotone equation in β (the profile score), solved
by Brent's method (``sawplan.life.scalar``: scipy's steps, without importing
scipy).  Standard errors come from the observed
information (analytic Hessian in ln β, ln η).  Confidence bounds are
**likelihood-ratio (profile) bounds**: two-sided at ``confidence``, the set of
values whose profile log-likelihood is within χ²₁(confidence)/2 of the maximum.
They behave better than Wald bounds with the few failures a shop collects.

All public lives are in cm² of area cut.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from sawplan.errors import BadDataError

MIN_FAILURES = 2
_SHAPE_MAX = 1.0e4  # beyond this the lives are "identical" for any practical purpose
_LOG_SPAN = 60.0  # how far (in ln units) a bound search may walk before giving up


@dataclass(frozen=True)
class WeibullFit:
    """A fitted 2-parameter Weibull life distribution (area cut, cm²)."""

    shape: float
    scale_cm2: float
    n: int
    failures: int
    censored: int
    shape_ci: tuple[float, float]
    scale_ci_cm2: tuple[float, float]
    confidence: float
    log_likelihood: float
    b10_ci_cm2: tuple[float, float]
    shape_se: float
    scale_se_cm2: float
    ci_method: str = "likelihood-ratio"
    fitted: Literal[True] = True

    @property
    def median_life_cm2(self) -> float:
        """η(ln 2)^(1/β): half the blades have failed by this area."""
        return self.scale_cm2 * math.log(2.0) ** (1.0 / self.shape)

    @property
    def b10_life_cm2(self) -> float:
        """η(−ln 0.9)^(1/β): one blade in ten has failed by this area."""
        return self.scale_cm2 * (-math.log(0.9)) ** (1.0 / self.shape)

    @property
    def mean_life_cm2(self) -> float:
        """η·Γ(1 + 1/β), the expected life of a blade."""
        return self.scale_cm2 * math.gamma(1.0 + 1.0 / self.shape)

    def json_extra(self) -> dict[str, float]:
        """The lives derived from shape and scale, for JSON."""
        return {
            "median_life_cm2": self.median_life_cm2,
            "b10_life_cm2": self.b10_life_cm2,
            "mean_life_cm2": self.mean_life_cm2,
        }

    def quantile_cm2(self, p: float) -> float:
        """Life by which a fraction ``p`` of blades has failed: η(−ln(1−p))^(1/β)."""
        if not 0.0 < p < 1.0:
            raise BadDataError(f"must be between 0 and 1 (exclusive), got {p}", field="p")
        return self.scale_cm2 * (-math.log1p(-p)) ** (1.0 / self.shape)

    def reliability(self, life_cm2: float) -> float:
        """Probability that a new blade cuts at least ``life_cm2``."""
        if life_cm2 <= 0.0:
            return 1.0
        return math.exp(-((life_cm2 / self.scale_cm2) ** self.shape))

    def early_failures(self) -> bool:
        """True when the point estimate of the shape is below 1 (early failures).

        β < 1 means the failure rate falls with use: blades die young from
        set-up problems (break-in, tension, guides) rather than from wear.  With
        few failures the interval is wide; ``early_failures_confirmed`` tells
        whether the whole confidence interval lies below 1.
        """
        return self.shape < 1.0

    def early_failures_confirmed(self) -> bool:
        """True when even the upper confidence bound of the shape is below 1."""
        return self.shape_ci[1] < 1.0


@dataclass(frozen=True)
class WeibullNotFitted:
    """Why no Weibull fit could be made (too few failures, identical lives...)."""

    n: int
    failures: int
    censored: int
    reason: str
    mean_failure_life_cm2: float | None
    fitted: Literal[False] = False


def fit_weibull(
    lives_cm2: Sequence[float],
    failed: Sequence[bool],
    confidence: float = 0.9,
    *,
    bounds: Literal["all", "shape", "none"] = "all",
) -> WeibullFit | WeibullNotFitted:
    """Fit a 2-parameter Weibull to blade lives with right-censoring.

    ``failed[i]`` is True when blade i wore out or broke at ``lives_cm2[i]``, False
    when it is still fitted or was removed unworn (its life is at least that).
    Returns ``WeibullNotFitted`` with a reason when there are fewer than two
    failures or the failures give no spread to estimate a shape from.
    ``bounds="shape"`` skips the profile bounds of η and B10 (NaN), the slow
    part, for callers that need the fit and the shape's interval only;
    ``bounds="none"`` skips the shape's too, for point estimates alone.
    """
    lives, flags = _check_inputs(lives_cm2, failed, confidence)
    n = len(lives)
    fail_lives = [x for x, f in zip(lives, flags, strict=True) if f]
    d = len(fail_lives)
    censored = n - d
    mean_fail = sum(fail_lives) / d if d else None
    if d < MIN_FAILURES:
        reason = (
            "all blades are censored (none failed yet)"
            if d == 0
            else f"only {d} failure recorded; at least {MIN_FAILURES} are needed"
        )
        return WeibullNotFitted(n, d, censored, reason, mean_fail)
    # With every failure at one life and nothing surviving longer, the likelihood
    # keeps rising as β → ∞: the data say "fixed life", not a distribution.
    if max(fail_lives) == min(fail_lives) and max(lives) <= fail_lives[0]:
        return WeibullNotFitted(
            n, d, censored, "all failures at the same life; no spread to fit a shape", mean_fail
        )
    model = _Model(lives, flags)
    shape = model.solve_shape()
    if shape is None:
        return WeibullNotFitted(
            n, d, censored, "lives nearly identical; shape too large to estimate", mean_fail
        )
    return model.result(shape, confidence, n, censored, bounds=bounds)


def quantile_interval(
    lives_cm2: Sequence[float], failed: Sequence[bool], fit: WeibullFit, p: float
) -> tuple[float, float]:
    """Profile-likelihood bounds (at the fit's confidence) of the ``p`` life of a fit.

    ``lives_cm2`` and ``failed`` are the data ``fit`` came from; the median's
    interval (p = 0.5) tells whether a lot's lives are surely shorter than others'.
    """
    lives, flags = _check_inputs(lives_cm2, failed, fit.confidence)
    if not 0.0 < p < 1.0:
        raise BadDataError(f"must be between 0 and 1 (exclusive), got {p}", field="p")
    model = _Model(lives, flags)
    return model.quantile_ci(fit.shape, p, model.target(fit.shape, fit.confidence))


def _check_inputs(
    lives_cm2: Sequence[float], failed: Sequence[bool], confidence: float
) -> tuple[list[float], list[bool]]:
    """Validate and convert caller lists; raise ``BadDataError`` naming the field."""
    lives = [float(x) for x in lives_cm2]
    flags = [bool(f) for f in failed]
    if len(lives) != len(flags):
        raise BadDataError(
            f"must have one entry per life ({len(lives)}), got {len(flags)}", field="failed"
        )
    if not 0.0 < confidence < 1.0:
        raise BadDataError(
            f"must be between 0 and 1 (exclusive), got {confidence}", field="confidence"
        )
    for x, f in zip(lives, flags, strict=True):
        if not math.isfinite(x) or x < 0.0 or (f and x == 0.0):
            need = "greater than 0" if f else "0 or more"
            raise BadDataError(f"must be finite and {need} cm², got {x}", field="lives_cm2")
    return lives, flags


class _Model:
    """Censored Weibull likelihood on lives scaled by their geometric mean.

    Scaling keeps x^β inside floating range for any β; η is scaled back at the end.
    Censored blades with zero area carry no information and are dropped.
    """

    def __init__(self, lives: list[float], flags: list[bool]) -> None:
        import numpy as np

        keep = [(x, f) for x, f in zip(lives, flags, strict=True) if x > 0.0]
        x = np.array([k[0] for k in keep])
        self.is_fail = np.array([k[1] for k in keep])
        self.log_ref = float(np.mean(np.log(x)))
        self.log_u = np.log(x) - self.log_ref  # ln of scaled lives
        self.d = int(self.is_fail.sum())
        self.sum_log_fail = float(self.log_u[self.is_fail].sum())

    # -- profile in β ---------------------------------------------------------
    def log_scale_u(self, shape: float) -> float:
        """ln η (scaled units) maximising the likelihood for this shape."""
        from sawplan.life.scalar import log_sum_exp

        return float((log_sum_exp(shape * self.log_u) - math.log(self.d)) / shape)

    def loglik(self, shape: float, log_scale_u: float) -> float:
        """Log-likelihood in original units (scaled lives shift it by −d·ln ref)."""
        import numpy as np

        w = self.log_u - log_scale_u
        z = np.exp(shape * w)
        ll = (
            self.d * (math.log(shape) - log_scale_u)
            + (shape - 1.0) * float(w[self.is_fail].sum())
            - float(z.sum())
        )
        return ll - self.d * self.log_ref

    def profile_shape(self, shape: float) -> float:
        return self.loglik(shape, self.log_scale_u(shape))

    def score(self, shape: float) -> float:
        """d(profile log-likelihood)/dβ divided by d; decreasing in β, so one root."""
        import numpy as np

        a = shape * self.log_u
        wts = np.exp(a - a.max())
        mean_log = float((wts * self.log_u).sum() / wts.sum())
        return 1.0 / shape + self.sum_log_fail / self.d - mean_log

    def solve_shape(self) -> float | None:
        from sawplan.life.scalar import find_root

        lo, hi = 0.5, 2.0
        while self.score(lo) < 0.0 and lo > 1e-6:
            lo /= 4.0
        while self.score(hi) > 0.0:
            if hi >= _SHAPE_MAX:
                return None
            hi *= 4.0
        return float(find_root(self.score, lo, hi, xtol=1e-12, rtol=1e-12))

    # -- profile of a quantile ------------------------------------------------
    def profile_quantile(self, log_t_u: float, c: float, log_shape_hat: float) -> float:
        """Max log-likelihood with the quantile ln t fixed (η = t·e^{−c/β})."""
        from sawplan.life.scalar import minimise_bounded

        def neg(log_shape: float) -> float:
            shape = math.exp(log_shape)
            return -self.loglik(shape, log_t_u - c / shape)

        _, lowest = minimise_bounded(neg, log_shape_hat - 5.0, log_shape_hat + 5.0, xatol=1e-10)
        return -float(lowest)

    # -- result -----------------------------------------------------------------
    def target(self, shape: float, confidence: float) -> float:
        """The profile log-likelihood at the edge of the ``confidence`` interval."""
        from sawplan.life.scalar import chi2_1_quantile

        drop = chi2_1_quantile(confidence) / 2.0
        return self.loglik(shape, self.log_scale_u(shape)) - drop

    def quantile_ci(self, shape: float, p: float, target: float) -> tuple[float, float]:
        """Profile-likelihood bounds of the life by which a fraction ``p`` has failed."""
        c = math.log(-math.log1p(-p))
        log_t = self.log_scale_u(shape) + c / shape
        log_shape = math.log(shape)

        def prof(v: float) -> float:
            return self.profile_quantile(v, c, log_shape)

        return (
            math.exp(_bound(prof, log_t, target, -1) + self.log_ref),
            math.exp(_bound(prof, log_t, target, +1) + self.log_ref),
        )

    def result(
        self,
        shape: float,
        confidence: float,
        n: int,
        censored: int,
        *,
        bounds: Literal["all", "shape", "none"] = "all",
    ) -> WeibullFit:
        log_eta_u = self.log_scale_u(shape)
        ll_max = self.loglik(shape, log_eta_u)
        target = self.target(shape, confidence)

        log_shape = math.log(shape)
        shape_ci = (math.nan, math.nan)
        if bounds != "none":
            shape_ci = (
                math.exp(_bound(lambda v: self.profile_shape(math.exp(v)), log_shape, target, -1)),
                math.exp(_bound(lambda v: self.profile_shape(math.exp(v)), log_shape, target, +1)),
            )

        def quantile_ci(p: float) -> tuple[float, float]:
            if bounds != "all":
                return (math.nan, math.nan)
            return self.quantile_ci(shape, p, target)

        se_log_shape, se_log_scale = self.log_param_se(shape, log_eta_u)
        scale = math.exp(log_eta_u + self.log_ref)
        return WeibullFit(
            shape=shape,
            scale_cm2=scale,
            n=n,
            failures=self.d,
            censored=censored,
            shape_ci=shape_ci,
            scale_ci_cm2=quantile_ci(1.0 - math.exp(-1.0)),  # η is the 63.2 % life
            confidence=confidence,
            log_likelihood=ll_max,
            b10_ci_cm2=quantile_ci(0.1),
            shape_se=shape * se_log_shape,
            scale_se_cm2=scale * se_log_scale,
        )

    def log_param_se(self, shape: float, log_eta_u: float) -> tuple[float, float]:
        """Standard errors of ln β and ln η from the observed information.

        At the maximum Σ(x/η)^β = d, so the Hessian of the log-likelihood in
        (β, η) is  H_ββ = −d/β² − Σ z w²,  H_βη = (β/η) Σ z w,  H_ηη = −β² d/η²
        with z = (x/η)^β and w = ln(x/η); in (ln β, ln η) it is J·H·J, J = diag(β, η).
        """
        import numpy as np

        w = self.log_u - log_eta_u
        z = np.exp(shape * w)
        szw = float((z * w).sum())
        szw2 = float((z * w * w).sum())
        h_bb = shape**2 * (-self.d / shape**2 - szw2)
        h_be = shape * shape * szw
        h_ee = -(shape**2) * self.d
        det = h_bb * h_ee - h_be * h_be
        var_b = -h_ee / det
        var_e = -h_bb / det
        return math.sqrt(max(var_b, 0.0)), math.sqrt(max(var_e, 0.0))


def _bound(profile, start: float, target: float, direction: int) -> float:
    """Where ``profile`` (max at ``start``) falls to ``target``, walking one way.

    Returns ±inf when the profile stays above the target over a wide span (the
    data do not bound the parameter on that side).
    """
    from sawplan.life.scalar import find_root

    def gap(v: float) -> float:
        return profile(v) - target

    step = 0.1
    inner = start
    while step <= _LOG_SPAN:
        outer = start + direction * step
        if gap(outer) < 0.0:
            a, b = sorted((inner, outer))
            return float(find_root(gap, a, b, xtol=1e-10))
        inner = outer
        step *= 2.0
    return math.inf * direction
