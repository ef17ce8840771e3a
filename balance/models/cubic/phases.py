"""The phase of a cubic mixture: stability test, isothermal flash, dew and bubble points.

* **Stability** (Michelsen's tangent-plane test): the feed z at (T, P) is
  stable as one phase when no trial composition w lies below the tangent
  plane of the Gibbs energy at z, i.e. when the modified distance

      tm*(W) = 1 + Σᵢ Wᵢ (ln Wᵢ + ln φᵢ(w) - dᵢ - 1),   dᵢ = ln zᵢ + ln φᵢ(z),  w = W/ΣW,

  is nowhere negative (tm* < 0 at any W proves a split). Two trials are
  iterated by successive substitution, ln Wᵢ ← dᵢ - ln φᵢ(w), from
  Wilson's K-values: a vapour-like one (W = z K) and a liquid-like one
  (W = z/K). A trial that heads for z itself (Σ (ln Wᵢ/zᵢ)² below 1e-4)
  is the trivial solution and is dropped.
* **Flash** at (T, P) where the test finds a split: the Rachford-Rice
  equation Σ zᵢ (Kᵢ - 1)/(1 + β (Kᵢ - 1)) = 0 for the vapour fraction β
  (safeguarded Newton over the whole bracket where every phase amount is
  positive), Kᵢ updated by successive substitution Kᵢ = φᵢᴸ/φᵢⱽ,
  accelerated every fifth step by the dominant-eigenvalue extrapolation,
  then finished by Newton's method on ln K (a finite-difference Jacobian).
* **Dew and bubble points**: the edges of the set of unstable states along
  an isobar (temperatures) or an isotherm (pressures), bracketed on a grid
  and bisected with the stability test to 1e-9 of their value.

The test and the flash use :class:`~.mixing.Mixing`'s fugacity coefficients
(scalar: numpy over the components; vectorised: over states as well).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ...rootfind import newton_bracketed

#: tm* below this proves a split [-].
TM_TOLERANCE = -1e-9
#: Σ (ln Wᵢ/zᵢ)² below this: the trial heads for the feed itself (the trivial solution).
TRIVIAL = 1e-4
#: Successive-substitution steps of one trial at most.
MAX_STEPS = 300
#: Converged when no ln Wᵢ (or ln Kᵢ) moves more than this [-].
STEP_TOL = 1e-10


@dataclass(frozen=True)
class Stability:
    """The outcome of the tangent-plane test at one (T, P)."""

    stable: bool
    tm: float
    """the smallest modified tangent-plane distance met [-] (0 when only the trivial solution was)"""
    w: tuple[float, ...] = ()
    """the trial phase's composition where the test found a split [-]"""
    kind: str = ""
    """which trial found it: 'vapour-like' or 'liquid-like'"""


@dataclass(frozen=True)
class Split:
    """An isothermal flash: the vapour fraction and the two phases' compositions."""

    T: float
    P: float
    beta: float
    """vapour mole fraction [-]"""
    x: tuple[float, ...]
    """liquid mole fractions [-]"""
    y: tuple[float, ...]
    """vapour mole fractions [-]"""
    Z_liquid: float
    Z_vapour: float
    steps: int


def _extrapolate(lnW, step, last):
    """The dominant-eigenvalue acceleration of successive substitution: λ = Δₖ·Δₖ / Δₖ₋₁·Δₖ."""
    den = float(last @ step)
    lam = float(step @ step) / den if den != 0.0 else 0.0
    if 0.0 < lam < 1.0:
        return lnW + step * (lam / (1.0 - lam))
    return lnW


def stability(mix, T: float, P: float, z) -> Stability:
    """The tangent-plane test of feed ``z`` (mole fractions) at T [K], P [Pa]."""
    z = np.asarray(z, dtype=float)
    lnz = np.log(z)
    aij = mix.a_matrix(T)
    d = lnz + mix.ln_phi(T, P, z, aij=aij)[0]
    K = mix.wilson_K(T, P)
    lowest = 0.0
    for kind, W in (("vapour-like", z * K), ("liquid-like", z / K)):
        lnW = np.log(W)
        last = None
        for n in range(MAX_STEPS):
            W = np.exp(lnW)
            w = W / W.sum()
            lnphi = mix.ln_phi(T, P, w, aij=aij)[0]
            tm = 1.0 + float(W @ (lnW + lnphi - d - 1.0))
            if tm < TM_TOLERANCE and float(np.sum((np.log(w) - lnz) ** 2)) > 1e-12:
                return Stability(False, tm, tuple(w), kind)
            new = d - lnphi
            step = new - lnW
            if float(np.max(np.abs(step))) < STEP_TOL or float(np.sum((new - lnz) ** 2)) < TRIVIAL:
                break
            lnW = _extrapolate(new, step, last) if n % 5 == 4 and last is not None else new
            last = step
        lowest = min(lowest, tm)
    return Stability(True, lowest)


def stability_many(mix, T, P, z) -> np.ndarray:
    """The tangent-plane test at many states (arrays T [K], P [Pa] of one shape, flat): True where
    the feed ``z`` is stable as one phase. The same iteration as :func:`stability`, on the states
    still undecided."""
    T, P = np.asarray(T, dtype=float), np.asarray(P, dtype=float)
    N = T.size
    z = np.asarray(z, dtype=float)
    lnz = np.log(z)[:, None]
    zz = np.repeat(z[:, None], N, axis=1)
    d = lnz + mix.ln_phi_many(T, P, zz)[0]
    K = mix.wilson_K(T, P)
    stable = np.ones(N, dtype=bool)
    for W0 in (zz * K, zz / K):
        live = np.flatnonzero(stable)
        lnW = np.log(W0[:, live])
        for _ in range(MAX_STEPS):
            if live.size == 0:
                break
            W = np.exp(lnW)
            w = W / W.sum(axis=0)
            lnphi = mix.ln_phi_many(T[live], P[live], w)[0]
            dl = d[:, live]
            tm = 1.0 + np.sum(W * (lnW + lnphi - dl - 1.0), axis=0)
            split = (tm < TM_TOLERANCE) & (np.sum((np.log(w) - lnz) ** 2, axis=0) > 1e-12)
            new = dl - lnphi
            step = new - lnW
            done = split | (np.max(np.abs(step), axis=0) < STEP_TOL) | (np.sum((new - lnz) ** 2, axis=0) < TRIVIAL)
            done |= ~np.isfinite(tm)
            stable[live[split]] = False
            keep = ~done
            live, lnW = live[keep], new[:, keep]
    return stable


def rachford_rice(z, K) -> float | None:
    """β [-] with Σ zᵢ (Kᵢ - 1)/(1 + β (Kᵢ - 1)) = 0, over the bracket where every phase amount is
    positive (it may lie outside 0..1: a negative flash); None where all K lie on one side of 1."""
    k_min, k_max = float(K.min()), float(K.max())
    if not (k_min < 1.0 < k_max):
        return None
    c = K - 1.0
    lo, hi = 1.0 / (1.0 - k_max), 1.0 / (1.0 - k_min)
    span = hi - lo

    def fdf(beta: float):
        den = 1.0 + beta * c
        f = z * c / den
        return float(f.sum()), -float((f * c / den).sum())

    return newton_bracketed(fdf, lo + 1e-12 * span, hi - 1e-12 * span, rtol=1e-15)


def flash_TP(mix, T: float, P: float, z, K=None) -> Split | None:
    """The isothermal flash of feed ``z`` at T [K], P [Pa] from K-values ``K`` (Wilson's if None);
    None where the flash finds one phase (β outside 0..1, or K heading for 1)."""
    z = np.asarray(z, dtype=float)
    lnK = np.log(mix.wilson_K(T, P) if K is None else np.asarray(K, dtype=float))
    last = None
    aij = mix.a_matrix(T)

    def update(lnK):
        K = np.exp(lnK)
        beta = rachford_rice(z, K)
        if beta is None:
            return None
        x = z / (1.0 + beta * (K - 1.0))
        y = K * x
        x, y = x / x.sum(), y / y.sum()
        ln_l, Z_l, _ = mix.ln_phi(T, P, x, aij=aij)
        ln_v, Z_v, _ = mix.ln_phi(T, P, y, aij=aij)
        return beta, x, y, Z_l, Z_v, ln_l - ln_v

    steps = 0
    for steps in range(1, MAX_STEPS + 1):
        out = update(lnK)
        if out is None:
            return None
        step = out[5] - lnK
        if float(np.sum(out[5] ** 2)) < 1e-8:
            return None  # every K heads for 1: one phase
        if float(np.max(np.abs(step))) < 1e-7:
            lnK = out[5]
            break
        lnK = _extrapolate(out[5], step, last) if steps % 5 == 0 and last is not None else out[5]
        last = step
    for _ in range(8):  # Newton on F(ln K) = ln K - (ln φᴸ - ln φⱽ)
        out = update(lnK)
        if out is None:
            return None
        F = lnK - out[5]
        if float(np.max(np.abs(F))) < 1e-12:
            break
        J = np.empty((lnK.size, lnK.size))
        for j in range(lnK.size):
            h = 1e-7 * max(1.0, abs(lnK[j]))
            probe = lnK.copy()
            probe[j] += h
            shifted = update(probe)
            if shifted is None:
                break
            J[:, j] = ((probe - shifted[5]) - F) / h
        else:
            lnK = lnK - np.linalg.solve(J, F)
            continue
        break
    out = update(lnK)
    if out is None or not 0.0 < out[0] < 1.0:
        return None
    beta, x, y, Z_l, Z_v, _ = out
    return Split(T, P, beta, tuple(x), tuple(y), Z_l, Z_v, steps)


def split_at(mix, T: float, P: float, z) -> Split | None:
    """The flash at (T, P) when the stability test finds a split there, started from the trial
    phase it found; else None."""
    test = stability(mix, T, P, z)
    if test.stable:
        return None
    w = np.asarray(test.w)
    z = np.asarray(z, dtype=float)
    K = w / z if test.kind == "vapour-like" else z / w
    return flash_TP(mix, T, P, z, K) or flash_TP(mix, T, P, z)


@dataclass(frozen=True)
class Edge:
    """One edge of the two-phase region along a line: its value and what kind of point it is."""

    value: float
    """T [K] along an isobar, P [Pa] along an isotherm"""
    kind: str
    """'dew point' (the first drop of liquid) or 'bubble point' (the first bubble of vapour)"""


def _edge_kind(mix, T: float, P: float, z) -> str:
    test = stability(mix, T, P, z)
    return "bubble point" if test.kind == "vapour-like" else "dew point"


def _edges(mix, z, grid, at, rtol: float = 1e-9, gas_end: str = "high") -> tuple[Edge | None, Edge | None]:
    """The edges of the unstable stretch of ``grid`` (ascending) nearest its gas end (``high``:
    the highest temperatures of an isobar; ``low``: the lowest pressures of an isotherm), ``at(x)``
    giving (T, P) of the point x of the line. Nearest the gas end, because a cubic can also split a
    mixture into two liquids far from it (CO2 at temperatures where it is in fact solid)."""
    unstable = [not stability(mix, *at(x), z).stable for x in grid]
    if not any(unstable):
        return None, None
    n = len(unstable)
    if gas_end == "high":
        last = n - 1 - unstable[::-1].index(True)
        first = last
        while first > 0 and unstable[first - 1]:
            first -= 1
    else:
        first = unstable.index(True)
        last = first
        while last < n - 1 and unstable[last + 1]:
            last += 1

    def bisect(a: float, b: float, a_unstable: bool) -> float:
        while abs(b - a) > rtol * abs(b):
            mid = 0.5 * (a + b)
            if (not stability(mix, *at(mid), z).stable) == a_unstable:
                a = mid
            else:
                b = mid
        return b if not a_unstable else a

    edges: list[Edge | None] = []
    for i, inside, outside in ((first, first, first - 1), (last, last, last + 1)):
        if 0 <= outside < len(grid):
            x = bisect(grid[outside], grid[inside], False)
            # the kind: which trial splits just inside the edge
            x_in = x + (grid[inside] - grid[outside]) * 1e-6
            edges.append(Edge(x, _edge_kind(mix, *at(x_in), z)))
        else:
            edges.append(None)
    return edges[0], edges[1]


def T_range(mix, z) -> tuple[float, float]:
    """The temperatures [K] an isobar is searched over: from 0.45 of Kay's pseudo-critical
    temperature (no lower than 0.4 of the lightest component's Tc; below, a cubic also splits
    mixtures that are in fact solid) to 1.5 of the heaviest component's Tc."""
    kay = float(mix.Tc @ np.asarray(z, dtype=float))
    return max(0.45 * kay, 0.4 * float(mix.Tc.min())), 1.5 * float(mix.Tc.max())


def P_range(mix) -> tuple[float, float]:
    """The pressures [Pa] an isotherm is searched over: 100 Pa to 3 times the highest component Pc."""
    return 100.0, 3.0 * float(mix.Pc.max())


def envelope_at_P(mix, P: float, z) -> tuple[Edge | None, Edge | None]:
    """The two-phase region's edges along the isobar P [Pa]: (lower T edge, upper T edge)
    [K]; the upper is the dew point, the lower the bubble point; None where none lies in
    :func:`T_range`."""
    T_lo, T_hi = T_range(mix, z)
    grid = list(np.geomspace(T_lo, T_hi, 56))
    return _edges(mix, z, grid, lambda T: (T, P))


def envelope_at_T(mix, T: float, z) -> tuple[Edge | None, Edge | None]:
    """The two-phase region's edges along the isotherm T [K]: (lower P edge, upper P edge) [Pa];
    the lower is the dew point, the upper the bubble point (or, in the retrograde region, the
    upper dew point); None where none lies in :func:`P_range`."""
    grid = list(np.geomspace(*P_range(mix), 56))
    return _edges(mix, z, grid, lambda P: (T, P), gas_end="low")


def _bar(P: float) -> str:
    return f"{P / 1e5:.6g} bar"


def _kelvin(T: float) -> str:
    return f"{T:.6g} K ({T - 273.15:.2f} degC)"


def _edges_text(lower: Edge | None, upper: Edge | None, fmt, span: tuple[float, float]) -> str:
    if lower is None and upper is None:
        return f"none between {fmt(span[0])} and {fmt(span[1])}"
    parts = []
    for edge, words in ((upper, f"none below {fmt(span[1])}"), (lower, f"beyond {fmt(span[0])}")):
        parts.append(f"{edge.kind} {fmt(edge.value)}" if edge is not None else f"other edge {words}")
    return "; ".join(parts)


def _along_P(P: float, edges, span) -> str:
    return f"two-phase region along P = {_bar(P)}: " + _edges_text(*edges, lambda T: f"T = {_kelvin(T)}", span)


def _along_T(T: float, edges, span) -> str:
    return f"two-phase region along T = {T:.6g} K: " + _edges_text(*edges, lambda P: f"P = {_bar(P)}", span)


def describe_envelope_P(model, P: float) -> str:
    """'two-phase region along P = …: dew point T = …; bubble point T = …' of a :class:`~.mixing.CubicMixture`."""
    return _along_P(P, envelope_at_P(model.mixing, P, model.z), T_range(model.mixing, model.z))


def describe_envelope_T(model, T: float) -> str:
    """'two-phase region along T = …: dew point P = …; bubble point P = …' of a :class:`~.mixing.CubicMixture`."""
    return _along_T(T, envelope_at_T(model.mixing, T, model.z), P_range(model.mixing))


def _main(ids, fractions, n: int = 3) -> str:
    order = sorted(range(len(ids)), key=lambda i: -fractions[i])[:n]
    return ", ".join(f"{ids[i]} {fractions[i]:.4g}" for i in order)


def describe_split(model, T: float, P: float) -> str:
    """Why a state is refused: the flash at (T, P) and the dew and bubble points on its isobar."""
    split = split_at(model.mixing, T, P, model.z)
    ids = [sp.id for sp in model.components]
    where = f"at T = {T:.6g} K, P = {_bar(P)} the mixture splits into two phases under {model.form.label}"
    if split is not None:
        where += (f" (isothermal flash: vapour fraction {split.beta:.6g}; liquid mainly {_main(ids, split.x)}; "
                  f"vapour mainly {_main(ids, split.y)})")
    return where + "; " + describe_envelope_P(model, P)


@dataclass(frozen=True)
class PhaseReport:
    """A cubic mixture's phase at one (T, P): the edges of its two-phase region along the isobar
    and the isotherm through it, and the flash where it splits there."""

    T: float
    P: float
    along_P: tuple[Edge | None, Edge | None]
    """(lower, upper) edge in T [K] along the isobar P: the bubble and the dew point"""
    along_T: tuple[Edge | None, Edge | None]
    """(lower, upper) edge in P [Pa] along the isotherm T: the dew point and the bubble (or upper dew) point"""
    split: Split | None
    ids: tuple[str, ...]
    z: tuple[float, ...]
    T_span: tuple[float, float] = (0.0, 0.0)
    """the temperatures searched along the isobar [K]"""
    P_span: tuple[float, float] = (0.0, 0.0)
    """the pressures searched along the isotherm [Pa]"""

    def lines(self) -> list[str]:
        """The report as text: the edges, then the flash (or that the mixture is one phase here)."""
        out = [_along_P(self.P, self.along_P, self.T_span), _along_T(self.T, self.along_T, self.P_span)]
        if self.split is None:
            out.append("one phase at this T and P (tangent-plane stability test)")
            return out
        s = self.split
        out += [f"two phases at this T and P (tangent-plane test, Rachford-Rice flash in {s.steps} substitution steps "
                f"and a Newton finish): vapour fraction beta = {s.beta:.9g}; Z liquid = {s.Z_liquid:.6g}, "
                f"Z vapour = {s.Z_vapour:.6g}",
                f"{'component':<10}  {'feed z':>10}  {'liquid x':>10}  {'vapour y':>10}  {'K = y/x':>10}",
                *(f"{i:<10}  {zi:>10.6g}  {xi:>10.6g}  {yi:>10.6g}  {yi / xi:>10.6g}"
                  for i, zi, xi, yi in zip(self.ids, self.z, s.x, s.y))]
        return out

    def as_json(self) -> dict:
        def edge(e: Edge | None, unit: str):
            return None if e is None else {"value": float(e.value), "unit": unit, "kind": e.kind}

        return {
            "T": {"value": self.T, "unit": "K"}, "P": {"value": self.P, "unit": "Pa"},
            "along_P": [edge(e, "K") for e in self.along_P], "along_T": [edge(e, "Pa") for e in self.along_T],
            "split": None if self.split is None else {
                "beta": self.split.beta, "x": dict(zip(self.ids, map(float, self.split.x))),
                "y": dict(zip(self.ids, map(float, self.split.y))), "Z_liquid": self.split.Z_liquid,
                "Z_vapour": self.split.Z_vapour},
        }


def report(model, T: float, P: float) -> PhaseReport:
    """The :class:`PhaseReport` of a :class:`~.mixing.CubicMixture` at T [K], P [Pa]."""
    mix, z = model.mixing, model.z
    return PhaseReport(T, P, envelope_at_P(mix, P, z), envelope_at_T(mix, T, z), split_at(mix, T, P, z),
                       tuple(sp.id for sp in model.components), tuple(float(v) for v in z), T_range(mix, z), P_range(mix))
