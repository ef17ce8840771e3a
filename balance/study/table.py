"""A solve's result as one row of named numbers, and the main results of each kind.

:func:`flatten` turns the JSON of a result (:func:`balance.api.as_json`: quantities as
``{"value", "unit"}`` in SI) into ``{"states.final.T [K]": 412.3, ...}``: every number the
result holds, given or solved, named by where it sits (a list's items by their names), with the
count of warnings; texts and the equations are left out. :func:`main_results` picks what a
reader of each kind looks at first: what a sweep plots by default and what the uncertainty is
reported for.
"""

from __future__ import annotations

import math

#: Parts of a result that are words or bookkeeping, not results.
_SKIP = {"title", "equations", "cautions", "wording", "reference_state", "convention", "warnings", "detail",
         "rate_read_as", "rows", "settings", "round_off", "overrides", "kind", "model", "species", "basis",
         "case", "stop", "phase", "composition", "mixtures", "iterations", "method", "evaluations"}


def _column(path: str, unit: str) -> str:
    return f"{path} [{unit}]" if unit and unit != "dimensionless" else path


def flatten(data: dict) -> dict[str, float]:
    """Every number of a result's JSON, by its place (see the module docstring)."""
    out: dict[str, float] = {}

    def walk(prefix: str, node) -> None:
        if isinstance(node, dict):
            if set(node) >= {"value", "unit"} and not isinstance(node["value"], dict):
                value = node["value"]
                if isinstance(value, (int, float)) and not isinstance(value, bool):
                    out[_column(prefix, str(node["unit"]))] = float(value)
                return
            for k, v in node.items():
                if k not in _SKIP:
                    walk(f"{prefix}.{k}" if prefix else str(k), v)
        elif isinstance(node, list):
            for n, item in enumerate(node):
                name = item.get("name") if isinstance(item, dict) else None
                walk(f"{prefix}.{name}" if name else f"{prefix}[{n + 1}]", item)
        elif isinstance(node, (int, float)) and not isinstance(node, bool) and math.isfinite(float(node)):
            out[prefix] = float(node)

    walk("", data)
    out["warnings"] = float(len(data.get("warnings", ())))
    return out


def main_results(data: dict) -> list[str]:
    """The columns of :func:`flatten` a reader of this kind of result looks at first."""
    kind = data.get("kind", "closed")
    cols = flatten(data)
    if kind == "steady-flow":
        picks = [c for c in cols if c.startswith("devices.") and any(
            f".{k} [" in c for k in ("Q_dot", "W_dot", "S_gen_dot"))]
        picks += [c for c in cols if c.startswith("streams.") and (c.endswith(".T [K]") or c.endswith(".P [Pa]"))]
        picks += [c for c in cols if c.startswith("S_gen_dot")]
    elif kind == "transient":
        picks = [c for c in cols if c.startswith("history.t_end") or (c.startswith("history.extremes.")
                                                                        and c.endswith(".value [K]"))]
        picks += [c for c in cols if c.startswith("end_state.vessels.") and any(
            c.endswith(f".{k} [{u}]") for k, u in (("T2", "K"), ("P2", "Pa"), ("Q", "J")))]
    else:
        final = [c for c in cols if c.startswith("states.")]
        names = list(dict.fromkeys(c.split(".")[1] for c in final))
        last = names[-1] if names else ""
        picks = [c for c in cols if c in (f"states.{last}.T [K]", f"states.{last}.P [Pa]")]
        solved = {t.get("name") for t in data.get("terms", ()) if t.get("solved")
                  and not (t.get("kind") == "boundary work" and t.get("name") == "rigid")}  # rigid: 0 by its path
        picks += [c for c in cols if c.startswith("terms.") and c.split(".")[1] in solved and ".value [" in c]
        picks += [c for c in cols if c.startswith("n [") or c.startswith("S_gen [")]
    return picks
