"""The eight steps of a worksheet, in the trade's order."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Step:
    id: str
    number: int
    title: str
    short: str
    """for the step list (fits 14 columns)"""


STEPS = (
    Step("purpose", 1, "Purpose and basis", "Purpose"),
    Step("boundary", 2, "System boundary", "Boundary"),
    Step("fluid", 3, "Fluid and property model", "Fluid, model"),
    Step("states", 4, "States", "States"),
    Step("terms", 5, "Heat and work terms", "Heat, work"),
    Step("constraints", 6, "Constraints and the unknown", "Constraints"),
    Step("results", 7, "Solve and results", "Solve"),
    Step("review", 8, "Review and sign", "Review, sign"),
)
BY_ID = {s.id: s for s in STEPS}
ORDER = tuple(s.id for s in STEPS)


def neighbour(step: str, offset: int) -> str | None:
    i = ORDER.index(step) + offset
    return ORDER[i] if 0 <= i < len(ORDER) else None
