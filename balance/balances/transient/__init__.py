"""The transient balance: vessels filled, vented, blown down or equalised, the control-volume
balance with accumulation.

    d(n u)/dt = Σ ṅ_in h_in - Σ ṅ_out h_out + Q̇ + Ẇ_on,   dn/dt = Σ ṅ_in - Σ ṅ_out

- :mod:`.gas` — the vessel's fluid at (T, v) in plain floats, for the integrator;
- :mod:`.nozzle` — flow through a restriction (an orifice, a valve by Cv or Kv) from the model's
  own isentropic nozzle, choked or subcritical;
- :mod:`.wall` — a lumped wall: its heat to the gas, from outside and from a fire;
- :mod:`.problem` — the worksheet's vessels, lines, end condition and integrator settings in SI;
- :mod:`.end_state` — the end state without time (the integrated uniform-state balance);
- :mod:`.history` — the history in time, integrated with scipy's solve_ivp to the end condition;
- :mod:`.result` — the :class:`Result`: both levels, extremes, closure, S_gen, cautions.

Registered as the kind ``transient`` in :mod:`balance.kinds`.
"""

from __future__ import annotations

from .problem import Problem, prepare, problems


def solve(problem: Problem):
    """Solve a prepared transient: the end state, and the history where the lines allow one;
    raises SpecificationError or SolveError."""
    from .result import result_of

    return result_of(problem)


def as_json(result) -> dict:
    """Everything in a result; quantities as {"value", "unit"} (SI): the record's solve entry."""
    return result.as_json()


__all__ = ["Problem", "as_json", "prepare", "problems", "solve"]
