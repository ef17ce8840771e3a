"""Cubic mixtures: the one-fluid mixing rules, the stability test, the flash and the dew and
bubble points, each against an outside source.

Sources of the check values:

* "CoolProp 8.0 PR/SRK backend": ``AbstractState("PR", "Methane&Ethane&...")`` with the same mole
  fractions and ``set_binary_interaction_double(i, j, "kij", k)``, evaluated at our density (no
  root choice on their side). The components are built from *that backend's own* Tc, Pc and ω, so
  both sides evaluate the same equation; residual properties are compared as in
  tests/test_cubic_vs_coolprop.py (h_dep = hmolar_residual; s_dep = smolar_residual + R ln Z).
* "thermo 0.6.1 FlashVL": the thermo package's vapour-liquid flash over its PRMIX equation of state,
  given the same Tc, Pc, ω and kij: vapour fraction, phase compositions, dew and bubble points.
* "CoolProp 8.0 HEOS": the reference mixture equations (GERG-type), for the cubic's density error.
* Closed forms: the entropy of mixing ideal gases, h = u + P v, cp = (∂h/∂T)_P.
"""

from __future__ import annotations

import math
from dataclasses import replace

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from balance import api
from balance.errors import InputError, TwoPhaseError
from balance.mixture import bundled_mixture, mixture
from balance.models import make_model
from balance.models.cubic import FORMS
from balance.models.cubic.mixing import CubicMixture
from balance.models.cubic.phases import envelope_at_P, envelope_at_T, split_at, stability, stability_many
from balance.species import lookup
from balance.units import P_REF, R

GAS = "hpp-natural-gas"
BACKENDS = {"PR": "peng-robinson", "SRK": "soave-redlich-kwong"}


def _coolprop_mixture(backend: str, model: CubicMixture):
    state = CP.AbstractState(backend, "&".join(sp.coolprop for sp in model.components))
    state.set_mole_fractions(list(model.z))
    k = 1.0 - model.mixing.M
    for i in range(len(model.z)):
        for j in range(i + 1, len(model.z)):
            if k[i, j]:
                state.set_binary_interaction_double(i, j, "kij", float(k[i, j]))
    return state


def _on_backend_constants(backend: str, name: str) -> CubicMixture:
    """The bundled mixture, its components' Tc, Pc and ω taken from the CoolProp cubic backend."""
    sp = bundled_mixture(name)
    parts = []
    for i, _ in sp.composition:
        c = lookup(i)
        pure = CP.AbstractState(backend, c.coolprop)
        parts.append(replace(c, Tc=pure.T_critical(), Pc=pure.p_critical(), omega=pure.acentric_factor()))
    return CubicMixture(sp, FORMS[BACKENDS[backend]], components=tuple(parts))


@pytest.mark.parametrize("backend", sorted(BACKENDS))
@pytest.mark.parametrize("name", [GAS, "dry-air"])
@pytest.mark.parametrize("T, P", [(300.0, 50e5), (250.0, 20e5), (400.0, 150e5), (330.0, 1e5)])
def test_residual_properties_agree_with_coolprop_cubic_backends(backend, name, T, P):
    m = _on_backend_constants(backend, name)
    p = m.at_TP(T, P)
    cp = _coolprop_mixture(backend, m)
    cp.update(CP.DmolarT_INPUTS, 1.0 / p.v, T)
    # source: CoolProp 8.0 PR/SRK backend, same constants and kij
    assert cp.p() == pytest.approx(P, rel=1e-6)  # Z = P v / R T to 1e-6
    assert p.h_dep == pytest.approx(cp.hmolar_residual(), rel=1e-6, abs=1e-6 * R * T)
    assert p.s_dep == pytest.approx(cp.smolar_residual() + R * math.log(p.Z), rel=1e-6, abs=1e-6 * R)
    ln_phi = m.mixing.ln_phi(T, P, m.z)[0]
    for i in range(len(m.z)):
        assert ln_phi[i] == pytest.approx(math.log(cp.fugacity_coefficient(i)), abs=1e-6)


def test_the_vectorised_path_equals_the_scalar_path():
    """One formula set, two paths (common practice, no source): to 1e-12."""
    m = make_model("pr", bundled_mixture(GAS))
    T = np.array([260.0, 300.0, 350.0, 420.0])
    P = np.array([5e5, 40e5, 90e5, 200e5])
    arrays = m.states_TP(T, P)
    for k in range(T.size):
        p = m.at_TP(float(T[k]), float(P[k]))
        for key in ("v", "h", "s", "cp", "Z"):
            assert arrays[key][k] == pytest.approx(getattr(p, key), rel=1e-12)
    assert arrays["stable"].all()
    lnphi, Z = m.mixing.ln_phi_many(T, P, np.repeat(m.z[:, None], T.size, axis=1))
    for k in range(T.size):
        assert lnphi[:, k] == pytest.approx(m.mixing.ln_phi(float(T[k]), float(P[k]), m.z)[0], rel=1e-12, abs=1e-14)


def test_at_low_pressure_the_mixture_is_the_ideal_gas_mixture_with_its_entropy_of_mixing():
    """Closed form: s = Σ y s°ᵢ(T) - R Σ y ln y - R ln(P/P°), h = Σ y h°ᵢ(T), as P -> 0."""
    components = ((lookup("CH4"), 0.6), (lookup("N2"), 0.3), (lookup("CO2"), 0.1))
    m = make_model("pr", mixture(components))
    T, P = 320.0, 10.0
    p = m.at_TP(T, P)
    s_mix = sum(y * sp.cp_ig.s(T) for sp, y in components) - R * sum(y * math.log(y) for _, y in components)
    assert p.s == pytest.approx(s_mix - R * math.log(P / P_REF), abs=1e-5)
    assert p.h == pytest.approx(sum(y * sp.cp_ig.h(T) for sp, y in components), abs=1e-2)  # h_dep ~ P (b - 2a/RT)


@pytest.mark.parametrize("T, P", [(300.0, 50e5), (240.0, 80e5)])
def test_identities_hold_in_the_mixture(T, P):
    """h = u + P v and cp = (∂h/∂T)_P (common practice, no source)."""
    m = make_model("srk", bundled_mixture(GAS))
    p = m.at_TP(T, P)
    assert p.h == pytest.approx(p.u + p.P * p.v, rel=1e-12, abs=1e-9)
    dT = 1e-3
    assert p.cp == pytest.approx((m.at_TP(T + dT, P).h - m.at_TP(T - dT, P).h) / (2 * dT), rel=1e-6)


# -- phases against thermo's flash -----------------------------------------------------------------
@pytest.fixture(scope="module")
def thermo_flash():
    thermo = pytest.importorskip("thermo")
    from thermo.heat_capacity import HeatCapacityGas

    m = make_model("pr", bundled_mixture(GAS))
    mx = m.mixing
    n = len(m.z)
    constants = thermo.ChemicalConstantsPackage(Tcs=list(mx.Tc), Pcs=list(mx.Pc), omegas=list(mx.omega),
                                                MWs=[c.M * 1e3 for c in m.components],
                                                CASs=[c.cas for c in m.components])
    cp = [HeatCapacityGas(poly_fit=(50.0, 1000.0, [0.0] * 9 + [30.0])) for _ in range(n)]  # unused by T-P flashes
    correlations = thermo.PropertyCorrelationsPackage(constants, HeatCapacityGases=cp, skip_missing=True)
    eos = dict(Tcs=list(mx.Tc), Pcs=list(mx.Pc), omegas=list(mx.omega), kijs=[list(map(float, r)) for r in 1.0 - mx.M])
    gas = thermo.CEOSGas(thermo.PRMIX, eos, HeatCapacityGases=cp)
    liquid = thermo.CEOSLiquid(thermo.PRMIX, eos, HeatCapacityGases=cp)
    return m, thermo.FlashVL(constants, correlations, liquid=liquid, gas=gas)


@pytest.mark.parametrize("T, P", [(200.0, 30e5), (190.0, 10e5), (215.0, 45e5)])
def test_the_isothermal_flash_agrees_with_thermo(thermo_flash, T, P):
    m, flasher = thermo_flash
    split = split_at(m.mixing, T, P, m.z)
    ref = flasher.flash(T=T, P=P, zs=list(m.z))  # source: thermo 0.6.1 FlashVL over PRMIX
    assert split is not None and ref.VF is not None and 0.0 < ref.VF < 1.0
    assert split.beta == pytest.approx(ref.VF, abs=1e-6)
    assert split.x == pytest.approx(list(ref.liquid0.zs), abs=1e-6)
    assert split.y == pytest.approx(list(ref.gas.zs), abs=1e-6)


@pytest.mark.parametrize("P", [10e5, 30e5, 50e5])
def test_dew_and_bubble_temperatures_agree_with_thermo(thermo_flash, P):
    m, flasher = thermo_flash
    bubble, dew = envelope_at_P(m.mixing, P, m.z)
    z = list(m.z)
    # source: thermo 0.6.1 FlashVL over PRMIX, VF = 1 (dew) and VF = 0 (bubble)
    assert dew.kind == "dew point" and dew.value == pytest.approx(flasher.flash(P=P, VF=1, zs=z).T, abs=1e-4)
    assert bubble.kind == "bubble point" and bubble.value == pytest.approx(flasher.flash(P=P, VF=0, zs=z).T, abs=1e-4)


def test_dew_pressures_along_an_isotherm_agree_with_thermo(thermo_flash):
    m, flasher = thermo_flash
    T = 215.0
    lower, upper = envelope_at_T(m.mixing, T, m.z)
    # at 215 K this gas is retrograde (below the cricondentherm, above the critical point): two dew points
    assert lower.kind == "dew point" and upper.kind == "dew point"
    ref = flasher.flash(T=T, VF=1, zs=list(m.z)).P  # source: thermo 0.6.1 FlashVL, the lower dew point
    assert lower.value == pytest.approx(ref, rel=1e-5)


def test_stability_of_many_states_equals_the_scalar_test():
    m = make_model("pr", bundled_mixture(GAS))
    T = np.array([300.0, 200.0, 215.0, 230.0, 190.0, 160.0])
    P = np.array([50e5, 30e5, 45e5, 20e5, 10e5, 60e5])
    many = stability_many(m.mixing, T, P, m.z)
    assert list(many) == [stability(m.mixing, float(t), float(p), m.z).stable for t, p in zip(T, P)]
    assert not many.all() and many.any()


# -- the model in a balance ------------------------------------------------------------------------
def test_a_state_inside_the_envelope_is_refused_with_the_flash_and_the_dew_point():
    m = make_model("pr", bundled_mixture(GAS))
    with pytest.raises(TwoPhaseError) as caught:
        m.flash({"T": 200.0, "P": 30e5}, "final")
    text = caught.value.message
    assert caught.value.field == "final"
    assert "vapour fraction 0.9495" in text and "dew point T = 221.65" in text and "bubble point" in text
    with pytest.raises(TwoPhaseError):  # the same by another pair: (P, h) of that state's one-phase root
        m.flash({"P": 30e5, "h": m.at_TP_one_phase(200.0, 30e5).h}, "final")


def test_a_gas_state_by_other_pairs_round_trips():
    m = make_model("pr", bundled_mixture(GAS))
    p = m.at_TP(290.0, 60e5)
    for pair in (("P", "h"), ("P", "s"), ("v", "u"), ("T", "v"), ("h", "s")):
        q = m.flash({k: getattr(p, k) for k in pair})
        assert q.T == pytest.approx(p.T, rel=1e-8) and q.v == pytest.approx(p.v, rel=1e-8)


def test_the_natural_gas_density_is_within_the_cubic_s_usual_error_of_the_reference_mixture():
    """PR's natural-gas densities lie within a few per cent of GERG-type equations (from memory);
    checked against CoolProp 8.0 HEOS at 4 %."""
    m = make_model("pr", bundled_mixture(GAS))
    heos = CP.AbstractState("HEOS", "&".join(sp.coolprop for sp in m.components))
    heos.set_mole_fractions(list(m.z))
    for T, P in ((280.0, 20e5), (300.0, 70e5), (320.0, 100e5)):
        heos.update(CP.PT_INPUTS, P, T)
        assert 1.0 / m.at_TP(T, P).v == pytest.approx(heos.rhomolar(), rel=0.04)


def test_kij_given_in_the_worksheet_change_the_state_and_show_in_the_equations():
    sp, bundled = api.fluid(GAS, "peng-robinson")
    from balance.state import make_fluid

    _, given = make_fluid(GAS, "peng-robinson", kij={"CH4-CO2": "0.2"})
    assert given.at_TP(300.0, 80e5).v != bundled.at_TP(300.0, 80e5).v
    assert any("CH4-CO2  kij = 0.2  (given in the worksheet)" in line for line in given.equations())
    with pytest.raises(InputError) as caught:
        make_fluid(GAS, "peng-robinson", kij={"CH4-H2S": "0.1"})
    assert caught.value.field == "fluid.kij.CH4-H2S" and "not a component" in caught.value.message
    with pytest.raises(InputError) as caught:
        make_fluid("CH4", "peng-robinson", kij={"CH4-CO2": "0.1"})
    assert caught.value.field == "fluid.kij"


def test_a_missing_kij_is_said_beside_the_state():
    components = ((lookup("CH4"), 0.95), (lookup("H2S"), 0.05))  # CH4-H2S is not in the bundled set
    m = make_model("pr", mixture(components))
    assert any("CH4-H2S" in w and "0 is assumed" in w for w in m.warnings(m.at_TP(300.0, 20e5)))


def test_the_model_pickles_with_its_kij():
    import pickle

    from balance.state import make_fluid

    _, m = make_fluid(GAS, "peng-robinson", kij={"CH4-CO2": "0.2"})
    again = pickle.loads(pickle.dumps(m))
    assert again.at_TP(300.0, 50e5) == m.at_TP(300.0, 50e5) and again.kij == m.kij
