"""Ideal-gas heat capacities from the species data against the reference equations of state.

Our cp° are NASA 7-coefficient polynomials (NASA Glenn coefficients, as
Cantera 3.2.0's nasa_gas.yaml ships them; balance/data/build_species.py).
The check values are computed here: the ideal-gas part of each fluid's
reference EOS in CoolProp 8.0 (HEOS, ``cp0molar`` at 1 Pa), which comes
from the EOS's own publication, not from the NASA tables (CoolProp's
BibTeX-EOS keys: Span-JPCRD-2000 for nitrogen, Schmidt-FPE-1985 for oxygen,
Span-JPCRD-1996 for CO2, Setzmann-JPCRD-1991 for methane, Wagner-JPCRD-2002
(IAPWS-95) for water, Tegeler-JPCRD-1999 for argon). Points are taken only
inside the EOS's stated temperature range (``Tmin``-``Tmax``).

The two are separate fits and agree to about 0.1-0.3 %. Measured with these data (|ours/CoolProp - 1|, worst of
the row's temperatures): N2 0.23 %, O2 0.23 %, CO2 0.26 %, CH4 0.22 %
(200-500 K), H2O 0.07 % (to 1000 K), Ar 6e-6 (both 5/2 R; the EOS uses the
older R = 8.31451 J/(mol K)). Tolerances: 0.3 % for the molecules, 0.1 % for
water to 1000 K, 2e-5 for argon; the rows the tolerance does not cover are
listed at EXCLUDED with the measured difference, not hidden in a looser
tolerance.
"""

from __future__ import annotations

import CoolProp
import pytest

from balance.species import lookup

# (species, temperatures [K], relative tolerance)
ROWS = [
    ("N2", (200.0, 250.0, 298.15, 400.0, 500.0, 700.0, 1000.0, 1500.0, 2000.0), 3e-3),
    ("O2", (200.0, 250.0, 298.15, 400.0, 500.0, 700.0, 1000.0, 1500.0, 2000.0), 3e-3),
    ("CO2", (250.0, 298.15, 400.0, 500.0, 700.0, 1000.0, 1500.0, 2000.0), 3e-3),
    ("CH4", (200.0, 250.0, 298.15, 400.0, 500.0), 3e-3),
    ("H2O", (298.15, 400.0, 500.0, 700.0, 1000.0), 1e-3),
    ("Ar", (200.0, 298.15, 500.0, 1000.0, 2000.0), 2e-5),
]

#: Measured, and not checked at the tolerances above (kept as a record of why):
EXCLUDED = {
    # IAPWS-95's ideal part (also iapws 1.5 IAPWS95: 47.090 J/(mol K) at 1500 K)
    # is below the NASA polynomial by 0.52 % at 1500 K and 0.97 % at 2000 K.
    ("H2O", 1500.0): 5.2e-3,
    ("H2O", 2000.0): 9.7e-3,
    # methane near the EOS's upper limit (625 K): 0.45 % at 600 K.
    ("CH4", 600.0): 4.5e-3,
}

CASES = [(name, T, rel) for name, temps, rel in ROWS for T in temps]


@pytest.fixture(scope="module")
def ideal_part():
    states = {}

    def cp0(name: str, T: float) -> float:
        fluid = lookup(name).coolprop
        st = states.setdefault(fluid, CoolProp.AbstractState("HEOS", fluid))
        assert st.Tmin() <= T <= st.Tmax(), f"{T} K is outside the {fluid} EOS's range"
        st.update(CoolProp.PT_INPUTS, 1.0, T)  # 1 Pa: the ideal gas; cp0 does not depend on P
        return st.cp0molar()

    return cp0


@pytest.mark.parametrize("name, T, rel", CASES)
def test_cp_matches_the_reference_eos_ideal_part(ideal_part, name, T, rel):
    cp_ig = lookup(name).cp_ig
    assert cp_ig.nasa.T_min <= T <= cp_ig.nasa.T_max
    # CoolProp 8.0 HEOS, ideal-gas part of the fluid's reference EOS
    assert float(cp_ig.cp(T)) == pytest.approx(ideal_part(name, T), rel=rel)


@pytest.mark.parametrize("name, T", sorted(EXCLUDED))
def test_excluded_rows_differ_as_recorded(ideal_part, name, T):
    # The rows left out are left out for the measured reason, not a guessed one.
    diff = abs(float(lookup(name).cp_ig.cp(T)) / ideal_part(name, T) - 1.0)
    assert diff == pytest.approx(EXCLUDED[(name, T)], abs=0.5e-3)


def test_argon_is_monatomic():
    # cp° = 5/2 R for a monatomic ideal gas (kinetic theory, a published closed form)
    from balance.units import R

    cp_ig = lookup("Ar").cp_ig
    for T in (200.0, 1000.0, 5000.0):
        assert float(cp_ig.cp(T)) == pytest.approx(2.5 * R, rel=1e-9)


def test_h_and_s_follow_from_cp():
    # h(T2) - h(T1) = ∫cp dT and s(T2) - s(T1) = ∫cp/T dT at 1 bar (definitions),
    # by trapezoidal integration of the same polynomial.
    import numpy as np

    cp_ig = lookup("CH4").cp_ig
    T = np.linspace(300.0, 900.0, 20001)
    cp = cp_ig.cp(T)
    dh = float(np.sum((cp[1:] + cp[:-1]) / 2 * np.diff(T)))
    ds = float(np.sum((cp[1:] / T[1:] + cp[:-1] / T[:-1]) / 2 * np.diff(T)))
    assert float(cp_ig.h(900.0) - cp_ig.h(300.0)) == pytest.approx(dh, rel=1e-7)
    assert float(cp_ig.s(900.0) - cp_ig.s(300.0)) == pytest.approx(ds, rel=1e-7)
