"""Density from temperature and pressure on one branch of an isotherm of a Helmholtz equation.

Below the critical temperature an isotherm p(rho) rises from zero on the vapour-like branch to
the vapour spinodal (a maximum, dp/drho = 0), turns down through the unstable region and rises
again from the liquid spinodal (a minimum) on the liquid-like branch; above it the isotherm
rises everywhere. On each branch p(rho) is monotone, so the root is bracketed by the branch's
ends and found by Newton steps that fall back to bisection (in ln rho) whenever a step would
leave the bracket or the slope is not positive ("safeguarded Newton"). A pressure the branch
does not reach (beyond the spinodal) leaves the iteration at the bracket's end with a residual:
such elements come back NaN, for the caller to name.

Every element iterates on its own and keeps its root from the step it converged, so a value
gives the same density alone as inside an array. A step converges when it is below RTOL, or when
Newton's next step, estimated from this one, would be below QTOL (which saves the last evaluation
of the equation). Above the critical temperature the starts come from a grid of the equation's own
roots (FluidStarts), solved once.

>>> from .equation import equation
>>> eq = equation("carbon-dioxide")
>>> rho = solve(eq, np.array(313.15), np.array(10e6), np.array(0.5), np.array(1e-3), np.array(3.5))
>>> round(float(rho) * eq.M, 2)   # kg/m3 at 40 degC, 100 bar
628.61
"""

from __future__ import annotations

import numpy as np

from ...numerics import anywhere, everywhere
from .equation import HelmholtzEquation

RTOL = 1e-8  # relative size of a Newton step after which an element counts as converged (Newton
# converges quadratically: the step's own result is then at rounding level)
QTOL = 1e-14  # relative size of the next Newton step, estimated, below which a step counts as converged
GATE = 1e-6  # ... for steps this small or smaller (relative): there the estimate of p'' is good
PTOL = 1e-9  # a bracket collapsed by bisection is a root only if Newton puts the root this close
_ITERATIONS = 80
_CHUNK = 8192  # states solved together (see solve)
# the grid of FluidStarts: nodes in sqrt(ln(T/Tc)) and in asinh(ln(p/pc) / _P_SPREAD), which crowds them
# towards the critical point, where the density changes fastest (2.6 K and 3 % apart at 1.03 Tc, 1.36 pc
# for carbon dioxide: starts within about 0.3 %, three Newton steps in place of six from a cubic equation)
_T_NODES, _P_NODES, _P_SPREAD = 48, 96, 0.1
_P_LOW = 1e-3  # times pc: the grid's lowest pressure (below it the gas is near ideal: the grid's end will do)


def solve(eq: HelmholtzEquation, T: np.ndarray, p: np.ndarray, guess: np.ndarray, lo: np.ndarray,
          hi: np.ndarray) -> np.ndarray:
    """Molar density (mol/m3) at (T, p) on the branch bracketed by reduced densities [lo, hi].

    ``guess``, ``lo`` and ``hi`` are reduced densities delta = rho / rho_c, arrays of T's shape;
    p(delta) must rise monotonically on [lo, hi]. NaN where the branch does not reach p.
    """
    arrays = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (T, p, guess, lo, hi)))
    shape = arrays[0].shape
    T, p, x, lo, hi = (a.ravel() for a in arrays)  # read only: the solver makes new arrays as it goes
    if x.size <= _CHUNK:  # one chunk: the usual case, without the copying
        return (_solve(eq, T, p, x, lo, hi) * eq.rhoc).reshape(shape)
    root = np.full(x.shape, np.nan)
    # in chunks of states: an isotherm keeps a (states x terms) array of its terms' temperature factors
    for start in range(0, x.size, _CHUNK):
        part = slice(start, start + _CHUNK)
        root[part] = _solve(eq, T[part], p[part], x[part], lo[part], hi[part])
    return (root * eq.rhoc).reshape(shape)


def _solve(eq: HelmholtzEquation, T: np.ndarray, p: np.ndarray, x: np.ndarray, lo: np.ndarray,
           hi: np.ndarray) -> np.ndarray:
    """The reduced densities of :func:`solve` for 1-d arrays."""
    x = np.minimum(np.maximum(x, lo), hi)
    root = np.full(x.shape, np.nan)
    active = np.flatnonzero(np.isfinite(x) & np.isfinite(p) & (p > 0))
    if active.size < x.size:
        T, p, x, lo, hi = T[active], p[active], x[active], lo[active], hi[active]
    isotherm = eq.isotherm(T)
    rhoc = eq.rhoc
    x_prev = slope_prev = size_prev = np.full(x.shape, np.nan)  # no previous step: no estimate yet
    with np.errstate(all="ignore"):
        for _ in range(_ITERATIONS):
            if active.size == 0:
                break
            pr, slope = isotherm.pressure(x * rhoc)
            f = pr - p
            lo = np.where(f < 0.0, x, lo)
            hi = np.where(f > 0.0, x, hi)
            step = f / (slope * rhoc)
            new = x - step
            bisect = ~((new >= lo) & (new <= hi) & (slope > 0.0))
            bisected = anywhere(bisect)
            if bisected:
                new = np.where(bisect, np.sqrt(lo * hi), new)
                size = np.abs(new - x)
                done = (size <= RTOL * x) | (f == 0.0)
                near = (size <= GATE * x) & ~bisect
            else:  # a Newton step everywhere: f = 0 is a zero step
                size = np.abs(step)
                done = size <= RTOL * x
                near = size <= GATE * x
            if anywhere(near):
                # the next step's size, estimated twice: (p''/2p') size^2, p'' from the slopes at this
                # and the last density, and size^3 / last size^2, from how fast the steps shrink (which
                # tells an isotherm whose slope is only approximate, where Newton converges linearly);
                # once both are below QTOL, for a step small enough that the estimates hold, this step's
                # result is as good as the next one's
                curvature = np.abs((slope - slope_prev) / ((x - x_prev) * slope))
                upcoming = np.maximum(0.5 * curvature * size, size * size / (size_prev * size_prev)) * size
                done = done | (near & (upcoming <= QTOL * x))
            x, last, x_prev, slope_prev, size_prev = new, x, x, slope, size
            if not anywhere(done):
                continue
            if bisected:
                # a Newton step that converged is a root; a bracket collapsed by bisection is one only if
                # Newton would put the root within PTOL of it or it gives back p to rounding (at the
                # critical point, where p - pc ~ (rho - rhoc)^3, rounding blurs the density to ~1e-5);
                # else it is the branch's end, short of p, where the slope vanishes at a spinodal
                found = done & ((np.abs(f) <= 1e-12 * p) | ~bisect | (np.abs(step) <= PTOL * last))
                root[active[found]] = np.where(f == 0.0, last, new)[found]
            else:
                root[active[done]] = new[done]
            if everywhere(done):  # the last states (a single one: its first convergence) need no subsetting
                break
            keep = ~done
            active = active[keep]
            T, p, x, lo, hi = T[keep], p[keep], x[keep], lo[keep], hi[keep]
            x_prev, slope_prev, size_prev = x_prev[keep], slope_prev[keep], size_prev[keep]
            isotherm = isotherm.take(keep)
    return root


class FluidStarts:
    """Starting densities for the single fluid above the critical temperature, from the equation's own
    roots on a grid of (T, p) solved once (from the guesses ``guess(T, p)``, reduced densities) and
    interpolated bilinearly in ln delta: the start decides how many Newton steps a root takes, never
    the root."""

    def __init__(self, eq: HelmholtzEquation, T_max: float, p_c: float, p_max: float, top: float, guess):
        self.Tc, self.p_c = eq.Tc, p_c
        self._s_max = np.sqrt(np.log(T_max / eq.Tc))
        self._z_low = np.arcsinh(np.log(_P_LOW) / _P_SPREAD)
        self._dz = (np.arcsinh(np.log(p_max / p_c) / _P_SPREAD) - self._z_low) / (_P_NODES - 1)
        s = np.linspace(0.0, self._s_max, _T_NODES)
        z = self._z_low + self._dz * np.arange(_P_NODES)
        T, p = np.meshgrid(eq.Tc * np.exp(s * s), p_c * np.exp(_P_SPREAD * np.sinh(z)), indexing="ij")
        ideal = p / (eq.R * T * eq.rhoc)
        delta = solve(eq, T, p, guess(T, p), ideal / 20.0, np.full(T.shape, top)) / eq.rhoc
        self._ln = np.log(np.where(np.isfinite(delta), delta, ideal))

    def __call__(self, T: np.ndarray, p: np.ndarray) -> np.ndarray:
        """Reduced starting densities at (T, p), T at or above Tc (the grid's ends beyond it)."""
        with np.errstate(invalid="ignore", divide="ignore"):
            u = np.sqrt(np.maximum(np.log(T / self.Tc), 0.0)) * ((_T_NODES - 1) / self._s_max)
            v = (np.arcsinh(np.log(p / self.p_c) / _P_SPREAD) - self._z_low) / self._dz
        u = np.minimum(u, _T_NODES - 1.0)
        v = np.minimum(np.maximum(v, 0.0), _P_NODES - 1.0)
        # a NaN argument indexes the first node and keeps its NaN in the weights: a NaN start
        i = np.minimum(np.where(u > 0.0, u, 0.0).astype(int), _T_NODES - 2)
        j = np.minimum(np.where(v > 0.0, v, 0.0).astype(int), _P_NODES - 2)
        a, b = u - i, v - j
        g = self._ln
        return np.exp((1.0 - a) * ((1.0 - b) * g[i, j] + b * g[i, j + 1]) + a * ((1.0 - b) * g[i + 1, j] + b * g[i + 1, j + 1]))
