"""Blade life against band speed: Taylor's relation fitted to a censored blade log.

Taylor's tool-life relation V·Lⁿ = C (Taylor 1907) says life L falls as a
power of the cutting speed V.  Blade lives scatter, and blades still running
are censored, so the relation is fitted as a **Weibull accelerated-life
model**: at a constant speed V a blade's life is Weibull with a shape β that
does not depend on speed and a scale that falls with speed,

    η(V) = η₀·(V/V₀)^(−m),     m = 1/n,

so the mean life L(V) = η(V)·Γ(1 + 1/β) follows Taylor's relation exactly
with n = 1/m and C = V₀·(η₀·Γ(1 + 1/β))ⁿ (C is the speed for a mean life of
one unit: 1 cm² of area cut, or 1 min of cutting).

A blade in a job shop runs at several speeds.  Under Taylor's relation a
stretch of area x cut at speed V uses x·(V/V₀)^m of the blade's life at V₀
(Miner's rule; Nelson's cumulative-exposure model), so each blade's
**exposure** u = Σ x_j (V_j/V₀)^m is Weibull(β, η₀) and the likelihood is

    failed:    ln β − ln η₀ + (β − 1) ln(u/η₀) − (u/η₀)^β + m·ln(V_last/V₀)
    censored:  −(u/η₀)^β

(the last term is the Jacobian du/dx of the blade's last stretch).  With one
speed per blade this is the ordinary Weibull AFT model in ln V.  The fit is
maximum likelihood with ``scipy.optimize.minimize`` on the analytic gradient;
intervals are Wald intervals from the observed information (numerical Hessian
of the analytic gradient), on ln m, ln C and ln β.

The data must show that life falls with speed: at least ``MIN_FAILURES``
retired blades, failures at two or more speeds, and an interval for m that
excludes 0.  Otherwise there is no fit, and the reason says what data would
make one.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from sawplan.errors import BadDataError

MIN_FAILURES = 3  # three parameters
SAME_SPEED = 1.02  # blades whose speeds differ by less than 2 % ran at "one speed"
SECOND_SPEED_HINT = "at least 10 % apart"
_M_BOUNDS = (-60.0, 60.0)  # m = 1/n; |n| below 1/60 is no tool-life relation anyone uses
_S_BOUNDS = (-4.0, 4.0)  # ln β: shapes from 0.02 to 55

LifeBasis = Literal["area", "time"]
LIFE_UNIT = {"area": "cm²", "time": "min"}


@dataclass(frozen=True)
class SpeedLifeFit:
    """Taylor's relation V·Lⁿ = C fitted from the log, with its intervals.

    Lives are area cut in cm² (``basis`` "area") or minutes of cutting ("time").
    """

    n: float
    n_ci: tuple[float, float]
    c_m_min: float  # speed for a mean life of 1 cm² (or 1 min)
    c_ci_m_min: tuple[float, float]
    shape: float  # Weibull β, the same at every speed
    shape_ci: tuple[float, float]
    reference_speed_m_min: float  # V₀: exposure-weighted geometric mean of the logged speeds
    reference_life: float  # mean life at V₀
    reference_life_ci: tuple[float, float]
    blades: int
    failures: int
    censored: int
    speed_levels: int  # distinct blade speeds, 2 % apart
    speed_range_m_min: tuple[float, float]  # slowest and fastest blade speed
    confidence: float
    log_likelihood: float
    basis: LifeBasis = "area"
    method: str = "Weibull AFT, cumulative exposure, maximum likelihood (scipy)"
    ci_method: str = "Wald (observed information)"
    fitted: Literal[True] = True

    @property
    def life_unit(self) -> str:
        return LIFE_UNIT[self.basis]

    def mean_life(self, speed_m_min: float) -> float:
        """L(V) = (C/V)^(1/n): the expected life of a blade run at this speed."""
        return (self.c_m_min / speed_m_min) ** (1.0 / self.n)

    def scale(self, speed_m_min: float) -> float:
        """The Weibull scale η(V) at this speed."""
        return self.mean_life(speed_m_min) / math.gamma(1.0 + 1.0 / self.shape)


@dataclass(frozen=True)
class SpeedLifeNotFitted:
    """Why the log gives no life-against-speed fit, and what data would give one."""

    blades: int
    failures: int
    censored: int
    speed_levels: int
    speed_range_m_min: tuple[float, float] | None
    reason: str
    needs: str  # what to log to make a fit possible
    fitted: Literal[False] = False


def fit_speed_life(
    blade: Sequence[int],
    exposure: Sequence[float],
    speed_m_min: Sequence[float],
    failed: Sequence[bool],
    *,
    confidence: float = 0.9,
    basis: LifeBasis = "area",
) -> SpeedLifeFit | SpeedLifeNotFitted:
    """Fit V·Lⁿ = C to blades that ran at logged band speeds.

    ``blade[j]``, ``exposure[j]`` and ``speed_m_min[j]`` describe stretch j of
    some blade's life (a cut, or several cuts at one speed), in the order they
    were cut: area in cm² (``basis`` "area") or minutes.  ``failed[i]`` is True
    when blade i was retired worn or broken, False when it is still running or
    came off unworn (censored).  Blades with no exposure are left out.
    """
    import numpy as np

    data = _Data.build(blade, exposure, speed_m_min, failed, confidence, basis)
    levels, span = data.speed_levels()
    counts = (data.n_blades, data.d, data.n_blades - data.d)

    def no_fit(reason: str, needs: str) -> SpeedLifeNotFitted:
        return SpeedLifeNotFitted(*counts, levels, span, reason, needs)

    if data.n_blades == 0:
        return no_fit(
            "no blade with a logged band speed has cut anything",
            "log the band speed of each cut (log cut --speed)",
        )
    if data.d < MIN_FAILURES:
        return no_fit(
            f"only {data.d} retired blade{'s' if data.d != 1 else ''} with logged band speeds; "
            f"at least {MIN_FAILURES} are needed",
            f"{MIN_FAILURES - data.d} more blade(s) run to the end of their life at logged "
            f"band speeds, at two or more speeds {SECOND_SPEED_HINT}",
        )
    fail_speeds = data.eff_speed[data.failed]
    if levels < 2:
        return no_fit(
            f"every blade ran at {span[0]:.3g} m/min; life against speed needs two speeds",
            f"blades run at a second band speed {SECOND_SPEED_HINT}, to the end of their life",
        )
    if fail_speeds.max() / fail_speeds.min() < SAME_SPEED:
        return no_fit(
            f"every retired blade ran at {fail_speeds.min():.3g} m/min",
            f"blades retired after running at a second band speed {SECOND_SPEED_HINT}",
        )
    est = data.maximise()
    if est is None:
        return no_fit(
            "the likelihood has no maximum inside the range of sensible exponents",
            "more retired blades at logged band speeds",
        )
    theta, cov, loglik = est
    a, m, s = (float(v) for v in theta)
    z = _normal_quantile(confidence)
    se_m = math.sqrt(max(cov[1, 1], 0.0))
    if not (m > 0.0 and m - z * se_m > 0.0):
        return no_fit(
            f"life does not fall measurably with band speed in this log "
            f"(m = 1/n = {m:.3g} ± {z * se_m:.2g})",
            f"more retired blades at band speeds further apart ({SECOND_SPEED_HINT} or more)",
        )
    beta = math.exp(s)
    g = math.lgamma(1.0 + 1.0 / beta)
    psi = _digamma(1.0 + 1.0 / beta)
    log_life0 = a + data.log_ref + g  # ln of the mean life at V₀, in real units
    log_c = math.log(data.v0) + log_life0 / m
    # delta method: gradients of ln m, ln C, ln L₀ and ln β in (a, m, s)
    grads = {
        "ln_m": np.array([0.0, 1.0 / m, 0.0]),
        "ln_c": np.array([1.0 / m, -log_life0 / m**2, -psi / (beta * m)]),
        "ln_l0": np.array([1.0, 0.0, -psi / beta]),
        "ln_beta": np.array([0.0, 0.0, 1.0]),
    }
    se = {k: math.sqrt(max(float(gv @ cov @ gv), 0.0)) for k, gv in grads.items()}
    n = 1.0 / m
    return SpeedLifeFit(
        n=n,
        n_ci=(n * math.exp(-z * se["ln_m"]), n * math.exp(z * se["ln_m"])),
        c_m_min=math.exp(log_c),
        c_ci_m_min=_log_ci(log_c, se["ln_c"], z),
        shape=beta,
        shape_ci=_log_ci(s, se["ln_beta"], z),
        reference_speed_m_min=data.v0,
        reference_life=math.exp(log_life0),
        reference_life_ci=_log_ci(log_life0, se["ln_l0"], z),
        blades=data.n_blades,
        failures=data.d,
        censored=data.n_blades - data.d,
        speed_levels=levels,
        speed_range_m_min=span,
        confidence=confidence,
        log_likelihood=loglik,
        basis=basis,
    )


def _log_ci(log_value: float, se: float, z: float) -> tuple[float, float]:
    return math.exp(log_value - z * se), math.exp(log_value + z * se)


def _normal_quantile(confidence: float) -> float:
    """Two-sided standard-normal quantile (scipy.special, without scipy.stats' import cost)."""
    from scipy.special import ndtri

    return float(ndtri(0.5 + confidence / 2.0))


def _digamma(x: float) -> float:
    from scipy.special import digamma

    return float(digamma(x))


class _Data:
    """The log as arrays: stretches merged per (blade, speed), exposures scaled to O(1)."""

    def __init__(self, idx, x, w, wl, failed, v0, log_ref, eff_speed) -> None:
        self.idx = idx  # blade of each stretch
        self.x = x  # scaled exposure of each stretch
        self.w = w  # ln(V/V₀) of each stretch
        self.wl = wl  # ln(V_last/V₀) of each blade
        self.failed = failed
        self.v0 = v0
        self.log_ref = log_ref
        self.eff_speed = eff_speed  # exposure-weighted mean speed of each blade
        self.n_blades = len(failed)
        self.d = int(failed.sum())
        self.wl_fail = float(wl[failed].sum())

    @classmethod
    def build(cls, blade, exposure, speed, failed, confidence, basis) -> _Data:
        import numpy as np

        if basis not in LIFE_UNIT:
            raise BadDataError(f"must be area or time, got {basis!r}", field="basis")
        if not 0.0 < confidence < 1.0:
            raise BadDataError(
                f"must be between 0 and 1 (exclusive), got {confidence}", field="confidence"
            )
        idx = np.asarray(blade, dtype=np.int64)
        x = np.asarray(exposure, dtype=float)
        v = np.asarray(speed, dtype=float)
        flags = np.asarray(failed, dtype=bool)
        if not (len(idx) == len(x) == len(v)):
            raise BadDataError(
                f"must have one entry per stretch ({len(idx)}), got {len(x)} and {len(v)}",
                field="exposure",
            )
        if len(idx) and (idx.min() < 0 or idx.max() >= len(flags)):
            raise BadDataError("must name blades 0 … blades − 1", field="blade")
        if not np.all(np.isfinite(x) & (x >= 0.0)):
            raise BadDataError(f"must be finite and 0 or more {LIFE_UNIT[basis]}", field="exposure")
        if not np.all(np.isfinite(v) & (v > 0.0)):
            raise BadDataError("must be finite and above 0 m/min", field="band-speed")
        total = np.bincount(idx, weights=x, minlength=len(flags))
        keep = total > 0.0
        renumber = np.cumsum(keep) - 1
        sel = keep[idx] & (x > 0.0)
        idx, x, v = renumber[idx[sel]], x[sel], v[sel]
        flags, total = flags[keep], total[keep]
        nb = len(flags)
        if nb == 0:
            empty = np.zeros(0)
            return cls(idx, x, empty, empty, flags, 1.0, 0.0, empty)
        # the last stretch of each blade: the highest position among its stretches
        pos = np.arange(len(idx))
        last = np.full(nb, -1, dtype=np.int64)
        np.maximum.at(last, idx, pos)
        lnv = np.log(v)
        v0 = math.exp(float((x * lnv).sum() / x.sum()))
        eff = np.bincount(idx, weights=x * v, minlength=nb) / total
        # merge stretches of one blade at one speed: the likelihood only sees their sum
        key = (idx << 32) + (np.round(lnv * 1e6).astype(np.int64) + (1 << 31))
        _, first, inverse = np.unique(key, return_index=True, return_inverse=True)
        merged_x = np.bincount(inverse, weights=x)
        log_ref = float(np.mean(np.log(total)))
        return cls(
            idx=idx[first],
            x=merged_x / math.exp(log_ref),
            w=lnv[first] - math.log(v0),
            wl=lnv[last] - math.log(v0),
            failed=flags,
            v0=v0,
            log_ref=log_ref,
            eff_speed=eff,
        )

    def speed_levels(self) -> tuple[int, tuple[float, float] | None]:
        """Distinct blade speeds (2 % apart) and the slowest and fastest."""
        if self.n_blades == 0:
            return 0, None
        speeds = sorted(float(s) for s in self.eff_speed)
        levels, anchor = 1, speeds[0]
        for s in speeds[1:]:
            if s / anchor >= SAME_SPEED:
                levels, anchor = levels + 1, s
        return levels, (speeds[0], speeds[-1])

    # -- likelihood ---------------------------------------------------------------------
    def _exposures(self, m: float):
        import numpy as np

        e = np.exp(m * self.w)
        n = self.n_blades
        big_e = np.bincount(self.idx, weights=self.x * e, minlength=n)
        big_f = np.bincount(self.idx, weights=self.x * self.w * e, minlength=n)
        return big_e, big_f

    def neg_loglik(self, theta):
        """−ln L and its gradient in (a, m, s), a = ln η₀ (scaled), s = ln β."""
        import numpy as np

        a, m, s = (float(t) for t in theta)
        if not (_M_BOUNDS[0] < m < _M_BOUNDS[1] and _S_BOUNDS[0] < s < _S_BOUNDS[1]):
            return math.inf, np.zeros(3)  # outside any sensible relation: the line search backs off
        beta = math.exp(s)
        big_e, big_f = self._exposures(m)
        log_z = np.log(big_e) - a
        zb = np.exp(beta * log_z)
        fail = self.failed
        ll = (
            self.d * (s - a)
            + (beta - 1.0) * float(log_z[fail].sum())
            + m * self.wl_fail
            - float(zb.sum())
        )
        ratio = big_f / big_e
        g_a = -beta * self.d + beta * float(zb.sum())
        g_m = (
            (beta - 1.0) * float(ratio[fail].sum())
            + self.wl_fail
            - beta * float((zb * ratio).sum())
        )
        g_s = self.d + beta * float(log_z[fail].sum()) - beta * float((zb * log_z).sum())
        return -ll, -np.array([g_a, g_m, g_s])

    def start(self):
        """m from a least-squares line of ln(life) on ln(speed) over the failures, then a, s."""
        import numpy as np

        total = np.bincount(self.idx, weights=self.x, minlength=self.n_blades)
        lx, lv = np.log(total[self.failed]), np.log(self.eff_speed[self.failed])
        slope = float(np.polyfit(lv, lx, 1)[0]) if np.ptp(lv) > 0 else -6.0
        m = min(max(-slope, 1.0), 20.0)
        big_e, _ = self._exposures(m)
        a = math.log(float(big_e.sum()) / self.d)  # exponential (β = 1) scale
        return np.array([a, m, 0.0])

    def maximise(self):
        """(θ̂, covariance of θ̂, max ln L in real units) or None when there is no maximum."""
        import numpy as np
        from scipy.optimize import minimize

        # BFGS on the analytic gradient; the exponent and shape stay inside sensible bounds
        res = minimize(
            self.neg_loglik,
            self.start(),
            jac=True,
            method="BFGS",
            options={"maxiter": 500, "gtol": 1e-8},
        )
        theta = res.x
        m_lo, m_hi = _M_BOUNDS
        s_lo, s_hi = _S_BOUNDS
        if not (m_lo < theta[1] < m_hi and s_lo < theta[2] < s_hi):
            return None
        _, grad = self.neg_loglik(theta)
        if not np.all(np.isfinite(theta)) or float(np.abs(grad).max()) > 1e-3:
            return None
        hess = np.empty((3, 3))
        for k in range(3):
            step = 1e-5 * max(1.0, abs(float(theta[k])))
            up, down = theta.copy(), theta.copy()
            up[k] += step
            down[k] -= step
            hess[:, k] = (self.neg_loglik(up)[1] - self.neg_loglik(down)[1]) / (2.0 * step)
        hess = (hess + hess.T) / 2.0
        try:
            cov = np.linalg.inv(hess)
        except np.linalg.LinAlgError:
            return None
        if not np.all(np.linalg.eigvalsh(hess) > 0.0):
            return None
        # −ln L in scaled units; lives in real units shift it by −d·ln ref
        loglik = -float(res.fun) - self.d * self.log_ref
        return theta, cov, loglik
