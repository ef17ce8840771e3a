"""Flow through a restriction and a lumped wall, against outside sources.

- Choked and subcritical flow of an ideal gas of constant cp: the closed forms of isentropic
  nozzle flow, G* = P0 sqrt(γ M/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1))) and the Saint-Venant–Wantzel
  flux G = P0 sqrt(2γ/(γ-1) M/(R T0) (r^(2/γ) - r^((γ+1)/γ))), with the critical pressure ratio
  (2/(γ+1))^(γ/(γ-1)) (Shapiro, The Dynamics and Thermodynamics of Compressible Fluid Flow,
  1953, vol. 1, ch. 4);
- the real-gas nozzle on the reference model against CoolProp 8.0 HEOS isentropic (P, s) flashes
  computed here, G maximised over the throat pressure by bounded Brent;
- Kv and Cv from their defining conditions (IEC 60534-1: Kv in m3/h of water at 1 bar; Cv in US
  gal/min of water at 60 °F at 1 psi); Kv = 0.865 Cv is the figure engineers quote (from memory);
- the Churchill and Chu (1975) correlation for natural convection on a vertical plate, evaluated
  here by hand at Ra = 1e9, Pr = 0.71, and the transport properties against CoolProp PropsSI.
"""

from __future__ import annotations

import math

import pytest

from balance.balances.transient.gas import tv_function
from balance.balances.transient.nozzle import mass_flux, orifice, valve
from balance.balances.transient.wall import Wall, churchill_chu, film_properties, heat_rates, natural_convection
from balance.state import make_fluid

R = 8.314462618  # J/(mol K), CODATA 2018 (exact since the 2019 SI)
CP_AR = 20.786  # J/(mol K): 5/2 R, a monatomic ideal gas (common practice, no source)


@pytest.fixture(scope="module")
def argon():
    sp, model = make_fluid("Ar", "ideal-gas", {"cp": f"{CP_AR} J/(mol K)"})
    return tv_function(model), sp.M


def test_choked_ideal_gas_flux_and_critical_ratio_are_the_closed_forms(argon):
    tv, M = argon
    T0, P0 = 300.0, 10e5
    g = CP_AR / (CP_AR - R)
    throat = mass_flux(tv, M, T0, R * T0 / P0, 1e5)
    G_star = P0 * math.sqrt(g * M / (R * T0)) * (2 / (g + 1)) ** ((g + 1) / (2 * (g - 1)))
    assert throat.choked
    assert throat.G == pytest.approx(G_star, rel=1e-9)
    assert throat.P / P0 == pytest.approx((2 / (g + 1)) ** (g / (g - 1)), rel=1e-9)
    # the throat at sonic speed: w = sqrt(γ R T / M) at the throat's temperature
    assert throat.w == pytest.approx(math.sqrt(g * R * throat.T / M), rel=1e-9)


@pytest.mark.parametrize("ratio", [0.6, 0.8, 0.95, 0.999])
def test_subcritical_ideal_gas_flux_is_the_saint_venant_wantzel_formula(argon, ratio):
    tv, M = argon
    T0, P0 = 300.0, 10e5
    g = CP_AR / (CP_AR - R)
    throat = mass_flux(tv, M, T0, R * T0 / P0, ratio * P0)
    G = P0 * math.sqrt(2 * g / (g - 1) * M / (R * T0) * (ratio ** (2 / g) - ratio ** ((g + 1) / g)))
    assert not throat.choked
    assert throat.G == pytest.approx(G, rel=1e-9)
    assert throat.P == pytest.approx(ratio * P0, rel=1e-12)


def test_no_flow_at_or_above_the_upstream_pressure_and_a_smooth_flux_across_choking(argon):
    tv, M = argon
    v0 = R * 300.0 / 10e5
    assert mass_flux(tv, M, 300.0, v0, 10e5).G == 0.0 and mass_flux(tv, M, 300.0, v0, 11e5).G == 0.0
    P_star = mass_flux(tv, M, 300.0, v0, 1e5).P
    below, at, above = (mass_flux(tv, M, 300.0, v0, P_star * (1 + e)).G for e in (-1e-7, 0.0, 1e-7))
    assert below == pytest.approx(at, rel=1e-12) and above == pytest.approx(at, rel=1e-12)


@pytest.mark.parametrize("species, fluid, T0, P0", [
    ("N2", "Nitrogen", 300.0, 150e5),
    ("CO2", "CarbonDioxide", 320.0, 40e5),
    ("H2", "Hydrogen", 300.0, 200e5),
])
def test_the_real_gas_nozzle_agrees_with_coolprop_isentropic_flashes(species, fluid, T0, P0):
    import CoolProp.CoolProp as CP
    from scipy.optimize import minimize_scalar

    _, model = make_fluid(species, "reference")
    tv, M = tv_function(model), model.species.M
    AS = CP.AbstractState("HEOS", fluid)  # CoolProp 8.0 HEOS, its own (P, s) flash
    AS.update(CP.PT_INPUTS, P0, T0)
    s0, h0, v0 = AS.smolar(), AS.hmolar(), 1.0 / AS.rhomolar()

    def G(P):
        AS.update(CP.PSmolar_INPUTS, P, s0)
        return AS.rhomass() * math.sqrt(2 * (h0 - AS.hmolar()) / M)

    best = minimize_scalar(lambda P: -G(P), bounds=(0.2 * P0, 0.99 * P0), method="bounded",
                           options={"xatol": 1e-6 * P0})
    throat = mass_flux(tv, M, T0, v0, 1e5)
    assert throat.choked
    assert throat.G == pytest.approx(-best.fun, rel=1e-7)
    assert throat.P == pytest.approx(best.x, rel=1e-4)  # G is flat at its maximum
    sub = mass_flux(tv, M, T0, v0, 0.9 * P0)  # subcritical: the throat at the back pressure
    assert not sub.choked and sub.G == pytest.approx(G(0.9 * P0), rel=1e-8)


def test_flow_coefficients_from_their_defining_conditions():
    # Kv: 1 m3/h of water (1000 kg/m3) at 1 bar: Cd A = Kv sqrt(ρ0 / (2 ΔP0)) with Kv in m3/s
    assert valve(Kv=1.0).CdA == pytest.approx(1.0 / 3600.0 * math.sqrt(1000.0 / 2e5), rel=1e-12)
    # Kv = 0.865 Cv (from memory; the two definitions give 0.8650 to four digits)
    assert valve(Cv=1.0).CdA / valve(Kv=1.0).CdA == pytest.approx(0.865, abs=5e-4)
    assert orifice(0.006, 0.62).CdA == pytest.approx(0.62 * math.pi * 0.006 ** 2 / 4, rel=1e-15)
    with pytest.raises(ValueError):
        orifice(0.006, 1.2)
    assert "x_T of IEC 60534-2-1" in valve(Kv=1.0).words


def test_churchill_and_chu_by_hand_and_transport_from_coolprop():
    # by hand, Ra = 1e9, Pr = 0.71: ψ = [1 + (0.492/0.71)^(9/16)]^(8/27) = 1.2155...; Nu = (0.825 + 0.387·31.62/ψ)²
    psi = (1 + (0.492 / 0.71) ** (9 / 16)) ** (8 / 27)
    assert churchill_chu(1e9, 0.71) == pytest.approx((0.825 + 0.387 * 1e9 ** (1 / 6) / psi) ** 2, rel=1e-14)
    assert 100 < churchill_chu(1e9, 0.71) < 130  # about 113 (the correlation's own tables, from memory)
    import CoolProp.CoolProp as CP

    _, model = make_fluid("N2", "peng-robinson")
    rho, cp, beta, mu, k = film_properties(model.species, 300.0, 20e5)
    assert mu == pytest.approx(CP.PropsSI("V", "T", 300.0, "P", 20e5, "Nitrogen"), rel=1e-12)
    assert k == pytest.approx(CP.PropsSI("L", "T", 300.0, "P", 20e5, "Nitrogen"), rel=1e-12)
    h, words = natural_convection(model, 250.0, 20e5, 290.0, 2.0)
    # the same by hand from CoolProp's properties at the film temperature, 270 K
    props = {k: CP.PropsSI(k, "T", 270.0, "P", 20e5, "Nitrogen") for k in ("D", "C", "V", "L",
                                                                         "isobaric_expansion_coefficient")}
    Ra = (9.80665 * props["isobaric_expansion_coefficient"] * 40.0 * 2.0 ** 3 * props["D"] ** 2 * props["C"]
          / (props["V"] * props["L"]))
    Pr = props["C"] * props["V"] / props["L"]
    assert h == pytest.approx(churchill_chu(Ra, Pr) * props["L"] / 2.0, rel=1e-9)
    assert "Churchill and Chu" in words


def test_the_wall_splits_its_heat_between_the_gas_and_itself():
    wall = Wall(mass=800.0, cp=480.0, area=6.0, h_inside=30.0, height=2.0, h_outside=5.0, T_ambient=293.15,
                fire_flux=20e3)
    Q, dT = heat_rates(wall, T_gas=250.0, T_wall=280.0, h_in=30.0)
    assert Q == pytest.approx(30.0 * 6.0 * 30.0)
    outside = 5.0 * 6.0 * (293.15 - 280.0) + 20e3 * 6.0
    assert dT == pytest.approx((outside - Q) / (800.0 * 480.0))
