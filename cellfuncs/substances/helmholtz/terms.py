"""The term families of Helmholtz-energy equations of state and their derivatives.

A fundamental equation gives the reduced Helmholtz energy alpha = a / (R T) as a function of
the inverse reduced temperature tau = T_c / T and the reduced density delta = rho / rho_c,
split into an ideal-gas part alpha0 and a residual part alphar. The published reference and
technical equations (Span and Wagner 1996, Span et al. 2000, Setzmann and Wagner 1991, the
GERG-2008 pure-fluid equations, IAPWS-95, ...) all build alphar from the same few term families:

    power        n delta^d tau^t
    exponential  n delta^d tau^t exp(-g delta^l)
    gaussian     n delta^d tau^t exp(-eta (delta - epsilon)^2 - beta (tau - gamma)^2)
    nonanalytic  n Delta^b delta psi           (the critical-region terms of Span and Wagner
                                                1996 and IAPWS-95, their eq. (6.1)/Table 2)

and alpha0 from

    lead             ln delta + a1 + a2 tau + a3 ln tau
    power            n tau^t
    planck_einstein  n ln(1 - exp(-theta tau))
    sinh / cosh      n ln|sinh(theta tau)|  and  -n ln cosh(theta tau)   (GERG-2008 form)
    planck_einstein_general  n ln(c + d exp(theta tau))   (a vibration with c = -1, d = 1, or an
                                                    excited electronic level with c = 1, theta < 0)

Every family returns the *reduced* derivatives, the products that the property relations use
and that stay finite as delta -> 0:

    a = alpha, d = delta a_delta, dd = delta^2 a_deltadelta,
    t = tau a_tau, tt = tau^2 a_tautau, dt = delta tau a_deltatau

Terms are evaluated as one array operation over all terms of a family (shape state x terms),
in chunks of states so that memory stays bounded for very large inputs, and only for the
derivatives a caller asks for.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

import numpy as np

DERIVATIVES = ("a", "d", "dd", "t", "tt", "dt")

# States evaluated together: big enough that the per-call overhead vanishes, small enough that
# a (chunk x terms) work array stays a few megabytes.
_CHUNK = 8192


def _columns(table: Mapping[str, Sequence[float]], names: Sequence[str], defaults: Mapping[str, float]) -> dict:
    n = np.asarray(table["n"], dtype=float)
    cols = {"n": n}
    for name in names:
        if name in table:
            col = np.asarray(table[name], dtype=float)
        elif name in defaults:
            col = np.full(n.shape, defaults[name])
        else:
            raise KeyError(f"term table lacks column '{name}'")
        if col.shape != n.shape:
            raise ValueError(f"column '{name}' has {col.size} values, 'n' has {n.size}")
        cols[name] = col
    return cols


@dataclass(frozen=True)
class PowerTerms:
    """n delta^d tau^t exp(-g delta^l); l = 0 (or g = 0) is a plain power term."""

    n: np.ndarray
    d: np.ndarray
    t: np.ndarray
    l: np.ndarray
    g: np.ndarray
    exponential: bool

    @classmethod
    def from_table(cls, table: Mapping, exponential: bool) -> "PowerTerms":
        defaults = {"l": 0.0, "g": 0.0} if not exponential else {"g": 1.0}
        c = _columns(table, ("d", "t", "l", "g"), defaults)
        if not exponential:
            c["l"] = np.zeros_like(c["n"])
            c["g"] = np.zeros_like(c["n"])
        return cls(**c, exponential=exponential)

    def add(self, tau: np.ndarray, delta: np.ndarray, out: dict) -> None:
        ln_d = np.log(delta)[:, None]
        arg = self.d * ln_d + self.t * np.log(tau)[:, None]
        if self.exponential:
            gl = self.g * np.exp(self.l * ln_d)  # g delta^l
            f = self.n * np.exp(arg - gl)
            A = self.d - self.l * gl  # delta * d(ln term)/d(delta)
        else:
            f = self.n * np.exp(arg)
            A = self.d
        if "a" in out:
            out["a"] += f.sum(axis=1)
        if "d" in out:
            out["d"] += (f * A).sum(axis=1)
        if "dd" in out:
            curl = A * A - self.d - self.l * (self.l - 1.0) * gl if self.exponential else A * (A - 1.0)
            out["dd"] += (f * curl).sum(axis=1)
        if "t" in out:
            out["t"] += f @ self.t
        if "tt" in out:
            out["tt"] += f @ (self.t * (self.t - 1.0))
        if "dt" in out:
            out["dt"] += (f * (A * self.t)).sum(axis=1)


@dataclass(frozen=True)
class GaussianTerms:
    """n delta^d tau^t exp(-eta (delta - epsilon)^2 - beta (tau - gamma)^2)."""

    n: np.ndarray
    d: np.ndarray
    t: np.ndarray
    eta: np.ndarray
    epsilon: np.ndarray
    beta: np.ndarray
    gamma: np.ndarray

    @classmethod
    def from_table(cls, table: Mapping) -> "GaussianTerms":
        return cls(**_columns(table, ("d", "t", "eta", "epsilon", "beta", "gamma"), {}))

    def add(self, tau: np.ndarray, delta: np.ndarray, out: dict) -> None:
        dl = delta[:, None]
        ta = tau[:, None]
        xd = dl - self.epsilon
        xt = ta - self.gamma
        f = self.n * np.exp(self.d * np.log(dl) + self.t * np.log(ta) - self.eta * xd * xd - self.beta * xt * xt)
        A = self.d - 2.0 * self.eta * dl * xd
        if "a" in out:
            out["a"] += f.sum(axis=1)
        if "d" in out:
            out["d"] += (f * A).sum(axis=1)
        if "dd" in out:
            out["dd"] += (f * (A * A - self.d - 2.0 * self.eta * dl * dl)).sum(axis=1)
        if "t" in out or "tt" in out or "dt" in out:
            B = self.t - 2.0 * self.beta * ta * xt
            if "t" in out:
                out["t"] += (f * B).sum(axis=1)
            if "tt" in out:
                out["tt"] += (f * (B * B - self.t - 2.0 * self.beta * ta * ta)).sum(axis=1)
            if "dt" in out:
                out["dt"] += (f * A * B).sum(axis=1)


@dataclass(frozen=True)
class NonanalyticTerms:
    """n Delta^b delta psi, the critical-region terms of Span and Wagner (1996) and IAPWS-95.

    theta = (1 - tau) + A ((delta - 1)^2)^(1/(2 beta)),  Delta = theta^2 + B ((delta - 1)^2)^a,
    psi = exp(-C (delta - 1)^2 - D (tau - 1)^2). Derivatives as in IAPWS R6-95, Table 5.
    """

    n: np.ndarray
    a: np.ndarray
    b: np.ndarray
    beta: np.ndarray
    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    D: np.ndarray

    @classmethod
    def from_table(cls, table: Mapping) -> "NonanalyticTerms":
        return cls(**_columns(table, ("a", "b", "beta", "A", "B", "C", "D"), {}))

    def __post_init__(self) -> None:
        # the products of constants that the derivatives use, formed once (as they were written, so
        # the values are the same to the last bit)
        ib = 1.0 / (2.0 * self.beta)
        for name, value in (("_ib", ib), ("_A2b", self.A * (2.0 / self.beta)), ("_2Ba", 2.0 * self.B * self.a),
                            ("_4Baa", 4.0 * self.B * self.a * (self.a - 1.0)), ("_2Ab2", 2.0 * (self.A / self.beta) ** 2),
                            ("_A4b", self.A * (4.0 / self.beta) * (ib - 1.0)), ("_m2C", -2.0 * self.C)):
            object.__setattr__(self, name, value)

    def add(self, tau: np.ndarray, delta: np.ndarray, out: dict) -> None:
        # The terms' derivatives contain (delta - 1)^(negative power) times (delta - 1): finite
        # limits, but 0 * inf at the critical density itself, so step off it by a hair.
        dm = delta[:, None] - 1.0
        dm = np.where(np.abs(dm) < 1e-12, 1e-12, dm)
        dl = dm + 1.0
        ta = tau[:, None]
        sq = dm * dm
        ln_sq = np.log(sq)
        sq_ib = np.exp(self._ib * ln_sq)  # ((delta - 1)^2)^(1/(2 beta))
        sq_a = np.exp(self.a * ln_sq)  # ((delta - 1)^2)^a
        theta = (1.0 - ta) + self.A * sq_ib
        Delta = theta * theta + self.B * sq_a
        psi = np.exp(-self.C * sq - self.D * (ta - 1.0) ** 2)
        Db = np.exp(self.b * np.log(Delta))  # Delta^b
        Db1 = Db / Delta  # Delta^(b-1)
        n = self.n
        d1 = dl[:, 0]
        t1 = ta[:, 0]
        if "a" in out:
            out["a"] += (n * Db * dl * psi).sum(axis=1)
        if "d" in out or "dd" in out or "dt" in out:
            # dDelta/ddelta, written with sq^x / sq in place of sq^(x - 1)
            D_d = (self._A2b * theta * sq_ib + self._2Ba * sq_a) / dm
            Db_d = self.b * Db1 * D_d
            p_d = self._m2C * dm * psi
            psi_dl = psi + dl * p_d  # d(delta psi)/ddelta
        if "d" in out:
            out["d"] += d1 * (n * (Db * psi_dl + Db_d * dl * psi)).sum(axis=1)
        Db2 = Db1 / Delta if ("dd" in out or "tt" in out or "dt" in out) else None  # Delta^(b-2)
        if "dd" in out:
            D_dd = D_d / dm + (self._4Baa * sq_a + self._2Ab2 * sq_ib * sq_ib + self._A4b * theta * sq_ib) / sq
            Db_dd = self.b * (Db1 * D_dd + (self.b - 1.0) * Db2 * D_d * D_d)
            p_dd = (2.0 * self.C * sq - 1.0) * 2.0 * self.C * psi
            a_dd = n * (Db * (2.0 * p_d + dl * p_dd) + 2.0 * Db_d * psi_dl + Db_dd * dl * psi)
            out["dd"] += d1 * d1 * a_dd.sum(axis=1)
        if "t" in out or "tt" in out or "dt" in out:
            Db_t = -2.0 * self.b * theta * Db1
            p_t = -2.0 * self.D * (ta - 1.0) * psi
            if "t" in out:
                out["t"] += t1 * (n * dl * (Db_t * psi + Db * p_t)).sum(axis=1)
            if "tt" in out:
                Db_tt = 2.0 * self.b * Db1 + 4.0 * self.b * (self.b - 1.0) * theta * theta * Db2
                p_tt = (2.0 * self.D * (ta - 1.0) ** 2 - 1.0) * 2.0 * self.D * psi
                out["tt"] += t1 * t1 * (n * dl * (Db_tt * psi + 2.0 * Db_t * p_t + Db * p_tt)).sum(axis=1)
            if "dt" in out:
                Db_dt = (-self.A * self.b * (2.0 / self.beta) * Db1 * sq_ib / dm
                         - 2.0 * self.b * (self.b - 1.0) * theta * Db2 * D_d)
                p_dt = 4.0 * self.C * self.D * dm * (ta - 1.0) * psi
                a_dt = n * (Db * (p_t + dl * p_dt) + dl * Db_d * p_t + Db_t * psi_dl + Db_dt * dl * psi)
                out["dt"] += d1 * t1 * a_dt.sum(axis=1)


@dataclass(frozen=True)
class IdealTerms:
    """alpha0 = ln delta + a1 + a2 tau + a3 ln tau + sum n tau^t + sum n ln(1 - exp(-theta tau))
    + sum n ln|sinh(theta tau)| - sum n ln cosh(theta tau) + sum n ln(c + d exp(theta tau))."""

    a1: float
    a2: float
    a3: float
    power: tuple[np.ndarray, np.ndarray]
    planck_einstein: tuple[np.ndarray, np.ndarray]
    sinh: tuple[np.ndarray, np.ndarray]
    cosh: tuple[np.ndarray, np.ndarray]
    planck_einstein_general: tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]  # n, c, d, theta

    def add(self, tau: np.ndarray, delta: np.ndarray, out: dict) -> None:
        """Adds alpha0 (to 'a') and its tau-derivatives ('t', 'tt'; asked for together); the
        delta-derivatives of ln delta are 1 and -1 and are applied by the property relations."""
        ta = tau[:, None]
        out["a"] += np.log(delta) + self.a1 + self.a2 * tau + self.a3 * np.log(tau)
        out["t"] += self.a2 * tau + self.a3
        out["tt"] += -self.a3
        n, t = self.power
        if n.size:
            f = n * ta**t
            out["a"] += f.sum(axis=1)
            out["t"] += (f * t).sum(axis=1)
            out["tt"] += (f * t * (t - 1.0)).sum(axis=1)
        n, th = self.planck_einstein
        if n.size:
            x = th * ta
            e = np.exp(-x)
            out["a"] += (n * np.log1p(-e)).sum(axis=1)
            q = e / (1.0 - e)  # 1 / (exp(x) - 1)
            out["t"] += (n * x * q).sum(axis=1)
            out["tt"] += (-n * x * x * q * (1.0 + q)).sum(axis=1)
        n, th = self.sinh
        if n.size:
            x = th * ta
            out["a"] += (n * np.log(np.abs(np.sinh(x)))).sum(axis=1)
            c = 1.0 / np.tanh(x)
            out["t"] += (n * x * c).sum(axis=1)
            out["tt"] += (-n * x * x * (c * c - 1.0)).sum(axis=1)
        n, th = self.cosh
        if n.size:
            x = th * ta
            out["a"] += (-n * np.log(np.cosh(x))).sum(axis=1)
            tn = np.tanh(x)
            out["t"] += (-n * x * tn).sum(axis=1)
            out["tt"] += (-n * x * x * (1.0 - tn * tn)).sum(axis=1)
        n, c, d, th = self.planck_einstein_general
        if n.size:
            x = th * ta
            u = np.exp(-np.abs(x))  # exp(theta tau) factored out where it is large, so nothing overflows
            up = x > 0.0
            inner = np.where(up, d + c * u, c + d * u)
            out["a"] += (n * (np.where(up, x, 0.0) + np.log(inner))).sum(axis=1)
            q = np.where(up, d, d * u) / inner  # d exp(x) / (c + d exp(x))
            out["t"] += (n * x * q).sum(axis=1)
            out["tt"] += (n * x * x * q * (1.0 - q)).sum(axis=1)


def evaluate(families: Sequence, tau: np.ndarray, delta: np.ndarray,
             want: Sequence[str] = DERIVATIVES) -> dict[str, np.ndarray]:
    """Sum of the families' reduced derivatives named in ``want`` at broadcast (tau, delta), in the
    input's shape. A family computes only what is asked for (the density solver wants d and dd)."""
    tau, delta = np.asarray(tau, dtype=float), np.asarray(delta, dtype=float)
    if tau.shape != delta.shape:  # broadcasting only when needed: it costs a single state a third of a term family
        tau, delta = np.broadcast_arrays(tau, delta)
    shape = tau.shape
    tf = tau.ravel()
    df = delta.ravel()
    if tf.size <= _CHUNK:  # one chunk: the usual case, without the copying
        out = {k: np.zeros(tf.size) for k in want}
        for family in families:
            family.add(tf, df, out)
        return {k: v.reshape(shape) for k, v in out.items()}
    out = {k: np.empty(tf.size) for k in want}
    for start in range(0, tf.size, _CHUNK):
        part = slice(start, start + _CHUNK)
        acc = {k: np.zeros(tf[part].size) for k in want}
        for family in families:
            family.add(tf[part], df[part], acc)
        for k in want:
            out[k][part] = acc[k]
    return {k: v.reshape(shape) for k, v in out.items()}


class DensityTerms:
    """The residual part's delta-derivatives (d and dd) along isotherms, for solving for density: the
    power, exponential and gaussian terms as one array of terms

        n delta^d tau^t exp(-g delta^l - eta (delta - epsilon)^2 - beta (tau - gamma)^2)

    in that order (l = g = 0 for a power term, eta = beta = 0 for an exponential one, l = g = 0 for a
    gaussian one; each part of the exponent computed only over the terms that have it), whose factor
    n tau^t exp(-beta (tau - gamma)^2) is computed once per isotherm (:meth:`factors`) rather than at
    each density of an iteration; the nonanalytic families as they are.

    A term f's d and dd are f A and f (A^2 + delta dA/ddelta - A), A = delta d(ln f)/d(delta): a power
    term's A = d is a constant, an exponential term's A = d - l g delta^l is linear in w = g delta^l and a
    gaussian term's A = d - 2 eta u linear in u = delta (delta - epsilon). So d and dd are polynomials in
    w and u with constant coefficients per term: the products f, f w, f w^2, f u, f u^2 and f delta side by
    side, times a row of coefficients each for d and dd, summed along the row by einsum's loop (each
    state's own sum, in the same order alone as inside an array, which a BLAS matrix product does not
    promise): a handful of array operations for a single state."""

    def __init__(self, families: Sequence):
        power = [f for f in families if isinstance(f, PowerTerms) and not f.exponential]
        exponential = [f for f in families if isinstance(f, PowerTerms) and f.exponential]
        gaussian = [f for f in families if isinstance(f, GaussianTerms)]
        series = power + exponential + gaussian
        self._others = [f for f in families if not any(f is s for s in series)]

        def column(name: str, group: list = series) -> np.ndarray:
            return np.concatenate([np.zeros(0)] + [getattr(f, name) for f in group])

        self._n, self._d, self._t = (column(name) for name in ("n", "d", "t"))
        k = sum(f.n.size for f in power)
        m = k + sum(f.n.size for f in exponential)
        self._exp, self._gauss = slice(k, m), slice(m, None)
        self._l, self._g = column("l", exponential), column("g", exponential)
        self._eta, self._epsilon = column("eta", gaussian), column("epsilon", gaussian)
        self._beta, self._gamma = column("beta", gaussian), column("gamma", gaussian)
        d, l, eta = self._d, self._l, self._eta
        de, dg = d[self._exp], d[self._gauss]
        zl, ze = np.zeros(l.shape), np.zeros(eta.shape)
        # the coefficients of f, f w, f w^2, f u, f u^2, f delta (dd's -2 eta delta^2 is -2 eta (u + epsilon delta))
        self._coefficients = np.stack([
            np.concatenate([d, -l, zl, -2.0 * eta, ze, ze]),
            np.concatenate([d * (d - 1.0), -l * (2.0 * de + l - 1.0), l * l, -4.0 * dg * eta - 2.0 * eta,
                            4.0 * eta * eta, -2.0 * eta * self._epsilon])])

    def factors(self, tau: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(n tau^t exp(-beta (tau - gamma)^2) as states x terms, tau): what the isotherms at ``tau``
        (one-dimensional) keep between densities."""
        ta = tau[:, None]
        arg = self._t * np.log(ta)
        xt = ta - self._gamma
        arg[:, self._gauss] -= self._beta * xt * xt
        return self._n * np.exp(arg), tau

    def derivatives(self, factors: tuple[np.ndarray, np.ndarray], delta: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(delta alphar_delta, delta^2 alphar_deltadelta) at the densities ``delta`` (one per state)."""
        F, tau = factors
        dl = delta[:, None]
        ln_d = np.log(dl)
        arg = self._d * ln_d
        w = self._g * np.exp(self._l * ln_d)  # g delta^l
        arg[:, self._exp] -= w
        xd = dl - self._epsilon
        arg[:, self._gauss] -= self._eta * xd * xd
        f = F * np.exp(arg)
        fw, fg = f[:, self._exp] * w, f[:, self._gauss]
        u = dl * xd
        fu = fg * u
        products = np.concatenate([f, fw, fw * w, fu, fu * u, fg * dl], axis=1)
        out = np.einsum("ij,kj->ik", products, self._coefficients)  # row by row: no BLAS blocking across states
        d, dd = out[:, 0], out[:, 1]
        if self._others:
            parts = {"d": d, "dd": dd}
            for family in self._others:
                family.add(tau, delta, parts)
            d, dd = parts["d"], parts["dd"]
        return d, dd
