"""The closed-system balance: a fixed amount of fluid inside a boundary that heat
and work cross (registered as the kind ``closed`` in :mod:`balance.kinds`).

First law, in the canonical sign (heat to the system and work done on the
system positive; :mod:`balance.convention`):

    ΔU + ΔKE + ΔPE = Σ Q_k + Σ W_k + W_boundary,   ΔU = n u2 - Σ n_i u1,i

Second law:

    S_gen = ΔS_system + ΔS_surroundings = (n s2 - Σ n_i s1,i) - Σ Q_k / T_k  >= 0

- :mod:`.problem` — the worksheet's text to SI numbers, the final state's
  fixed properties, the path, and the degrees-of-freedom count; every field
  at fault (``problems``);
- :mod:`.solver` — the search (unknown heat, work and amount eliminated
  exactly; 0, 1 or 2 free properties of the final state);
- :mod:`.result` — the :class:`Result`, rebuilt from the states and checked;
- :mod:`.explain` — the equations with their numbers.

What other kinds of balance share (heat and work terms, the entropy of heat
crossing the boundary, the count's words) is in
:mod:`balance.balances.control_volume`; the cautions in
:mod:`balance.balances.cautions`.
"""

from __future__ import annotations

from .problem import Compartment, Problem, count_dof, prepare, problems
from .result import Result
from .solver import solve


def as_json(result: Result) -> dict:
    """Everything in a result; quantities as {"value", "unit"} (SI): the record's solve entry."""
    return result.as_json()


__all__ = ["Compartment", "Problem", "Result", "as_json", "count_dof", "prepare", "problems", "solve"]
