"""The vectorised cubic core against its scalar use, and the choice of root.

Sources of the check values:

* "scalar at_TP": ``Cubic.at_TP`` at one point, the path every balance
  takes; ``states_TP`` on arrays must give the same Z, h, s, cp point by
  point (to 1e-12 relative: the arithmetic is the same, but numpy may use
  vector instructions for log and sqrt on arrays, which can differ from
  the scalar results in the last bit);
* "the equation itself": the chosen volume must solve P(T, v) = P, to a
  volume error of 1e-9 relative;
* "scipy quad": Gibbs energy differences between the roots by the
  integral g(v_l) - g(v_v) = P (v_l - v_v) + ∫ P dv from v_l to v_v along
  the isotherm, independent of the closed-form ln φ; the stable root is
  the one with the lower Gibbs energy (lower fugacity) - standard
  thermodynamics.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad

from balance.models.cubic import FORMS, Cubic
from balance.units import R
from tests.test_cubic_vs_coolprop import species_from

N_POINTS = 1000
SEED = 7


@pytest.fixture(scope="module", params=list(FORMS), ids=list(FORMS))
def model(request):
    return Cubic(species_from("PR", "Propane"), FORMS[request.param])


def random_points(model: Cubic, n: int, seed: int):
    """(T [K], P [Pa]) arrays: T/Tc in 0.4-3, P from 100 Pa to 5 Pc (log-uniform),
    so liquids, vapours, supercritical states and three-root isotherms all occur."""
    rng = np.random.default_rng(seed)
    T = rng.uniform(0.4, 3.0, n) * model.species.Tc
    P = np.exp(rng.uniform(math.log(100.0), math.log(5.0 * model.species.Pc), n))
    return T, P


def test_states_TP_equals_at_TP_point_by_point(model):
    T, P = random_points(model, N_POINTS, SEED)
    arr = model.states_TP(T, P)
    for key in ("Z", "h", "s", "cp", "v"):
        assert arr[key].shape == (N_POINTS,)
    three = 0
    for i in range(N_POINTS):
        p = model.at_TP(float(T[i]), float(P[i]))
        three += p.root.startswith("three")
        for key in ("Z", "h", "s", "cp", "v"):
            ref = p.get(key)
            assert float(arr[key][i]) == pytest.approx(ref, rel=1e-12, abs=1e-12 * R * T[i] if key == "h" else 0.0), (
                key, T[i], P[i])
    # the sample does reach the three-root region, where the choice matters
    assert three >= 50, three


def test_the_chosen_root_solves_the_equation(model):
    """|P(T, v) - P| <= 1e-9 v |∂P/∂v|_T: the volume is right to 1e-9 relative.

    Source: the equation itself (``Cubic.pressure``)."""
    T, P = random_points(model, N_POINTS, SEED + 1)
    v = model.states_TP(T, P)["v"]
    dv = 1e-7 * v
    stiffness = v * np.abs(model.pressure(T, v + dv) - model.pressure(T, v - dv)) / (2 * dv)
    err = np.abs(model.pressure(T, v) - P)
    bad = np.flatnonzero(err > 1e-9 * stiffness)
    assert bad.size == 0, [(T[i], P[i], v[i], err[i] / stiffness[i]) for i in bad[:5]]


def _g_liquid_minus_vapour(model: Cubic, T: float, P: float, v_l: float, v_v: float) -> float:
    """g(v_l) - g(v_v) [J/mol] along the isotherm, by quad."""
    area = quad(lambda v: float(model.pressure(T, v)), v_l, v_v, epsabs=1e-12 * R * T, epsrel=1e-13, limit=400)[0]
    return P * (v_l - v_v) + area


@pytest.mark.parametrize("Tr", (0.55, 0.7, 0.85, 0.95))
def test_three_root_region_picks_the_lower_fugacity_root(model, Tr):
    """Between the spinodal pressures an isotherm below Tc has three roots.

    At pressures spread over that range (above and below P_sat) the root
    chosen - vectorised and scalar - is the one of lower Gibbs energy
    (quad, see the module docstring), and the closed-form ln φ difference
    equals the Gibbs difference / (R T) to 1e-9.
    """
    T = Tr * model.Tc_eos
    spin = model.spinodal_volumes(T)
    assert spin is not None
    P_lo = max(float(model.pressure(T, spin[0])), 1e-3 * float(model.pressure(T, spin[1])))
    P_hi = float(model.pressure(T, spin[1]))
    P_sat = model.saturation(T)[0]
    Ps = np.concatenate([np.geomspace(P_lo * 1.001, P_hi * 0.999, 24), [P_sat * 0.99, P_sat * 1.01]])
    v_lo, v_hi, n, stable = model.roots_TP(np.full(Ps.shape, T), Ps)
    arr = model.states_TP(np.full(Ps.shape, T), Ps)
    liquid_chosen = vapour_chosen = 0
    for i, P in enumerate(Ps):
        assert int(n[i]) == 3, (T, P)
        dg = _g_liquid_minus_vapour(model, T, float(P), float(v_lo[i]), float(v_hi[i]))
        expected = float(v_lo[i]) if dg < 0 else float(v_hi[i])
        assert float(stable[i]) == expected, (T, P, dg)
        assert float(arr["v"][i]) == expected
        assert model.at_TP(T, float(P)).v == pytest.approx(expected, rel=1e-12)
        lnphi = model.props_Tv(T, np.array([v_lo[i], v_hi[i]]))["ln_phi"]
        assert float(lnphi[0] - lnphi[1]) == pytest.approx(dg / (R * T), abs=1e-9)
        assert (dg < 0) == (P > P_sat)  # liquid above the saturation pressure, vapour below
        liquid_chosen += dg < 0
        vapour_chosen += dg > 0
    assert liquid_chosen >= 2 and vapour_chosen >= 2
