"""Thermodynamic identities every property model must satisfy, table-driven.

A table of (model, state, tolerance) drives checks that hold for any
consistent equation of state, whatever its constants (in the spirit of a
thermodynamic consistency suite): the values compared are computed by the
model itself along independent routes (closed forms against finite
differences or numerical integrals), so the source of every check value
is "standard thermodynamic identity" unless marked otherwise:

* h = u + P v;
* cp = (∂h/∂T)_P and cv = (∂u/∂T)_v, by central finite difference;
* (∂s/∂v)_T = (∂P/∂T)_v (a Maxwell relation), both by finite difference;
* cp - cv = -T (∂P/∂T)_v² / (∂P/∂v)_T, with the derivatives of P by
  finite difference;
* g = h - T s obeys dg = -s dT + v dP: along an isotherm
  (∂g/∂v)_T = v (∂P/∂v)_T, along an isochore (∂g/∂T)_v = -s + v (∂P/∂T)_v
  (taken at constant v, where every model's state is exact, rather than at
  constant P through a density solve);
* ln φ = ∫0^P (Z - 1)/P dP at constant T, by scipy quad.

The rows: the ideal gas and the four cubics (constants below), the
reference model (CoolProp 8.0 HEOS through joulebook, for water, nitrogen,
CO2 and methane at gas, liquid and supercritical states) and, in a table of
its own, the incompressible model, whose equations (v = M/ρ, u = cp (T -
T_ref), h = u + P v, s = cp ln(T/T_ref), cv = cp) imply their own
identities: v the same at every state, cp = cv (no thermal expansion),
cp = (∂h/∂T)_P = (∂u/∂T)_v, (∂s/∂T)_P = cp/T, (∂h/∂P)_T = v,
(∂u/∂P)_T = (∂s/∂P)_T = 0 (the Maxwell relation (∂s/∂P)_T = -(∂v/∂T)_P
with no expansion), (∂g/∂P)_T = v and (∂g/∂T)_P = -s, Z = P v/(R T).
Every model is called through its public interface (make_model, at_TP,
at_Tv, flash and the Point's fields) for these rows.

Facts of the trade, marked "common practice, no source": cv of a van der
Waals gas equals its ideal-gas cv at any (T, v); an ideal gas expanding
freely (constant u) keeps its temperature; a gas with attractive forces
cools on a free expansion. The van der Waals free expansion is also
checked against its closed form (from u = cv T - a/v with constant cv):
T2 = T1 - (a n / cv)(1/V1 - 1/V2) and
ΔS = n cv ln(T2/T1) + n R ln((V2 - n b)/(V1 - n b)).

Finite-difference tolerances: a central difference with relative step
1e-5 has a truncation error of order 1e-10 of the derivative's scale and
a round-off error of order 1e-11 for these magnitudes; the worst seen
when this was written was 2e-9 (cp - cv in a liquid, two difference
quotients of a steep P(v) combined). The table allows 1e-8 for gases and
2e-8 for liquids.

Tolerances are per row, as Cantera's consistency suite keeps them per
phase: ``tol`` for the identities at constant v (exact states) and
``tol_TP`` for those through at_TP (cp, ln φ). The reference model's at_TP
solves ρ(T, P) iteratively, and near CO2's critical point cp changes so
steeply that the central difference's truncation (∝ step²) shows. Measured
with the reference model (worst identity of the row): gases and methane
below 1.5e-9; liquid nitrogen, CO2 and methane 2e-9 (cp - cv); liquid
water at 300 K 2.0e-8 (Maxwell, cp - cv: its (∂P/∂T)_v is small, thermal
expansion vanishing at 4 °C, and a difference of large terms); cp through
at_TP 1.4e-8 for supercritical water and nitrogen; CO2 at 310 K and 100 bar
(Tr = 1.02) cp 4.6e-7, cp - cv 9.9e-9, ln φ 8.9e-9. h = u + P v holds
to 1e-12 for our own models; the reference model's h and u come from
CoolProp at the density its solve met, and P v differs by up to 2.9e-10 of
u + P v (nitrogen at 150 K, 50 bar), so 1e-9 there. The incompressible
model's equations are linear in T and P where the differences are taken, so
its identities hold to round-off (measured below 1e-10).

Species: Tc, Pc, ω, M from CoolProp 8.0's PR backend, cp° fitted to
CoolProp 8.0 HEOS's cp0 (see tests/test_cubic_vs_coolprop.py); the
identities hold for any such constants.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pytest
from scipy.integrate import quad

from balance.errors import InputError, TwoPhaseError
from balance.models import make_model
from balance.models.cubic import FORMS, Cubic
from balance.models.idealgas import IdealGas
from balance.species import IdealGasHeatCapacity, Species, lookup
from balance.units import R, T_REF
from tests.test_cubic_vs_coolprop import species_from

MODELS = ("ideal-gas", "van-der-waals", "redlich-kwong", "soave-redlich-kwong", "peng-robinson")
CUBICS = MODELS[1:]
_SPECIES: dict[str, Species] = {}


def species(fluid: str) -> Species:
    if fluid not in _SPECIES:
        _SPECIES[fluid] = species_from("PR", fluid)
    return _SPECIES[fluid]


def model_for(name: str, fluid: str):
    """The model for a row: the reference and incompressible rows name joulebook's
    own species (``lookup``) and go through ``make_model``."""
    if name in ("reference", "incompressible"):
        return make_model(name, lookup(fluid))
    sp = species(fluid)
    return IdealGas(sp) if name == "ideal-gas" else Cubic(sp, FORMS[name])


@dataclass(frozen=True)
class Case:
    model: str
    fluid: str
    T: float
    """[K]"""
    P: float
    """[Pa]"""
    tol: float
    """relative tolerance of the finite-difference identities at constant v [-]"""
    liquid: bool = False
    tol_TP: float | None = None
    """relative tolerance of those through at_TP (cp, ln φ) [-]; None: ``tol``"""
    tol_h: float = 1e-12
    """relative tolerance of h = u + P v [-]"""

    @property
    def tp(self) -> float:
        return self.tol if self.tol_TP is None else self.tol_TP

    @property
    def id(self) -> str:
        return f"{self.model}-{self.fluid}-{self.T:g}K-{self.P / 1e5:g}bar"


GAS_STATES = (
    ("Methane", 300.0, 1e5),  # near-ideal gas
    ("Methane", 250.0, 2e6),  # gas, Tr = 1.3
    ("Methane", 200.0, 1e7),  # dense supercritical, Tr = 1.05, Pr = 2.2
    ("Methane", 900.0, 5e6),  # hot gas
    ("CarbonDioxide", 280.0, 1e6),  # subcritical gas, under P_sat
    ("Propane", 300.0, 2e5),  # subcritical gas, under P_sat
)
LIQUID_STATES = (
    ("CarbonDioxide", 250.0, 5e6),  # compressed liquid
    ("Propane", 300.0, 5e6),
)

# The reference model (CoolProp 8.0 HEOS): (species, T [K], P [Pa], tol, tol_TP, liquid)
REFERENCE_STATES = (
    ("H2O", 573.15, 1e6, 1e-8, 1e-8, False),     # superheated steam
    ("H2O", 300.0, 1e5, 5e-8, 1e-8, True),       # liquid; small (∂P/∂T)_v, see above
    ("H2O", 700.0, 3e7, 1e-8, 5e-8, False),      # supercritical
    ("N2", 300.0, 1e5, 1e-8, 1e-8, False),       # near-ideal gas
    ("N2", 100.0, 2e6, 2e-8, 1e-8, True),        # compressed liquid
    ("N2", 150.0, 5e6, 1e-8, 5e-8, False),       # supercritical, Tr = 1.19
    ("CO2", 280.0, 2e6, 1e-8, 1e-8, False),      # gas under P_sat
    ("CO2", 250.0, 5e6, 2e-8, 1e-8, True),       # compressed liquid
    ("CO2", 310.0, 1e7, 3e-8, 1e-6, False),      # supercritical, near the critical point
    ("CH4", 300.0, 1e5, 1e-8, 1e-8, False),      # near-ideal gas
    ("CH4", 150.0, 5e6, 2e-8, 1e-8, True),       # compressed liquid
    ("CH4", 250.0, 1e7, 1e-8, 1e-8, False),      # supercritical
)

TABLE = [Case(m, f, T, P, 1e-8) for m in MODELS for f, T, P in GAS_STATES] + [
    Case(m, f, T, P, 2e-8, liquid=True) for m in CUBICS for f, T, P in LIQUID_STATES
] + [Case("reference", f, T, P, tol, liquid=liq, tol_TP=tp, tol_h=1e-9) for f, T, P, tol, tp, liq in REFERENCE_STATES]


@pytest.fixture(params=TABLE, ids=[c.id for c in TABLE])
def case(request):
    c = request.param
    m = model_for(c.model, c.fluid)
    p = m.at_TP(c.T, c.P)
    if c.liquid:
        assert p.phase == "liquid", p
    else:
        assert p.phase in ("gas", "supercritical"), p
    return c, m, p


def central(f, x: float, rel: float = 1e-5) -> float:
    dx = rel * x
    return (f(x + dx) - f(x - dx)) / (2 * dx)


def test_h_equals_u_plus_Pv(case):
    c, m, p = case
    assert p.h == pytest.approx(p.u + p.P * p.v, rel=c.tol_h, abs=c.tol_h * (abs(p.u) + p.P * p.v))


def test_cp_is_dh_dT_at_constant_P(case):
    c, m, p = case
    dhdT = central(lambda T: m.at_TP(T, p.P).h, p.T)
    assert p.cp == pytest.approx(dhdT, rel=c.tp)


def test_cv_is_du_dT_at_constant_v(case):
    c, m, p = case
    dudT = central(lambda T: m.at_Tv(T, p.v).u, p.T)
    assert p.cv == pytest.approx(dudT, rel=c.tol)


def test_maxwell_ds_dv_equals_dP_dT(case):
    c, m, p = case
    dsdv = central(lambda v: m.at_Tv(p.T, v).s, p.v)
    dPdT = central(lambda T: m.at_Tv(T, p.v).P, p.T)
    assert dsdv == pytest.approx(dPdT, rel=c.tol)


def test_cp_minus_cv(case):
    c, m, p = case
    dPdT = central(lambda T: m.at_Tv(T, p.v).P, p.T)
    dPdv = central(lambda v: m.at_Tv(p.T, v).P, p.v)
    assert p.cp - p.cv == pytest.approx(-p.T * dPdT**2 / dPdv, rel=c.tol)


def test_g_along_an_isotherm(case):
    # g = h - T s; dg = -s dT + v dP, so (∂g/∂v)_T = v (∂P/∂v)_T
    c, m, p = case

    def g(q):
        return q.h - q.T * q.s

    dgdv = central(lambda v: g(m.at_Tv(p.T, v)), p.v)
    dPdv = central(lambda v: m.at_Tv(p.T, v).P, p.v)
    assert dgdv == pytest.approx(p.v * dPdv, rel=c.tol)


def test_g_along_an_isochore(case):
    # g = h - T s; dg = -s dT + v dP, so (∂g/∂T)_v = -s + v (∂P/∂T)_v; the
    # scale is the largest term (s can be near 0 at the reference state)
    c, m, p = case

    def g(q):
        return q.h - q.T * q.s

    dgdT = central(lambda T: g(m.at_Tv(T, p.v)), p.T)
    dPdT = central(lambda T: m.at_Tv(T, p.v).P, p.T)
    scale = max(abs(p.s), abs(p.v * dPdT), p.cv)
    assert dgdT == pytest.approx(-p.s + p.v * dPdT, abs=c.tol * scale)


GAS_TABLE = [c for c in TABLE if not c.liquid]


@pytest.mark.parametrize("c", GAS_TABLE, ids=[c.id for c in GAS_TABLE])
def test_ln_phi_is_the_integral_of_Z_minus_1(c):
    """ln φ [-] = ∫0^P (Z - 1)/P dP along the isotherm (gas and supercritical
    states only: from a liquid the path would cross the two-phase region).
    The integral starts at 1e-9 P; what is left out is ~1e-9 of ln φ."""
    m = model_for(c.model, c.fluid)
    p = m.at_TP(c.T, c.P)
    # the quadrature asks for 1e-3 of the row's tolerance, at least 1e-11 (Z from a
    # density solve is not smoother than that near CO2's critical point)
    integral = quad(lambda P: (m.at_TP(p.T, P).Z - 1.0) / P, 1e-9 * p.P, p.P, epsabs=1e-13,
                    epsrel=max(1e-11, 1e-3 * c.tp), limit=200)[0]
    assert p.ln_phi == pytest.approx(integral, rel=max(1e-8, c.tp), abs=1e-12)
    if c.model == "ideal-gas":
        assert p.ln_phi == 0.0


# -- the incompressible model ---------------------------------------------------------
# (species with liquid data, T [K], P [Pa], tol); the model's equations are in
# balance/models/incompressible.py and the module docstring above.
INCOMPRESSIBLE_STATES = (
    ("H2O", 300.0, 1e5, 1e-9),
    ("H2O", 350.0, 5e6, 1e-9),
    ("C3H8", 250.0, 2e6, 1e-9),
    ("NH3", 280.0, 1e6, 1e-9),
)


@pytest.fixture(params=INCOMPRESSIBLE_STATES, ids=lambda r: f"incompressible-{r[0]}-{r[1]:g}K-{r[2] / 1e5:g}bar")
def liquid_case(request):
    sid, T, P, tol = request.param
    m = make_model("incompressible", lookup(sid))
    return m, m.at_TP(T, P), tol


def test_incompressible_h_u_Pv_and_Z(liquid_case):
    m, p, tol = liquid_case
    assert p.h == pytest.approx(p.u + p.P * p.v, rel=1e-14)
    assert p.Z == pytest.approx(p.P * p.v / (R * p.T), rel=1e-14)


def test_incompressible_v_is_the_same_everywhere(liquid_case):
    # (∂v/∂T)_P = (∂v/∂P)_T = 0: v = M/ρ at every state
    m, p, tol = liquid_case
    for T, P in ((p.T * 0.9, p.P), (p.T * 1.1, p.P), (p.T, p.P * 10.0), (p.T, p.P / 10.0)):
        assert m.at_TP(T, P).v == p.v


def test_incompressible_cp_equals_cv_and_the_derivatives(liquid_case):
    # cp - cv = T v α² / κ_T = 0 without thermal expansion; cp = (∂h/∂T)_P,
    # cv = (∂u/∂T)_v (at_Tv on the model's own v), (∂s/∂T)_P = cp / T
    m, p, tol = liquid_case
    assert p.cp == p.cv
    assert central(lambda T: m.at_TP(T, p.P).h, p.T) == pytest.approx(p.cp, rel=tol)
    assert central(lambda T: m.at_Tv(T, p.v).u, p.T) == pytest.approx(p.cv, rel=tol)
    assert central(lambda T: m.at_TP(T, p.P).s, p.T) == pytest.approx(p.cp / p.T, rel=tol)


def test_incompressible_pressure_derivatives(liquid_case):
    # (∂h/∂P)_T = v; (∂u/∂P)_T = 0; (∂s/∂P)_T = -(∂v/∂T)_P = 0 (Maxwell)
    m, p, tol = liquid_case
    assert central(lambda P: m.at_TP(p.T, P).h, p.P) == pytest.approx(p.v, rel=tol)
    for key in ("u", "s"):
        assert m.at_TP(p.T, 2.0 * p.P).get(key) == p.get(key), key


def test_incompressible_g_derivatives(liquid_case):
    # g = h - T s; (∂g/∂P)_T = v and (∂g/∂T)_P = -s (s can be near 0: scale cp)
    m, p, tol = liquid_case

    def g(q):
        return q.h - q.T * q.s

    assert central(lambda P: g(m.at_TP(p.T, P)), p.P) == pytest.approx(p.v, rel=tol)
    assert central(lambda T: g(m.at_TP(T, p.P)), p.T) == pytest.approx(-p.s, abs=tol * p.cp)


def test_incompressible_reference_state_and_state_by_v(liquid_case):
    # the model's stated reference: u = 0 and s = 0 at 298.15 K at every pressure;
    # a state given by (T, v) has no pressure (NaN), with the same u and s
    m, p, tol = liquid_case
    ref = m.at_TP(T_REF, p.P)
    assert ref.u == 0.0 and ref.s == 0.0 and ref.h == pytest.approx(p.P * p.v, rel=1e-14)
    q = m.at_Tv(p.T, p.v)
    assert math.isnan(q.P) and q.u == p.u and q.s == p.s
    assert m.flash({"T": p.T, "P": p.P}) == p
    back = m.flash({"P": p.P, "h": p.h})
    assert back.T == pytest.approx(p.T, rel=1e-12)


# -- facts of the trade -------------------------------------------------------------
def test_van_der_waals_cv_is_the_ideal_gas_cv_at_any_T_v():
    """cv,real = cv,ig for van der Waals (a constant, a'' = 0); common practice, no source.

    Checked on a (T, v) grid covering liquid-like, two-phase, gas and
    supercritical volumes through the vectorised core, and through at_Tv
    at states outside the dome.
    """
    m = model_for("van-der-waals", "Methane")
    T, v = np.meshgrid(np.linspace(80.0, 900.0, 30), m.b * np.geomspace(1.01, 1e5, 40))
    props = m.props_Tv(T, v)
    cv_ig = m.species.cp_ig.cp(T.ravel()).reshape(T.shape) - R
    np.testing.assert_allclose(props["cv"], cv_ig, rtol=1e-13, atol=0)
    for T1, v1 in ((300.0, 1e-3), (150.0, 5e-2), (120.0, 4.5e-5), (600.0, 1e-4)):
        p = m.at_Tv(T1, v1)
        assert p.cv == pytest.approx(float(m.species.cp_ig.cp(T1)) - R, rel=1e-13)


@pytest.mark.parametrize("fluid,T,P", GAS_STATES[:3])
def test_ideal_gas_free_expansion_keeps_its_temperature(fluid, T, P):
    """Constant u, volume x3: T unchanged; common practice, no source."""
    m = model_for("ideal-gas", fluid)
    p1 = m.at_TP(T, P)
    p2 = m.flash({"u": p1.u, "v": 3.0 * p1.v})
    assert p2.T == pytest.approx(T, rel=1e-9)
    assert p2.P == pytest.approx(P / 3.0, rel=1e-9)


@pytest.mark.parametrize("name", ("van-der-waals", "peng-robinson", "soave-redlich-kwong", "redlich-kwong"))
@pytest.mark.parametrize("fluid,T,P", GAS_STATES[:2] + GAS_STATES[3:5])
def test_gas_with_attractive_forces_cools_on_free_expansion(name, fluid, T, P):
    """Constant u, volume x3: T falls; common practice, no source.

    The drop must be real, not round-off: at least 1e-4 of T (the flash
    finds T to ~1e-10).
    """
    m = model_for(name, fluid)
    p1 = m.at_TP(T, P)
    p2 = m.flash({"u": p1.u, "v": 3.0 * p1.v})
    assert p2.u == pytest.approx(p1.u, abs=1e-9 * R * T)
    assert p2.T < T * (1 - 1e-4), (p2.T, T)


def test_free_expansion_into_the_dome_is_refused():
    """van der Waals methane from 200 K, 100 bar to three times the volume at
    constant u lands inside its two-phase region (T about 175 K, under its Tc
    of 190.6 K, v between the saturated volumes): TwoPhaseError, not a
    made-up single-phase state. Source: our own saturation (see above)."""
    m = model_for("van-der-waals", "Methane")
    p1 = m.at_TP(200.0, 1e7)
    with pytest.raises(TwoPhaseError):
        m.flash({"u": p1.u, "v": 3.0 * p1.v})


@pytest.mark.parametrize("n,T1,V1,V2,cp", (
    # methane's a and b; the constant cp [J/(mol K)] is an input chosen for the test
    (2.0, 300.0, 2e-3, 8e-3, 29.1),
    (1.0, 200.0, 2e-4, 5e-3, 37.0),     # dense start, T/Tc = 1.05
    (5.0, 450.0, 1e-3, 1e-2, 50.0),
))
def test_van_der_waals_free_expansion_closed_form(n, T1, V1, V2, cp):
    """van der Waals free expansion of n [mol] from V1 to V2 [m3] with constant cv.

    Source: the closed form from u = cv T - a/v (constant cv) at constant
    U: T2 = T1 - (a n / cv)(1/V1 - 1/V2); and
    ΔS = n cv ln(T2/T1) + n R ln((V2 - n b)/(V1 - n b)). Ours: T2 from our
    flash on (u, v), S from our points; both to 1e-9 relative.
    """
    sp = species("Methane")
    sp = Species(sp.id, sp.name, sp.formula, sp.M, sp.Tc, sp.Pc, sp.omega, IdealGasHeatCapacity(constant_cp=cp))
    m = Cubic(sp, FORMS["van-der-waals"])
    cv = cp - R
    p1 = m.at_Tv(T1, V1 / n)
    p2 = m.flash({"u": p1.u, "v": V2 / n})
    T2 = T1 - (m.a_c * n / cv) * (1.0 / V1 - 1.0 / V2)
    assert p2.T == pytest.approx(T2, rel=1e-9)
    dS = n * cv * math.log(T2 / T1) + n * R * math.log((V2 - n * m.b) / (V1 - n * m.b))
    assert n * (p2.s - p1.s) == pytest.approx(dS, rel=1e-9)
    assert dS > 0  # an adiabatic free expansion generates entropy


# -- two-phase detection and bad input ----------------------------------------------
@pytest.mark.parametrize("name", CUBICS)
@pytest.mark.parametrize("fluid", ("Methane", "CarbonDioxide"))
def test_state_inside_the_dome_is_refused_with_advice(name, fluid):
    """(T, v) and (P, h) inside the two-phase region: TwoPhaseError naming the reference model.

    Source of the dome: the model's own saturation at 0.8 Tc (checked against
    CoolProp in tests/test_cubic_vs_coolprop.py for PR and SRK).
    """
    m = model_for(name, fluid)
    T = 0.8 * m.Tc_eos
    P_sat, v_l, v_v = m.saturation(T)
    v_mid = math.sqrt(v_l * v_v)
    with pytest.raises(TwoPhaseError, match="reference model"):
        m.at_Tv(T, v_mid)
    with pytest.raises(TwoPhaseError, match="reference model"):
        m.flash({"T": T, "v": v_mid})
    h_l, h_v = m.at_Tv(T, v_l).h, m.at_Tv(T, v_v).h
    assert h_v > h_l
    with pytest.raises(TwoPhaseError):
        m.flash({"P": P_sat, "h": 0.5 * (h_l + h_v)})
    s_l, s_v = m.at_Tv(T, v_l).s, m.at_Tv(T, v_v).s
    with pytest.raises(TwoPhaseError):
        m.flash({"P": P_sat, "s": 0.5 * (s_l + s_v)})
    # just outside the dome on either side: states
    assert m.at_Tv(T, v_v * 1.001).phase == "gas"
    assert m.at_Tv(T, v_l * 0.999).phase == "liquid"


@pytest.mark.parametrize("name", MODELS)
def test_bad_input_names_the_field(name):
    """T <= 0, P <= 0, v <= b (v <= 0 for the ideal gas): InputError naming the field."""
    m = model_for(name, "Methane")
    b = getattr(m, "b", 0.0)
    where = "state 'feed'"
    for specs, key in (
        ({"T": 0.0, "P": 1e5}, "T"),
        ({"T": -10.0, "v": 1e-3}, "T"),
        ({"T": 300.0, "P": 0.0}, "P"),
        ({"P": -1e5, "h": 0.0}, "P"),
        ({"T": 300.0, "v": 0.5 * b if b else -1e-3}, "v"),
        ({"P": 1e5, "v": b if b else 0.0}, "v"),
    ):
        with pytest.raises(InputError) as err:
            m.flash(specs, field=where)
        assert err.value.field == f"{where}.{key}", (specs, err.value.field)
        assert not isinstance(err.value, TwoPhaseError)
    for call, key in ((lambda: m.at_TP(-5.0, 1e5), "T"), (lambda: m.at_TP(300.0, -1.0), "P"),
                      (lambda: m.at_Tv(0.0, 1e-3), "T"), (lambda: m.at_Tv(300.0, 0.5 * b if b else -1e-3), "v")):
        with pytest.raises(InputError) as err:
            call()
        assert err.value.field == key


def test_ideal_gas_pairs_that_fix_no_state_are_refused():
    """u and h of an ideal gas depend on T alone: (T, u), (T, h), (u, h) fix no state."""
    m = model_for("ideal-gas", "Methane")
    p = m.at_TP(300.0, 1e5)
    for pair in (("T", "u"), ("T", "h"), ("u", "h")):
        with pytest.raises(InputError, match="do not fix a state"):
            m.flash({k: p.get(k) for k in pair}, field="state 'a'")
