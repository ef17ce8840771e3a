"""The reference model for a gas mixture of fixed composition: CoolProp's HEOS
multi-fluid mixture model (the GERG-2008 form of Kunz and Wagner).

Each component keeps its own reference equation of state; the mixture's
Helmholtz energy adds the ideal mixing term, reducing functions of
composition and, for the pairs that have one, a departure function. CoolProp
supplies the parameters of every pair; a pair it has none for is refused
when the model is built, naming each such pair.

Basis of u, h and s
-------------------
CoolProp's values are shifted by two constants so that, as in the ideal-gas
mixture model, each component's ideal gas at 298.15 K and 1 bar has h = 0 and
s = 0:

    h = h_CoolProp - h0,   u = u_CoolProp - h0,   s = s_CoolProp - s0,
    h0 = Σ yᵢ h°ᵢ(298.15 K),   s0 = Σ yᵢ s°ᵢ(298.15 K, 1 bar)

(h°ᵢ, s°ᵢ the ideal-gas parts of the components' own equations of state), so
h = Σ yᵢ h°ᵢ(T) + h_dep and s = Σ yᵢ s°ᵢ(T, 1 bar) - R Σ yᵢ ln yᵢ - R ln(P/1 bar)
+ s_dep. The ideal-gas parts are the equations of state's, not the species
data's NASA polynomials: the two differ by up to about 0.6 % in cp°, so away
from 298.15 K the two models' ideal-gas limits differ by that (for the bundled
natural gas about 1e-3 of h at 500 K).

Single phase only
-----------------
Every state returned is one CoolProp's phase-stability test finds stable as
one phase at its T and P. The test costs 0.01-1 s a state, so it is skipped
where the state lies on the gas side of CoolProp's phase envelope for this
composition, clear of it, and above every component's triple point; there the
density root of lowest Gibbs energy is taken (checked against the test on a
grid in the tests). A two-phase state is refused with the dew and bubble points.

Input pairs
-----------
T-P and T-v directly; the others by bracketed searches on paths along which
the equation of state is evaluated with the phase imposed (fast): P with v,
u, h or s along the isobar in T (both density roots); T with u, h or s along
the isotherm in v; v with u, h or s along the isochore in T; two of u, h, s
along v, T being solved on each isochore. Every root found is checked for
stability, and of several stable ones the largest volume is taken
(:func:`~balance.models.base.choose_largest_volume`). CoolProp's own mixture
solvers for P-h and P-s work but take about 0.7 s each, and for h-s about
20 s; the searches take about 50 ms along an isobar and 5 ms along an isotherm
or an isochore, away from the phase envelope.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from itertools import pairwise

import numpy as np

from ...errors import InputError, TwoPhaseError
from ...rootfind import brent
from ...species import Species, lookup
from ...units import P_REF, T_REF
from ..base import SPEC_KEYS, Point, PropertyModel, choose_largest_volume, fmt_spec
from .coolprop import CoolPropState, coolprop

#: Nodes on each scanned path; roots closer together than one step can merge.
_N_SCAN = 160
#: Lowest pressure [Pa] an isotherm's scan reaches (its largest volume).
_P_SCAN_LO = 1e-2
#: The densest state a scan visits, in multiples of the mixture's reducing density.
_RHO_SCAN_HI = 5.0
#: An isobar's scan of one density root ends after this many failed solves in a row.
_GIVE_UP = 3
#: Roots at the same state to this relative difference in T and ρ are one.
_SAME = 1e-7
#: A state is taken as one phase without CoolProp's test when at least this far from the envelope [K]...
_CLEAR_K = 3.0
#: ... and this fraction of T.
_CLEAR_REL = 0.02
#: Scale of each property for the root tolerance (absolute part).
_SCALE = {"v": 0.0, "u": 1e3, "h": 1e3, "s": 10.0}
#: GERG-2008's normal range of validity (Kunz and Wagner 2012): 90-450 K, up to 35 MPa.
_GERG_RANGE = (90.0, 450.0, 35e6)

_NO_MIXTURE = "the cubic models (with kij) and ideal-gas take this mixture"


@dataclass(frozen=True)
class _Pair:
    """CoolProp's parameters of one binary pair, in CoolProp's order of the two."""

    first: str
    """species id of CoolProp's first component"""
    second: str
    """species id of CoolProp's second component"""
    betaT: float
    gammaT: float
    betaV: float
    gammaV: float
    F: float
    """weight of the departure function [-] (0: none)"""
    function: str
    """name of the departure function, '' where F = 0"""
    source: str
    """CoolProp's BibTeX key of the parameters"""


@dataclass(frozen=True)
class _Envelope:
    """CoolProp's phase envelope of the mixture: the dew line, through the critical point, the bubble line."""

    T: tuple[float, ...]
    """temperatures along the envelope [K]"""
    P: tuple[float, ...]
    """pressures along the envelope [Pa]"""
    Tc: float
    """critical temperature, where the dew line meets the bubble line [K]"""
    Pc: float
    """critical pressure [Pa]"""
    rhoc: float
    """critical molar density [mol/m3]"""

    @property
    def cricondentherm(self) -> float:
        """the highest temperature of the envelope [K]"""
        return max(self.T)

    @property
    def cricondenbar(self) -> float:
        """the highest pressure of the envelope [Pa]"""
        return max(self.P)

    def crossings(self, P: float) -> list[float]:
        """Temperatures [K] where the envelope meets the isobar P [Pa] (linear in ln P between points)."""
        out = []
        lnP = math.log(P)
        for (T0, P0), (T1, P1) in pairwise(zip(self.T, self.P)):
            if (P0 - P) * (P1 - P) <= 0.0 and P0 != P1:
                a, b = math.log(P0), math.log(P1)
                out.append(T0 + (T1 - T0) * (lnP - a) / (b - a))
        return out

    def clear_of(self, T: float, P: float) -> bool:
        """Whether (T [K], P [Pa]) lies on the gas side of the envelope by the margin, so is surely one phase.

        The liquid side is never taken as clear: below the bubble line a liquid
        can still split into two liquids (CoolProp finds a CO2-rich one below
        CO2's triple point), which the envelope does not show.
        """
        margin = max(_CLEAR_K, _CLEAR_REL * T)
        if T > self.cricondentherm + margin:
            return True
        if P > 1.05 * self.cricondenbar:
            return T > self.Tc + margin
        # above the dew line; below the envelope's lowest pressure the dew line lies lower still
        return T > max([*self.crossings(P), self.T[0], self.T[-1]]) + margin


@dataclass(frozen=True)
class _Component:
    """One component's EOS range, for the warnings."""

    id: str
    Tmin: float
    Tmax: float
    Ttriple: float
    Pmax: float


@dataclass(frozen=True)
class _MixtureConstants:
    """Fixed numbers of the mixture's model (never state-dependent)."""

    R: float
    """the mixture's gas constant in CoolProp [J/(mol K)]"""
    Tmin: float
    """lowest temperature of the searches, CoolProp's for the mixture [K]"""
    Tmax: float
    """highest temperature of the searches, CoolProp's for the mixture [K]"""
    Pmax: float
    """highest pressure, CoolProp's for the mixture [Pa]"""
    rho_red: float
    """the mixture's reducing density [mol/m3]"""
    h0: float
    """Σ yᵢ h°ᵢ(298.15 K) in CoolProp's reference [J/mol], subtracted from h and u"""
    s0: float
    """Σ yᵢ s°ᵢ(298.15 K, 1 bar) in CoolProp's reference [J/(mol K)], subtracted from s"""
    mixing: float
    """-R Σ y ln y [J/(mol K)]"""
    components: tuple[_Component, ...]
    T_solid: float
    """the highest triple-point temperature of the components [K]: below it the envelope is not trusted"""
    envelope: _Envelope | None
    """None where CoolProp could not trace a whole envelope (every state then gets its test)"""
    critical: tuple[float, float, float, str]
    """(Tc [K], Pc [Pa], ρc [mol/m3], where they come from) for the phase labels"""


class ReferenceMixture(CoolPropState, PropertyModel):
    """A gas mixture of fixed composition under CoolProp's HEOS multi-fluid model.

    Parameters
    ----------
    species : Species
        A mixture (``species.composition``); every component must carry a
        CoolProp fluid name, and CoolProp must have parameters for every pair.

    Raises
    ------
    InputError
        field ``fluid.model``, naming the components without a CoolProp name
        or every pair CoolProp has no parameters for.
    """

    name = "reference"
    two_phase = False

    def __init__(self, species: Species):
        super().__init__(species)
        parts = [(lookup(sid), y) for sid, y in species.composition]
        unnamed = [sp for sp, _ in parts if not sp.coolprop]
        if unnamed:
            listed = ", ".join(f"{sp.id} ({sp.name})" for sp in unnamed)
            raise InputError(
                "fluid.model",
                f"the reference model has no equation of state for {listed} (the species data gives no CoolProp "
                f"fluid name), so not for this mixture; {_NO_MIXTURE}",
            )
        self.ids = tuple(sp.id for sp, _ in parts)
        self.fluids = tuple(sp.coolprop for sp, _ in parts)
        self.y = tuple(float(y) for _, y in parts)
        #: CoolProp's name of the mixture (its fluids joined by '&'), as the pure model's ``fluid``
        self.fluid = "&".join(self.fluids)
        self.pairs = _binary_pairs(self.ids, self.fluids)
        mixing = "GERG-type mixing" if len(self.ids) > 1 else "one component"
        self.label = (f"reference mixture (CoolProp HEOS, {mixing}: "
                      + ", ".join(f"{i} {y:.4g}" for i, y in zip(self.ids, self.y)) + ")")
        self._state = None
        self._equations: list[str] | None = None

    # -- CoolProp's state -------------------------------------------------------
    def _as(self):
        """The mixture's AbstractState with its mole fractions, created on first use."""
        if self._state is None:
            CP = coolprop()
            try:
                state = CP.AbstractState("HEOS", self.fluid)
                state.set_mole_fractions(list(self.y))
            except (ValueError, RuntimeError) as exc:
                raise InputError("fluid.model", f"CoolProp could not build the mixture {self.fluid} ({exc}); "
                                                f"{_NO_MIXTURE}") from None
            self._state = state
        return self._state

    @cached_property
    def _c(self) -> _MixtureConstants:
        CP = coolprop()
        AS = self._as()
        R = AS.gas_constant()
        # the ideal-gas parts at the reference state: any density is ideal there, so impose the phase
        self._update("DmolarT_INPUTS", P_REF / (R * T_REF), T_REF, "gas")
        mixing = -R * sum(y * math.log(y) for y in self.y if y > 0.0)
        h0 = AS.hmolar_idealgas()
        s0 = AS.smolar_idealgas() - mixing  # CoolProp's s° of the mixture includes the mixing term
        components = []
        for sid, fluid in zip(self.ids, self.fluids):
            pure = CP.AbstractState("HEOS", fluid)
            components.append(_Component(sid, pure.Tmin(), pure.Tmax(), pure.Ttriple(), pure.pmax()))
        envelope = _envelope(self.fluid, self.y) if len(self.ids) > 1 else None
        if envelope is not None:
            critical = (envelope.Tc, envelope.Pc, envelope.rhoc, "CoolProp's phase envelope")
        else:
            critical = (AS.T_reducing(), self.species.Pc, AS.rhomolar_reducing(),
                        "reducing T and ρ of the mixture, Kay's pseudo-critical P")
        return _MixtureConstants(
            R=R, Tmin=AS.Tmin(), Tmax=AS.Tmax(), Pmax=AS.pmax(), rho_red=AS.rhomolar_reducing(),
            h0=h0, s0=s0, mixing=mixing, components=tuple(components),
            T_solid=max(k.Ttriple for k in components), envelope=envelope,
            critical=critical,
        )

    def _point(self) -> Point:
        """Every property of the current (single-phase) CoolProp state, on this model's basis."""
        AS = self._as()
        c = self._c
        T, P, rho = AS.T(), AS.p(), AS.rhomolar()
        # departures from the residual functions, not as h - h°: a dilute gas's are ~1e-7 of h
        z1 = AS.delta() * AS.dalphar_dDelta()  # Z - 1
        h_dep = AS.hmolar_residual()
        u_dep = h_dep - c.R * T * z1
        s_dep = AS.smolar_residual() + c.R * math.log1p(z1)
        return Point(T=T, P=P, v=1.0 / rho, u=AS.umolar() - c.h0, h=AS.hmolar() - c.h0, s=AS.smolar() - c.s0,
                     cv=AS.cvmolar(), cp=AS.cpmolar(), Z=1.0 + z1, phase=self._phase(T, P, rho),
                     u_dep=u_dep, h_dep=h_dep, s_dep=s_dep, x=None,
                     ln_phi=(h_dep - T * s_dep) / (c.R * T), root="reference mixture EOS, stable single phase")

    def _phase(self, T: float, P: float, rho: float) -> str:
        """'supercritical' above the mixture's critical T and P, 'gas' above its T only; below, by density."""
        Tc, Pc, rhoc, _ = self._c.critical
        if T >= Tc:
            return "supercritical" if P >= Pc else "gas"
        if P >= Pc:
            return "liquid"
        return "liquid" if rho > rhoc else "gas"

    # -- stability ----------------------------------------------------------------
    def _stable_rho(self, T: float, P: float) -> float | None:
        """The molar density [mol/m3] of the stable single phase at T [K], P [Pa]; None when two-phase.

        Raises CoolProp's ValueError when its stability test fails.
        """
        c = self._c
        if c.envelope is not None and T >= c.T_solid and c.envelope.clear_of(T, P):
            CP = coolprop()
            AS = self._as()
            best = None
            for side in ("gas", "liquid"):
                try:
                    self._update("PT_INPUTS", P, T, side)
                except (ValueError, RuntimeError):
                    continue
                rho = AS.rhomolar()
                if not (rho > 0.0 and AS.first_partial_deriv(CP.iP, CP.iDmolar, CP.iT) > 0.0):
                    continue  # a mechanically unstable root
                g = AS.gibbsmolar()
                if best is None or g < best[0]:
                    best = (g, rho)
            if best is not None:
                return best[1]
        self._update("PT_INPUTS", P, T)  # CoolProp's own stability test
        if self._is_two_phase():
            return None
        return self._as().rhomolar()

    def _judge(self, T: float, rho: float) -> tuple[str, float]:
        """('stable' | 'two-phase' | 'other', P [Pa]) of the EOS state at T [K], ρ [mol/m3].

        'other': one phase, but another root is stable at its T and P (a metastable branch).
        """
        self._update("DmolarT_INPUTS", rho, T, "gas")
        P = self._as().p()
        if not P > 0.0:
            return "two-phase", P  # only inside the spinodal does the EOS give P <= 0
        stable = self._stable_rho(T, P)
        if stable is None:
            return "two-phase", P
        return ("stable" if abs(stable / rho - 1.0) < 1e-6 else "other"), P

    def _value(self, key: str) -> float:
        """``key`` (T, P, v, u, h or s) of the current state, on this model's basis."""
        c = self._c
        return self._get(key) - (c.h0 if key in ("u", "h") else c.s0 if key == "s" else 0.0)

    def _at(self, T: float, rho: float) -> Point:
        self._update("DmolarT_INPUTS", rho, T, "gas")  # the EOS itself at (T, ρ): the phase is known
        return self._point()

    # -- the interface ----------------------------------------------------------------
    def at_Tv(self, T: float, v: float) -> Point:
        """The stable state at T [K] and molar volume v [m3/mol]; a TwoPhaseError inside the envelope."""
        return self.flash({"T": T, "v": v})

    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K] and P [Pa]; a TwoPhaseError where the mixture splits."""
        return self.flash({"T": T, "P": P})

    def T_bounds(self) -> tuple[float, float]:
        """CoolProp's temperature range for the mixture [K] (mole-weighted limits of the components)."""
        return (self._c.Tmin, self._c.Tmax)

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        """The stable single-phase state fixed by a checked pair (SPEC_KEYS order, SI floats).

        Raises TwoPhaseError (with the dew and bubble points) when the state is
        two-phase, InputError naming ``field`` when no state meets the pair.
        """
        specs = dict(zip(keys, values))
        a, b = keys
        if "x" in keys:
            raise InputError(f"{field}.x", f"quality x needs a model with two phases; {self.label} gives "
                                           "single-phase states only")
        if keys == ("u", "h") and specs["h"] <= specs["u"]:
            raise InputError(field, f"h - u = P v must be positive; got h = {specs['h']:.6g} J/mol, "
                                    f"u = {specs['u']:.6g} J/mol")
        if a == "T":
            self._check_T(specs["T"], field)
        try:
            if keys == ("T", "P"):
                return self._solve_TP(specs["T"], specs["P"], field)
            if keys == ("T", "v"):
                return self._solve_Tv(specs["T"], specs["v"], field)
            if a == "P":
                roots = self._isobar(specs["P"], b, specs[b])
            elif a == "T":
                roots = self._isotherm(specs["T"], b, specs[b])
            elif a == "v":
                roots = self._isochore(1.0 / specs["v"], b, specs[b])
            else:
                roots = self._caloric(a, specs[a], b, specs[b])
        except (ValueError, RuntimeError) as exc:
            raise InputError(field, f"CoolProp could not solve the mixture at {_fmt_specs(specs)}: {exc}") from None
        return self._chosen(keys, values, roots, field)

    def _solve_TP(self, T: float, P: float, field: str) -> Point:
        rho = self._stable_rho(T, P)
        if rho is None:
            raise self._two_phase(field, f"T = {T:.6g} K and P = {P:.6g} Pa", P=P)
        return self._at(T, rho)

    def _solve_Tv(self, T: float, v: float, field: str) -> Point:
        verdict, _ = self._judge(T, 1.0 / v)
        if verdict != "stable":
            raise self._two_phase(field, f"T = {T:.6g} K and v = {v:.6g} m3/mol", T=T)
        return self._at(T, 1.0 / v)

    def _check_T(self, T: float, field: str) -> None:
        """Refuse T below CoolProp's lowest for the mixture (where its components would be frozen)."""
        if T < self._c.Tmin:
            raise InputError(f"{field}.T", f"T = {T:.6g} K is below {self._c.Tmin:.6g} K, the lowest temperature "
                                           "CoolProp gives for this mixture (its components' triple points, "
                                           "mole-weighted)")

    def _chosen(self, keys, values, roots: list[tuple[float, float]], field: str) -> Point:
        """The stable states among the roots (T, ρ); the largest volume, or the refusal."""
        found, wet, failed = [], [], []
        for T, rho in _distinct(roots):
            try:
                verdict, P = self._judge(T, rho)
            except (ValueError, RuntimeError) as exc:  # CoolProp's stability test failed there
                failed.append(exc)
                continue
            if verdict == "stable":
                found.append(self._at(T, rho))
            elif verdict == "two-phase":
                wet.append((T, P))
        chosen = choose_largest_volume(keys, values, found)
        if chosen is not None:
            return chosen
        specs = dict(zip(keys, values))
        at = _fmt_specs(specs)
        if keys[0] == "P" and not wet and self._between_dew_and_bubble(specs["P"], keys[1], values[1]):
            wet.append((None, specs["P"]))
        if wet:
            T, P = wet[0]
            if keys[0] == "T":
                raise self._two_phase(field, at, T=specs["T"])
            if keys[0] == "P":
                raise self._two_phase(field, at, P=specs["P"])
            # where the search met the pair on a metastable root: near the two-phase state's P
            raise self._two_phase(field, at, P=P) if P > 0.0 else self._two_phase(field, at, T=T)
        if failed:
            raise InputError(field, f"CoolProp could not decide the phase of the mixture where it has {at}: "
                                    f"{failed[0]}")
        c = self._c
        raise InputError(field, f"no single-phase state of the mixture between {c.Tmin:.6g} K and {c.Tmax:.6g} K "
                                f"(up to {c.Pmax:.6g} Pa) has {at}")

    # -- the searches -------------------------------------------------------------------
    def _isobar(self, P: float, key: str, target: float) -> list[tuple[float, float]]:
        """(T, ρ) on the isobar P [Pa] where ``key`` is ``target``: T scanned on each density root."""
        c = self._c
        grid = np.geomspace(c.Tmin, c.Tmax, _N_SCAN)
        roots = []
        # each root scanned from where it surely exists (the gas from the hot end, the liquid
        # from the cold end) until CoolProp loses it: a failed solve costs ten good ones
        for side, order in (("gas", grid[::-1]), ("liquid", grid)):
            def along(T, side=side):
                self._update("PT_INPUTS", P, T, side)
                return self._value(key)

            roots += self._roots(order, along, key, target, give_up=_GIVE_UP)
        return roots

    def _isotherm(self, T: float, key: str, target: float) -> list[tuple[float, float]]:
        """(T, ρ) on the isotherm T [K] where ``key`` is ``target``: the EOS scanned in v."""
        c = self._c
        grid = np.geomspace(1.0 / (_RHO_SCAN_HI * c.rho_red), c.R * T / _P_SCAN_LO, _N_SCAN)

        def along(v):
            self._update("DmolarT_INPUTS", 1.0 / v, T, "gas")
            return self._value(key)

        return self._roots(grid, along, key, target)

    def _isochore(self, rho: float, key: str, target: float) -> list[tuple[float, float]]:
        """(T, ρ) on the isochore ρ [mol/m3] where ``key`` is ``target``: the EOS scanned in T."""
        c = self._c

        def along(T):
            self._update("DmolarT_INPUTS", rho, T, "gas")
            return self._value(key)

        return self._roots(np.geomspace(c.Tmin, c.Tmax, _N_SCAN), along, key, target)

    def _caloric(self, a: str, va: float, b: str, vb: float) -> list[tuple[float, float]]:
        """(T, ρ) where two of u, h, s are met: v scanned, T solved for ``a`` on each isochore."""
        c = self._c
        lo, hi = c.Tmin, c.Tmax
        tol = 1e-9 * max(abs(va), _SCALE[a])

        def T_on(v: float) -> float:
            def f(T):
                self._update("DmolarT_INPUTS", 1.0 / v, T, "gas")
                return self._value(a) - va
            try:
                T = brent(f, lo, hi, xtol=1e-300, rtol=1e-14)
            except ValueError:  # no T on this isochore (no bracket, or CoolProp refused a state)
                return math.nan
            return T if abs(f(T)) <= tol * 1e3 else math.nan

        def along(v):
            T = T_on(v)
            if not math.isfinite(T):
                return math.nan
            self._update("DmolarT_INPUTS", 1.0 / v, T, "gas")
            return self._value(b)

        grid = np.geomspace(1.0 / (_RHO_SCAN_HI * c.rho_red), c.R * hi / _P_SCAN_LO, _N_SCAN)
        return self._roots(grid, along, b, vb)

    def _roots(self, grid, along, key: str, target: float, give_up: int = 0) -> list[tuple[float, float]]:
        """(T, ρ) of every root of along(p) = target on the grid: sign changes refined by Brent's
        method, kept only where the residual is zero (a jump between density roots is not a root).

        With ``give_up``, the scan (in the grid's order) ends after that many failures in a row.
        """
        tol = 1e-9 * max(abs(target), _SCALE[key], 1e-300)
        nodes = []
        misses = 0
        for p in grid:
            p = float(p)
            try:
                y = along(p)
            except (ValueError, RuntimeError):
                misses += 1
                if give_up and misses >= give_up:
                    break
                continue
            misses = 0
            if math.isfinite(y):
                nodes.append((p, y - target))
        nodes.sort()
        out = []
        for p, f in nodes:
            if abs(f) <= tol:
                out.append(self._where(along, p))
        for (p0, f0), (p1, f1) in pairwise(nodes):
            if not f0 * f1 < 0.0:
                continue
            try:
                p = brent(lambda q: along(q) - target, p0, p1, xtol=1e-300, rtol=1e-14, fa=f0, fb=f1)
                if not abs(along(p) - target) <= tol * 1e3:
                    continue
            except (ValueError, RuntimeError):
                continue
            out.append(self._where(along, p))
        return [r for r in out if r is not None]

    def _where(self, along, p: float) -> tuple[float, float] | None:
        """(T, ρ) of the state ``along`` reaches at p."""
        try:
            along(p)
        except (ValueError, RuntimeError):
            return None
        AS = self._as()
        return AS.T(), AS.rhomolar()

    # -- the two-phase region ---------------------------------------------------------
    def dew_bubble_T(self, P: float) -> tuple[float | None, float | None]:
        """(bubble, dew) temperatures [K] at P [Pa], None where neither CoolProp's flash nor its
        envelope gives one: what a stream table shows (as :meth:`CubicMixture.dew_bubble_T`)."""
        dew, bubble = self._dew_bubble_T(P)
        return bubble, dew

    def _dew_bubble_T(self, P: float) -> tuple[float | None, float | None]:
        """Dew and bubble temperatures [K] at P [Pa] (CoolProp's PQ flash, else its envelope; None: neither)."""
        out = []
        for Q in (1.0, 0.0):
            try:
                self._update("PQ_INPUTS", P, Q)
                out.append(self._get("T"))
            except (ValueError, RuntimeError):
                out.append(None)
            finally:
                self._as().unspecify_phase()
        env = self._c.envelope
        if env is not None and None in out:
            xs = env.crossings(P)
            if len(xs) >= 2:
                out = [max(xs) if out[0] is None else out[0], min(xs) if out[1] is None else out[1]]
        return out[0], out[1]

    def _dew_bubble_P(self, T: float) -> tuple[float | None, float | None]:
        """Dew and bubble pressures [Pa] at T [K] (CoolProp's QT flash; None where it fails)."""
        out = []
        for Q in (1.0, 0.0):
            try:
                self._update("QT_INPUTS", Q, T)
                out.append(self._get("P"))
            except (ValueError, RuntimeError):
                out.append(None)
            finally:
                self._as().unspecify_phase()
        return out[0], out[1]

    def _between_dew_and_bubble(self, P: float, key: str, target: float) -> bool:
        """Whether ``key`` = ``target`` lies between its values at the bubble and the dew point at P."""
        values = []
        for Q in (0.0, 1.0):
            try:
                self._update("PQ_INPUTS", P, Q)
                values.append(self._value(key))
            except (ValueError, RuntimeError):
                return False
            finally:
                self._as().unspecify_phase()
        return min(values) < target < max(values)

    def _two_phase(self, field: str, at: str, P: float | None = None, T: float | None = None) -> TwoPhaseError:
        """The refusal of a two-phase state, with the dew and bubble points at P (or at T)."""
        def words(x, unit):
            return "not found by CoolProp" if x is None else f"{x:.6g} {unit}"

        where = []
        if P is not None:
            dew, bubble = self._dew_bubble_T(P)
            where.append(f"at P = {P:.6g} Pa its dew point is {words(dew, 'K')}, its bubble point {words(bubble, 'K')}")
        if T is not None:
            dew, bubble = self._dew_bubble_P(T)
            where.append(f"at T = {T:.6g} K its dew point is at P = {words(dew, 'Pa')}, its bubble point at "
                         f"P = {words(bubble, 'Pa')}")
        return TwoPhaseError(
            field,
            f"the mixture is two-phase at {at} (CoolProp's phase-stability test)"
            + (f": {'; '.join(where)}" if where else "")
            + ". The reference model of this version gives single-phase mixture states only: fix the state "
              "outside the phase envelope",
        )

    # -- record -------------------------------------------------------------------------
    @cached_property
    def reference_state(self) -> str:
        """Where u, h, s are measured from: each component's ideal gas at 298.15 K and 1 bar."""
        c = self._c
        return (f"each component's ideal gas at {T_REF:g} K and 1 bar: h = 0, s = 0, as in the ideal-gas mixture "
                f"model (the mixture's s there is its entropy of mixing, -R Σ y ln y = {c.mixing:.6g} J/(mol K)); "
                f"CoolProp's values shifted by h0 = {c.h0:.8g} J/mol and s0 = {c.s0:.8g} J/(mol K)")

    def equations(self) -> list[str]:
        """The mixture model and how it is evaluated, for the record; asked of CoolProp once per model."""
        if self._equations is None:
            self._equations = self._equation_lines()
        return list(self._equations)

    def _equation_lines(self) -> list[str]:
        CP = coolprop()
        c = self._c

        def key(fluid, param):
            try:
                return CP.get_fluid_param_string(fluid, param) or "not given"
            except (ValueError, RuntimeError):
                return "not given"

        y = ", ".join(f"{i} {x:.6g}" for i, x in zip(self.ids, self.y))
        lines = [
            "a(T, ρ, y) = a°(T, ρ, y) + aʳ(T, ρ, y): multi-fluid mixture model (the GERG-2008 form of Kunz and "
            f"Wagner), evaluated by CoolProp {CP.get_global_param_string('version')}, HEOS backend; y = {y}",
            "a° = Σ yi [a°i(T, ρ) + R T ln yi];  aʳ = R T [Σ yi αʳi(δ, τ) + Σ(i<j) yi yj Fij αʳij(δ, τ)], "
            "δ = ρ/ρr(y), τ = Tr(y)/T",
            "reducing functions: Tr = Σi Σj yi yj βT,ij γT,ij (yi + yj)/(βT,ij² yi + yj) √(Tc,i Tc,j); 1/ρr the same "
            "with βv,ij, γv,ij and (ρc,i^-1/3 + ρc,j^-1/3)³/8",
        ]
        for p in self.pairs:
            dep = (f"departure function {p.function}, F = {p.F:g}" if p.F else "no departure function (F = 0)")
            lines.append(f"  {p.first}-{p.second} ({p.source}): βT = {p.betaT:.9g}, γT = {p.gammaT:.9g}, "
                         f"βv = {p.betaV:.9g}, γv = {p.gammaV:.9g}; {dep}")
        lines += [
            "components' equations of state (CoolProp's BibTeX keys): " + "; ".join(
                f"{i} {f} ({key(f, 'BibTeX-EOS')}"
                + (f", ideal-gas part {key(f, 'BibTeX-CP0')}" if key(f, "BibTeX-CP0") != "not given" else "") + ")"
                for i, f in zip(self.ids, self.fluids)),
            f"h = h_CoolProp - h0, u = u_CoolProp - h0, s = s_CoolProp - s0: h0 = Σ yi h°i({T_REF:g} K) = "
            f"{c.h0:.8g} J/mol, s0 = Σ yi s°i({T_REF:g} K, 1 bar) = {c.s0:.8g} J/(mol K) (the components' ideal-gas "
            "parts); so h = Σ yi h°i(T) + h_dep, s = Σ yi s°i(T, 1 bar) - R Σ yi ln yi - R ln(P/1 bar) + s_dep",
            "departures at the same T and P: h_dep = hʳ(T, ρ), u_dep = h_dep - R T (Z - 1), s_dep = sʳ(T, ρ) + R ln Z; "
            "Z = 1 + δ ∂αʳ/∂δ; ln φ = (h_dep - T s_dep)/(R T) = Σ yi ln φi, the mixture's",
            f"R = {c.R:.10g} J/(mol K); range {c.Tmin:.6g}-{c.Tmax:.6g} K, up to {c.Pmax:.6g} Pa (CoolProp's for "
            "the mixture, from its components' limits)",
            "single phase only: each state passes CoolProp's phase-stability test at its T and P (or lies clear of "
            f"CoolProp's phase envelope by max({_CLEAR_K:g} K, {100 * _CLEAR_REL:g} % of T), the root of lowest "
            "Gibbs energy then taken); two-phase states are refused with the dew and bubble points",
        ]
        Tc, Pc, rhoc, source = c.critical
        env = c.envelope
        lines.append(
            f"phase labels: supercritical at T ≥ Tc and P ≥ Pc, gas at T ≥ Tc below Pc, liquid at T < Tc above Pc, "
            f"else by density against ρc; Tc = {Tc:.6g} K, Pc = {Pc:.6g} Pa, ρc = {rhoc:.6g} mol/m3 ({source})"
            + (f"; cricondentherm {env.cricondentherm:.6g} K, cricondenbar {env.cricondenbar:.6g} Pa"
               if env is not None else ""))
        return lines

    def warnings(self, p: Point) -> list[str]:
        """The components' EOS ranges, freezing components, GERG-2008's range, the envelope nearby."""
        c = self._c
        out = super().warnings(p)
        if p.T > c.Tmax or p.P > c.Pmax:
            out.append(f"outside CoolProp's range for the mixture ({c.Tmin:.6g}-{c.Tmax:.6g} K, up to {c.Pmax:.6g} "
                       "Pa): the values are extrapolated")
        beyond = [k for k in c.components if p.T > k.Tmax or p.P > k.Pmax]
        if beyond:
            out.append("outside the range of the equation of state (and its ideal-gas cp°) of "
                       + ", ".join(f"{k.id} ({k.Tmin:.6g}-{k.Tmax:.6g} K, up to {k.Pmax:.6g} Pa)" for k in beyond)
                       + ": its values are extrapolated")
        frozen = [k for k in c.components if p.T < k.Ttriple]
        if frozen:
            out.append("below the triple point of " + ", ".join(f"{k.id} ({k.Ttriple:.6g} K)" for k in frozen)
                       + ": that component may freeze out as a solid, which this model does not represent")
        T_lo, T_hi, P_hi = _GERG_RANGE
        if any(pair.source.startswith("Kunz") for pair in self.pairs) and not (T_lo <= p.T <= T_hi and p.P <= P_hi):
            out.append(f"outside GERG-2008's normal range of validity ({T_lo:g}-{T_hi:g} K, up to {P_hi / 1e6:g} MPa; "
                       "Kunz and Wagner 2012): its uncertainty there is larger than stated for the range")
        env = c.envelope
        if env is not None and p.P <= env.cricondenbar:
            near = [T for T in env.crossings(p.P) if abs(T - p.T) < 5.0]
            if near:
                T = min(near, key=lambda t: abs(t - p.T))
                out.append(f"within {abs(T - p.T):.3g} K of the mixture's phase envelope at this pressure ({T:.6g} K, "
                           "CoolProp's envelope): a little colder, hotter or at another pressure it may split into "
                           "two phases, which this model refuses")
        Tc, Pc, _, _ = c.critical
        if abs(p.T / Tc - 1.0) < 0.02 and abs(p.P / Pc - 1.0) < 0.1:
            out.append(f"near the mixture's critical point (T/Tc = {p.T / Tc:.4f}, P/Pc = {p.P / Pc:.4f}): cp, "
                       "compressibility and their uncertainty grow steeply")
        return out


def _binary_pairs(ids: tuple[str, ...], fluids: tuple[str, ...]) -> tuple[_Pair, ...]:
    """CoolProp's parameters of every pair; an InputError naming every pair it has none for."""
    CP = coolprop()
    cas = []
    for sid, fluid in zip(ids, fluids):
        try:
            cas.append(CP.get_fluid_param_string(fluid, "CAS"))
        except (ValueError, RuntimeError):
            raise InputError("fluid.model", f"CoolProp has no fluid named {fluid!r} (the species data's name for "
                                            f"{sid}); {_NO_MIXTURE}") from None
    pairs, missing = [], []
    for i in range(len(ids)):
        for j in range(i + 1, len(ids)):
            found = None
            # CoolProp keeps each pair in one order of the two CAS numbers and refuses the other
            for a, b in ((i, j), (j, i)):
                try:
                    CP.get_mixture_binary_pair_data(cas[a], cas[b], "betaT")
                except ValueError:
                    continue
                found = (a, b)
                break
            if found is None:
                missing.append(f"{ids[i]}–{ids[j]}")
                continue
            a, b = found

            def get(param, a=a, b=b):
                try:
                    return CP.get_mixture_binary_pair_data(cas[a], cas[b], param)
                except ValueError:
                    return ""  # 'function' is absent where the pair has no departure function

            pairs.append(_Pair(ids[a], ids[b], float(get("betaT")), float(get("gammaT")), float(get("betaV")),
                               float(get("gammaV")), float(get("F") or 0.0), get("function"), get("BibTeX")))
    if missing:
        which = "the pair " if len(missing) == 1 else "the pairs "
        raise InputError(
            "fluid.model",
            f"CoolProp has no binary parameters for {which}{', '.join(missing)} (its HEOS mixture model needs them "
            f"for every pair of components); choose a cubic (with kij) or ideal-gas",
        )
    return tuple(pairs)


def _envelope(fluid: str, y: tuple[float, ...]) -> _Envelope | None:
    """CoolProp's phase envelope of the mixture, when it traced the whole of it (else None).

    Whole: from the dew line at low pressure through one critical point (where
    CoolProp's quality switches from 1 to 0) down the bubble line to low pressure.
    Traced on a state of its own: once a state holds an envelope, CoolProp's
    (T, P) flash on it consults the envelope and then misses two-phase states.
    """
    CP = coolprop()
    try:
        AS = CP.AbstractState("HEOS", fluid)
        AS.set_mole_fractions(list(y))
        AS.build_phase_envelope("")
        pe = AS.get_phase_envelope_data()
        T, P, Q = list(pe.T), list(pe.p), list(pe.Q)
        rho_l, rho_v = list(pe.rhomolar_liq), list(pe.rhomolar_vap)
    except (ValueError, RuntimeError):
        return None
    switch = [k for k in range(1, len(Q)) if Q[k] != Q[k - 1]]
    if len(T) < 10 or len(switch) != 1 or not (P[0] < P_REF and P[-1] < P_REF) \
            or not all(math.isfinite(x) and x > 0.0 for x in T + P):
        return None
    k = switch[0]
    return _Envelope(T=tuple(T), P=tuple(P), Tc=0.5 * (T[k - 1] + T[k]), Pc=0.5 * (P[k - 1] + P[k]),
                     rhoc=0.25 * (rho_l[k - 1] + rho_l[k] + rho_v[k - 1] + rho_v[k]))


def _distinct(roots: list[tuple[float, float]]) -> list[tuple[float, float]]:
    out: list[tuple[float, float]] = []
    for T, rho in roots:
        if not any(abs(T / t - 1.0) < _SAME and abs(rho / r - 1.0) < _SAME for t, r in out):
            out.append((T, rho))
    return out


def _fmt_specs(specs: dict[str, float]) -> str:
    return ", ".join(fmt_spec(k, specs[k]) for k in sorted(specs, key=SPEC_KEYS.index))
