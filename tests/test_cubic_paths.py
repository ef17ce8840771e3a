"""One formula set, two paths: the scalar (plain floats) and vectorised (numpy) cubic agree to 1e-12.

Sources of the check values:

* "the scalar path": ``Cubic.point`` / ``Cubic.at_TP`` in Python floats, and
  ``IdealGasHeatCapacity.terms`` on a float; the vectorised path evaluates
  the same expressions (``balance.models.cubic.formulas``) on arrays, so
  every property must agree to 1e-12 relative (numpy's vector log and sqrt
  may differ from ``math``'s in the last bit: common practice, no source);
* "the equation itself": the volume roots of the scalar path solve
  P(T, v) = P to 1e-9 of v |∂P/∂v|.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from balance.models import make_model
from balance.models.cubic import FORMS, cubic_roots, z_roots
from balance.species import lookup
from balance.units import R

KEYS = ("P", "Z", "u", "h", "s", "cv", "cp", "u_dep", "h_dep", "s_dep", "ln_phi")
SPECIES = ("CH4", "CO2", "N2", "H2O")


def _states(model, n: int, seed: int):
    """(T, v) arrays over gas, liquid and supercritical states outside the dome."""
    rng = np.random.default_rng(seed)
    T, P = rng.uniform(0.45, 3.0, n) * model.Tc_eos, np.exp(rng.uniform(math.log(1e3), math.log(5 * model.Pc_eos), n))
    return T, model.states_TP(T, P)["v"]


@pytest.mark.parametrize("form", list(FORMS))
@pytest.mark.parametrize("sid", SPECIES)
def test_props_Tv_on_arrays_equals_the_scalar_point(form, sid):
    model = make_model(form, lookup(sid))
    T, v = _states(model, 400, seed=11)
    arr = model.props_Tv(T, v)
    for i in range(T.size):
        p = model.point(float(T[i]), float(v[i]), "")
        for key in KEYS:
            scale = R * T[i] if key in ("u", "h", "u_dep", "h_dep") else R if key in ("s", "s_dep") else 0.0
            assert float(arr[key][i]) == pytest.approx(p.get(key), rel=1e-12, abs=1e-12 * scale), (key, T[i], v[i])


@pytest.mark.parametrize("form", list(FORMS))
def test_states_TP_in_chunks_equals_at_TP(form):
    """Arrays longer than a chunk of the vectorised path, state by state."""
    from balance.models.cubic.eos import CHUNK

    model = make_model(form, lookup("C3H8"))
    rng = np.random.default_rng(5)
    n = CHUNK + 257
    T = rng.uniform(0.45, 3.0, n) * model.Tc_eos
    P = np.exp(rng.uniform(math.log(1e3), math.log(5 * model.Pc_eos), n))
    arr = model.states_TP(T.reshape(1, n), P.reshape(1, n))
    assert arr["v"].shape == (1, n)
    for i in list(range(0, n, 997)) + [CHUNK - 1, CHUNK, n - 1]:
        p = model.at_TP(float(T[i]), float(P[i]))
        for key in ("v", "h", "s", "cp"):
            assert float(arr[key][0, i]) == pytest.approx(p.get(key), rel=1e-12, abs=1e-12 * R * T[i]), (key, i)


def test_cubic_roots_scalar_and_vector_agree_and_solve_the_cubic():
    rng = np.random.default_rng(3)
    model = make_model("peng-robinson", lookup("C3H8"))
    T = rng.uniform(0.3, 2.0, 3000) * model.Tc_eos
    P = np.exp(rng.uniform(math.log(1e-2), math.log(3 * model.Pc_eos), 3000))
    a = model.a_terms(T)[0]
    A, B = a * P / (R * T) ** 2, model.b * P / (R * T)
    from balance.models.cubic.formulas import z_coefficients

    c2, c1, c0 = z_coefficients(A, B, model._eps, model._sig)
    lo, hi, n = cubic_roots(c2, c1, c0)
    for i in range(T.size):
        s_lo, s_hi, s_n = z_roots(float(c2[i]), float(c1[i]), float(c0[i]))
        assert s_n == int(n[i])
        assert s_hi == pytest.approx(float(hi[i]), rel=1e-12)
        assert s_lo == pytest.approx(float(lo[i]), rel=1e-10, abs=1e-14)
        for z in (s_lo, s_hi):  # each root solves the cubic, to round-off of its terms
            f = ((z + c2[i]) * z + c1[i]) * z + c0[i]
            assert abs(f) <= 1e-13 * max(1.0, abs(c0[i]) / max(z, 1e-300), abs(c1[i]) * 4), (T[i], P[i], z)


def test_liquid_root_at_a_pressure_of_millipascals():
    """At Tr = 0.25, P = 1 mPa the liquid root is Z ~ 1e-12: the closed form alone loses it
    (round-off hides the three-root discriminant); the deflated quadratic keeps it."""
    model = make_model("soave-redlich-kwong", lookup("CO2"))
    T, P = 0.25 * model.Tc_eos, 1e-3
    v_lo, v_hi, n = model.volume_roots(T, P)
    assert n == 3 and v_lo < 2 * model.b and v_hi > 0.99 * R * T / P
    for v in (v_lo, v_hi):  # the equation itself
        res = model.residual(T, v)
        assert abs(res[0] - P) <= 1e-9 * v * abs(res[2]), v


@pytest.mark.parametrize("sid", ("N2", "CO2", "H2O", "CH4"))
def test_ideal_gas_heat_capacity_terms_on_a_float_and_on_arrays(sid):
    cp_ig = lookup(sid).cp_ig
    T = np.linspace(200.0, 3000.0, 57)  # both NASA ranges
    arr = cp_ig.terms(T)
    for i, t in enumerate(T):
        one = cp_ig.terms(float(t))
        assert all(isinstance(x, float) for x in one)  # the scalar path is plain floats
        for a, b in zip(arr, one):
            assert float(a[i]) == pytest.approx(b, rel=1e-12, abs=1e-9)
