"""Our Peng-Robinson and Soave-Redlich-Kwong against CoolProp 8.0's cubic backends.

Sources of the check values:

* "CoolProp 8.0 PR backend" / "CoolProp 8.0 SRK backend":
  ``AbstractState("PR", fluid)`` and ``AbstractState("SRK", fluid)``. Our
  species are built from *that backend's own* Tc, Pc, ω and M, so both
  sides evaluate the same equation with the same constants and should
  agree to round-off. (CoolProp's SRK Ωa literal differs from the exact
  1/(9(2^(1/3) - 1)) in the tenth digit, which shows as ~1e-9 relative
  differences; far inside the 1e-6 asked for here.)
* "CoolProp 8.0 HEOS": the multiparameter reference equations, used only
  for the ideal-gas heat capacity our test species are fitted to and for
  entropy changes at 1 kPa, where every equation of state is nearly ideal.
* "scipy quad": numerical integration of our own cp°(T) / T, an
  independent route to the ideal-gas entropy change.

How the comparison is made. CoolProp's cubic backends carry their own
ideal-gas part (cp°(T) from their fluid files), ours comes from the
species' polynomials, so total h, u, s cannot be compared directly.
What both sides share is the residual part of the same cubic:

* enthalpy: CoolProp's ``hmolar_residual()`` is h(T, ρ) - h_ig(T); since
  h_ig depends on T alone this is our ``h_dep`` (departure at the same T
  and P). For changes between two states we compare our total
  h2 - h1 with [h_ig(T2) - h_ig(T1)]_ours + hr2 - hr1 from CoolProp: the
  ideal-gas part is evaluated the same way (ours) on both sides, so the
  test checks our residual enthalpy and how it is added to the ideal gas.
* internal energy: u^r = h^r - (P v - R T) = h^r - R T (Z - 1), with
  CoolProp's Z; compared the same way.
* entropy: CoolProp's ``smolar_residual()`` is S^r at the same T and
  *density*; our ``s_dep`` is at the same T and *pressure*:
  s_dep = S^r(T, v) + R ln Z. At constant temperature the ideal-gas part
  of CoolProp's own total entropy is right, so isothermal changes of s are
  compared with CoolProp's total smolar directly.

Entropy across temperatures. CoolProp 8.0's cubic backends get entropy
changes with temperature wrong: their Δs disagrees with ∫cp/T dT taken
from their own cp (methane at 1 kPa from 280 K to 215 K: -13.75 J/(mol K)
against -9.04), a known upstream defect (their residual entropy is right,
the ideal-gas part is not). So our Δs across temperatures is checked
(a) against ∫cp°/T dT by scipy quad over our cp° - R ln(P2/P1) plus the
residual entropies from CoolProp's cubic (smolar_residual + R ln Z), and
(b) against CoolProp HEOS at 1 kPa with a species whose cp° is fitted to
HEOS's cp0 on the temperature range of the check.

CoolProp's PR/SRK backends fail their own T-P solve at some gas and
supercritical states ("Cubic has three roots, but phase not imposed"):
those states are skipped in the comparison, counted, and our model must
still solve every one of them (checked against CoolProp evaluated at our
density, which needs no root choice). CoolProp's cubic backends also
cannot solve from (h, P) or (P, s); our generic flash is round-tripped
over all fifteen input pairs, at states including the ones CoolProp
fails.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from CoolProp.CoolProp import AbstractState
from scipy.integrate import quad

from balance.models.cubic import FORMS, Cubic
from balance.species import IdealGasHeatCapacity, Nasa7, Species
from balance.units import R

BACKENDS = {"PR": "peng-robinson", "SRK": "soave-redlich-kwong"}
FLUIDS = ("Methane", "Nitrogen", "CarbonDioxide", "Propane")
STATES_PER_FLUID = 40  # x 4 fluids x 2 backends = 320 random states
RTOL = 1e-6  # the agreement asked of every comparison with CoolProp's cubics
SEED = 20240611


# -- test species: constants from the CoolProp backend, cp° fitted to HEOS -------
def _heos_cp0_R(fluid: str, T: np.ndarray) -> np.ndarray:
    """cp0/R [-] of CoolProp 8.0 HEOS's ideal gas at T [K]."""
    heos = AbstractState("HEOS", fluid)
    out = []
    for t in T:
        heos.update(CP.DmolarT_INPUTS, 1e-9, float(t))
        out.append(heos.cp0molar() / heos.gas_constant())
    return np.array(out)


def _poly_int(c, t):
    """(h/R [K], s/R [-]) of cp/R = Σ c_k t^k without integration constants."""
    h = sum(ck * t ** (k + 1) / (k + 1) for k, ck in enumerate(c))
    s = c[0] * math.log(t) + sum(ck * t**k / k for k, ck in enumerate(c) if k)
    return h, s


def fitted_nasa(fluid: str, T_lo: float = 100.0, T_mid: float = 1000.0, T_hi: float = 6000.0) -> Nasa7:
    """Two NASA 7-coefficient ranges least-squares fitted to HEOS cp0 [K ranges].

    a6, a7 of the high range make h and s continuous at T_mid. This stands
    in for the species data file; the fit quality only matters for the HEOS
    check, which fits its own narrow range.
    """
    T1 = np.linspace(T_lo, T_mid, 150)
    T2 = np.linspace(T_mid, T_hi, 150)
    lo = np.polynomial.polynomial.polyfit(T1, _heos_cp0_R(fluid, T1), 4)
    hi = np.polynomial.polynomial.polyfit(T2, _heos_cp0_R(fluid, T2), 4)
    h_lo, s_lo = _poly_int(lo, T_mid)
    h_hi, s_hi = _poly_int(hi, T_mid)
    return Nasa7(T_lo, T_mid, T_hi, tuple(lo) + (0.0, 0.0), tuple(hi) + (h_lo - h_hi, s_lo - s_hi))


def species_from(backend: str, fluid: str, nasa: Nasa7 | None = None) -> Species:
    """A Species with the backend's Tc [K], Pc [Pa], ω [-], M [kg/mol]."""
    cp = AbstractState(backend, fluid)
    return Species(
        id=fluid.lower(), name=fluid, formula=fluid, M=cp.molar_mass(), Tc=cp.T_critical(),
        Pc=cp.p_critical(), omega=cp.acentric_factor(),
        cp_ig=IdealGasHeatCapacity(nasa=nasa or fitted_nasa(fluid)), coolprop=fluid,
    )


# -- the random states, computed once --------------------------------------------
@dataclass
class Compared:
    T: float
    P: float
    ours: object  # Point
    Z: float | None = None  # CoolProp; None where CoolProp failed
    hr: float | None = None
    sr: float | None = None
    s: float | None = None
    error: str = ""


@dataclass
class Run:
    backend: str
    fluid: str
    model: Cubic
    states: list[Compared] = field(default_factory=list)
    pairs: list[tuple[Compared, Compared, float]] = field(default_factory=list)
    """(state, same T at another P, CoolProp Δs [J/(mol K)] or nan)"""


def _random_states(model: Cubic, rng: np.random.Generator, n: int) -> list[tuple[float, float]]:
    """Gas and supercritical (T [K], P [Pa]): below Tc, P under 0.95 of our P_sat."""
    sp = model.species
    out = []
    while len(out) < n:
        T = float(rng.uniform(0.6, 3.0) * sp.Tc)
        if 0.985 * sp.Tc < T < sp.Tc:
            continue  # too close to the critical point for a "gas" label to mean much
        if T < sp.Tc:
            P_max = 0.95 * model.saturation(T)[0]
        else:
            P_max = 3.0 * sp.Pc
        P_min = min(1e3, 0.1 * P_max)
        out.append((T, float(math.exp(rng.uniform(math.log(P_min), math.log(P_max))))))
    return out


def _coolprop_at(cp: AbstractState, T: float, P: float, ours) -> Compared:
    c = Compared(T, P, ours)
    try:
        cp.update(CP.PT_INPUTS, P, T)
        c.Z, c.hr, c.sr, c.s = cp.compressibility_factor(), cp.hmolar_residual(), cp.smolar_residual(), cp.smolar()
    except ValueError as exc:
        c.error = str(exc)
        c.Z = c.hr = c.sr = c.s = None
    return c


@pytest.fixture(scope="module")
def runs() -> list[Run]:
    rng = np.random.default_rng(SEED)
    out = []
    for backend, form in BACKENDS.items():
        for fluid in FLUIDS:
            model = Cubic(species_from(backend, fluid), FORMS[form])
            cp = AbstractState(backend, fluid)
            run = Run(backend, fluid, model)
            for T, P in _random_states(model, rng, STATES_PER_FLUID):
                run.states.append(_coolprop_at(cp, T, P, model.at_TP(T, P)))
                # a second pressure at the same T, lower by a factor 1.5 to 20
                P2 = P / float(math.exp(rng.uniform(math.log(1.5), math.log(20.0))))
                other = _coolprop_at(cp, T, P2, model.at_TP(T, P2))
                ok = run.states[-1].s is not None and other.s is not None
                run.pairs.append((run.states[-1], other, other.s - run.states[-1].s if ok else math.nan))
            out.append(run)
    return out


def _compared(runs):
    return [(r, c) for r in runs for c in r.states if c.Z is not None]


def _rel(ours: float, ref: float, floor: float = 0.0) -> float:
    return abs(ours - ref) / max(abs(ref), floor)


def test_enough_states_compared_and_coolprop_failures_counted(runs):
    total = sum(len(r.states) for r in runs)
    compared = len(_compared(runs))
    failed = [(r.backend, r.fluid, c.T, c.P, c.error) for r in runs for c in r.states if c.Z is None]
    print(f"\n{total} random states; CoolProp 8.0 cubic T-P solve failed at {len(failed)}; compared {compared}")
    for f in failed[:10]:
        print(f"  CoolProp {f[0]} {f[1]} T = {f[2]:.2f} K, P = {f[3]:.5g} Pa: {f[4][:70]}")
    assert compared >= 200
    assert total == len(BACKENDS) * len(FLUIDS) * STATES_PER_FLUID


def test_our_model_solves_every_state(runs):
    """Every random state, including those CoolProp fails: a gas-like root on the isotherm.

    Where CoolProp's T-P solve failed, CoolProp is evaluated at our (T, ρ)
    instead (no root choice involved): its pressure and residual enthalpy
    must equal ours to 1e-6 (source: CoolProp 8.0 PR/SRK backend).
    """
    for run in runs:
        cp = AbstractState(run.backend, run.fluid)
        for c in run.states:
            p = c.ours
            assert all(math.isfinite(x) for x in (p.v, p.Z, p.h, p.s, p.cp)), (run.fluid, c.T, c.P)
            assert p.phase in ("gas", "supercritical"), (run.fluid, c.T, c.P, p.phase)
            assert abs(p.P - c.P) <= 1e-9 * c.P  # P(T, v) of the chosen root gives back P
            if c.Z is None:
                cp.update(CP.DmolarT_INPUTS, 1.0 / p.v, c.T)
                assert _rel(p.P, cp.p()) <= RTOL, (run.fluid, c.T, c.P)
                assert _rel(p.h_dep, cp.hmolar_residual(), 1e-3 * R * c.T) <= RTOL
            if c.T < run.model.species.Tc:  # below Tc and under P_sat: the vapour root
                v_lo, v_hi, _, _ = run.model.roots_TP(c.T, c.P)
                assert p.v == pytest.approx(float(v_hi), rel=1e-12)


def test_Z_against_coolprop(runs):
    """Z = P v/(R T) [-]; source: CoolProp 8.0 PR/SRK backend, compressibility_factor()."""
    worst = max(_rel(c.ours.Z, c.Z) for _, c in _compared(runs))
    print(f"\nworst relative Z difference: {worst:.2e}")
    assert worst <= RTOL


def test_residual_parts_against_coolprop(runs):
    """h_dep [J/mol] = hmolar_residual; s_dep [J/(mol K)] = smolar_residual + R ln Z.

    Source: CoolProp 8.0 PR/SRK backend. The floor of 1e-3 R T (1e-3 R for
    s) only matters at the lowest pressures, where the residual parts are
    themselves a few 1e-3 R T; relative 1e-6 of that floor is 1e-9 R T.
    """
    for run, c in _compared(runs):
        p = c.ours
        assert _rel(p.h_dep, c.hr, 1e-3 * R * c.T) <= RTOL, (run.backend, run.fluid, c.T, c.P)
        s_dep_cp = c.sr + R * math.log(c.Z)
        assert _rel(p.s_dep, s_dep_cp, 1e-3 * R) <= RTOL, (run.backend, run.fluid, c.T, c.P)
        u_dep_cp = c.hr - R * c.T * (c.Z - 1.0)
        assert _rel(p.u_dep, u_dep_cp, 1e-3 * R * c.T) <= RTOL


def _consecutive(run: Run):
    good = [c for c in run.states if c.Z is not None]
    return list(zip(good[:-1], good[1:]))


def test_changes_of_u_and_h_between_pairs_of_states(runs):
    """Δh, Δu [J/mol] between consecutive random states of one fluid.

    Reference: [h_ig(T2) - h_ig(T1)] from our cp° (the same ideal-gas part
    on both sides, see the module docstring) + hr2 - hr1 from CoolProp 8.0
    PR/SRK backend; u^r = h^r - R T (Z - 1). Relative to |Δ|, with a floor
    of R x 1 K for the rare pair whose h nearly coincide.
    """
    n = 0
    for run in runs:
        ig = run.model.species.cp_ig
        for a, b in _consecutive(run):
            dh_ig = float(ig.h(b.T) - ig.h(a.T))
            dh_ref = dh_ig + b.hr - a.hr
            du_ref = (dh_ig - R * (b.T - a.T)) + (b.hr - R * b.T * (b.Z - 1)) - (a.hr - R * a.T * (a.Z - 1))
            assert _rel(b.ours.h - a.ours.h, dh_ref, R) <= RTOL, (run.backend, run.fluid, a.T, b.T)
            assert _rel(b.ours.u - a.ours.u, du_ref, R) <= RTOL, (run.backend, run.fluid, a.T, b.T)
            n += 1
    assert n >= 200


def test_isothermal_entropy_changes_against_coolprop(runs):
    """Δs [J/(mol K)] at constant T between P and a P lower by 1.5x to 20x.

    Source: CoolProp 8.0 PR/SRK backend, total smolar() at both states (its
    ideal-gas part is right at constant T: -R ln(ρ2/ρ1)).
    """
    n = 0
    for run in runs:
        for a, b, ds_cp in run.pairs:
            if math.isnan(ds_cp):
                continue
            assert _rel(b.ours.s - a.ours.s, ds_cp) <= RTOL, (run.backend, run.fluid, a.T, a.P, b.P)
            n += 1
    assert n >= 200


def test_entropy_changes_across_temperatures_against_quad_and_residuals(runs):
    """Δs [J/(mol K)] between consecutive random states (different T and P).

    Reference: ∫cp°/T dT (scipy quad over our cp°) - R ln(P2/P1) + the
    residual entropies s_dep = smolar_residual + R ln Z of CoolProp 8.0
    PR/SRK backend. Not CoolProp's total smolar: its cubic backends get
    entropy changes with T wrong (see the module docstring).
    """
    n = 0
    for run in runs:
        cp_ig = run.model.species.cp_ig
        for a, b in _consecutive(run):
            ds_ig = quad(lambda T: float(cp_ig.cp(T)) / T, a.T, b.T, epsabs=1e-13, epsrel=1e-13,
                         points=[cp_ig.nasa.T_mid] if min(a.T, b.T) < cp_ig.nasa.T_mid < max(a.T, b.T) else None)[0]
            ds_ref = ds_ig - R * math.log(b.P / a.P) + (b.sr + R * math.log(b.Z)) - (a.sr + R * math.log(a.Z))
            assert _rel(b.ours.s - a.ours.s, ds_ref, R) <= RTOL, (run.backend, run.fluid, a.T, b.T)
            n += 1
    assert n >= 200


HEOS_T = (200.0, 215.0, 240.0, 280.0, 320.0, 380.0)
P_LOW = 100.0  # [Pa]; residual entropies of the cubics and HEOS differ by < 1e-5 R here


@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("fluid", ("Argon", "Methane"))
def test_entropy_change_across_temperatures_against_heos_at_low_pressure(backend, fluid):
    """Δs [J/(mol K)] at 100 Pa between temperatures 200-380 K, against HEOS.

    Source: CoolProp 8.0 HEOS. Argon: cp° = 2.5 R exactly in HEOS (R =
    8.31451 J/(mol K), its gas_constant()), so our species gets that
    constant cp° and the totals are compared as they are. Methane: our
    cp° is a quartic fitted to HEOS's cp0 (worst error ~2e-4), so the
    known cp° difference ∫(cp°_ours - cp0_HEOS)/T dT (scipy quad) is added
    to HEOS's Δs. What remains is the difference of residual entropies of
    the cubic and of HEOS at 100 Pa, under 1e-5 J/(mol K) (the bound).
    """
    heos = AbstractState("HEOS", fluid)
    if fluid == "Argon":
        cp_ig = IdealGasHeatCapacity(constant_cp=2.5 * heos.gas_constant())
    else:
        T = np.linspace(190.0, 400.0, 200)
        c = tuple(np.polynomial.polynomial.polyfit(T, _heos_cp0_R(fluid, T) * heos.gas_constant() / R, 4))
        cp_ig = IdealGasHeatCapacity(nasa=Nasa7(100.0, 1000.0, 6000.0, c + (0.0, 0.0), c + (0.0, 0.0)))
    sp = species_from(backend, fluid)
    model = Cubic(Species(sp.id, sp.name, sp.formula, sp.M, sp.Tc, sp.Pc, sp.omega, cp_ig), FORMS[BACKENDS[backend]])

    def cp_diff_over_T(T):
        return (float(cp_ig.cp(T)) - _heos_cp0_R(fluid, [T])[0] * heos.gas_constant()) / T

    for T1 in HEOS_T:
        for T2 in HEOS_T:
            if T2 <= T1:
                continue
            heos.update(CP.PT_INPUTS, P_LOW, T1)
            s1 = heos.smolar()
            heos.update(CP.PT_INPUTS, P_LOW, T2)
            ds_heos = heos.smolar() - s1
            correction = quad(cp_diff_over_T, T1, T2, epsabs=1e-12)[0]
            if fluid == "Argon":
                assert abs(correction) < 1e-12
            ds_ours = model.at_TP(T2, P_LOW).s - model.at_TP(T1, P_LOW).s
            assert abs(ds_ours - (ds_heos + correction)) <= 1e-5, (T1, T2, ds_ours, ds_heos, correction)


def test_coolprop_cubic_entropy_defect_is_why_we_do_not_compare_total_s():
    """Records the upstream defect that shapes the entropy checks above.

    CoolProp 8.0 PR backend, methane, 1 kPa, 280 K -> 215 K: smolar changes
    by -13.75 J/(mol K) while ∫cp/T dT from its own cpmolar() gives -9.04
    (values quoted in the brief of this test, reproduced here). Ours gives
    the ∫cp/T dT value (with cp° fitted to HEOS, whose cp0 CoolProp's PR
    backend shares here to 1e-5). If this test fails because CoolProp
    fixed the defect, compare total Δs across temperatures directly.
    """
    cp = AbstractState("PR", "Methane")
    P = 1e3
    cp.update(CP.PT_INPUTS, P, 280.0)
    s1 = cp.smolar()
    cp.update(CP.PT_INPUTS, P, 215.0)
    ds_coolprop = cp.smolar() - s1

    def cp_over_T(T):
        cp.update(CP.PT_INPUTS, P, T)
        return cp.cpmolar() / T

    ds_integral = quad(cp_over_T, 280.0, 215.0, epsrel=1e-12)[0]
    assert ds_coolprop == pytest.approx(-13.75, abs=0.01)  # CoolProp 8.0 PR backend
    assert ds_integral == pytest.approx(-9.04, abs=0.01)  # ∫cp/T dT, CoolProp 8.0 PR cpmolar
    model = Cubic(species_from("PR", "Methane"), FORMS["peng-robinson"])
    ds_ours = model.at_TP(215.0, P).s - model.at_TP(280.0, P).s
    assert ds_ours == pytest.approx(ds_integral, abs=2e-3)


# -- saturation pressure -----------------------------------------------------------
@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("fluid", FLUIDS)
def test_saturation_pressure_against_coolprop(backend, fluid):
    """P_sat [Pa] at T/Tc = 0.5 ... 0.9 to 1e-7 relative; our saturation to 0.97.

    Source: CoolProp 8.0 PR/SRK backend, QT_INPUTS, at T/Tc = 0.5-0.9.
    Closer to Tc CoolProp's own saturation is converged less tightly: for
    SRK propane at T/Tc = 0.97 its P_sat misses the equal-area rule of its
    own equation by 4.8e-7 relative (SRK CO2 at 0.97: 3.6e-7; ours: 2e-14,
    found while writing this test), so there only our equal-area check runs.

    The saturated volumes are not compared with CoolProp's either: its
    saturated-liquid density is converged to ~1e-6 only (at T/Tc = 0.95 for
    PR methane, CoolProp's own P(T, ρ_liquid) differs from its P_sat by
    7.6e-6). Instead our two volumes are checked against the equation
    itself: P(T, v) = P_sat to what a volume error of 1e-9 relative
    explains, |P - P_sat| <= 1e-9 v |∂P/∂v|_T (the liquid is stiff), and
    equal Gibbs energies by the equal-area rule,
    ∫ P dv from v_l to v_v = P_sat (v_v - v_l), with scipy quad, to
    1e-9 R T (independent of our closed-form ln φ).
    """
    model = Cubic(species_from(backend, fluid), FORMS[BACKENDS[backend]])
    cp = AbstractState(backend, fluid)
    for Tr in (0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.97):
        T = Tr * model.species.Tc
        P_sat, v_l, v_v = model.saturation(T)
        if Tr <= 0.9:
            cp.update(CP.QT_INPUTS, 0.0, T)
            assert _rel(P_sat, cp.p()) <= 1e-7, (Tr, P_sat, cp.p())
        for v in (v_l, v_v):
            dv = 1e-7 * v
            stiffness = v * abs(float(model.pressure(T, v + dv) - model.pressure(T, v - dv))) / (2 * dv)  # [Pa]
            assert abs(float(model.pressure(T, v)) - P_sat) <= 1e-9 * stiffness, (Tr, v)
        area = quad(lambda v: float(model.pressure(T, v)) - P_sat, v_l, v_v, epsabs=1e-12 * R * T,
                    epsrel=1e-13, limit=200)[0]
        assert abs(area) <= 1e-9 * R * T, (Tr, area / (R * T))
        assert v_v > 1.5 * v_l


# -- every input pair by round trip --------------------------------------------
PAIRS = (("T", "P"), ("T", "v"), ("P", "v"), ("T", "u"), ("T", "h"), ("T", "s"), ("P", "h"), ("P", "s"),
         ("P", "u"), ("v", "u"), ("v", "h"), ("v", "s"), ("u", "s"), ("h", "s"), ("u", "h"))


def _round_trip_states():
    """(fluid, T [K], P [Pa]) for the round trips: two where CoolProp 8.0's PR
    backend fails its own T-P solve (found by trying; its SRK backend solves
    them), a subcritical gas and a dense supercritical state."""
    out = []
    for fluid in ("Methane", "Nitrogen"):
        probe = AbstractState("PR", fluid)
        Tc, Pc = probe.T_critical(), probe.p_critical()
        for Tr in (1.5, 2.0, 2.5, 3.0, 3.5):
            for Pr in (1.0, 2.0, 3.0, 4.0):
                if _coolprop_fails("PR", fluid, Tr * Tc, Pr * Pc):
                    out.append((fluid, Tr * Tc, Pr * Pc))
                    break
            if len(out) >= 2:
                break
        if len(out) >= 2:
            break
    out += [("CarbonDioxide", 260.0, 8e5), ("Methane", 240.0, 9e6)]
    return out


def _coolprop_fails(backend: str, fluid: str, T: float, P: float) -> bool:
    """Whether a fresh CoolProp cubic state fails its T-P solve (the outcome of
    a reused AbstractState depends on the state it held before)."""
    try:
        AbstractState(backend, fluid).update(CP.PT_INPUTS, P, T)
    except ValueError:
        return True
    return False


@pytest.mark.parametrize("backend", BACKENDS)
def test_flash_round_trip_every_pair(backend):
    """flash(pair of the state) gives back the state: T, P, v to 1e-8 relative.

    Source: our own at_TP (a round trip). The first two states are ones
    where CoolProp 8.0's PR backend fails its own T-P solve (asserted). (u, h) is
    handled apart: along a line of constant u, h - u = P v has a minimum, so
    a gas state usually shares (u, h) with a second, nearby state; our
    flash returns the gas-side one (larger v). There the check is that the
    pair is met, that the original is the one returned when it lies on the
    gas side of that minimum, and otherwise that the one returned has the
    larger volume. The state tolerance for (u, h) follows from its
    condition: a relative error e in h moves v by e (|h| + R T) / |v d(Pv)/dv|_u.
    """
    states = _round_trip_states()
    assert all(_coolprop_fails("PR", f, T, P) for f, T, P in states[:2])  # CoolProp 8.0 PR backend
    for fluid, T, P in states:
        model = Cubic(species_from(backend, fluid), FORMS[BACKENDS[backend]])
        p = model.at_TP(T, P)
        for pair in PAIRS:
            q = model.flash({k: p.get(k) for k in pair})
            for key in pair:  # the pair itself is met
                assert q.get(key) == pytest.approx(p.get(key), rel=1e-9, abs=1e-9 * R * T), (fluid, T, P, pair, key)
            if pair == ("u", "h"):
                _check_u_h(model, p, q)
                continue
            for key in ("T", "P", "v"):
                assert q.get(key) == pytest.approx(p.get(key), rel=1e-8), (fluid, T, P, pair, key)


def _check_u_h(model: Cubic, p, q) -> None:
    """(u, h) gave q for the state p: p itself, or p's gas-side partner.

    Along constant u, P v falls from R T* (v -> ∞) to a minimum, then rises.
    p is on the gas side of that minimum when d(Pv)/dv > 0 there; on the
    dense side it has a gas-side partner only if its P v is below R T*.
    """
    dv = 1e-4 * p.v
    lo = model.flash({"u": p.u, "v": p.v - dv})
    hi = model.flash({"u": p.u, "v": p.v + dv})
    slope = (hi.P * hi.v - lo.P * lo.v) / (2 * dv)  # d(Pv)/dv along constant u [Pa]
    far = model.flash({"u": p.u, "v": 0.9 * model.v_bounds(p.T)[1]})  # P v -> R T*
    if slope > 0 or p.P * p.v >= far.P * far.v:  # the state itself
        tol = max(1e-8, 1e-9 * (abs(p.h) + R * p.T) / abs(p.v * slope))
        assert q.v == pytest.approx(p.v, rel=tol), (p.T, p.P, slope)
    else:  # the gas-side partner
        assert q.v > p.v * (1 + 1e-6), (p.T, p.P, slope)


def test_flash_T_h_prefers_the_gas_side_root():
    """(T, h): h on an isotherm falls with P, then rises past the Joule-Thomson
    inversion pressure, so a gas state shares (T, h) with a dense one.

    Source: our own at_TP; the dense partner is found by brentq on the
    isotherm. The flash returns the gas-side state (documented rule).
    """
    from scipy.optimize import brentq

    model = Cubic(species_from("PR", "Methane"), FORMS["peng-robinson"])
    T = 300.0
    gas = model.at_TP(T, 2e6)
    Ps = np.geomspace(4e6, 4e9, 400)
    dh = np.array([model.at_TP(T, P).h - gas.h for P in Ps])
    i = int(np.flatnonzero(dh[:-1] * dh[1:] < 0)[0])
    dense = model.at_TP(T, brentq(lambda P: model.at_TP(T, P).h - gas.h, Ps[i], Ps[i + 1], rtol=1e-14))
    assert dense.h == pytest.approx(gas.h, abs=1e-6)
    assert dense.P > 1e8  # a second state with the same T and h
    q = model.flash({"T": T, "h": gas.h})
    assert q.v == pytest.approx(gas.v, rel=1e-8)
    assert q.P == pytest.approx(2e6, rel=1e-8)


def test_flash_u_h_finds_two_states_hidden_between_grid_points():
    """PR CO2 at 486.6 K, 31.7 bar (T/Tc = 1.6, P/Pc = 0.43): along constant u
    the minimum of P v lies so close to this state that both states sharing
    its (u, h) fall between two points of the flash's volume grid, with no
    sign change on the grid (the flash used to answer "no state").

    Source: our own at_TP; the answer must meet u and h and be the gas-side
    state of the two (larger v), per the flash's documented rule.
    """
    model = Cubic(species_from("PR", "CarbonDioxide"), FORMS["peng-robinson"])
    p = model.at_TP(1.6 * model.species.Tc, 0.43 * model.species.Pc)
    q = model.flash({"u": p.u, "h": p.h})
    assert q.u == pytest.approx(p.u, abs=1e-9 * R * p.T)
    assert q.h == pytest.approx(p.h, abs=1e-9 * R * p.T)
    assert q.v > 1.01 * p.v
    assert q.phase == "gas"
