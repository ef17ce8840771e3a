"""The vapour-liquid coexistence of one cubic: solved exactly, fitted once per model.

At a temperature below the equation's critical point, saturation is where
the liquid and vapour roots at one pressure have equal fugacity. Newton's
method on ln P converges quadratically, because

    d(ln φ_liquid - ln φ_vapour) / d ln P = Z_liquid - Z_vapour   (at fixed T);

it is kept inside a bracket of pressures known to lie above or below
saturation (one real root of liquid or vapour kind, or the sign of the
fugacity difference), so it cannot wander off.

A search asks for saturation at many temperatures, so each model fits
its curve once, on first use (:class:`SaturationCurve`): ln P, ln v_liquid
and ln v_vapour as piecewise Chebyshev series in t = √(1 - T/Tc), on which
all three are smooth up to and including the critical point (the
coexisting volumes of a cubic part as √(Tc - T) there), with the exact
critical values at t = 0. Pieces are halved until the series agree with
the exact solution to 1e-12 at points between their nodes; the build takes
a few milliseconds. Below the fitted range (T < Tc/4) the exact solution is
used directly.
"""

from __future__ import annotations

import math
import threading
from bisect import bisect_right

from ...rootfind import NoBracket, newton_bracketed
from ...units import R
from . import formulas as fm

#: Chebyshev degree of each piece of the fit.
DEGREE = 16
#: Largest disagreement accepted between a piece and the exact solution [-] (ln P, ln v).
FIT_TOLERANCE = 1e-12
#: How many times a piece may be halved.
MAX_DEPTH = 14
#: Bins of the quick inside/outside test (uniform in t).
BINS = 256
#: Closest to the critical point (in t) that the exact solution is used; nearer, the fit's limit.
CRITICAL_GAP = 5e-4


def solve(model, T: float, lnP: float) -> tuple[float, float, float] | None:
    """(P_sat [Pa], v_liquid, v_vapour [m3/mol]) at T [K], from a first guess of ln P; None if none."""
    a3 = model.a_terms(T)
    lo, hi = -math.inf, math.inf  # ln P known to lie below / above saturation
    reach = 0.25  # how far to step towards saturation while only one side is known
    last_step = False
    for _ in range(200):
        sides = _sides(model, T, lnP, a3)
        if sides is None:  # one root only
            P = math.exp(lnP)
            v = model.volume_roots(T, P, a3[0])[0]
            if v < model.vc_eos:  # only a liquid root: above the liquid spinodal
                hi = lnP
            else:
                lo = lnP
            if math.isfinite(lo) and math.isfinite(hi):
                lnP = 0.5 * (lo + hi)
            else:
                lnP = lnP - reach if math.isfinite(hi) else lnP + reach
                reach *= 2.0
            if hi - lo < 1e-14 * max(1.0, abs(lnP)):
                return None  # no pressure with three roots between them
            continue
        g, dg, v_l, v_v = sides
        step = -g / dg if dg < 0 else math.nan
        if last_step or g == 0.0 or abs(step) <= 1e-15 * max(1.0, abs(lnP)):
            return math.exp(lnP), v_l, v_v
        if g < 0:  # the liquid is the stable root: above saturation
            hi = lnP
        else:
            lo = lnP
        new = lnP + step
        if lo < new < hi:
            # quadratic convergence: one step from within 1e-9 lands on round-off
            last_step = abs(step) <= 1e-9 * max(1.0, abs(lnP))
        elif math.isfinite(lo) and math.isfinite(hi):
            new = 0.5 * (lo + hi)
        else:
            new = lnP - reach if math.isfinite(hi) else lnP + reach
        lnP = new
    return None


def _sides(model, T: float, lnP: float, a3):
    """(ln φ_l - ln φ_v, Z_l - Z_v, v_l, v_v) at T and P = exp(lnP), or None with one root."""
    P = math.exp(lnP)
    v_l, v_v, n = model.volume_roots(T, P, a3[0])
    if n != 3:
        return None
    v_l, v_v = _polish(model, T, P, v_l, a3), _polish(model, T, P, v_v, a3)
    res_l, res_v = model.residual(T, v_l, a3), model.residual(T, v_v, a3)
    # at the pressure asked, not the equation's at the roots: a liquid's P(T, v) moves a
    # million times faster than v at low pressure, and would drown ln φ in round-off
    g = fm.ln_phi(T, v_l, P, res_l[3], math.log) - fm.ln_phi(T, v_v, P, res_v[3], math.log)
    return g, P * (v_l - v_v) / (R * T), v_l, v_v


def _polish(model, T: float, P: float, v: float, a3) -> float:
    """A volume root refined by Newton's method on P(T, v) itself (the liquid's, exact at very low pressures)."""
    for _ in range(3):
        res = model.residual(T, v, a3)
        dv = (res[0] - P) / res[2]
        if not (math.isfinite(dv) and v - dv > model.b):
            break
        v -= dv
        if abs(dv) <= 1e-15 * v:
            break
    return v


def _cheb_fit(x: list[float], columns: list[list[float]]) -> list[list[float]]:
    """Chebyshev coefficients (degree 0..N) of the interpolants through N + 1 points x in [-1, 1]."""
    import numpy as np
    from numpy.polynomial import chebyshev

    V = chebyshev.chebvander(np.array(x), len(x) - 1)
    return [[float(c) for c in np.linalg.solve(V, np.array(col))] for col in columns]


def _cheb_derivative(c: list[float]) -> list[float]:
    """Coefficients of the derivative (in x) of the series with coefficients c."""
    from numpy.polynomial import chebyshev

    return [float(d) for d in chebyshev.chebder(c)] or [0.0]


def _clenshaw(x: float, c: list[float]) -> float:
    b1 = b2 = 0.0
    x2 = 2.0 * x
    for cj in reversed(c[1:]):
        b1, b2 = x2 * b1 - b2 + cj, b1
    return x * b1 - b2 + c[0]


class _Piece:
    """One Chebyshev piece on [ta, tb] of t: ln P, ln v_liquid, ln v_vapour."""

    __slots__ = ("ta", "tb", "coefficients", "c_lnP", "dlnP")

    def __init__(self, ta: float, tb: float, nodes: list[float], columns: list[list[float]]):
        self.ta, self.tb = ta, tb
        # rows of (c_lnP, c_lnvl, c_lnvv), degree 0 .. N, for one Clenshaw pass over all three
        self.coefficients = list(zip(*_cheb_fit([self.x(t) for t in nodes], columns)))
        self.c_lnP = [row[0] for row in self.coefficients]
        self.dlnP = _cheb_derivative(self.c_lnP)

    def x(self, t: float) -> float:
        return (2.0 * t - self.ta - self.tb) / (self.tb - self.ta)

    def values(self, t: float) -> tuple[float, float, float]:
        x = self.x(t)
        x2 = 2.0 * x
        p1 = p2 = l1 = l2 = g1 = g2 = 0.0
        rows = self.coefficients
        for cp, cl, cg in reversed(rows[1:]):
            p1, p2 = x2 * p1 - p2 + cp, p1
            l1, l2 = x2 * l1 - l2 + cl, l1
            g1, g2 = x2 * g1 - g2 + cg, g1
        c0 = rows[0]
        return x * p1 - p2 + c0[0], x * l1 - l2 + c0[1], x * g1 - g2 + c0[2]

    def lnP(self, t: float) -> tuple[float, float]:
        """ln P and d ln P / dt at t."""
        x = self.x(t)
        return _clenshaw(x, self.c_lnP), _clenshaw(x, self.dlnP) * 2.0 / (self.tb - self.ta)


class SaturationCurve:
    """P_sat(T), v_liquid(T), v_vapour(T) of one cubic model, fitted on first use.

    The model holds one curve for its lifetime (``model.saturation_curve``):
    the fit is made the first time a state below Tc asks for it.
    """

    def __init__(self, model):
        self.model = model
        self._lock = threading.Lock()  # one build, even when two threads ask at once
        self._pieces: list[_Piece] | None = None
        self._starts: list[float] = []
        self._bins: list[tuple[float, float]] = []
        self._lnP_ends: list[float] = []
        self.t_max = 0.0
        """the fit covers t in [0, t_max] (T from Tc down to Tc (1 - t_max²))"""
        self.T_low = 0.0
        """the lowest temperature of the fit [K]"""

    def __getstate__(self) -> dict:
        """Pickled with its fit (plain numbers), without the lock (made anew)."""
        return {k: v for k, v in self.__dict__.items() if k != "_lock"}

    def __setstate__(self, state: dict) -> None:
        self.__dict__.update(state)
        self._lock = threading.Lock()

    # -- building --------------------------------------------------------------
    def _build(self) -> None:
        m = self.model
        Tc = m.Tc_eos
        self.T_low = max(1.0, 0.25 * Tc)
        self.t_max = math.sqrt(1.0 - self.T_low / Tc)
        res_c = m.residual(Tc, m.vc_eos)
        self._last = (Tc, math.log(m.Pc_eos), res_c[1] * Tc / m.Pc_eos)  # T, ln P, d ln P/d ln T
        pieces: list[_Piece] = []
        todo = [(0.0, self.t_max, 0)]
        while todo:
            ta, tb, depth = todo.pop(0)
            piece = self._fit(ta, tb)
            if piece is None or (depth < MAX_DEPTH and not self._accurate(piece)):
                if depth >= MAX_DEPTH:
                    break
                mid = 0.5 * (ta + tb)
                todo[:0] = [(ta, mid, depth + 1), (mid, tb, depth + 1)]
                self._last = self._restart(ta)
                continue
            pieces.append(piece)
        if not pieces:
            self._pieces = []
            return
        self.t_max = pieces[-1].tb
        self.T_low = Tc * (1.0 - self.t_max**2)
        self._starts = [p.ta for p in pieces]
        self._lnP_ends = [p.lnP(p.ta)[0] for p in pieces] + [pieces[-1].lnP(self.t_max)[0]]
        edges = []
        for i in range(BINS + 1):
            t = self.t_max * i / BINS
            _, lv, gv = pieces[max(0, bisect_right(self._starts, t) - 1)].values(t)
            edges.append((math.exp(lv), math.exp(gv)))
        # in bin i the liquid volume lies in [edges[i+1].l, edges[i].l], the vapour's in [edges[i].g, edges[i+1].g]
        self._bins = edges
        self._pieces = pieces  # last: a reader that sees the pieces sees everything above

    def _restart(self, t: float):
        """The continuation start at t: from the critical point, or the exact solution just below it."""
        m = self.model
        Tc = m.Tc_eos
        if t == 0.0:
            res_c = m.residual(Tc, m.vc_eos)
            return (Tc, math.log(m.Pc_eos), res_c[1] * Tc / m.Pc_eos)
        return self._last

    def _exact_node(self, t: float):
        """ln P, ln v_l, ln v_v at t by :func:`solve`, continued from the last node solved."""
        m = self.model
        if t == 0.0:
            lv = math.log(m.vc_eos)
            return math.log(m.Pc_eos), lv, lv
        T = m.Tc_eos * (1.0 - t * t)
        T0, lnP0, slope = self._last
        sat = solve(m, T, lnP0 + slope * math.log(T / T0))
        if sat is None:
            return None
        P, v_l, v_v = sat
        res_l, res_v = m.residual(T, v_l), m.residual(T, v_v)
        # Clapeyron: d ln P/d ln T = T (s_v - s_l) / (P (v_v - v_l)), with s_v - s_l from the residual terms
        ds = (res_v[5] - res_l[5]) + R * math.log(v_v / v_l) if v_v > v_l else 0.0
        self._last = (T, math.log(P), T * ds / (P * (v_v - v_l)) if v_v > v_l else slope)
        return math.log(P), math.log(v_l), math.log(v_v)

    def _nodes(self, ta: float, tb: float, count: int, lobatto: bool) -> list[float]:
        """Chebyshev points on [ta, tb] (with their ends, or between them); near the critical
        point they start at CRITICAL_GAP, where the exact solution is still well conditioned,
        and t = 0 itself (the critical point, known exactly) is added as a node."""
        lo = ta if ta > 0 else max(CRITICAL_GAP, tb / 16.0)
        if lobatto:
            n = count - 1 if ta == 0 else count
            pts = [0.5 * (lo + tb) + 0.5 * (tb - lo) * math.cos(math.pi * k / (n - 1)) for k in range(n)]
            return sorted(([0.0] if ta == 0 else []) + pts)
        return sorted(0.5 * (lo + tb) + 0.5 * (tb - lo) * math.cos(math.pi * (k + 0.5) / count)
                      for k in range(count))

    def _fit(self, ta: float, tb: float) -> _Piece | None:
        nodes = self._nodes(ta, tb, DEGREE + 1, lobatto=True)
        columns: list[list[float]] = [[], [], []]
        for t in nodes:
            node = self._exact_node(t)
            if node is None:
                return None
            for column, value in zip(columns, node):
                column.append(value)
        return _Piece(ta, tb, nodes, columns)

    def _accurate(self, piece: _Piece) -> bool:
        """The piece against the exact solution between its nodes.

        ln P must agree to FIT_TOLERANCE; the volumes to FIT_TOLERANCE or to
        what the equation itself fixes them to near the critical point,
        where P hardly changes with v (a relative 1e-14/t², measured).
        """
        saved = self._last
        for t in self._nodes(piece.ta, piece.tb, DEGREE, lobatto=False):
            exact = self._exact_node(t)
            if exact is None:
                return False
            fit = piece.values(t)
            tol_v = max(FIT_TOLERANCE, 1e-14 / (t * t))
            if (abs(exact[0] - fit[0]) > FIT_TOLERANCE or abs(exact[1] - fit[1]) > tol_v
                    or abs(exact[2] - fit[2]) > tol_v):
                self._last = saved
                return False
        return True

    def _piece(self, t: float) -> _Piece:
        return self._pieces[max(0, bisect_right(self._starts, t) - 1)]

    def _ready(self) -> bool:
        if self._pieces is None:
            with self._lock:
                if self._pieces is None:
                    self._build()
        return bool(self._pieces)

    # -- asking ----------------------------------------------------------------------
    def at(self, T: float) -> tuple[float, float, float] | None:
        """(P_sat [Pa], v_liquid, v_vapour [m3/mol]) at T [K] from the fit; None at or above Tc."""
        m = self.model
        if not T < m.Tc_eos or not self._ready():
            return None
        t = math.sqrt(1.0 - T / m.Tc_eos)
        if t > self.t_max:
            return self.exact(T)
        lnP, lv, gv = self._piece(t).values(t)
        return math.exp(lnP), math.exp(lv), math.exp(gv)

    def exact(self, T: float) -> tuple[float, float, float] | None:
        """(P_sat, v_liquid, v_vapour) at T [K] solved to round-off, started from the fit."""
        m = self.model
        if not T < m.Tc_eos or not self._ready():
            return None
        t = math.sqrt(1.0 - T / m.Tc_eos)
        if t < CRITICAL_GAP:  # the equation fixes the volumes no better than the fit here
            return self.at(T)
        if t <= self.t_max:
            return solve(m, T, self._piece(t).lnP(t)[0])
        # below the fit: continue from its low end along ln P ~ A - B/T
        T0 = self.T_low
        lnP0, dlnP_dt = self._pieces[-1].lnP(self.t_max)
        dlnP_dlnT = -dlnP_dt * (1.0 - self.t_max**2) / (2.0 * self.t_max)
        return solve(m, T, lnP0 + dlnP_dlnT * math.log(T / T0))

    def T_at(self, P: float) -> float | None:
        """The saturation temperature [K] at P [Pa] from the fit; None at or above Pc, or below the fit."""
        m = self.model
        if not 0.0 < P < m.Pc_eos or not self._ready():
            return None
        y = math.log(P)
        # ln P falls as t rises: find the piece whose ends bracket y
        ends = self._lnP_ends  # falling: ends[i] at the start of piece i, the last at t_max
        if y < ends[-1]:
            return None
        lo, hi = 0, len(self._pieces) - 1
        while lo < hi:  # the last piece whose start lies at or above y
            mid = (lo + hi + 1) // 2
            if ends[mid] >= y:
                lo = mid
            else:
                hi = mid - 1
        piece = self._pieces[lo]

        def fdf(t: float):
            lnP, d = piece.lnP(t)
            return lnP - y, d

        try:
            t = newton_bracketed(fdf, piece.ta, piece.tb, xtol=1e-15, rtol=1e-15)
        except NoBracket:
            return None
        T = m.Tc_eos * (1.0 - t * t)
        return T if T < m.Tc_eos else None

    def contains(self, T: float, v: float) -> bool:
        """Whether (T, v) lies strictly inside the dome, where the cubic has no stable single phase."""
        m = self.model
        if not T < m.Tc_eos or not self._ready():
            return False
        t = math.sqrt(1.0 - T / m.Tc_eos)
        if t <= self.t_max:
            i = min(int(t / self.t_max * BINS), BINS - 1)
            near, far = self._bins[i], self._bins[i + 1]
            if v <= far[0] or v >= far[1]:
                return False  # below every liquid volume, or above every vapour volume, of the bin
            if near[0] < v < near[1]:
                return True  # between the largest liquid and the smallest vapour volume of the bin
        sat = self.at(T)
        return sat is not None and sat[1] * (1.0 + 1e-10) < v < sat[2] * (1.0 - 1e-10)
