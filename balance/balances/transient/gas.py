"""The vessel's fluid as an integrator asks for it: every property at (T, v) in plain floats.

A history is integrated in the amount and temperature of each vessel, so a
step asks the model for its state at (T, v) thousands of times: no flash, no
Point, no checks. :func:`tv_function` gives, for any model, one function

    (T [K], v [m3/mol]) -> (P, u, h, s, cv, (∂P/∂T)_v, (∂P/∂v)_T)   molar SI

built from the model's own equations (the cubic's closed forms, the ideal
gas's cp° polynomial, the reference equation through CoolProp's
AbstractState at (ρ, T)). Inside the two-phase region of a model that has
one, it raises :class:`WetState`: a vessel's history here is of a single
phase (homogeneous two-phase vessels are not modelled, and the output says
so where a history reaches the dome).
"""

from __future__ import annotations

import math
from collections.abc import Callable

from ...errors import InputError
from ...units import P_REF, R

TV = Callable[[float, float], tuple[float, float, float, float, float, float, float]]


class WetState(InputError):
    """A state of the history inside the two-phase region."""


def tv_function(model) -> TV:
    """The (T, v) -> (P, u, h, s, cv, P_T, P_v) function of ``model`` (molar SI floats).

    Raises InputError (field ``fluid.model``) for a model a vessel's gas cannot be
    integrated on (the incompressible model).
    """
    name = model.name
    if name == "ideal-gas":
        return _ideal(model)
    if name == "reference":
        return _reference(model)
    if hasattr(model, "tv") and hasattr(model, "saturation_curve"):
        return _cubic(model)
    raise InputError("fluid.model", f"a vessel's history needs a gas model; {model.label} has no gas "
                                    "(choose the ideal gas, a cubic or the reference model)")


def _ideal(model) -> TV:
    terms = model.species.cp_ig.terms

    def tv(T: float, v: float):
        cp, h, s0 = terms(T)
        P = R * T / v
        return P, h - R * T, h, s0 - R * math.log(P / P_REF), cp - R, R / v, -P / v

    return tv


def _cubic(model) -> TV:
    state = model.tv
    contains = model.saturation_curve.contains
    mixing = getattr(model, "mixing", None)
    if mixing is not None:  # a mixture splits outside its one-fluid dome too: the stability test at each state
        from ...models.cubic.phases import stability

    def tv(T: float, v: float):
        if contains(T, v):
            raise WetState("state", f"T = {T:.2f} K, v = {v:.4g} m3/mol lies inside the two-phase "
                                    f"region of {model.label}")
        out = state(T, v)
        if mixing is not None and out[0] > 0.0 and not stability(mixing, T, out[0], model.z).stable:
            raise WetState("state", model.two_phase_error("state", T, out[0]).message)
        return out

    return tv


def _reference(model) -> TV:
    from ...models.reference.coolprop import coolprop

    CP = coolprop()
    AS = model._as()
    pair, wet = CP.DmolarT_INPUTS, CP.iphase_twophase
    iP, iT, iD = CP.iP, CP.iT, CP.iDmolar

    def tv(T: float, v: float):
        rho = 1.0 / v
        try:
            AS.update(pair, rho, T)
        except ValueError as exc:
            raise InputError("state", f"the reference model has no state at T = {T:.2f} K, "
                                      f"v = {v:.4g} m3/mol ({exc})") from None
        if AS.phase() == wet:
            raise WetState("state", f"T = {T:.2f} K, v = {v:.4g} m3/mol lies inside the two-phase "
                                    f"region of {model.label}")
        dPdrho = AS.first_partial_deriv(iP, iD, iT)
        return (AS.p(), AS.umolar(), AS.hmolar(), AS.smolar(), AS.cvmolar(),
                AS.first_partial_deriv(iP, iT, iD), -dPdrho * rho * rho)

    return tv


__all__ = ["TV", "WetState", "tv_function"]
