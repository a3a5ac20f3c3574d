"""Vectorised root finding for monotone, bracketed problems.

scipy's bracketing solvers work on one scalar at a time, and its element-wise
solver costs about a millisecond per call in overhead; the models here solve
many independent one-dimensional equations at once (one per cell), so this
module runs Chandrupatla's method (a bracketed inverse-quadratic/bisection
hybrid, Chandrupatla 1997, Adv. Eng. Software 28, 145) on whole arrays.

>>> x = solve_bracketed(lambda x: x**3 - np.array([8.0, 27.0]), 0.0, 10.0)
>>> np.allclose(x, [2.0, 3.0])
True
"""

from __future__ import annotations

from typing import Any, Callable

import numpy as np


def anywhere(mask: Any) -> bool:
    """Whether any element of ``mask`` holds; a single value is read directly, without numpy's
    reduction machinery (which costs ten times the comparison that made the mask)."""
    if mask.__class__ is np.bool_:  # a single value's mask, the usual cell: its truth without a call
        return True if mask else False
    return bool(mask) if getattr(mask, "size", 1) == 1 else bool(mask.any())


def everywhere(mask: Any) -> bool:
    """Whether every element of ``mask`` holds (an empty mask: True); a single value read directly."""
    if mask.__class__ is np.bool_:
        return True if mask else False
    return bool(mask) if getattr(mask, "size", 1) == 1 else bool(mask.all())


def solve_bracketed(
    f: Callable[[np.ndarray], np.ndarray],
    lo: np.ndarray | float,
    hi: np.ndarray | float,
    xtol: float = 1e-13,
    maxiter: int = 100,
) -> np.ndarray:
    """Roots of ``f`` element-wise inside ``[lo, hi]``.

    ``f`` maps an array of trial points (the shape of ``lo``/``hi`` broadcast)
    to residuals. Elements whose bracket does not change sign come back NaN, as
    do NaN brackets. ``xtol`` is relative to the magnitude of the root.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a = a.astype(float, copy=True)
    b = b.astype(float, copy=True)
    with np.errstate(all="ignore"):
        fa = np.asarray(f(a), dtype=float)
        fb = np.asarray(f(b), dtype=float)
        # f may broadcast scalar brackets to the shape of its own data
        a, b, fa, fb = (np.array(x) for x in np.broadcast_arrays(a, b, fa, fb))
        valid = np.sign(fa) * np.sign(fb) <= 0
        t = np.full(a.shape, 0.5)
        c, fc = a.copy(), fa.copy()
        # each element's root is recorded when it converges, so it does not depend
        # on how long the other elements of the array keep the loop going
        root = np.full(a.shape, np.nan)
        finished = ~valid
        for _ in range(maxiter):
            xt = a + t * (b - a)
            ft = np.asarray(f(xt), dtype=float)
            same = np.sign(ft) == np.sign(fa)
            # keep [a, b] a bracket: c takes the end point that is dropped
            c = np.where(same, a, b)
            fc = np.where(same, fa, fb)
            b = np.where(same, b, a)
            fb = np.where(same, fb, fa)
            a, fa = xt, ft
            xm = np.where(np.abs(fa) < np.abs(fb), a, b)
            fm = np.where(np.abs(fa) < np.abs(fb), fa, fb)
            tol = 2.0 * xtol * np.abs(xm) + 1e-300
            tlim = tol / np.abs(b - c)
            done = (tlim > 0.5) | (fm == 0) | ~valid
            newly = done & ~finished
            root[newly] = xm[newly]
            finished |= done
            if finished.all():
                break
            xi = (a - b) / (c - b)
            phi = (fa - fb) / (fc - fb)
            quadratic = (phi**2 < xi) & ((1 - phi) ** 2 < 1 - xi)
            t_iqi = fa / (fb - fa) * fc / (fb - fc) + (c - a) / (b - a) * fa / (fc - fa) * fb / (fc - fb)
            t = np.where(quadratic, t_iqi, 0.5)
            t = np.minimum(np.maximum(t, tlim), 1 - tlim)
            # converged or non-finite steps bisect, which keeps every bracket valid
            t = np.where(np.isfinite(t) & ~finished, t, 0.5)
        last = np.where(np.abs(fa) < np.abs(fb), a, b)
        root = np.where(finished, root, last)
    return np.where(valid, root, np.nan)


_MEMO_SIZE = 16  # MonotoneInverse remembers its last values up to this many


class MonotoneInverse:
    """x(y) for a smooth, strictly monotone y = f(x) on [lo, hi], fast for one value or many.

    A table of f built once gives a first estimate by linear interpolation; Newton
    steps with the table's local slope then polish it to rounding. Values of y
    outside f's range give NaN.

    >>> inverse = MonotoneInverse(np.exp, 0.0, 2.0)
    >>> float(inverse(np.exp(1.234)))
    1.234
    """

    def __init__(self, f: Callable[[np.ndarray], np.ndarray], lo: float, hi: float, points: int = 4097, steps: int = 2):
        self.f, self.steps = f, steps
        x = np.linspace(lo, hi, points)
        y = np.asarray(f(x), dtype=float)
        if y[0] > y[-1]:  # interpolation wants increasing y
            x, y = x[::-1], y[::-1]
        self.x, self.y = x, y
        self.slope = np.gradient(x, y)  # dx/dy at the nodes
        self._last: tuple[np.ndarray, np.ndarray] | None = None  # (y, x) of the last few values inverted

    def __call__(self, y: np.ndarray | float) -> np.ndarray:
        y = np.asarray(y, dtype=float)  # a single value stays 0-d: numpy's arithmetic on scalars
        last = self._last
        # a model asks for the same value twice in one call (the stable phase, then the phase's own
        # range check): the second time is a comparison
        if last is not None and last[0].shape == y.shape and everywhere(last[0] == y):
            return last[1].copy()
        with np.errstate(all="ignore"):
            # NaN outside f's range, which the steps keep
            x = np.interp(y, self.y, self.x, left=np.nan, right=np.nan)
            slope = np.interp(y, self.y, self.slope)
            for _ in range(self.steps):
                step = (self.f(x) - y) * slope
                x = x - step
            # a kink in f (where two equations meet) can stall Newton: bracket those elements
            slow = np.abs(step) > 1e-13 * np.abs(x)
            if anywhere(slow):
                x, ys, slow = np.array(x, ndmin=1), np.array(y, ndmin=1), np.array(slow, ndmin=1)
                k = np.clip(np.searchsorted(self.y, ys[slow]), 1, len(self.y) - 1)
                x[slow] = solve_bracketed(lambda t: self.f(t) - ys[slow], self.x[k - 1], self.x[k], xtol=1e-15)
        x = np.reshape(x, y.shape)
        if y.size <= _MEMO_SIZE:
            self._last = (y.copy(), x.copy())
        return x
