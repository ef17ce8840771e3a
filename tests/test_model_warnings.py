"""What each model warns about a state, measured rather than by rule of thumb.

Sources: Peng-Robinson's Z at the state (tests/test_cubic_vs_coolprop.py holds it to CoolProp
8.0's PR backend); the 1 % threshold is the program's, stated in the warning (common practice
to call |Z - 1| of a per cent a real-gas effect worth a look, no source).
"""

from __future__ import annotations

import pytest

from balance.models import make_model
from balance.models.idealgas import Z_TOLERANCE
from balance.species import lookup


def _real_gas(warnings: list[str]) -> list[str]:
    return [w for w in warnings if "Peng-Robinson gives Z" in w]


@pytest.mark.parametrize("T, P", [(300.0, 1e5), (300.0, 10e5), (500.0, 30e5)])
def test_nitrogen_near_ambient_is_not_flagged(T, P):
    """N2 at 300 K and 10 bar has Z = 0.998: the old rule of thumb (Pr > 0.1, Tr < 2.5) flagged it."""
    ig, pr = make_model("ideal-gas", lookup("N2")), make_model("peng-robinson", lookup("N2"))
    assert abs(pr.at_TP(T, P).Z - 1) < Z_TOLERANCE
    assert _real_gas(ig.warnings(ig.at_TP(T, P))) == []


@pytest.mark.parametrize("sid, T, P", [("N2", 150.0, 30e5), ("CO2", 300.0, 40e5), ("CH4", 250.0, 80e5)])
def test_a_measured_departure_is_flagged_with_its_number(sid, T, P):
    ig, pr = make_model("ideal-gas", lookup(sid)), make_model("peng-robinson", lookup(sid))
    Z = pr.at_TP(T, P).Z
    assert abs(Z - 1) > Z_TOLERANCE
    (words,) = _real_gas(ig.warnings(ig.at_TP(T, P)))
    assert f"Z = {Z:.4f}" in words and "above 1%" in words
