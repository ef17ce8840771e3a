"""The steady-flow balance: streams through devices, the open form of the control-volume balance.

    0 = Σ ṅ_in e_in - Σ ṅ_out e_out + Σ Q̇ + Σ Ẇ,   e = h + M (V²/2 + g z)
    Ṡ_gen = Σ ṅ_out s_out - Σ ṅ_in s_in - Σ Q̇ / T_boundary  >= 0

- :mod:`.streams` — a stream's state, rate, speed and height (:class:`~.streams.Flow`);
- :mod:`.devices` — what each kind of device does, solved forward, and the three balances
  recomputed from the flows (the independent check);
- :mod:`.network` — streams joined by devices, solved by propagation: each device works out
  what its equations fix from what is known around it; what is still missing is said per device;
- :mod:`.problem` — the worksheet's streams and devices in SI numbers;
- :mod:`.result` — the :class:`Result`: streams, devices (Q̇, Ẇ, η, Ṡ_gen, exergy destroyed),
  the equations with numbers, warnings and cautions.

Registered as the kind ``steady-flow`` in :mod:`balance.kinds`.
"""

from __future__ import annotations

from .problem import Problem, prepare, problems
from .result import Result, result_of


def solve(problem: Problem) -> Result:
    """Solve a prepared network; raises SpecificationError or SolveError."""
    return result_of(problem, problem.solution())


def as_json(result: Result) -> dict:
    """Everything in a result; quantities as {"value", "unit"} (SI): the record's solve entry."""
    return result.as_json()


__all__ = ["Problem", "Result", "as_json", "prepare", "problems", "solve"]
