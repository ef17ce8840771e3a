"""CoolProp access for the reference model: its lazy import, the EOS's constants,
one AbstractState per model, and the :class:`Point` of the state it holds.

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

from ...errors import InputError
from ..base import Point

#: The other models, named when the reference model cannot serve.
OTHER_MODELS = (
    "ideal-gas, van-der-waals, redlich-kwong, soave-redlich-kwong, "
    "peng-robinson and incompressible"
)


def coolprop():
    """CoolProp's low-level module, imported on first use (the import costs over a second)."""
    import CoolProp.CoolProp as CP

    return CP


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


class CoolPropState:
    """The model's one AbstractState: made on first use, dropped when pickled.

    Every method updates the state before reading it, so no result depends
    on what was computed before.
    """

    fluid: str
    _state = None

    def _as(self):
        """The model's AbstractState, created on first use."""
        if self._state is None:
            CP = coolprop()
            try:
                self._state = CP.AbstractState("HEOS", self.fluid)
            except (ValueError, RuntimeError) as exc:
                raise InputError(
                    "fluid.model",
                    f"CoolProp has no fluid named {self.fluid!r} ({exc}); correct the species' "
                    f"CoolProp name, or use one of the {OTHER_MODELS} models",
                ) from None
        return self._state

    def __getstate__(self) -> dict:
        """The model without its AbstractState; once used, with what it asked CoolProp.

        Its constants, reference state and equations are worked out (and
        kept) while CoolProp is loaded, so a process receiving the model reads
        them without importing CoolProp.
        """
        if self._state is not None:
            self._c, self.reference_state, self.equations()  # noqa: B018  (computed and kept)
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
        CP = coolprop()
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
        return self._as().phase() == coolprop().iphase_twophase

    def _is_solid(self) -> bool:
        """Whether the current (single-phase) state lies below the melting line."""
        AS = self._as()
        if self._is_two_phase() or not AS.has_melting_line():
            return False
        T, P = AS.T(), AS.p()
        CP = coolprop()
        try:
            return T < AS.melting_line(CP.iT, CP.iP, P) - 1e-9
        except (ValueError, RuntimeError):
            return False  # outside the melting curve's range: no check possible

    # -- the Point -------------------------------------------------------------
    def _point(self) -> Point:
        """Every property of the current CoolProp state."""
        CP = coolprop()
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
