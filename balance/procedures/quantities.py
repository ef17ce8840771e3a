"""The result quantities a house procedure may check, by kind of balance: one table.

Each quantity is read from a solve entry's data (:func:`balance.api.entry_data`, the same data
the record files), so the app after a solve, ``record verify`` on a record and the practice
mode's comparison all read the same numbers. A quantity a result does not have (no history,
no device with a shaft) reads as None, and a check on it says so rather than passing.

Every value is SI: [K], [Pa], [J/K], [W/K], [s], [kg], [J], [W]; ``residual`` is relative.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Iterable

Reader = Callable[[dict], "float | None"]


@dataclass(frozen=True)
class Quantity:
    name: str
    dimension: str
    """a key of :data:`balance.units.DIMENSIONS`: the limit a check compares with is read as it"""
    words: str
    """what it is, for ``procedure show`` and the README"""
    readers: dict[str, Reader]
    """kind of balance -> how its solve data gives the value (None where this result has none)"""

    @property
    def kinds(self) -> tuple[str, ...]:
        """the kinds of balance that have it"""
        return tuple(self.readers)


def _si(item) -> float | None:
    """The SI number of a result's ``{"value", "unit"}`` (or a plain number)."""
    if isinstance(item, dict):
        item = item.get("value")
    if isinstance(item, bool) or not isinstance(item, (int, float)):
        return None
    return float(item)


def _values(items: Iterable) -> list[float]:
    return [v for v in (_si(i) for i in items) if v is not None]


def _lowest(items) -> float | None:
    values = _values(items)
    return min(values) if values else None


def _highest(items) -> float | None:
    values = _values(items)
    return max(values) if values else None


def _total(items) -> float | None:
    values = _values(items)
    return sum(values) if values else None


# -- where each kind keeps its states -------------------------------------------------------
def _closed_states(data: dict, prop: str) -> list:
    return [s.get(prop) for s in data.get("states", {}).values()]


def _streams(data: dict, prop: str) -> list:
    return [s.get(prop) for s in data.get("streams", {}).values()]


def _devices(data: dict, prop: str) -> list:
    return [d.get(prop) for d in data.get("devices", {}).values()]


def _history(data: dict) -> dict:
    return data.get("history") or {}


def _vessel_series(data: dict, prop: str, unit: str) -> list[float]:
    """Every recorded value of a vessel's gas ``prop`` in the history's rows (T in K, P in Pa),
    with the start and end of the end state without time."""
    rows = _history(data).get("rows", {})
    out = [v for name, column in rows.items() if name.endswith(f" {prop} [{unit}]") and " wall " not in name
           for v in column if isinstance(v, (int, float))]
    for vessel in (data.get("end_state") or {}).get("vessels", {}).values():
        out += _values([vessel.get(f"{prop}1"), vessel.get(f"{prop}2")])
    return out


def _extreme(data: dict, which: str) -> list:
    """The history's extremes of the gas temperature (``which``: 'min' or 'max')."""
    return [e.get("value") for name, e in _history(data).get("extremes", {}).items()
            if name.endswith(f" T {which}") and " wall " not in name]


def _wall_extreme(data: dict, which: str) -> list:
    return [e.get("value") for name, e in _history(data).get("extremes", {}).items()
            if name.endswith(f"wall T {which}")]


def _transient_T(data: dict, which: str) -> float | None:
    values = _values(_extreme(data, which)) + _vessel_series(data, "T", "K")
    if not values:
        return None
    return min(values) if which == "min" else max(values)


def _transient_residual(data: dict) -> float | None:
    closures = [v.get("closure") for v in _history(data).get("vessels", {}).values()]
    closures += [(data.get("end_state") or {}).get("residual")]
    values = [abs(v) for v in _values(closures)]
    return max(values) if values else None


def _flow_residual(data: dict) -> float | None:
    values = [abs(v) for v in _values(_devices(data, "residual_energy") + _devices(data, "residual_mass"))]
    return max(values) if values else None


def _magnitude(items) -> float | None:
    values = [abs(v) for v in _values(items)]
    return max(values) if values else None


#: The relative size below which an entropy generated is round-off, as the closed result's own
#: ``round_off`` says (the precision the balances are solved to).
ROUND_OFF = 1e-9


def _rounded(value: float | None, scale: float | None) -> float | None:
    """``value``, or 0 where it is round-off of ``scale`` (a reversible process solves to
    -1e-11 J/K, which a check of 'at least 0' must not refuse)."""
    if value is None or not scale:
        return value
    return 0.0 if abs(value) <= ROUND_OFF * scale else value


def _entropy_scale(data: dict) -> float | None:
    """[J/K] the closed result's own entropy scale."""
    return _si((data.get("round_off") or {}).get("entropy"))


def _entropy_rate_scale(data: dict) -> float | None:
    """[W/K] the largest entropy flow of any stream, ṅ |s|."""
    flows = [abs(_si(s.get("n_dot")) or 0.0) * abs(_si(s.get("s")) or 0.0) for s in data.get("streams", {}).values()]
    return max(flows, default=0.0) or None


CLOSED, FLOW, TRANSIENT = "closed", "steady-flow", "transient"

_TABLE = (
    Quantity("T_min", "temperature", "the lowest gas or fluid temperature: of any state, any stream, or over a "
             "transient's history", {CLOSED: lambda d: _lowest(_closed_states(d, "T")),
                                     FLOW: lambda d: _lowest(_streams(d, "T")),
                                     TRANSIENT: lambda d: _transient_T(d, "min")}),
    Quantity("T_max", "temperature", "the highest gas or fluid temperature: of any state, any stream, or over a "
             "transient's history", {CLOSED: lambda d: _highest(_closed_states(d, "T")),
                                     FLOW: lambda d: _highest(_streams(d, "T")),
                                     TRANSIENT: lambda d: _transient_T(d, "max")}),
    Quantity("P_max", "pressure", "the highest absolute pressure: of any state, any stream, or over a transient's "
             "history", {CLOSED: lambda d: _highest(_closed_states(d, "P")),
                         FLOW: lambda d: _highest(_streams(d, "P")),
                         TRANSIENT: lambda d: _highest(_vessel_series(d, "P", "Pa"))}),
    Quantity("P_min", "pressure", "the lowest absolute pressure: of any state, any stream, or over a transient's "
             "history", {CLOSED: lambda d: _lowest(_closed_states(d, "P")),
                         FLOW: lambda d: _lowest(_streams(d, "P")),
                         TRANSIENT: lambda d: _lowest(_vessel_series(d, "P", "Pa"))}),
    Quantity("S_gen", "entropy", "the entropy generated by the process (second law: at least 0)",
             dict.fromkeys((CLOSED, TRANSIENT), lambda d: _rounded(_si(d.get("S_gen")), _entropy_scale(d)))),
    Quantity("S_gen_rate", "entropy_rate", "the entropy generated per second by all the devices (second law: at "
             "least 0)", {FLOW: lambda d: _rounded(_si(d.get("S_gen_dot")), _entropy_rate_scale(d))}),
    Quantity("S_gen_rate_min", "entropy_rate", "the lowest entropy generation rate of any one device (second law: "
             "at least 0)",
             {FLOW: lambda d: _rounded(_lowest(_devices(d, "S_gen_dot")), _entropy_rate_scale(d))}),
    Quantity("residual", "dimensionless", "the largest relative residual of the energy balance the solve closed "
             "(for a transient, of each vessel's energy closure)",
             {CLOSED: lambda d: _magnitude([d.get("residual")]), FLOW: _flow_residual,
              TRANSIENT: _transient_residual}),
    Quantity("Q_total", "energy", "the heat to the system, all heat terms together",
             {CLOSED: lambda d: _total(t.get("value") for t in d.get("terms", []) if "heat" in str(t.get("kind")))}),
    Quantity("W_total", "energy", "the work, all work terms together, in the worksheet's convention",
             {CLOSED: lambda d: _total(t.get("value") for t in d.get("terms", []) if "work" in str(t.get("kind")))}),
    Quantity("Q_dot_max", "power", "the largest heat duty of any one device (its magnitude)",
             {FLOW: lambda d: _magnitude(_devices(d, "Q_dot"))}),
    Quantity("W_dot_max", "power", "the largest shaft power of any one device (its magnitude)",
             {FLOW: lambda d: _magnitude(_devices(d, "W_dot"))}),
    Quantity("t_end", "time", "the time the transient takes to its end condition",
             {TRANSIENT: lambda d: _si(_history(d).get("t_end"))}),
    Quantity("T_wall_min", "temperature", "the lowest wall temperature over the history (a wall heat model only)",
             {TRANSIENT: lambda d: _lowest(_wall_extreme(d, "min"))}),
    Quantity("mass_moved", "mass", "the mass moved through all the lines together",
             {TRANSIENT: lambda d: _total(_history(d).get("moved", {}).values())}),
)

#: Every quantity a check may name, by name.
QUANTITIES: dict[str, Quantity] = {q.name: q for q in _TABLE}


def _kind(data: dict) -> str:
    """A solve entry's kind of balance (a closed system's data name none)."""
    return data.get("kind", CLOSED)


def value_of(name: str, data: dict) -> float | None:
    """The SI value of quantity ``name`` in a solve entry's ``data`` (None where this result has
    none: another kind, a failed solve, no history)."""
    reader = QUANTITIES[name].readers.get(_kind(data))
    if reader is None or "error" in data:
        return None
    try:
        return reader(data)
    except (KeyError, TypeError, AttributeError):  # a result of another shape: it has no such quantity
        return None
