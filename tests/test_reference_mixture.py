"""The reference model for mixtures against CoolProp itself, the ideal-gas mixture model and
thermodynamic identities.

Sources of the check values, named beside each check:

* "CoolProp 8.0 PropsSI": the same library through its high-level interface, with the
  mixture given as ``HEOS::Methane[0.905]&Ethane[0.048]&...`` (its own full phase-stability
  flash at every call), so these tests check joulebook's wrapping (the shift of u, h, s, the
  departures, the searches, the fast stability path, the refusals), not the EOS;
* "CoolProp 8.0 binary table": ``get_mixture_binary_pair_data``, which raises for a pair it
  has no parameters for (in either order of the two CAS numbers);
* "ideal-gas mixture model": ``make_model("ideal-gas", mixture)``, whose cp° comes from the
  species data's NASA polynomials; the reference model's ideal-gas parts are the components'
  own EOS (through pure-fluid PropsSI), so away from 298.15 K the two differ by the two cp°
  sources, which the test computes rather than allows for by a loose tolerance;
* identities: h = u + P v, cp = (∂h/∂T)_P, g_dep = R T Σ yi ln φi.

The shift (the reference state: each component's ideal gas at 298.15 K and 1 bar):

    h_joulebook = h_CoolProp - h0,  h0 = Hmolar_idealgas(298.15 K, ρ = 1 bar/(R 298.15 K))
    s_joulebook = s_CoolProp - s0,  s0 = Smolar_idealgas(298.15 K, same ρ) + R Σ yi ln yi
    u_joulebook = u_CoolProp - h0

(CoolProp's ideal-gas entropy of the mixture includes the mixing term -R Σ y ln y, which the
joulebook basis keeps, so s0 adds it back.)
"""

from __future__ import annotations

import math
import pickle
import subprocess
import sys

import CoolProp.CoolProp as CP
import pytest

from balance.errors import InputError, TwoPhaseError
from balance.mixture import bundled_mixture, mixture, read_composition
from balance.models import make_model
from balance.models.reference import ReferenceMixture
from balance.species import lookup
from balance.units import P_REF, T_REF, R
from tests.helpers import ROOT

NG = bundled_mixture("hpp-natural-gas")
#: a gas rich in propane and butane, whose dew line lies near ambient at pipeline pressures
RICH = mixture(read_composition({"CH4": "0.80", "C2H6": "0.10", "C3H8": "0.06", "nC4H10": "0.04"}), "rich gas")


def heos(sp) -> str:
    """The mixture as PropsSI reads it: HEOS::Methane[0.905]&Ethane[0.048]&..."""
    return "HEOS::" + "&".join(f"{lookup(i).coolprop}[{y!r}]" for i, y in sp.composition)


def props(out: str, a: str, va: float, b: str, vb: float, sp=NG) -> float:
    return CP.PropsSI(out, a, va, b, vb, heos(sp))


def shift(sp=NG) -> tuple[float, float]:
    """(h0, s0) of the module docstring, from CoolProp 8.0 PropsSI."""
    rho = P_REF / (R * T_REF)
    mixing = -R * sum(y * math.log(y) for _, y in sp.composition)
    return (props("Hmolar_idealgas", "T", T_REF, "Dmolar", rho, sp),
            props("Smolar_idealgas", "T", T_REF, "Dmolar", rho, sp) - mixing)


def close(a: float, b: float, rel: float, abs_: float = 0.0) -> bool:
    return abs(a - b) <= max(rel * max(abs(a), abs(b)), abs_)


@pytest.fixture(scope="module")
def ng() -> ReferenceMixture:
    return make_model("reference", NG)


# -- states against CoolProp PropsSI ---------------------------------------------------------
#: (T [K], P [Pa], phase): gas, dense supercritical, liquid (CoolProp's full stability test on
#: the liquid side), a gas 6 K above the dew line at 40 bar, and a dilute gas
STATES = [
    (300.0, 1e5, "gas"),
    (300.0, 5e6, "gas"),
    (250.0, 10e6, "supercritical"),
    (350.0, 20e6, "supercritical"),
    (450.0, 1e6, "gas"),
    (160.0, 3e6, "liquid"),
    (230.0, 4e6, "gas"),
]


@pytest.mark.parametrize("T, P, phase", STATES)
def test_natural_gas_h_s_v_against_coolprop(ng, T, P, phase):
    """Source: CoolProp 8.0 PropsSI, same mole fractions, with the shift of the module docstring."""
    h0, s0 = shift()
    p = ng.at_TP(T, P)
    assert p.phase == phase
    assert close(p.v, 1.0 / props("Dmolar", "T", T, "P", P), 1e-9)
    assert close(p.h, props("Hmolar", "T", T, "P", P) - h0, 1e-9, 1e-6)
    assert close(p.u, props("Umolar", "T", T, "P", P) - h0, 1e-9, 1e-6)
    assert close(p.s, props("Smolar", "T", T, "P", P) - s0, 1e-9, 1e-9)
    assert close(p.cp, props("Cpmolar", "T", T, "P", P), 1e-9)
    assert close(p.cv, props("Cvmolar", "T", T, "P", P), 1e-9)
    # the shift itself, as the record prints it
    assert close(ng._c.h0, h0, 1e-12) and close(ng._c.s0, s0, 1e-12)


def test_the_fast_stability_path_agrees_with_coolprops_full_flash(ng):
    """Source: CoolProp 8.0's full phase-stability flash at (T, P), on an AbstractState of its
    own (as PropsSI flashes; one state read twice): on a grid of (T, P) the model's state (often
    decided from the phase envelope without CoolProp's test) has CoolProp's density, and is
    refused exactly where CoolProp reports two phases."""
    AS = CP.AbstractState("HEOS", ng.fluid)
    AS.set_mole_fractions(list(ng.y))
    wet = clear = 0
    for T in (200.0, 215.0, 226.0, 240.0, 260.0, 300.0):
        for P in (2e5, 1e6, 3e6, 5e6, 7e6, 1.5e7):
            clear += T >= ng._c.T_solid and ng._c.envelope.clear_of(T, P)
            AS.update(CP.PT_INPUTS, P, T)
            if AS.phase() == CP.iphase_twophase:
                wet += 1
                with pytest.raises(TwoPhaseError):
                    ng.at_TP(T, P)
            else:
                assert close(ng.at_TP(T, P).v, 1.0 / AS.rhomolar(), 1e-9), (T, P)
    assert wet > 0 and 0 < clear < 36  # the grid reaches into the envelope, and takes both paths


def test_dense_gas_is_supercritical_not_liquid(ng):
    """A 200-bar cylinder of natural gas at 300 K is labelled supercritical (CoolProp's own label
    for it is liquid: its density exceeds the mixture's reducing density), so a vessel takes it.
    Source: CoolProp 8.0's phase envelope (the critical point the label is measured from)."""
    Tc, Pc, _, source = ng._c.critical
    assert source == "CoolProp's phase envelope" and 200.0 < Tc < 215.0 and 5e6 < Pc < 7e6
    assert ng.at_TP(300.0, 2e7).phase == "supercritical"


# -- the basis: the ideal-gas mixture model at low pressure -------------------------------------
def test_low_pressure_limit_at_298_is_the_ideal_gas_mixture(ng):
    """Source: the ideal-gas mixture model: at 298.15 K both measure h and s from the same
    zero, so a dilute gas agrees to 1e-4 (h, which is 0 there, to 1e-4 R T)."""
    ig = make_model("ideal-gas", NG)
    for P in (1.0, 100.0):
        p, q = ng.at_TP(T_REF, P), ig.at_TP(T_REF, P)
        assert abs(p.h - q.h) <= 1e-4 * R * T_REF
        assert close(p.s, q.s, 1e-4) and close(p.v, q.v, 1e-4)
    # and the entropy of mixing is kept: at 298.15 K and 1 bar s = -R Σ y ln y + s_dep
    p = ng.at_TP(T_REF, P_REF)
    assert close(p.s - p.s_dep, -R * sum(y * math.log(y) for _, y in NG.composition), 1e-4)


@pytest.mark.parametrize("T", [250.0, 400.0, 500.0, 600.0])
def test_low_pressure_limit_elsewhere_differs_by_the_cp_sources_only(ng, T):
    """Source: the ideal-gas mixture model, corrected by the difference of the two cp° sources
    computed from CoolProp 8.0 PropsSI on each pure component (a dilute gas, its own EOS's
    ideal-gas part) and the species data's polynomials; the correction itself is up to ~1e-3 of h."""
    ig = make_model("ideal-gas", NG)
    P, dilute = 1.0, 1e-3
    p, q = ng.at_TP(T, P), ig.at_TP(T, P)
    dh = ds = 0.0
    for sid, y in NG.composition:
        sp = lookup(sid)
        fluid = "HEOS::" + sp.coolprop
        Ri = CP.PropsSI("gas_constant", fluid)

        def eos(out, T_, fluid=fluid, Ri=Ri):  # ideal-gas h°, s°(1 bar) of the component's EOS
            value = CP.PropsSI(out, "T", T_, "P", dilute, fluid)
            return value + (Ri * math.log(dilute / P_REF) if out == "Smolar" else 0.0)

        dh += y * (eos("Hmolar", T) - eos("Hmolar", T_REF) - sp.cp_ig.h(T))
        ds += y * (eos("Smolar", T) - eos("Smolar", T_REF) - sp.cp_ig.s(T))
    assert close(p.v, q.v, 1e-4)
    assert close(p.h, q.h + dh, 1e-4)
    assert close(p.s, q.s + ds, 1e-4)


# -- the input pairs -------------------------------------------------------------------------
ROUND_TRIP = [(300.0, 5e6), (250.0, 10e6), (450.0, 1e6), (350.0, 20e6), (160.0, 3e6), (230.0, 4e6)]


@pytest.mark.parametrize("T, P", ROUND_TRIP)
def test_P_h_and_P_s_round_trips(ng, T, P):
    """A state at (T, P), then at (P, h) and (P, s), returns T to 1e-8 (identity of the model)."""
    p = ng.at_TP(T, P)
    for key in ("h", "s"):
        q = ng.flash({"P": P, key: p.get(key)})
        assert close(q.T, T, 1e-8), key
        assert close(q.v, p.v, 1e-7), key


def test_letdown_and_compression_against_coolprops_own_solvers(ng):
    """Source: CoolProp 8.0 PropsSI with its own mixture (P, h) and (P, s) solvers (HmolarP and
    PSmolar, about 0.7 s each): a valve from 12 °C and 56 bar(a) to 7 bar(a) (the fuel-gas
    letdown sample's streams), and an isentropic compression of the header gas back to 56 bar(a)."""
    h0, s0 = shift()
    supply = ng.at_TP(285.15, 56.01325e5)
    header = ng.flash({"P": 7.01325e5, "h": supply.h})
    assert close(header.T, props("T", "P", 7.01325e5, "Hmolar", supply.h + h0), 1e-8)
    back = ng.flash({"P": 56.01325e5, "s": header.s})
    assert close(back.T, props("T", "P", 56.01325e5, "Smolar", header.s + s0), 1e-8)


@pytest.mark.parametrize("T, P", ROUND_TRIP[:4])
def test_closed_vessel_v_u_and_other_pairs_round_trip(ng, T, P):
    """v-u (the closed vessel), P-v, T-v, T-s and v-h return the (T, P) state (identity)."""
    p = ng.at_TP(T, P)
    for specs in ({"v": p.v, "u": p.u}, {"P": P, "v": p.v}, {"T": T, "v": p.v}, {"T": T, "s": p.s},
                  {"v": p.v, "h": p.h}):
        q = ng.flash(specs)
        assert close(q.T, T, 1e-8) and close(q.P, P, 1e-7), specs


def test_T_h_takes_the_largest_volume_and_names_the_other(ng):
    """At 300 K, h falls with P and rises again above the Joule-Thomson inversion: two states
    meet (T, h); the rule of every model takes the larger volume and its note names the other."""
    p = ng.at_TP(300.0, 5e6)
    q = ng.flash({"T": 300.0, "h": p.h})
    assert close(q.P, 5e6, 1e-8)
    assert q.note.startswith("2 states have T = 300 K")


def test_identities(ng):
    """h = u + P v; cp = (∂h/∂T)_P by central difference; g_dep/(R T) = Σ yi ln φi with the
    φi from CoolProp 8.0's low-level AbstractState at the same state."""
    AS = CP.AbstractState("HEOS", ng.fluid)
    AS.set_mole_fractions(list(ng.y))
    for T, P, _ in STATES:
        p = ng.at_TP(T, P)
        assert close(p.h, p.u + p.P * p.v, 1e-12, 1e-9)
        dT = 1e-3
        assert close(p.cp, (ng.at_TP(T + dT, P).h - ng.at_TP(T - dT, P).h) / (2 * dT), 1e-6)
        AS.update(CP.PT_INPUTS, P, T)
        ln_phi = sum(y * math.log(AS.fugacity_coefficient(i)) for i, y in enumerate(ng.y))
        assert close(p.ln_phi, ln_phi, 1e-8, 1e-10)
        assert close(p.Z, P * p.v / (ng._c.R * T), 1e-10)


# -- refusals ----------------------------------------------------------------------------------
def _no_pair(a: str, b: str) -> bool:
    """Source: CoolProp 8.0 binary table; True when it has no parameters for the pair."""
    ca, cb = lookup(a).cas, lookup(b).cas
    for x, y in ((ca, cb), (cb, ca)):
        try:
            CP.get_mixture_binary_pair_data(x, y, "betaT")
            return False
        except ValueError:
            pass
    return True


def test_a_pair_without_parameters_is_refused_naming_every_such_pair():
    """Source: CoolProp 8.0 binary table: argon with R134a and methane with R134a have none;
    methane with argon has (GERG-2008)."""
    assert _no_pair("Ar", "R134a") and _no_pair("CH4", "R134a") and not _no_pair("CH4", "Ar")
    sp = mixture(read_composition({"CH4": "0.5", "Ar": "0.3", "R134a": "0.2"}))
    with pytest.raises(InputError) as err:
        make_model("reference", sp)
    assert err.value.field == "fluid.model"
    message = err.value.message
    assert "CoolProp has no binary parameters for the pairs CH4–R134a, Ar–R134a" in message
    assert "CH4–Ar" not in message
    assert "choose a cubic (with kij) or ideal-gas" in message


def test_hydrogen_sulfide_with_ammonia_is_refused():
    """Source: CoolProp 8.0 binary table: no H2S-NH3 pair."""
    assert _no_pair("H2S", "NH3")
    sp = mixture(read_composition({"H2S": "0.5", "NH3": "0.5"}))
    with pytest.raises(InputError, match="for the pair H2S–NH3 "):
        make_model("reference", sp)


def test_a_component_without_a_coolprop_name_is_refused():
    """NO has no CoolProp name in the species data (its reference EOS is not in CoolProp 8.0)."""
    assert lookup("NO").coolprop is None
    sp = mixture(read_composition({"N2": "0.9", "NO": "0.1"}))
    with pytest.raises(InputError) as err:
        make_model("reference", sp)
    assert err.value.field == "fluid.model"
    assert "NO (" in err.value.message and "the cubic models (with kij) and ideal-gas take" in err.value.message


def test_a_two_phase_rich_gas_is_refused_with_its_dew_point():
    """Source: CoolProp 8.0 PropsSI: the rich gas at 250 K and 30 bar is two-phase, and its dew
    and bubble points at 30 bar are its PQ flash with Q = 1 and Q = 0."""
    m = make_model("reference", RICH)
    T, P = 250.0, 3e6
    assert props("Phase", "T", T, "P", P, RICH) == CP.get_phase_index("phase_twophase")
    dew, bubble = props("T", "P", P, "Q", 1, RICH), props("T", "P", P, "Q", 0, RICH)
    with pytest.raises(TwoPhaseError) as err:
        m.at_TP(T, P)
    assert f"its dew point is {dew:.6g} K, its bubble point {bubble:.6g} K" in err.value.message
    assert "single-phase mixture states only" in err.value.message
    # a search that lands inside the envelope is refused the same way
    h_dew = props("Hmolar", "P", P, "Q", 1, RICH) - shift(RICH)[0]
    with pytest.raises(TwoPhaseError, match=f"dew point is {dew:.6g} K"):
        m.flash({"P": P, "h": h_dew - 500.0})
    # just outside, on the gas side, the state is given with a warning of the envelope nearby
    p = m.at_TP(dew + 2.0, P)
    assert p.phase == "gas" and any("phase envelope" in w for w in m.warnings(p))


def test_results_do_not_depend_on_call_order():
    """A liquid state (CoolProp's full test) and a P-h search give the same bits whatever the
    model's CoolProp state computed before, two-phase refusals included."""
    first = ReferenceMixture(NG)
    a1 = first.at_TP(160.0, 3e6).as_dict(), first.flash({"P": 3e6, "h": -12000.0}).as_dict()
    for specs in ({"T": 180.0, "P": 2e6}, {"T": 210.0, "P": 5.5e6}, {"P": 2e6, "h": -8000.0}, {"T": 300.0, "P": 5e6}):
        try:
            first.flash(specs)
        except TwoPhaseError:
            pass
    a2 = first.at_TP(160.0, 3e6).as_dict(), first.flash({"P": 3e6, "h": -12000.0}).as_dict()
    fresh = ReferenceMixture(NG)
    a3 = fresh.at_TP(160.0, 3e6).as_dict(), fresh.flash({"P": 3e6, "h": -12000.0}).as_dict()
    assert a1 == a2 == a3


def test_below_coolprops_lowest_temperature_is_refused(ng):
    with pytest.raises(InputError, match="is below 91.4.* K, the lowest temperature CoolProp gives"):
        ng.at_TP(50.0, 1e5)


def test_quality_is_not_an_input(ng):
    with pytest.raises(InputError, match="quality x needs a model with two phases"):
        ng.flash({"T": 200.0, "x": 0.5})


# -- the model as an object ----------------------------------------------------------------------
def test_pickles_before_and_after_use():
    """The app solves in another process: a model crosses it unused and used."""
    fresh = make_model("reference", RICH)
    before = pickle.loads(pickle.dumps(fresh))
    assert before.at_TP(300.0, 5e6) == fresh.at_TP(300.0, 5e6)
    after = pickle.loads(pickle.dumps(fresh))
    assert after._state is None
    assert after.flash({"P": 5e6, "h": fresh.at_TP(320.0, 5e6).h}).T == pytest.approx(320.0, rel=1e-10)
    assert after.equations() == fresh.equations() and after.reference_state == fresh.reference_state


def test_a_used_model_is_read_in_another_process_without_coolprop(ng, tmp_path):
    ng.at_TP(300.0, 5e6)
    path = tmp_path / "model.pickle"
    path.write_bytes(pickle.dumps(ng))
    code = ("import pickle, sys; m = pickle.loads(open(sys.argv[1], 'rb').read()); "
            "m.equations(); m.reference_state; m.T_bounds(); print('CoolProp' in sys.modules, m.name)")
    out = subprocess.run([sys.executable, "-c", code, str(path)], cwd=ROOT, capture_output=True, text=True,
                         check=True)
    assert out.stdout.split() == ["False", "reference"]


def test_importing_the_model_does_not_import_coolprop():
    code = "import sys; import balance.models.reference.mixture; print('CoolProp' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_the_facade_builds_it():
    from balance.state import make_fluid

    sp, model = make_fluid("hpp-natural-gas", "reference")
    assert isinstance(model, ReferenceMixture) and sp.composition == NG.composition
    assert model.label.startswith("reference mixture (CoolProp HEOS, GERG-type mixing: CH4 0.905, C2H6 0.048")


def test_record_words_name_what_coolprop_uses(ng):
    """Source: CoolProp 8.0 binary table: the methane-ethane pair is Kunz and Wagner's
    (Kunz-JCED-2012) with its own departure function; CO2-N2 is Gernert's."""
    lines = "\n".join(ng.equations())
    assert CP.get_mixture_binary_pair_data("74-82-8", "74-84-0", "BibTeX") == "Kunz-JCED-2012"
    assert "CH4-C2H6 (Kunz-JCED-2012)" in lines and "departure function Methane-Ethane, F = 1" in lines
    assert "CO2-N2 (Gernert-Thesis-2013)" in lines
    assert "CO2-C2H6 (Kunz-JCED-2012)" in lines and "no departure function (F = 0)" in lines
    assert "298.15 K and 1 bar" in ng.reference_state
    lo, hi = ng.T_bounds()
    assert lo == pytest.approx(CP.PropsSI("Tmin", heos(NG))) and hi == pytest.approx(CP.PropsSI("Tmax", heos(NG)))
