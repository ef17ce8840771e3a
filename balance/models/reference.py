"""The reference model: a fluid's multiparameter Helmholtz-energy equation of
state, evaluated by CoolProp's HEOS backend.

CoolProp is imported only inside methods (its import costs over a second),
and each model instance owns one low-level ``AbstractState``, created on
first use. Every method updates that state before reading it, so no result
depends on what was computed before. A pickled model leaves the state
behind (CoolProp's object does not pickle; it is made again on first use);
once used, it takes its constants and reference state along: the terminal
app solves in another process and shows the result without CoolProp.

Input pairs
-----------
Any two of T, P, v, u, h, s and x (quality) fix a state:

* pairs CoolProp solves itself (T-P, T-v, T-u, T-h, T-s, T-x, P-v, P-u,
  P-h, P-s, P-x, v-u, v-h, v-s, v-x, h-s) go to CoolProp first;
* the pairs CoolProp has no solver for (u-h, u-s, u-x, h-x, s-x), and any
  pair whose CoolProp solve fails, are found by bracketed one-dimensional
  searches along a path on which CoolProp can evaluate the state directly
  (an isotherm, an isobar, an isochore, the saturation curve, or a sweep in
  P with CoolProp's P-u or P-h solver). A root is only accepted where the
  residual changes sign and is zero at the end of the search;
* T with u, h or s, u with h or s, x with v, u, h or s, and P with a
  liquid-like v can be met by more than one state (a compressed liquid and
  a wet mixture at the same T and h; the two sides of an isotherm's
  Joule-Thomson minimum; the two sides of the maximum of the
  saturated-vapour enthalpy; water on either side of its density maximum).
  For these pairs the whole path is scanned and, when more than one state
  qualifies, an :class:`AmbiguousStateError` lists them all instead of
  picking one silently. Roots closer together than one step of the scan
  (1/160 of the path, logarithmic) can merge into one.

Departures
----------
CoolProp's residual functions (``smolar_residual``, and ``smolar_idealgas``)
are at the same T and *density* (the ideal gas there has pressure
ρRT = P/Z). The :class:`~balance.models.base.Point` departures are at the
same T and *pressure*, so ``s_dep = s_res + R ln Z`` (in a wet state, where
the residual functions at the mixture's density mean nothing,
``s - s°(T, ρ) + R ln Z``); u° and h° depend on T only and need no
correction. The check is
``h_dep - T s_dep = R T ln φ`` against CoolProp's own fugacity coefficient
(tests/test_reference_model.py). R here is the EOS's own gas constant
(``AbstractState.gas_constant()``; 8.314371357587 J/(mol K) for IAPWS-95),
so Z = P v / (R T) tends to exactly 1 in the ideal-gas limit.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from ..errors import InputError
from ..rootfind import brent
from ..species import Species
from .base import SPEC_KEYS, Point, PropertyModel, check_specs

#: Lowest pressure [Pa] the pressure scans start from.
_P_SCAN_LO = 1e-2
#: Nodes on each scanned path; roots closer together than one step can merge.
_N_SCAN = 160

_OTHER_MODELS = (
    "ideal-gas, van-der-waals, redlich-kwong, soave-redlich-kwong, "
    "peng-robinson and incompressible"
)

_UNITS = {"T": "K", "P": "Pa", "v": "m3/mol", "u": "J/mol", "h": "J/mol", "s": "J/(mol K)", "x": ""}

# Pairs whose solution may not be unique: the path is always scanned.
_SCANNED_PAIRS = {("T", "u"), ("T", "h"), ("T", "s"), ("P", "v"),
                  ("v", "x"), ("u", "x"), ("h", "x"), ("s", "x"), ("u", "h"), ("u", "s")}


class AmbiguousStateError(InputError):
    """Two specifications met by more than one state of the fluid.

    ``states`` holds every state found, as :class:`Point` objects, so a
    caller (or a test) can show or check them.
    """

    def __init__(self, field: str, message: str, states: list[Point]):
        super().__init__(field, message)
        self.states = states


def _coolprop():
    """CoolProp's low-level module, imported on first use."""
    try:
        import CoolProp.CoolProp as CP
    except ImportError:
        raise InputError(
            "fluid.model",
            "the reference model needs the CoolProp package, which is not installed "
            f"(pip install CoolProp); the {_OTHER_MODELS} models remain available",
        ) from None
    return CP


def _fmt(key: str, value: float) -> str:
    unit = _UNITS[key]
    return f"{key} = {value:.6g}" + (f" {unit}" if unit else "")


def _fmt_specs(specs: dict[str, float]) -> str:
    return ", ".join(_fmt(k, specs[k]) for k in sorted(specs, key=SPEC_KEYS.index))


@dataclass(frozen=True)
class _Constants:
    """Fixed numbers of the fluid's EOS (never state-dependent)."""

    Tc: float
    """critical temperature [K]"""
    Pc: float
    """critical pressure [Pa]"""
    rhoc: float
    """critical molar density [mol/m3]"""
    Ttriple: float
    """triple-point temperature [K]"""
    Ptriple: float
    """triple-point pressure [Pa]"""
    Tmin: float
    """lowest temperature of the EOS [K]"""
    Tmax: float
    """highest temperature of the EOS [K]"""
    Pmax: float
    """highest pressure of the EOS [Pa]"""
    R: float
    """the EOS's gas constant [J/(mol K)]"""
    M: float
    """molar mass [kg/mol]"""


@dataclass
class _Node:
    """One point of a scanned path: parameter, residual, which side of saturation."""

    p: float
    f: float
    side: str | None
    """'liquid', 'gas', 'sat_f', 'sat_g' or None (no saturation on the path)"""
    state: tuple | None = None
    """for saturation nodes, how to set the state: ('Tx', T, x)"""


class Reference(PropertyModel):
    """A species' reference equation of state through CoolProp HEOS.

    Parameters
    ----------
    species : Species
        Must carry a CoolProp fluid name (``species.coolprop``).

    Raises
    ------
    InputError
        field ``fluid.model``, when the species has no CoolProp name; when
        CoolProp is missing or does not know the name, on first use.
    """

    name = "reference"
    two_phase = True

    def __init__(self, species: Species):
        super().__init__(species)
        if not species.coolprop:
            raise InputError(
                "fluid.model",
                f"{species.name} has no reference equation of state (the species data gives no "
                f"CoolProp fluid name for it); the {_OTHER_MODELS} models remain available",
            )
        self.fluid: str = species.coolprop
        self.label = f"reference equation of state (CoolProp HEOS: {self.fluid})"
        self._state = None

    # -- CoolProp access -----------------------------------------------------
    def _as(self):
        """The model's AbstractState, created on first use."""
        if self._state is None:
            CP = _coolprop()
            try:
                self._state = CP.AbstractState("HEOS", self.fluid)
            except (ValueError, RuntimeError) as exc:
                raise InputError(
                    "fluid.model",
                    f"CoolProp has no fluid named {self.fluid!r} ({exc}); correct the species' "
                    f"CoolProp name, or use one of the {_OTHER_MODELS} models",
                ) from None
        return self._state

    def __getstate__(self) -> dict:
        """The model without its AbstractState; once used, with its constants and reference state."""
        if self._state is not None:
            # cached here while CoolProp is loaded, so the receiving process needs none to read them
            self.__dict__.update(_c=self._c, reference_state=self.reference_state)
        return {**self.__dict__, "_state": None}

    @cached_property
    def _c(self) -> _Constants:
        AS = self._as()
        return _Constants(
            Tc=AS.T_critical(), Pc=AS.p_critical(), rhoc=AS.rhomolar_critical(),
            Ttriple=AS.Ttriple(), Ptriple=AS.p_triple(), Tmin=AS.Tmin(), Tmax=AS.Tmax(),
            Pmax=AS.pmax(), R=AS.gas_constant(), M=AS.molar_mass(),
        )

    def _update(self, pair: str, a: float, b: float, side: str | None = None) -> None:
        """Set the state from a CoolProp input pair (by name), optionally with
        the phase imposed ('liquid' or 'gas') so that a state on one side of
        saturation can be evaluated right up to the saturation line."""
        CP = _coolprop()
        AS = self._as()
        if side in ("liquid", "gas"):
            AS.specify_phase(CP.iphase_liquid if side == "liquid" else CP.iphase_gas)
            try:
                AS.update(getattr(CP, pair), a, b)
            finally:
                AS.unspecify_phase()
        else:
            AS.update(getattr(CP, pair), a, b)

    def _get(self, key: str) -> float:
        AS = self._as()
        if key == "v":
            return 1.0 / AS.rhomolar()
        return {"T": AS.T, "P": AS.p, "u": AS.umolar, "h": AS.hmolar, "s": AS.smolar, "x": AS.Q}[key]()

    def _is_two_phase(self) -> bool:
        return self._as().phase() == _coolprop().iphase_twophase

    # -- the interface -------------------------------------------------------
    def at_Tv(self, T: float, v: float) -> Point:
        """The state at T [K] and molar volume v [m3/mol] (inside the dome: a wet mixture)."""
        return self.flash({"T": T, "v": v})

    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K] and P [Pa]; on the saturation line an InputError."""
        return self.flash({"T": T, "P": P})

    def T_bounds(self) -> tuple[float, float]:
        """The EOS's temperature range [K] (CoolProp Tmin, Tmax)."""
        return (self._c.Tmin, self._c.Tmax)

    def flash(self, specs: dict[str, float], field: str = "state") -> Point:
        """The state fixed by exactly two of T, P, v, u, h, s, x (SI floats).

        Parameters
        ----------
        specs : dict
            two of T [K], P [Pa], v [m3/mol], u [J/mol], h [J/mol],
            s [J/(mol K)], x [-]
        field : str
            the name errors are reported under

        Raises
        ------
        InputError
            naming ``field`` when the pair cannot be met; an
            :class:`AmbiguousStateError` when it is met by several states.
        """
        check_specs(specs, field)
        keys = tuple(sorted(specs, key=SPEC_KEYS.index))
        if len(keys) != 2:
            raise InputError(
                field, f"needs exactly two of T, P, v, u, h, s, x; got {', '.join(keys) or 'none'}"
            )
        specs = {k: float(specs[k]) for k in keys}
        if keys == ("u", "h") and specs["h"] <= specs["u"]:
            raise InputError(field, f"h - u = P v must be positive; got h = {specs['h']:.6g} J/mol, "
                                    f"u = {specs['u']:.6g} J/mol")
        direct: Point | None = None
        error: Exception | None = None
        if keys not in (("u", "h"), ("u", "s"), ("u", "x"), ("h", "x"), ("s", "x")):
            try:
                direct = self._direct(keys, specs)
            except (ValueError, RuntimeError) as exc:
                error = exc
        if direct is not None and not self._may_have_twin(keys, direct):
            return direct
        if keys == ("T", "P") or keys == ("T", "v") or keys in (("T", "x"), ("P", "x")):
            raise InputError(field, self._cannot(specs, error))
        found = self._search(keys, specs)
        states = _distinct(([direct] if direct is not None else []) + found)
        if len(states) == 1:
            return states[0]
        if not states:
            raise InputError(field, self._cannot(specs, error))
        listed = "; ".join(
            f"T = {p.T:.6g} K, P = {p.P:.6g} Pa ({p.phase}" + (f", x = {p.x:.6g})" if p.x is not None else ")")
            for p in states
        )
        raise AmbiguousStateError(
            field,
            f"{_fmt_specs(specs)} do not fix one state of {self.fluid}: {len(states)} states have them "
            f"({listed}); give another pair, such as T and P or P and h",
            states,
        )

    def _may_have_twin(self, keys: tuple[str, str], found: Point) -> bool:
        """Whether another state could meet the same pair, so the path must be scanned.

        At fixed P, v rises with T through gas and wet states (a gas always
        expands when heated), so only a liquid-like v can recur (water near
        its density maximum).
        """
        if keys == ("P", "v"):
            return found.phase == "liquid" or (found.phase == "supercritical" and found.v < 1.0 / self._c.rhoc)
        return keys in _SCANNED_PAIRS

    def _direct(self, keys: tuple[str, str], specs: dict[str, float]) -> Point:
        """CoolProp's own solver for the pair; raises CoolProp's ValueError."""
        CP = _coolprop()
        index = {"T": CP.iT, "P": CP.iP, "v": CP.iDmolar, "u": CP.iUmolar, "h": CP.iHmolar,
                 "s": CP.iSmolar, "x": CP.iQ}
        a, b = keys
        va = 1.0 / specs[a] if a == "v" else specs[a]
        vb = 1.0 / specs[b] if b == "v" else specs[b]
        pair, v1, v2 = CP.generate_update_pair(index[a], va, index[b], vb)
        self._as().update(pair, v1, v2)
        return self._point()

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

    def _is_solid(self) -> bool:
        """Whether the current (single-phase) state lies below the melting line."""
        AS = self._as()
        if self._is_two_phase() or not AS.has_melting_line():
            return False
        T, P = AS.T(), AS.p()
        CP = _coolprop()
        try:
            return T < AS.melting_line(CP.iT, CP.iP, P) - 1e-9
        except (ValueError, RuntimeError):
            return False  # outside the melting curve's range: no check possible

    # -- the Point -------------------------------------------------------------
    def _point(self) -> Point:
        """Every property of the current CoolProp state."""
        CP = _coolprop()
        AS = self._as()
        c = self._c
        T, P, rho = AS.T(), AS.p(), AS.rhomolar()
        u, h, s = AS.umolar(), AS.hmolar(), AS.smolar()
        # in the dome from P itself (CoolProp's compressibility_factor() there is
        # not the mixture's); a single phase overrides it from the EOS below
        Z = P / (rho * c.R * T)
        idx = AS.phase()
        if idx == CP.iphase_twophase:
            # the residual functions at the mixture's density mean nothing: subtract the
            # ideal gas (CoolProp's s° is at the same T and density; R ln Z moves it to
            # the same T and P)
            u_dep = u - AS.umolar_idealgas()
            h_dep = h - AS.hmolar_idealgas()
            s_dep = s - AS.smolar_idealgas() + c.R * math.log(Z)
            x = min(max(AS.Q(), 0.0), 1.0)
            phase = "two-phase"
            # g is the same in both phases, so g_dep/(R T) is the common ln φ
            ln_phi = (h_dep - T * s_dep) / (c.R * T)
            if 0.0 < x < 1.0:
                cp = math.inf
                cv = self._cv_wet(T, rho)  # CoolProp's own cv there is not the mixture's
            else:  # on the saturation line: the saturated phase's values
                cp, cv = AS.cpmolar(), AS.cvmolar()
        else:
            x = None
            # from the residual functions, not as s - s°: a dilute gas's departures
            # are ~1e-7 of s and would drown in the subtraction
            z1 = AS.delta() * AS.dalphar_dDelta()  # Z - 1, without P's rounding
            Z = 1.0 + z1
            h_dep = AS.hmolar_residual()
            u_dep = h_dep - c.R * T * z1
            s_dep = AS.smolar_residual() + c.R * math.log1p(z1)
            cp, cv = AS.cpmolar(), AS.cvmolar()
            try:
                ln_phi = math.log(AS.fugacity_coefficient(0))
            except (ValueError, RuntimeError):
                ln_phi = (h_dep - T * s_dep) / (c.R * T)
            if idx in (CP.iphase_supercritical, CP.iphase_critical_point):
                phase = "supercritical"
            elif idx in (CP.iphase_liquid, CP.iphase_supercritical_liquid):
                phase = "liquid"
            elif idx in (CP.iphase_gas, CP.iphase_supercritical_gas):
                phase = "gas"
            else:
                phase = "supercritical" if T >= c.Tc and P >= c.Pc else ("gas" if rho < c.rhoc else "liquid")
        return Point(T=T, P=P, v=1.0 / rho, u=u, h=h, s=s, cv=cv, cp=cp, Z=Z, phase=phase,
                     u_dep=u_dep, h_dep=h_dep, s_dep=s_dep, x=x, ln_phi=ln_phi, root="reference EOS")

    def _cv_wet(self, T: float, rho: float) -> float:
        """cv = (∂u/∂T)_v [J/(mol K)] of a wet mixture, by central difference
        along the isochore (one-sided when a step leaves the dome)."""
        dT = 1e-4 * T
        u = {}
        for k in (-1, 0, 1):
            try:
                self._update("DmolarT_INPUTS", rho, T + k * dT)
            except (ValueError, RuntimeError):
                continue
            if self._is_two_phase():
                u[k] = self._get("u")
        if -1 in u and 1 in u:
            return (u[1] - u[-1]) / (2 * dT)
        if 0 in u and 1 in u:
            return (u[1] - u[0]) / dT
        if 0 in u and -1 in u:
            return (u[0] - u[-1]) / dT
        return math.nan

    # -- messages ----------------------------------------------------------------
    def _cannot(self, specs: dict[str, float], exc: Exception | None) -> str:
        """Why no state was found, with a hint where one helps."""
        c = self._c
        why = f": {exc}" if exc is not None else ": no state on the searched range meets them"
        hint = ""
        T, P = specs.get("T"), specs.get("P")
        if T is not None and P is not None and c.Ttriple <= T < c.Tc:
            try:
                self._update("QT_INPUTS", 0.0, T)
                near = abs(P / self._get("P") - 1.0) < 1e-5
            except (ValueError, RuntimeError):
                near = False
            if near or "aturation" in str(exc or ""):
                hint = ("; the state is on the saturation line, where T and P do not fix it: "
                        "near saturation give T and quality x, or P and x, instead")
        elif "x" in specs and ((T is not None and T >= c.Tc) or (P is not None and P >= c.Pc)):
            hint = (f"; quality x exists only below the critical point "
                    f"(Tc = {c.Tc:.6g} K, Pc = {c.Pc:.6g} Pa)")
        elif "Tmelt" in str(exc or "") or "melting" in str(exc or ""):
            hint = "; the state would be solid (below the melting line), which this model does not cover"
        elif T is not None and T < c.Tmin:
            hint = f"; the EOS starts at {c.Tmin:.6g} K"
        return f"CoolProp could not solve {self.fluid} at {_fmt_specs(specs)}{why}{hint}"

    # -- record ------------------------------------------------------------------
    @cached_property
    def reference_state(self) -> str:
        """Where u, h, s are measured from: CoolProp's default for the fluid,
        named when it is one of the usual conventions, with one value."""
        M = self._c.M
        conventions = (
            ("QT_INPUTS", 0.0, self._c.Ttriple, "u", 0.0, 0.0,
             "IAPWS convention, u = 0 and s = 0 for saturated liquid at the triple point"),
            ("QT_INPUTS", 0.0, 273.15, "h", 200e3, 1e3,
             "IIR convention, h = 200 kJ/kg and s = 1 kJ/(kg K) for saturated liquid at 0 °C"),
            ("QT_INPUTS", 0.0, 233.15, "h", 0.0, 0.0,
             "ASHRAE convention, h = 0 and s = 0 for saturated liquid at -40 °C"),
            ("PQ_INPUTS", 101325.0, 0.0, "h", 0.0, 0.0,
             "NBP convention, h = 0 and s = 0 for saturated liquid at 1 atm"),
        )
        which = "the offsets of the EOS's own publication"
        for pair, a, b, key, value, s_value, words in conventions:
            try:
                self._update(pair, a, b)
            except (ValueError, RuntimeError):
                continue
            if abs(self._get(key) / M - value) < 1.0 and abs(self._get("s") / M - s_value) < 0.01:
                which = words
                break
        self._update("QT_INPUTS", 0.0, self._c.Ttriple)
        return (
            f"CoolProp default reference state for {self.fluid} ({which}); saturated liquid at "
            f"the triple point {self._c.Ttriple:.6g} K has h = {self._get('h'):.6g} J/mol, "
            f"s = {self._get('s'):.6g} J/(mol K); only changes are used"
        )

    def equations(self) -> list[str]:
        CP = _coolprop()
        c = self._c

        def key(param):
            try:
                return CP.get_fluid_param_string(self.fluid, param) or "not given"
            except (ValueError, RuntimeError):
                return "not given"

        return [
            "a(T, ρ) = a°(T, ρ) + aʳ(T, ρ): multiparameter Helmholtz-energy equation of state "
            f"for {self.fluid} (EOS BibTeX key {key('BibTeX-EOS')}; ideal-gas part {key('BibTeX-CP0')})",
            f"evaluated by CoolProp {CP.get_global_param_string('version')}, HEOS backend; "
            f"range {c.Tmin:.6g}-{c.Tmax:.6g} K, up to {c.Pmax:.6g} Pa; "
            f"R = {c.R:.10g} J/(mol K), Tc = {c.Tc:.6g} K, Pc = {c.Pc:.6g} Pa",
            "departures at the same T and P: u_dep = u - u°(T), h_dep = h - h°(T), "
            "s_dep = s_res(T, ρ) + R ln Z (wet states: s - s°(T, ρ) + R ln Z); Z = P v / (R T); "
            "ln φ from CoolProp (wet states: (h_dep - T s_dep)/(R T), common to both phases)",
            "wet states: v, u, h, s = (1 - x)·saturated liquid + x·saturated vapour; cp = ∞; "
            "cv = (∂u/∂T)_v by central difference along the isochore",
        ]

    def warnings(self, p: Point) -> list[str]:
        """Wet or saturated states, the critical region, the EOS's range."""
        c = self._c
        out = []
        if p.phase == "two-phase" and p.x is not None:
            if 0.0 < p.x < 1.0:
                out.append(
                    f"wet state (x = {p.x:.4g}): cp is infinite (heat at constant P only changes "
                    "the quality); cv is the mixture's (∂u/∂T)_v by finite difference; ln φ is the "
                    "value common to both phases"
                )
            else:
                which = "liquid" if p.x == 0.0 else "vapour"
                out.append(f"saturated {which} (x = {p.x:g}): cp and cv are those of the saturated {which}")
        Tr, Pr = p.T / c.Tc, p.P / c.Pc
        if abs(Tr - 1.0) < 0.02 and abs(Pr - 1.0) < 0.1:
            out.append(
                f"near the critical point (T/Tc = {Tr:.4f}, P/Pc = {Pr:.4f}): cp, compressibility and "
                "their uncertainty grow steeply, and a small change of input moves the state a lot"
            )
        if p.T < c.Ttriple:
            out.append(f"T = {p.T:.6g} K is below the triple point ({c.Ttriple:.6g} K): the stable phase "
                       "may be solid, which this model does not represent")
        if p.T > c.Tmax or p.P > c.Pmax:
            out.append(f"outside the EOS's stated range ({c.Tmin:.6g}-{c.Tmax:.6g} K, up to "
                       f"{c.Pmax:.6g} Pa): the values are extrapolated")
        return out


def _distinct(points: list[Point]) -> list[Point]:
    """Points with duplicates (same T, P and v within 1e-6) removed."""
    out: list[Point] = []
    for p in points:
        if not any(_same(p, q) for q in out):
            out.append(p)
    return out


def _same(p: Point, q: Point) -> bool:
    return all(abs(a - b) <= 1e-6 * max(abs(a), abs(b)) for a, b in ((p.T, q.T), (p.P, q.P), (p.v, q.v)))
