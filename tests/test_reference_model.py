"""The reference model against CoolProp itself and against IAPWS-95 values.

Sources of the check values:

* "CoolProp 8.0 HEOS": the same library called directly through PropsSI
  or a separate AbstractState, so these tests check joulebook's wrapping
  (units, input pairs, departures, two-phase handling), not the EOS;
* "iapws 1.5 IAPWS95": the ``iapws`` package (PyPI), a separate
  implementation of IAPWS-95 in Python, at the same states (compressed and
  saturated liquid, saturated and superheated steam, supercritical water,
  the triple point, the critical constants). Both implement one
  formulation, so they must agree to round-off and solver tolerance:
  tolerance 1e-8 relative, with 1e-8 kJ/kg (kJ/(kg K)) absolute for u, h, s
  near 0 at the triple point (measured: at most 5e-10 relative in P, 1e-11
  relative in the others, 2e-11 kJ/kg at the triple point);
  at the critical point itself they differ (cp, cv diverge there), so it is
  not a row;
* identities of the residual Helmholtz energy (standard thermodynamics):
  s_dep(T, P) = s_res(T, ρ) + R ln Z and ln φ = aʳ + Z - 1 - ln Z.
"""

from __future__ import annotations

import dataclasses
import itertools
import math
import re
import subprocess
import sys

import CoolProp.CoolProp as CP
import pytest
from iapws import IAPWS95

from balance.errors import InputError
from balance.models import make_model
from balance.models.reference import Reference
from balance.species import lookup
from tests.helpers import ROOT

FLUIDS = {"H2O": "Water", "N2": "Nitrogen", "CO2": "CarbonDioxide", "R134a": "R134a"}


@pytest.fixture(scope="module")
def models():
    return {sid: make_model("reference", lookup(sid)) for sid in FLUIDS}


def props(fluid: str, out: str, a: str, va: float, b: str, vb: float) -> float:
    return CP.PropsSI(out, a, va, b, vb, "HEOS::" + fluid)


def close(a: float, b: float, rel: float = 1e-9, abs_: float = 0.0) -> bool:
    return abs(a - b) <= max(rel * max(abs(a), abs(b)), abs_)


# -- single-phase states: every property against CoolProp 8.0 HEOS ------------------
SINGLE = [
    ("H2O", 300.0, 1e5, "liquid"),
    ("H2O", 573.15, 1e6, "gas"),
    ("H2O", 700.0, 3e7, "supercritical"),
    ("H2O", 700.0, 1e6, "gas"),          # above Tc, below Pc
    ("H2O", 300.0, 3e7, "liquid"),       # above Pc, below Tc
    ("H2O", 1500.0, 1e5, "gas"),
    ("N2", 300.0, 1e5, "gas"),
    ("N2", 150.0, 5e6, "supercritical"),
    ("N2", 100.0, 2e6, "liquid"),
    ("N2", 300.0, 1e8, "supercritical"),
    ("CO2", 310.0, 1e7, "supercritical"),
    ("CO2", 280.0, 2e6, "gas"),
    ("CO2", 250.0, 5e6, "liquid"),
    ("R134a", 260.0, 1e6, "liquid"),
    ("R134a", 320.0, 5e5, "gas"),
    ("R134a", 400.0, 5e6, "supercritical"),
]


@pytest.mark.parametrize("sid, T, P, phase", SINGLE)
def test_single_phase_properties_match_coolprop(models, sid, T, P, phase):
    fluid = FLUIDS[sid]
    p = models[sid].at_TP(T, P)
    # CoolProp 8.0 HEOS, direct PropsSI calls
    # P is the EOS's P(T, ρ) after the density solve: a stiff liquid leaves ~1e-9 of it
    assert p.T == T and close(p.P, P, 1e-8)
    assert close(p.v, 1.0 / props(fluid, "Dmolar", "T", T, "P", P))
    # (separate density solves here and in PropsSI agree to ~1e-9, hence 1e-8)
    for key, name in (("u", "Umolar"), ("h", "Hmolar"), ("s", "Smolar"), ("cv", "Cvmolar"),
                      ("cp", "Cpmolar"), ("Z", "Z")):
        assert close(p.get(key), props(fluid, name, "T", T, "P", P), 1e-8, 1e-9), key
    for key, name in (("u_dep", "Umolar"), ("h_dep", "Hmolar")):
        expected = props(fluid, name, "T", T, "P", P) - props(fluid, name + "_idealgas", "T", T, "P", P)
        assert close(p.get(key), expected, 1e-9, 1e-9), key
    assert p.phase == phase  # expected phase: common practice (T vs Tc, P vs Pc), no source
    assert p.x is None and p.root == "reference EOS"


@pytest.mark.parametrize("sid, T, P, phase", SINGLE)
def test_departures_are_at_the_same_T_and_P(models, sid, T, P, phase):
    # CoolProp's s° is at the same T and density; the Point's at the same T and P.
    # Identities of the residual Helmholtz energy, with CoolProp 8.0 HEOS's
    # aʳ and s_res (PropsSI 'alphar', 'Smolar_residual') and its own R:
    #   s_dep = s_res + R ln Z,   ln φ = aʳ + Z - 1 - ln Z,   g_dep = h_dep - T s_dep = R T ln φ
    fluid = FLUIDS[sid]
    p = models[sid].at_TP(T, P)
    R = props(fluid, "gas_constant", "T", T, "P", P)
    Z = props(fluid, "Z", "T", T, "P", P)
    s_res = props(fluid, "Smolar_residual", "T", T, "P", P)
    alphar = props(fluid, "alphar", "T", T, "P", P)
    assert close(p.s_dep, s_res + R * math.log(Z), 1e-8, 1e-9)
    ln_phi = alphar + Z - 1.0 - math.log(Z)
    assert close(p.ln_phi, ln_phi, 1e-8, 1e-10)
    assert close(p.h_dep - T * p.s_dep, R * T * p.ln_phi, 1e-8, 1e-6)


def test_departures_vanish_in_the_ideal_gas_limit(models):
    # At low pressure every departure is proportional to P (second virial
    # coefficient; standard thermodynamics): from 10 Pa to 1 Pa they shrink
    # tenfold, and Z - 1 is ~1e-9 at 1 Pa for N2 at 300 K.
    p1 = models["N2"].at_TP(300.0, 1.0)
    p10 = models["N2"].at_TP(300.0, 10.0)
    assert abs(p1.Z - 1.0) < 1e-8
    assert abs(p1.h_dep) < 1e-3 and abs(p1.s_dep) < 1e-6 and abs(p1.ln_phi) < 1e-8
    for key in ("u_dep", "h_dep", "s_dep", "ln_phi"):
        assert p10.get(key) / p1.get(key) == pytest.approx(10.0, rel=1e-3), key


# -- wet states ----------------------------------------------------------------------
WET = [("H2O", 400.0, 0.3), ("H2O", 373.15, 0.0), ("H2O", 373.15, 1.0), ("N2", 100.0, 0.5),
       ("CO2", 250.0, 0.6), ("R134a", 250.0, 0.2)]


def _sat(fluid: str, T: float, x: float, out: str) -> float:
    return props(fluid, out, "T", T, "Q", x)


@pytest.mark.parametrize("sid, T, x", WET)
def test_wet_states_match_coolprop(models, sid, T, x):
    fluid = FLUIDS[sid]
    p = models[sid].flash({"T": T, "x": x})
    assert p.phase == "two-phase" and p.x == x
    # CoolProp 8.0 HEOS, PropsSI at (T, Q)
    assert close(p.P, _sat(fluid, T, x, "P"))
    assert close(p.v, 1.0 / _sat(fluid, T, x, "Dmolar"))
    for key, name in (("u", "Umolar"), ("h", "Hmolar"), ("s", "Smolar")):
        assert close(p.get(key), _sat(fluid, T, x, name), 1e-9, 1e-9), key
    if 0.0 < x < 1.0:
        assert p.cp == math.inf
    else:  # on the saturation line: the saturated phase's own cp (CoolProp 8.0 HEOS)
        assert close(p.cp, _sat(fluid, T, x, "Cpmolar"))


@pytest.mark.parametrize("sid, T, x", [w for w in WET if 0.0 < w[2] < 1.0])
def test_wet_cv_is_the_mixture_derivative_along_the_isochore(models, sid, T, x):
    # Independent route: v and u of a wet mixture are quality-weighted between
    # the saturated phases, so along an isochore (standard thermodynamics)
    #   cv = du_f/dT + x d(u_g - u_f)/dT + (u_g - u_f) dx/dT,  x = (v - v_f)/(v_g - v_f),
    # with saturation derivatives by central difference of CoolProp 8.0 HEOS
    # saturation values (step 0.01 K).
    fluid = FLUIDS[sid]
    p = models[sid].flash({"T": T, "x": x})

    def sat(t):
        return (1 / _sat(fluid, t, 0, "Dmolar"), 1 / _sat(fluid, t, 1, "Dmolar"),
                _sat(fluid, t, 0, "Umolar"), _sat(fluid, t, 1, "Umolar"))

    d = 0.01
    vf, vg, uf, ug = sat(T)
    dvf, dvg, duf, dug = ((a - b) / (2 * d) for a, b in zip(sat(T + d), sat(T - d)))
    dx = (-dvf * (vg - vf) - (p.v - vf) * (dvg - dvf)) / (vg - vf) ** 2
    cv = duf + x * (dug - duf) + (ug - uf) * dx
    assert close(p.cv, cv, 1e-4)
    assert math.isfinite(p.cv)


@pytest.mark.parametrize("sid, T, x", WET)
def test_wet_ln_phi_is_the_saturation_value(models, sid, T, x):
    # In a wet state both phases have the same fugacity; CoolProp 8.0 HEOS's
    # fugacity coefficient of the vapour evaluated (phase imposed) at (T, Psat).
    p = models[sid].flash({"T": T, "x": x})
    AS = CP.AbstractState("HEOS", FLUIDS[sid])
    AS.specify_phase(CP.iphase_gas)
    AS.update(CP.PT_INPUTS, p.P, T)
    assert close(p.ln_phi, math.log(AS.fugacity_coefficient(0)), 1e-7, 1e-9)


def test_at_Tv_inside_the_dome_gives_the_quality(models):
    # CoolProp 8.0 HEOS: Q at (T, Dmolar)
    v = 0.01  # m3/mol, inside the dome of water at 400 K (v_f ≈ 1.9e-5, v_g ≈ 0.033)
    p = models["H2O"].at_Tv(400.0, v)
    assert p.phase == "two-phase"
    assert close(p.x, props("Water", "Q", "T", 400.0, "Dmolar", 1 / v), 1e-9)


# -- every input pair round-trips -------------------------------------------------
STATES = [("H2O", 573.15, 1e6, None), ("H2O", 300.0, 1e6, None), ("H2O", 700.0, 3e7, None),
          ("H2O", 400.0, None, 0.3), ("H2O", 373.15, None, 0.0), ("H2O", 373.15, None, 1.0),
          ("N2", 300.0, 1e5, None), ("N2", 150.0, 5e6, None), ("N2", 100.0, 2e6, None),
          ("N2", 100.0, None, 0.5), ("CO2", 310.0, 1e7, None), ("CO2", 280.0, 2e6, None),
          ("CO2", 250.0, None, 0.6), ("R134a", 260.0, 1e6, None), ("R134a", 320.0, 5e5, None),
          ("R134a", 250.0, None, 0.2), ("R134a", 260.0, None, 0.0)]
KEYS = ("T", "P", "v", "u", "h", "s", "x")
PAIRS = list(itertools.combinations(KEYS, 2))
# Pairs that can be met by more than one state (see the module docstring of
# balance.models.reference); every other pair must round-trip.
MAY_BE_AMBIGUOUS = {("T", "u"), ("T", "h"), ("T", "s"), ("P", "v"), ("u", "h"), ("u", "s"),
                    ("v", "x"), ("u", "x"), ("h", "x"), ("s", "x")}
CP_NAMES = {"T": "T", "P": "P", "u": "Umolar", "h": "Hmolar", "s": "Smolar"}


def _cases():
    for sid, T, P, x in STATES:
        for pair in PAIRS:
            if "x" in pair and x is None:
                continue
            yield pytest.param(sid, T, P, x, pair, id=f"{sid}-{T}-{P}-{x}-{pair[0]}{pair[1]}")


def _spec_of(point, key):
    return point.get(key) if key != "x" else point.x


def _check_meets(fluid, point, specs):
    """Each state an ambiguity lists really meets the pair (CoolProp 8.0 HEOS at its T, ρ)."""
    for key, value in specs.items():
        if key == "x":
            got = point.x
        elif key == "v":
            got = point.v
        else:
            got = props(fluid, CP_NAMES[key], "T", point.T, "Dmolar", 1 / point.v)
        assert close(got, value, 1e-6, 1e-6), (key, got, value)


@pytest.mark.parametrize("sid, T, P, x, pair", list(_cases()))
def test_every_pair_round_trips(models, sid, T, P, x, pair):
    m = models[sid]
    base = m.at_TP(T, P) if x is None else m.flash({"T": T, "x": x})
    specs = {k: _spec_of(base, k) for k in pair}
    if pair == ("T", "P") and x is not None:
        # a wet state's T and P are the saturation pair: they cannot fix it
        with pytest.raises(InputError, match="give T and quality x, or P and x"):
            m.flash(specs)
        return
    q = m.flash(specs)
    _check_meets(FLUIDS[sid], q, specs)
    if q.note:  # several states meet the pair: the largest volume is taken and the others named
        assert pair in MAY_BE_AMBIGUOUS, q.note
        others = _others(q.note)
        assert others and all(v <= q.v * (1 + 1e-9) for _, _, v in others), q.note
        if not (close(q.T, base.T, 1e-6) and close(q.P, base.P, 1e-6)):
            assert any(close(T, base.T, 1e-5) and close(P, base.P, 1e-5) for T, P, _ in others), q.note
        return
    assert close(q.T, base.T, 1e-6) and close(q.P, base.P, 1e-6), (q.T, q.P)


_OTHER = re.compile(r"T = ([-+0-9.e]+) K, P = ([-+0-9.e]+) Pa, v = ([-+0-9.e]+) m3/mol")


def _others(note: str) -> list[tuple[float, float, float]]:
    """(T, P, v) of the states a note names beside the one taken (printed to 6 digits)."""
    also = note.split("; also ", 1)[-1] if "; also " in note else note.split("also ", 1)[-1]
    return [tuple(float(g) for g in m.groups()) for m in _OTHER.finditer(also)]


def test_a_state_after_a_saturated_v_x_flash_is_still_right():
    # The model's CoolProp state is shared by every flash: a (v, x) flash must
    # not leave a phase imposed on it. CoolProp 8.0 HEOS at (T, P) as the check.
    m = make_model("reference", lookup("H2O"))
    sat = m.flash({"T": 373.15, "x": 0.0})
    m.flash({"v": sat.v, "x": 0.0})
    q = m.at_TP(300.0, 1e6)
    assert close(q.u, props("Water", "Umolar", "T", 300.0, "P", 1e6), 1e-9)


def test_compressed_liquid_T_h_takes_the_wet_state_and_names_the_liquid(models):
    # Liquid water at 300 K and 1 MPa has h above the saturated liquid's at
    # 300 K (CoolProp 8.0 HEOS), so a wet state at 300 K has the same h too;
    # the wet one has the larger volume (the one rule of balance.models.base).
    m = models["H2O"]
    liquid = m.at_TP(300.0, 1e6)
    assert liquid.h > props("Water", "Hmolar", "T", 300.0, "Q", 0.0)
    q = m.flash({"T": 300.0, "h": liquid.h})
    assert q.phase == "two-phase" and q.v > liquid.v
    assert close(q.P, props("Water", "P", "T", 300.0, "Q", 0.0), 1e-9)
    (T, P, v), = _others(q.note)
    assert close(P, liquid.P, 1e-5) and close(v, liquid.v, 1e-5) and "(liquid)" in q.note
    assert q.note in m.warnings(q)  # said beside the result


def _iapws_root(f, a: float, b: float) -> float:
    """The root of f on [a, b] by Brent's method (scipy 1.17 brentq), f from iapws."""
    from scipy.optimize import brentq

    return brentq(f, a, b, xtol=1e-9, rtol=1e-13)


def test_saturated_vapour_enthalpy_maximum_h_x_takes_the_larger_volume(models):
    # h'' of water has a maximum on the saturation curve (near 510 K, 3.2 MPa in
    # iapws 1.5 IAPWS95): h'' at 100 °C recurs on the other side of it.
    m = models["H2O"]
    h_g = m.flash({"T": 373.15, "x": 1.0}).h
    q = m.flash({"h": h_g, "x": 1.0})  # the vapour at 100 °C has the larger volume: taken
    assert close(q.T, 373.15, 1e-9)
    (T_other, _, v_other), = _others(q.note)
    assert v_other < q.v
    # iapws 1.5 IAPWS95: the other saturation temperature with that h'' [kJ/kg]
    target = h_g / lookup("H2O").M / 1e3
    other = _iapws_root(lambda T: IAPWS95(T=T, x=1.0).h - target, 520.0, 640.0)
    assert close(T_other, other, 1e-5)  # the note prints 6 digits
    assert close(props("Water", "Hmolar", "T", other, "Q", 1.0), h_g, 1e-8)


def test_density_maximum_P_v_takes_the_warmer_state(models):
    # Water at 1 bar is densest near 4 °C: the density at 2 °C recurs a few
    # kelvin above the maximum.
    m = models["H2O"]
    cold = m.at_TP(275.15, 1e5)
    q = m.flash({"P": 1e5, "v": cold.v})
    # equal volumes: the state of higher entropy, the warmer one, is taken (the one rule)
    (T_other, _, _), = _others(q.note)
    assert close(T_other, 275.15, 1e-5) and q.s > cold.s
    # iapws 1.5 IAPWS95: the warmer temperature of that density at 0.1 MPa
    rho = lookup("H2O").M / cold.v
    other = _iapws_root(lambda T: IAPWS95(T=T, P=0.1).rho - rho, 278.0, 290.0)
    assert close(q.T, other, 1e-7)


def test_gas_P_v_is_not_scanned_and_is_unique(models):
    # A gas always expands when heated at constant P (common practice, no source).
    m = models["N2"]
    base = m.at_TP(300.0, 1e5)
    q = m.flash({"P": 1e5, "v": base.v})
    assert close(q.T, 300.0, 1e-9)


# -- water against iapws 1.5 IAPWS95 ------------------------------------------------------
# iapws works per kilogram in kJ and MPa; the model per mole in J and Pa.
IAPWS_TOL = 1e-8  # both implement IAPWS-95 (see the module docstring)

WATER_TP = [
    (300.0, 0.1, "liquid"),
    (275.15, 0.1, "liquid"),          # near the density maximum
    (300.0, 30.0, "liquid"),          # compressed, above Pc
    (573.15, 1.0, "gas"),             # superheated steam, 1 MPa and 300 °C
    (700.0, 1.0, "gas"),              # above Tc, below Pc
    (700.0, 30.0, "supercritical"),
    (1500.0, 0.1, "gas"),
]


def _same_as_iapws(p, P: float, w, M: float) -> None:
    """Point p against iapws at P [MPa] and w, its state or saturated phase."""
    assert close(p.P, P * 1e6, IAPWS_TOL), "P"
    assert close(M / p.v, w.rho, IAPWS_TOL), "rho"
    for key in ("u", "h", "s"):  # abs 1e-8 kJ/kg (or /K): u, s are 0 at the triple point
        assert close(p.get(key) / M / 1e3, getattr(w, key), IAPWS_TOL, 1e-8), key


@pytest.mark.parametrize("T, P, phase", WATER_TP)
def test_water_single_phase_matches_iapws95(models, T, P, phase):
    M = lookup("H2O").M
    p = models["H2O"].at_TP(T, P * 1e6)
    w = IAPWS95(T=T, P=P)  # iapws 1.5 IAPWS95
    _same_as_iapws(p, w.P, w, M)
    assert close(p.cp / M / 1e3, w.cp, IAPWS_TOL) and close(p.cv / M / 1e3, w.cv, IAPWS_TOL)
    assert p.phase == phase  # expected phase: common practice (T vs Tc, P vs Pc), no source


@pytest.mark.parametrize("T", [273.16, 300.0, 373.15, 400.0, 500.0, 600.0, 640.0])
def test_water_saturation_matches_iapws95(models, T):
    M = lookup("H2O").M
    w = IAPWS95(T=T, x=0.5)  # iapws 1.5 IAPWS95: both saturated phases
    for x, phase in ((0.0, w.Liquid), (1.0, w.Vapor)):
        p = models["H2O"].flash({"T": T, "x": x})
        assert p.phase == "two-phase" and p.x == x
        _same_as_iapws(p, w.P, phase, M)


def test_superheated_steam_1_MPa_300_C(models):
    p = models["H2O"].at_TP(573.15, 1e6)
    # iapws 1.5 IAPWS95 (the state is also a row of WATER_TP): a gas, and a
    # state the model has no doubt about
    assert IAPWS95(T=573.15, P=1.0).phase == "Vapour" and p.phase == "gas"
    assert models["H2O"].warnings(p) == []


def test_the_wet_water_sample_state_is_wet():
    # tests/helpers.py WET_WATER_PR: 1 m3/kg at 100 °C lies between the
    # saturated liquid and vapour (iapws 1.5 IAPWS95: v' = 0.001044, v'' = 1.6718 m3/kg)
    w = IAPWS95(T=373.15, x=0.5)
    assert w.Liquid.v < 1.0 < w.Vapor.v


def test_water_critical_point(models):
    m = models["H2O"]
    Tc, Pc = IAPWS95.Tc, IAPWS95.Pc * 1e6  # iapws 1.5 IAPWS95: 647.096 K, 22.064 MPa
    near = m.flash({"P": Pc - 1e3, "x": 0.5})
    assert close(near.T, IAPWS95(P=(Pc - 1e3) / 1e6, x=0.5).T, IAPWS_TOL) and near.T < Tc
    with pytest.raises(InputError, match=re.escape(f"Tc = {Tc:g} K, Pc = {Pc:g} Pa")):
        m.flash({"P": Pc + 1e3, "x": 0.5})
    c = m.at_TP(Tc, Pc)
    assert c.phase == "supercritical"
    assert any("near the critical point" in w for w in m.warnings(c))


def test_water_triple_point_and_reference_state(models):
    m = models["H2O"]
    t = m.flash({"T": 273.16, "x": 0.0})
    # iapws 1.5 IAPWS95 at the triple point (611.655 Pa); the IAPWS-95 reference
    # state, u = 0 and s = 0 for the saturated liquid there, which iapws also keeps
    w = IAPWS95(T=273.16, x=0.0)
    assert close(t.P, w.P * 1e6, IAPWS_TOL)
    assert abs(t.u) < 1e-6 and abs(t.s) < 1e-9
    assert abs(w.u) < 1e-9 and abs(w.s) < 1e-12  # [kJ/kg], [kJ/(kg K)]
    assert "IAPWS convention" in m.reference_state
    assert m.T_bounds() == (273.16, 2000.0)  # CoolProp 8.0 HEOS Tmin, Tmax for Water


def test_reference_states_are_named(models):
    # CoolProp 8.0 HEOS defaults: R134a and CO2 use the IIR convention
    # (h = 200 kJ/kg, s = 1 kJ/(kg K) for saturated liquid at 0 °C); the
    # nitrogen EOS keeps its publication's own offsets.
    assert "IIR convention" in models["R134a"].reference_state
    assert "IIR convention" in models["CO2"].reference_state
    assert "own publication" in models["N2"].reference_state
    for m in models.values():
        assert "only changes are used" in m.reference_state


def test_equations_name_the_eos(models):
    # BibTeX keys as CoolProp 8.0's fluid library gives them
    text = " ".join(models["H2O"].equations())
    assert CP.get_fluid_param_string("Water", "BibTeX-EOS") == "Wagner-JPCRD-2002"
    assert "Wagner-JPCRD-2002" in text and "CoolProp 8.0.0" in text
    assert "Span-JPCRD-2000" in " ".join(models["N2"].equations())
    assert models["H2O"].label == "reference equation of state (CoolProp HEOS: Water)"
    assert models["H2O"].two_phase is True and models["H2O"].name == "reference"


# -- bad input ---------------------------------------------------------------------------
def test_species_without_coolprop_name_is_refused():
    sp = dataclasses.replace(lookup("N2"), coolprop=None)
    with pytest.raises(InputError) as err:
        make_model("reference", sp)
    assert err.value.field == "fluid.model"
    assert "peng-robinson" in str(err.value) and "incompressible" in str(err.value)


def test_unknown_coolprop_fluid_is_a_clear_error():
    m = Reference(dataclasses.replace(lookup("N2"), coolprop="NoSuchFluid"))
    with pytest.raises(InputError) as err:
        m.at_TP(300.0, 1e5)
    assert err.value.field == "fluid.model"
    assert "'NoSuchFluid'" in str(err.value) and "ideal-gas" in str(err.value)


@pytest.mark.parametrize("rel", [0.0, 1e-7, -1e-7])
def test_T_P_on_saturation_is_a_clear_error(models, rel):
    T = 373.15
    P = props("Water", "P", "T", T, "Q", 0.0) * (1.0 + rel)  # CoolProp 8.0 HEOS saturation pressure
    with pytest.raises(InputError) as err:
        models["H2O"].flash({"T": T, "P": P}, field="state 'drum'")
    assert err.value.field == "state 'drum'"
    text = str(err.value)
    assert "CoolProp could not solve Water at T = 373.15 K" in text
    assert "near saturation give T and quality x, or P and x, instead" in text


@pytest.mark.parametrize("x", [1.2, -0.1])
def test_quality_outside_0_1(models, x):
    with pytest.raises(InputError) as err:
        models["H2O"].flash({"T": 400.0, "x": x})
    assert err.value.field == "state.x"
    assert "between 0 and 1" in str(err.value)


@pytest.mark.parametrize("T", [0.0, -10.0])
def test_non_positive_temperature(models, T):
    with pytest.raises(InputError) as err:
        models["N2"].flash({"T": T, "P": 1e5})
    assert err.value.field == "state.T"
    assert "above 0 K" in str(err.value)


def test_other_bad_specifications(models):
    m = models["H2O"]
    with pytest.raises(InputError, match="solid"):  # below the melting line (CoolProp 8.0 HEOS)
        m.at_TP(260.0, 1e5)
    with pytest.raises(InputError, match="exactly two"):
        m.flash({"T": 300.0, "P": 1e5, "v": 1e-3})
    with pytest.raises(InputError) as err:
        m.flash({"T": 300.0, "q": 1.0})
    assert err.value.field == "state.q"
    with pytest.raises(InputError, match="finite"):
        m.flash({"T": math.nan, "P": 1e5})
    with pytest.raises(InputError, match="quality x exists only below the critical point"):
        m.flash({"T": 700.0, "x": 0.5})
    with pytest.raises(InputError, match="h - u = P v must be positive"):
        m.flash({"u": 1000.0, "h": 900.0})
    with pytest.raises(InputError, match="CoolProp could not solve Water"):
        m.flash({"P": 1e5, "v": 1e-9})  # denser than any state of the EOS


# -- behaviour -----------------------------------------------------------------------------
def test_results_do_not_depend_on_call_order():
    sp = lookup("H2O")
    first = Reference(sp)
    a1 = first.flash({"P": 1e6, "h": 50000.0}).as_dict()
    first.flash({"T": 400.0, "x": 0.3})
    first.at_TP(300.0, 3e7)
    first.flash({"v": 0.01, "u": 30000.0})
    a2 = first.flash({"P": 1e6, "h": 50000.0}).as_dict()
    fresh = Reference(sp).flash({"P": 1e6, "h": 50000.0}).as_dict()
    assert a1 == a2 == fresh


def test_importing_the_model_does_not_import_coolprop():
    code = ("import sys; import balance.models.reference as r; from balance.species import lookup; "
            "m = r.Reference(lookup('N2')); print('CoolProp' in sys.modules, m.label)")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    assert out.stdout.split()[0] == "False"


def test_wet_state_warnings(models):
    m = models["H2O"]
    w = m.warnings(m.flash({"T": 400.0, "x": 0.3}))
    assert any("cp is infinite" in line for line in w)
    w = m.warnings(m.flash({"T": 400.0, "x": 0.0}))
    assert any("saturated liquid" in line for line in w)
