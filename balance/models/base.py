"""The one interface every property model offers, and the generic flash.

A balance never knows which model it uses: it asks a model for a
:class:`Point` at a pair of specifications (``T`` and ``P``, ``P`` and
``h``, ``v`` and ``u`` ...) and gets every property back in molar SI units.

Models built on (T, v) — ideal gas and the cubics — only implement
``at_Tv`` and ``at_TP``; :meth:`PropertyModel.flash` turns any other pair
into bracketed one-dimensional searches on those, so no root is ever taken
without a sign change around it. The reference model overrides ``flash``
with the reference library's own solvers.
"""

from __future__ import annotations

import math
from abc import ABC, abstractmethod
from dataclasses import asdict, dataclass

import numpy as np

from ..errors import InputError, TwoPhaseError
from ..rootfind import brent, scan_root
from ..species import Species

#: The intensive properties a state may be fixed by.
SPEC_KEYS = ("T", "P", "v", "u", "h", "s", "x")
_CALORIC = ("u", "h", "s")


@dataclass(frozen=True)
class Point:
    """Every intensive property of one equilibrium state, molar SI units.

    ``u_dep``, ``h_dep`` and ``s_dep`` are the departures from the ideal gas
    at the same T and P (u = u_ig(T) + u_dep), the part a reviewer needs to
    see why a real gas cools when it expands.
    """

    T: float
    """temperature [K]"""
    P: float
    """pressure [Pa]"""
    v: float
    """molar volume [m3/mol]"""
    u: float
    """molar internal energy [J/mol], relative to the model's reference state"""
    h: float
    """molar enthalpy [J/mol]"""
    s: float
    """molar entropy [J/(mol K)]"""
    cv: float
    """molar isochoric heat capacity [J/(mol K)]"""
    cp: float
    """molar isobaric heat capacity [J/(mol K)] (inf inside a two-phase region)"""
    Z: float
    """compressibility factor P v / (R T) [-]"""
    phase: str
    """'gas', 'liquid', 'supercritical', 'two-phase' or 'incompressible'"""
    u_dep: float = 0.0
    """u - u_ig(T) [J/mol]"""
    h_dep: float = 0.0
    """h - h_ig(T) [J/mol]"""
    s_dep: float = 0.0
    """s - s_ig(T, P) [J/(mol K)]"""
    x: float | None = None
    """vapour quality [-] where the model has two phases"""
    ln_phi: float | None = None
    """natural log of the fugacity coefficient [-]"""
    root: str = ""
    """how the volume root was chosen, for the record"""

    @property
    def a(self) -> float:
        """molar Helmholtz energy u - T s [J/mol]"""
        return self.u - self.T * self.s

    def get(self, key: str) -> float:
        return getattr(self, key)

    def as_dict(self) -> dict:
        return asdict(self)


class PropertyModel(ABC):
    """A property model for one species."""

    #: command-line name, e.g. 'peng-robinson'
    name: str = ""
    #: readable name, e.g. 'Peng-Robinson (1976)'
    label: str = ""
    #: whether states inside a two-phase region can be computed
    two_phase: bool = False

    def __init__(self, species: Species):
        self.species = species

    # -- what each model must provide ------------------------------------
    @abstractmethod
    def at_Tv(self, T: float, v: float) -> Point:
        """The state at T [K] and molar volume v [m3/mol]."""

    @abstractmethod
    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K] and P [Pa]."""

    @property
    @abstractmethod
    def reference_state(self) -> str:
        """Words saying where u, h and s are measured from."""

    def equations(self) -> list[str]:
        """The model's equations, in plain text, for the record."""
        return []

    def warnings(self, p: Point) -> list[str]:
        """What a reviewer should know about this state under this model."""
        return []

    def T_bounds(self) -> tuple[float, float]:
        """Temperatures [K] the generic flash searches between."""
        return (max(1.0, 0.2 * self.species.Tc), 6000.0)

    def v_bounds(self, T: float) -> tuple[float, float]:
        """Molar volumes [m3/mol] the generic flash searches between at T."""
        return (1e-6, 1e4)

    # -- generic flash -----------------------------------------------------
    def flash(self, specs: dict[str, float], field: str = "state") -> Point:
        """The state fixed by exactly two of T, P, v, u, h, s (SI floats).

        Raises InputError naming ``field`` when the pair cannot be met.
        """
        check_specs(specs, field)  # first: it names an unknown key before sorting needs it
        keys = tuple(sorted(specs, key=SPEC_KEYS.index))
        if len(keys) != 2:
            raise InputError(field, f"needs exactly two of T, P, v, u, h, s; got {', '.join(keys) or 'none'}")
        if "x" in keys:
            raise InputError(
                field,
                f"quality x needs a model with two phases (the reference model); {self.label} has none",
            )
        a, b = keys
        va, vb = specs[a], specs[b]
        if keys == ("T", "v"):
            return self.at_Tv(va, vb)
        if keys == ("T", "P"):
            return self.at_TP(va, vb)
        if a == "T":  # T with u, h or s: search over v
            return self._solve_v(va, b, vb, field)
        if a == "P" and b == "v":
            return self._solve_T(lambda T: self.at_Tv(T, vb), "P", va, field)
        if a == "P":  # P with u, h or s
            return self._solve_T(lambda T: self.at_TP(T, va), b, vb, field)
        if a == "v":  # v with u, h or s
            return self._solve_T(lambda T: self.at_Tv(T, va), b, vb, field)
        # two caloric properties: outer search over v, inner over T at that v.
        # At fixed v, u, h and s all rise with T, so the inner search always
        # has its one root; the outer function is then defined on a whole
        # range of v (an outer search over T is not: below the T where
        # u_ig(T) reaches the target there is no state, and the scan missed
        # roots lying between that edge and the next grid point).
        lo, hi = self.v_bounds(self.T_bounds()[1])
        return self._search_v(lambda v: self._solve_T(lambda T: self.at_Tv(T, v), a, va, field),
                              lo, hi, b, vb, field, "")

    def _solve_T(self, point_at, key: str, target: float, field: str) -> Point:
        lo, hi = self.T_bounds()
        grid = np.geomspace(lo, hi, 90)
        root = bracketed_root(lambda T: point_at(T).get(key) - target, grid, scale=_scale(key, target))
        if root is None:
            raise InputError(field, f"no state of {self.label} between {lo:g} K and {hi:g} K has {key} = {target:.6g}")
        return point_at(root)

    def _solve_v(self, T: float, key: str, target: float, field: str) -> Point:
        lo, hi = self.v_bounds(T)
        return self._search_v(lambda v: self.at_Tv(T, v), lo, hi, key, target, field, f" at T = {T:.6g} K")

    def _search_v(self, point_at, lo: float, hi: float, key: str, target: float, field: str,
                  where: str) -> Point:
        """The state on ``point_at(v)`` with ``key`` = target, v in [lo, hi] [m3/mol].

        The scan runs from the largest volume down, so where two states
        share the pair (h on an isotherm falls, then rises again past the
        Joule-Thomson inversion pressure) the gas-side one is returned.
        """
        grid = np.geomspace(hi, lo, 120)
        scale = _scale(key, target)

        def f(v):
            return point_at(v).get(key) - target

        try:
            root = bracketed_root(f, grid, scale=scale)
        except TwoPhaseError:
            root = _root_behind_fold(f, grid, scale)
            if root is None:
                raise
        if root is None:
            root = _root_behind_fold(f, grid, scale)
        if root is None:
            raise InputError(field, f"no state of {self.label}{where} has {key} = {target:.6g}")
        return point_at(root)


def _scale(key: str, target: float) -> float:
    """A size for judging a residual of ``key`` as zero."""
    typical = {"P": 1e5, "u": 1e3, "h": 1e3, "s": 10.0, "v": 1e-3, "T": 100.0}[key]
    return max(abs(target), typical)


def _root_behind_fold(f, grid, scale: float, rtol: float = 1e-10):
    """A root the scan of ``grid`` stepped over, or None.

    Near a fold of f (h along an isotherm near the Joule-Thomson inversion
    pressure, h along a line of constant u where P v is least) f can dip
    through zero and back between two neighbouring grid points: two states
    share the pair and no sign change shows on the grid. At each interior
    grid point where |f| is smallest among its neighbours and all three have
    one sign, f is minimised (in its sign) between the neighbours; if it
    crosses zero, the root on the side of ``grid[0]`` is returned.
    """
    values = []
    for x in grid:
        try:
            values.append(float(f(x)))
        except (InputError, ValueError, ZeroDivisionError, FloatingPointError):
            values.append(math.nan)
    for i in range(1, len(grid) - 1):
        fa, fm, fb = values[i - 1], values[i], values[i + 1]
        if not (math.isfinite(fa) and math.isfinite(fm) and math.isfinite(fb)):
            continue
        if not (fa * fm > 0 and fm * fb > 0 and abs(fm) < abs(fa) and abs(fm) <= abs(fb)):
            continue
        sign = 1.0 if fm > 0 else -1.0

        def g(x):
            try:
                return sign * float(f(x))
            except (InputError, ValueError, ZeroDivisionError, FloatingPointError):
                return math.inf

        lo, hi = sorted((float(grid[i - 1]), float(grid[i + 1])))
        from scipy.optimize import minimize_scalar  # lazy: only a fold needs it (~0.4 s import)

        best = minimize_scalar(g, bounds=(lo, hi), method="bounded",
                               options={"xatol": 1e-13 * abs(float(grid[i]))})
        if not best.fun < 0:
            continue
        x = brent(f, float(grid[i - 1]), float(best.x), xtol=1e-14, rtol=rtol / 4, maxiter=200)
        if abs(f(x)) <= 1e-7 * scale:
            return float(x)
    return None


def bracketed_root(f, grid, scale: float = 1.0, rtol: float = 1e-10):
    """A root of f found by scanning ``grid`` for a sign change, then Brent's method.

    Points where f raises a two-phase error are skipped (a cubic cannot be
    evaluated inside its dome). When the sign changes across a jump (the
    target lies inside a two-phase region the scan stepped over), Brent's method
    converges onto the jump; that is detected by the residual and raised as
    a two-phase error rather than returned. Of several roots, the first one
    on the grid that is a true zero is returned.
    """
    # rootfind.brent stops at 2 rtol |x|, scipy's brentq at rtol |x| / 2:
    # rtol / 4 keeps the tolerance this function has always had
    root, jumps, skipped = scan_root(f, grid, scale=scale, rtol=rtol / 4,
                                     skip=(InputError, ValueError, ZeroDivisionError, FloatingPointError))
    if root is not None:
        return root
    if jumps:
        raise TwoPhaseError("state", "the requested state lies inside the two-phase region of this model")
    two_phase = [exc for exc in skipped if isinstance(exc, TwoPhaseError)]
    if two_phase:
        raise two_phase[-1]
    return None


def check_arguments(**values: float) -> None:
    """Reject T [K], P [Pa] or v [m3/mol] that are not finite and positive.

    Called by ``at_TP`` and ``at_Tv``, whose callers may bypass
    :func:`check_specs`; the error names the argument (``T``, ``P`` or
    ``v``). Without it a direct call returned a point full of NaN.
    """
    for key, value in values.items():
        if not (math.isfinite(value) and value > 0):
            what = {"T": "an absolute temperature above 0 K", "P": "an absolute pressure above 0",
                    "v": "a positive volume"}[key]
            raise InputError(key, f"must be {what}; got {value:g} in SI units")


def check_specs(specs: dict[str, float], field: str) -> None:
    """Reject values no state can have (T <= 0, P <= 0, v <= 0, x outside 0..1)."""
    for key, value in specs.items():
        if key not in SPEC_KEYS:
            raise InputError(f"{field}.{key}", f"is not a property a state can be fixed by; use {', '.join(SPEC_KEYS)}")
        if not math.isfinite(value):
            raise InputError(f"{field}.{key}", f"must be a finite number; got {value!r}")
        if key in ("T", "P", "v") and value <= 0:
            what = {"T": "an absolute temperature above 0 K", "P": "an absolute pressure above 0", "v": "a positive volume"}[key]
            raise InputError(f"{field}.{key}", f"must be {what}; got {value:g} in SI units")
        if key == "x" and not 0.0 <= value <= 1.0:
            raise InputError(f"{field}.x", f"quality must be between 0 and 1; got {value:g}")
