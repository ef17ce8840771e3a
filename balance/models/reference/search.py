"""The reference model's bracketed searches, for the pairs CoolProp has no solver
for and for the pairs that more than one state can meet.

Each search runs along a path on which CoolProp can evaluate the state
directly (an isotherm, an isobar, an isochore, the saturation curve, or a
sweep in P with CoolProp's P-u or P-h solver). A root is only accepted
where the residual changes sign and is zero at the end of the search;
every state on the path that meets the pair is returned. Roots closer
together than one step of the scan (1/160 of the path, logarithmic) can
merge into one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ...rootfind import brent
from ..base import Point

#: Lowest pressure [Pa] the pressure scans start from.
_P_SCAN_LO = 1e-2
#: Nodes on each scanned path; roots closer together than one step can merge.
_N_SCAN = 160


@dataclass
class _Node:
    """One point of a scanned path: parameter, residual, which side of saturation."""

    p: float
    f: float
    side: str | None
    """'liquid', 'gas', 'sat_f', 'sat_g' or None (no saturation on the path)"""
    state: tuple | None = None
    """for saturation nodes, how to set the state: ('Tx', T, x)"""


class PathSearch:
    """Searches along paths of a :class:`CoolPropState` model."""

    # -- bracketed searches ----------------------------------------------------
    def _search(self, keys: tuple[str, str], specs: dict[str, float]) -> list[Point]:
        """Every state on the pair's path that meets both specifications."""
        a, b = keys
        c = self._c
        if a == "T":  # T with u, h or s: the isotherm, in P
            return self._isotherm(specs["T"], b, specs[b])
        if a == "P":  # P with v, u, h or s: the isobar, in T
            return self._isobar(specs["P"], b, specs[b])
        if b == "x":  # v, u, h or s with x: the saturation curve, in T
            x = specs["x"]
            grid = np.linspace(c.Ttriple, c.Tc * (1.0 - 1e-7), _N_SCAN)

            def on_sat(T, side=None):
                self._update("QT_INPUTS", x, T)
                return self._get(a)

            return self._scan_plain(grid, on_sat, a, specs[a])
        if a == "v":  # v with u, h or s: the isochore, in T
            rho = 1.0 / specs["v"]

            def on_isochore(T, side=None):
                self._update("DmolarT_INPUTS", rho, T)
                return self._get(b)

            return self._scan_plain(np.geomspace(c.Tmin, c.Tmax, _N_SCAN), on_isochore, b, specs[b])
        # two caloric properties: sweep P, solving the first with CoolProp
        inner = "PUmolar_INPUTS" if a == "u" else "HmolarP_INPUTS"
        value = specs[a]

        def on_sweep(P, side=None):
            if inner == "HmolarP_INPUTS":
                self._update(inner, value, P)
            else:
                self._update(inner, P, value)
            return self._get(b)

        found = self._scan_plain(np.geomspace(_P_SCAN_LO, c.Pmax, _N_SCAN), on_sweep, b, specs[b])
        # A saturated end state is a fold of this map (the sweep's residual
        # only touches zero there), so look along both saturation lines too.
        tol = 1e-7 * max(abs(specs[b]), {"h": 1e3, "s": 10.0}[b])
        grid = np.linspace(c.Ttriple, c.Tc * (1.0 - 1e-7), _N_SCAN)
        for xq in (0.0, 1.0):
            def on_line(T, side=None, xq=xq):
                self._update("QT_INPUTS", xq, T)
                return self._get(a)

            found += [p for p in self._scan_plain(grid, on_line, a, value) if abs(p.get(b) - specs[b]) <= tol]
        return found

    def _isotherm(self, T: float, key: str, target: float) -> list[Point]:
        c = self._c

        def on_isotherm(P, side=None):
            self._update("PT_INPUTS", P, T, side)
            return self._get(key)

        sat = None
        if c.Ttriple <= T < c.Tc:
            sat = self._saturation("QT_INPUTS", T, key)
        return self._scan_split(np.geomspace(_P_SCAN_LO, c.Pmax, _N_SCAN), on_isotherm, key, target,
                                sat, low_side="gas")

    def _isobar(self, P: float, key: str, target: float) -> list[Point]:
        c = self._c

        def on_isobar(T, side=None):
            self._update("PT_INPUTS", P, T, side)
            return self._get(key)

        sat = None
        if c.Ptriple <= P < c.Pc:
            sat = self._saturation("PQ_INPUTS", P, key)
        return self._scan_split(np.geomspace(c.Tmin, c.Tmax, _N_SCAN), on_isobar, key, target,
                                sat, low_side="liquid")

    def _saturation(self, pair: str, value: float, key: str):
        """(path parameter at saturation, T, key of liquid, key of vapour) or None."""
        try:
            out = []
            for x in (0.0, 1.0):
                if pair == "QT_INPUTS":
                    self._update(pair, x, value)
                else:
                    self._update(pair, value, x)
                out.append(self._get(key))
            param = self._get("P") if pair == "QT_INPUTS" else self._get("T")
            return param, self._get("T"), out[0], out[1]
        except (ValueError, RuntimeError):
            return None

    def _scan_split(self, grid, evaluate, key, target, sat, low_side) -> list[Point]:
        """Scan a path that may cross the saturation line once.

        ``sat`` = (parameter, T, liquid value, vapour value) at the crossing;
        ``low_side`` is the phase below it on the path ('gas' along an
        isotherm in P, 'liquid' along an isobar in T). Across the crossing the
        wet states join the two saturated ends, linear in x for v, u, h, s.
        """
        nodes: list[_Node] = []
        high_side = "liquid" if low_side == "gas" else "gas"
        for p in grid:
            p = float(p)
            if sat is not None and abs(p / sat[0] - 1.0) < 1e-6:
                continue  # CoolProp refuses states this close to saturation
            side = None if sat is None else (low_side if p < sat[0] else high_side)
            try:
                y = evaluate(p)
            except (ValueError, RuntimeError):
                continue
            if math.isfinite(y):
                nodes.append(_Node(p, y - target, side))
        if sat is not None:
            param, T, y_f, y_g = sat
            ends = [_Node(param, y_f - target, "sat_f", ("Tx", T, 0.0)),
                    _Node(param, y_g - target, "sat_g", ("Tx", T, 1.0))]
            if low_side == "gas":
                ends.reverse()
            k = sum(1 for n in nodes if n.p < param)
            nodes[k:k] = ends
        return self._roots(nodes, evaluate, key, target)

    def _scan_plain(self, grid, evaluate, key, target) -> list[Point]:
        """Scan a path along which CoolProp evaluates every state directly."""
        nodes = []
        for p in grid:
            try:
                y = evaluate(float(p))
            except (ValueError, RuntimeError):
                continue
            if math.isfinite(y):
                nodes.append(_Node(float(p), y - target, None))
        return self._roots(nodes, evaluate, key, target)

    def _roots(self, nodes: list[_Node], evaluate, key: str, target: float) -> list[Point]:
        """States where the residual along the path is zero.

        A root inside a single-phase stretch is refined by Brent's method with the
        phase of that stretch imposed and kept only if the residual there is
        zero (a jump is not a root); across the two saturation nodes the
        wet state has x = -f_liquid / (f_vapour - f_liquid).
        """
        tol = 1e-9 * max(abs(target), {"v": 0.0, "u": 1e3, "h": 1e3, "s": 10.0}[key], 1e-300)
        states: list[tuple] = []
        for n in nodes:
            if abs(n.f) <= tol:
                states.append(n.state or self._locate(evaluate, n.p, None))
        for n0, n1 in zip(nodes, nodes[1:]):
            if not n0.f * n1.f < 0.0:
                continue
            if n0.state is not None and n1.state is not None:  # the wet stretch
                f_liq, f_vap = (n0.f, n1.f) if n0.side == "sat_f" else (n1.f, n0.f)
                states.append(("Tx", n0.state[1], -f_liq / (f_vap - f_liq)))
                continue
            side = n0.side if n0.side in ("liquid", "gas") else n1.side
            side = side if side in ("liquid", "gas") else None
            try:
                p = brent(lambda q: evaluate(q, side) - target, n0.p, n1.p, xtol=1e-300, rtol=1e-14)
                if abs(evaluate(p, side) - target) > tol * 1e3:
                    continue  # a jump, not a root
            except (ValueError, RuntimeError):
                continue
            states.append(self._locate(evaluate, p, side))
        points = []
        for st in states:
            if st is None:
                continue
            try:
                if st[0] == "Tx":
                    self._update("QT_INPUTS", st[2], st[1])
                else:
                    self._update("DmolarT_INPUTS", st[2], st[1])
            except (ValueError, RuntimeError):
                continue
            if self._is_solid():
                continue
            points.append(self._point())
        return points

    def _locate(self, evaluate, p: float, side: str | None):
        """How to set again the state ``evaluate`` reaches at p: ('Tx', T, x) or ('Trho', T, rho)."""
        try:
            evaluate(p, side)
        except (ValueError, RuntimeError):
            return None
        if self._is_two_phase():
            return ("Tx", self._get("T"), self._get("x"))
        return ("Trho", self._get("T"), self._as().rhomolar())
