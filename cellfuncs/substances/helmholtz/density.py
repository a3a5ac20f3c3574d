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
gives the same density alone as inside an array.

>>> from .equation import equation
>>> eq = equation("carbon-dioxide")
>>> rho = solve(eq, np.array(313.15), np.array(10e6), np.array(0.5), np.array(1e-3), np.array(3.5))
>>> round(float(rho) * eq.M, 2)   # kg/m3 at 40 degC, 100 bar
628.61
"""

from __future__ import annotations

import numpy as np

from .equation import HelmholtzEquation

RTOL = 1e-8  # relative size of a Newton step after which an element counts as converged (Newton
# converges quadratically: the step's own result is then at rounding level)
PTOL = 1e-9  # a bracket collapsed by bisection is a root only if Newton puts the root this close
_ITERATIONS = 80


def solve(eq: HelmholtzEquation, T: np.ndarray, p: np.ndarray, guess: np.ndarray, lo: np.ndarray,
          hi: np.ndarray) -> np.ndarray:
    """Molar density (mol/m3) at (T, p) on the branch bracketed by reduced densities [lo, hi].

    ``guess``, ``lo`` and ``hi`` are reduced densities delta = rho / rho_c, arrays of T's shape;
    p(delta) must rise monotonically on [lo, hi]. NaN where the branch does not reach p.
    """
    shape = np.broadcast_shapes(*(np.shape(a) for a in (T, p, guess, lo, hi)))
    T, p, x, lo, hi = (np.array(a, dtype=float).ravel() for a in np.broadcast_arrays(T, p, guess, lo, hi))
    x = np.clip(x, lo, hi)
    root = np.full(x.shape, np.nan)
    active = np.flatnonzero(np.isfinite(x) & np.isfinite(p) & (p > 0))
    rhoc = eq.rhoc
    with np.errstate(all="ignore"):
        for _ in range(_ITERATIONS):
            if active.size == 0:
                break
            t, q, xa, la, ha = T[active], p[active], x[active], lo[active], hi[active]
            pr, slope = eq.pressure(t, xa * rhoc)
            f = pr - q
            la = np.where(f < 0.0, xa, la)
            ha = np.where(f > 0.0, xa, ha)
            step = f / (slope * rhoc)
            new = xa - step
            bisect = ~((new >= la) & (new <= ha)) | ~(slope > 0.0)
            new = np.where(bisect, np.sqrt(la * ha), new)
            done = (np.abs(new - xa) <= RTOL * xa) | (f == 0.0)
            # a Newton step that converged is a root; a bracket collapsed by bisection is one only if
            # Newton would put the root within PTOL of it or it gives back p to rounding (at the
            # critical point, where p - pc ~ (rho - rhoc)^3, rounding blurs the density to ~1e-5);
            # else it is the branch's end, short of p, where the slope vanishes at a spinodal
            found = (np.abs(f) <= 1e-12 * q) | ~bisect | (np.abs(step) <= PTOL * xa)
            root[active[done & found]] = np.where(f == 0.0, xa, new)[done & found]
            x[active], lo[active], hi[active] = new, la, ha
            active = active[~done]
    return (root * rhoc).reshape(shape)
