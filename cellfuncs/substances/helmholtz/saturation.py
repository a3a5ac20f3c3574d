"""The liquid-vapour equilibrium of a Helmholtz equation: solved from the equation, tabulated once.

Phase equilibrium means equal temperature, pressure and chemical potential in both phases. With
J = delta (1 + delta alphar_delta) and K = delta alphar_delta + alphar + ln delta this is
J(delta') = J(delta''), K(delta') = K(delta'') at one tau, solved by Newton's method on the pair
(delta', delta'') as Akasaka (2008), J. Thermal Sci. Technol. 3, 442, describes, with
dJ/ddelta = 1 + 2 delta alphar_delta + delta^2 alphar_deltadelta and dK/ddelta = (dJ/ddelta) / delta.

The table is built on first use, over the whole line at once: nodes uniform in x = (1 - T/Tc)^(1/3),
which crowds them towards the critical point where densities change as (1 - T/Tc)^0.33, and a node
at each of the equation's knots (a mapped equation's shape factors are splines, whose third
derivative jumps there). The interpolated quantity is y = (T/Tc) ln(p/p_c), which
Clausius-Clapeyron's ln p = A - B/T makes linear in T: ln p itself curves so strongly near a triple
point far below Tc (propane's, 0.23 Tc) that cubic polynomials between nodes 2 K apart miss it by
1e-6. y is interpolated by cubic Hermite polynomials with the exact slope of each node (the
Clapeyron equation, dp/dT = (s'' - s') / (v'' - v')), which reproduces the equation's own vapour
pressure to better than 1e-10 between the nodes for a reference equation (measured in
tests/test_equation_co2.py) and to 5e-8 for a mapped one (tests/test_fluid_consistency.py); no
equation call is needed when a vapour pressure is looked up. The other columns (saturated and
spinodal densities, spinodal pressures) serve as the density solver's starting values and
brackets and are interpolated linearly.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from ...numerics import everywhere, solve_bracketed
from . import density
from .equation import HelmholtzEquation

NODES = 801  # about 1 K apart near a triple point at 0.3 Tc: 5e-8 in pressure at most (mapped equations)
_X_SMALL = 0.01  # nodes closer to the critical point than this are not solved: the pair is too close
_X_GAP = 0.05  # the last solved node must be at least this close to the critical point (T > 0.99987 Tc)
_SCAN = 64  # points of the stiffness scan between the saturated densities (finding the spinodals)
_NEWTON = 8  # Newton steps at most inverting the vapour pressure (three or four from the straight line)
_S_TOL = 1e-9  # after a Newton step this small on the position in an interval the next is at rounding level


def starting_densities(eq: HelmholtzEquation, T: np.ndarray, p_guess: np.ndarray, rho_liquid_guess: np.ndarray
                       ) -> tuple[np.ndarray, np.ndarray]:
    """Reduced densities to start the equilibrium from: the vapour's root at an estimated vapour
    pressure (found between the ideal gas and the critical density) and a liquid density estimate
    (a Rackett volume is close enough away from the critical point)."""
    tiny = 0.5 * p_guess / (eq.R * T * eq.rhoc)
    dv = density.solve(eq, T, p_guess, 2.0 * tiny, tiny, np.full(T.shape, 1.0)) / eq.rhoc
    dl = np.maximum(np.asarray(rho_liquid_guess, dtype=float) / eq.rhoc, 1.0)
    return dl, np.where(np.isfinite(dv), dv, 2.0 * tiny)


def equilibrium(eq: HelmholtzEquation, T: np.ndarray, dl: np.ndarray, dv: np.ndarray
                ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(p, rho', rho'') of the equation's phase equilibrium at temperatures T below Tc, by Newton's
    method from the reduced densities (dl, dv). NaN where it does not converge."""
    T = np.asarray(T, dtype=float)
    dl, dv = np.array(dl, dtype=float), np.array(dv, dtype=float)
    converged = np.zeros(T.shape, bool)
    d_l, d_v = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
    active = np.flatnonzero(np.isfinite(T))
    with np.errstate(all="ignore"):
        for _ in range(100):
            if active.size == 0:
                break
            t, a, b = T[active], dl[active], dv[active]
            r = eq.residual(np.concatenate([t, t]), np.concatenate([a, b]) * eq.rhoc, ("a", "d", "dd"))
            n = t.size
            d, dd, al = r["d"], r["dd"], r["a"]
            delta = np.concatenate([a, b])
            J = delta * (1.0 + d)
            K = d + al + np.log(delta)
            Jd = 1.0 + 2.0 * d + dd
            Kd = Jd / delta
            F1, F2 = J[:n] - J[n:], K[:n] - K[n:]
            det = Jd[:n] * Kd[n:] * -1.0 + Jd[n:] * Kd[:n]
            step_l = -(F1 * -Kd[n:] + F2 * Jd[n:]) / det
            step_v = -(Jd[:n] * F2 - Kd[:n] * F1) / det
            # keep each phase on its side of the critical density and positive (halving the step)
            new_l, new_v = a + step_l, b + step_v
            for _halve in range(30):
                bad = ~((new_l > 1.0) & (new_v > 0.0) & (new_v < 1.0))
                if not bad.any():
                    break
                step_l, step_v = np.where(bad, 0.5 * step_l, step_l), np.where(bad, 0.5 * step_v, step_v)
                new_l, new_v = a + step_l, b + step_v
            bad = ~((new_l > 1.0) & (new_v > 0.0) & (new_v < 1.0))
            # Newton converges quadratically: after a step below 1e-9 the pair is at rounding level
            # (near the critical point rounding keeps later steps near 1e-12, so do not wait for less)
            done = (np.abs(step_l) <= 1e-9 * a) & (np.abs(step_v) <= 1e-9 * b) & ~bad
            dl[active], dv[active] = new_l, new_v
            d_l[active[done]], d_v[active[done]] = new_l[done], new_v[done]
            converged[active[done]] = True
            active = active[~done & ~bad]  # a step that cannot be kept on its side gives up
    p, _ = eq.pressure(T, d_v * eq.rhoc)
    ok = converged & (d_l - d_v > 1e-6)  # not the trivial solution delta' = delta''
    return (np.where(ok, p, np.nan), np.where(ok, d_l * eq.rhoc, np.nan), np.where(ok, d_v * eq.rhoc, np.nan))


def _spinodals(eq: HelmholtzEquation, T: np.ndarray, d_l: np.ndarray, d_v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Reduced densities of the vapour and liquid spinodals: the first zero of dp/drho going up
    from the saturated vapour and going down from the saturated liquid."""
    grid = np.linspace(0.0, 1.0, _SCAN)
    ln_v, ln_l = np.log(d_v)[:, None], np.log(d_l)[:, None]
    scan = np.exp(ln_v + (ln_l - ln_v) * grid)  # states x scan points, geometric
    tt = np.broadcast_to(T[:, None], scan.shape)
    _, slope = eq.pressure(tt, scan * eq.rhoc)
    falling = slope <= 0.0
    # where the scan misses the unstable region (a hair from the critical point) the saturated
    # states stand in for the spinodals: no metastable states are offered there
    seen = falling.any(axis=1)
    first = np.clip(np.argmax(falling, axis=1), 1, _SCAN - 1)  # first scan point past the vapour spinodal
    last = np.clip(_SCAN - 1 - np.argmax(falling[:, ::-1], axis=1), 0, _SCAN - 2)  # last before the liquid branch
    rows = np.arange(T.size)

    def stiffness(x):
        return eq.pressure(T, x * eq.rhoc)[1]

    sv = solve_bracketed(stiffness, scan[rows, first - 1], scan[rows, first], xtol=1e-12)
    sl = solve_bracketed(stiffness, scan[rows, last], scan[rows, last + 1], xtol=1e-12)
    return np.where(seen, sv, d_v), np.where(seen, sl, d_l)


def _nodes(x_top: float, Tc: float, knots: tuple[float, ...]) -> np.ndarray:
    """Node abscissae x from x_top down to 0: uniform, with the equation's knots (temperatures where its
    temperature dependence is only piecewise smooth) in place of the uniform nodes nearest them, so
    that no interval between nodes holds a knot (a jump in a third derivative inside an interval
    costs the cubic interpolation 5e-7 in pressure; between knots it is smooth)."""
    x = np.linspace(x_top, 0.0, NODES)
    step = x[0] - x[1]
    xk = np.cbrt(1.0 - np.asarray(knots, dtype=float) / Tc)
    xk = xk[(xk < x_top - 0.25 * step) & (xk > 0.25 * step)]
    if xk.size == 0:
        return x
    near = np.abs(x[:, None] - xk[None, :]).min(axis=1) < 0.5 * step
    near[0] = near[-1] = False
    return np.sort(np.concatenate([x[~near], xk]))[::-1]


class Saturation:
    """The equation's vapour pressure and saturated and spinodal densities from T_low to Tc."""

    def __init__(self, eq: HelmholtzEquation, T_low: float, p_guess: Callable, rho_liquid_guess: Callable):
        self.eq = eq
        Tc = eq.Tc
        self.x_top = (1.0 - T_low / Tc) ** (1.0 / 3.0)
        x = _nodes(self.x_top, Tc, eq.knots)
        solved = x >= _X_SMALL
        T = Tc * (1.0 - x[solved] ** 3)
        T[0] = T_low  # exactly, so the table's end is the triple point's own value
        p, rho_l, rho_v = equilibrium(eq, T, *starting_densities(eq, T, p_guess(T), rho_liquid_guess(T)))
        # near the critical point the estimates are too far off: start there from the converged node
        # closest to it, scaled as delta - 1 ~ x (the densities go as (1 - T/Tc)^0.33)
        failed = ~np.isfinite(p)
        if failed.any() and (~failed).any():
            ref = np.flatnonzero(~failed)[-1]
            scale = x[solved][failed] / x[solved][ref]
            d_l0 = 1.0 + (rho_l[ref] / eq.rhoc - 1.0) * scale
            d_v0 = 1.0 + (rho_v[ref] / eq.rhoc - 1.0) * scale
            p[failed], rho_l[failed], rho_v[failed] = equilibrium(eq, T[failed], d_l0, d_v0)
        # an equation's own critical point may lie a hair from its reducing point (normal hydrogen:
        # within 3 mK of Tc its liquid branch crosses the reducing density): nodes that fail next to
        # the critical point are left out, and the table runs from the last solved node to it
        # (nodes beyond the first failure are not trusted either: there the liquid sits on the
        # reducing density, where the solver holds it)
        failed = ~np.isfinite(p)
        last = (np.argmax(failed) if failed.any() else T.size) - 1
        if last < 0 or x[solved][last] > _X_GAP:
            raise ArithmeticError(f"{eq.key}: the phase equilibrium failed at {T[failed]} K")
        keep = np.arange(T.size) <= last
        solved[np.flatnonzero(solved)[~keep]] = False
        T, p, rho_l, rho_v = T[keep], p[keep], rho_l[keep], rho_v[keep]
        d_l, d_v = rho_l / eq.rhoc, rho_v / eq.rhoc
        r = eq.residual(np.concatenate([T, T]), np.concatenate([rho_l, rho_v]), ("a", "t"))
        n = T.size
        ds = eq.R * ((r["t"][n:] - r["t"][:n]) - (r["a"][n:] - r["a"][:n]) - np.log(d_v / d_l))
        dp_dT = ds / (1.0 / rho_v - 1.0 / rho_l)  # Clapeyron
        sv, sl = _spinodals(eq, T, d_l, d_v)
        p_sv, _ = eq.pressure(T, sv * eq.rhoc)
        p_sl, _ = eq.pressure(T, sl * eq.rhoc)
        _, stiff_l = eq.pressure(T, rho_l)
        # the critical point closes the table: both densities and both spinodals meet there
        crit_p, _ = eq.pressure(np.array(Tc), np.array(eq.rhoc))
        crit_slope, = np.atleast_1d(eq.mechanical(np.array(Tc), np.array(eq.rhoc)).dp_dT)
        xs = x[solved]
        x_all = np.concatenate([xs, [0.0]])
        T_all = Tc * (1.0 - x_all**3)
        T_all[0] = T[0]
        ln_pr = np.log(np.concatenate([p, [float(crit_p)]]) / float(crit_p))
        # y = (T/Tc) ln(p/p_c): dy/dT = ln(p/p_c)/Tc + (T/Tc) (dp/dT)/p, and dT/dx = -3 Tc x^2
        dy_dT = ln_pr / Tc + T_all / Tc * np.concatenate([dp_dT / p, [crit_slope / float(crit_p)]])
        one = [1.0]
        self._x = x_all[::-1]  # increasing x, for interpolation
        self._y = y = (T_all / Tc * ln_pr)[::-1]
        self._slope = (dy_dT * -3.0 * Tc * x_all**2)[::-1]
        # each interval's Hermite cubic as a polynomial in s = (x - x_i) / h, y = c0 + s (c1 + s (c2 + s c3)),
        # for the inverse
        h = np.diff(self._x)
        m0, m1 = h * self._slope[:-1], h * self._slope[1:]
        y0, y1 = y[:-1], y[1:]
        self._c = (y0, m0, 3.0 * (y1 - y0) - 2.0 * m0 - m1, 2.0 * (y0 - y1) + m0 + m1)
        self._h = h
        self._q = -ln_pr[::-1]  # -ln(p/p_c) at the nodes, increasing with x: where a pressure's interval is found
        # the inner nodes: searched, they give the interval's index, the end intervals standing for beyond the ends
        self._x_inner, self._q_inner = self._x[1:-1].copy(), self._q[1:-1].copy()
        self._cols = {name: np.concatenate([col, end])[::-1] for name, col, end in (
            ("d_l", d_l, one), ("d_v", d_v, one), ("sv", sv, one), ("sl", sl, one),
            ("p_sv", p_sv, [float(crit_p)]), ("p_sl", p_sl, [float(crit_p)]),
            ("stiff_l", stiff_l * eq.rhoc, [0.0]))}
        self.T_low, self.p_critical = T_low, float(crit_p)

    # np.minimum / np.maximum in place of np.clip: the same values, without np.clip's Python-level
    # wrappers, which cost a single value more than the arithmetic
    def _x_of(self, T: np.ndarray) -> np.ndarray:
        return np.cbrt(np.maximum(1.0 - np.asarray(T, dtype=float) / self.eq.Tc, 0.0))

    def pressure(self, T: np.ndarray) -> np.ndarray:
        """Vapour pressure (Pa) at T, T_low <= T <= Tc (cubic Hermite in x, no equation call)."""
        T = np.minimum(np.maximum(np.asarray(T, dtype=float), self.T_low), self.eq.Tc)
        x = np.minimum(self._x_of(T), self.x_top)  # _x_of is never negative
        i = self._x_inner.searchsorted(x, side="right")
        h = self._h[i]
        s = (x - self._x[i]) / h
        s2, s3 = s * s, s * s * s
        y = ((2 * s3 - 3 * s2 + 1) * self._y[i] + (s3 - 2 * s2 + s) * h * self._slope[i]
             + (-2 * s3 + 3 * s2) * self._y[i + 1] + (s3 - s2) * h * self._slope[i + 1])
        return self.p_critical * np.exp(y * self.eq.Tc / T)

    def temperature(self, p: np.ndarray) -> np.ndarray:
        """The temperature (K) whose vapour pressure is p, p(T_low) <= p <= p_c: the root of the same
        cubic that :meth:`pressure` evaluates, in the interval the nodes' pressures put p in.

        With L = ln(p/p_c) and T/T_c = 1 - x^3, p(T) = p means y(x) = L (1 - x^3): in s, the cubic
        F(s) = y(s) - L (1 - (x_i + h s)^3), solved by Newton's method from ln p interpolated linearly in
        T between the nodes (Clausius-Clapeyron's near-straight line; F falls monotonically in an
        interval, its slope vanishing only at the critical point itself, where F = 0)."""
        L = np.minimum(np.log(np.asarray(p, dtype=float) / self.p_critical), 0.0)
        q = self._q
        i = self._q_inner.searchsorted(-L, side="right")
        c0, c1, c2, c3 = (c[i] for c in self._c)
        x0, h = self._x[i], self._h[i]
        w = np.minimum(np.maximum((-L - q[i]) / (q[i + 1] - q[i]), 0.0), 1.0)
        x1 = x0 + h
        s = (np.cbrt(x0**3 + w * (x1 - x0) * (x1 * x1 + x1 * x0 + x0 * x0)) - x0) / h
        # F's coefficients: y's less those of L (1 - (x0 + h s)^3)
        a0, a1 = c0 - L * (1.0 - x0**3), c1 + 3.0 * L * x0 * x0 * h
        a2, a3 = c2 + 3.0 * L * x0 * h * h, c3 + L * h**3
        for _ in range(_NEWTON):
            # F' < 0: the tiny shift keeps 0/0 at the critical point itself a zero step
            step = (a0 + s * (a1 + s * (a2 + s * a3))) / (a1 + s * (2.0 * a2 + 3.0 * s * a3) - 1e-300)
            s = s - step
            if everywhere(~(np.abs(step) > _S_TOL)):  # the next step would be at rounding level
                break
        x = x0 + h * s
        return self.eq.Tc * (1.0 - x * x * x)

    def column(self, name: str, T: np.ndarray) -> np.ndarray:
        """A tabulated quantity at T (linear in x): d_l, d_v (saturated densities / rho_c), sv, sl
        (spinodal densities / rho_c), p_sv, p_sl (spinodal pressures), stiff_l (dp/ddelta of the
        saturated liquid)."""
        return np.interp(self._x_of(T), self._x, self._cols[name])

    def columns(self, T: np.ndarray, *names: str) -> tuple[np.ndarray, ...]:
        """Several of :meth:`column`'s quantities at T, its position in the table found once."""
        x = self._x_of(T)
        return tuple(np.interp(x, self._x, self._cols[name]) for name in names)
