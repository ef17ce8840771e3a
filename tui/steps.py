"""The steps of a worksheet, per kind of balance: one table.

A step is data: its id, its title, the worksheet sections it commits and
the screen that edits it. A kind's steps are numbered in the order the
table lists them, so a procedure that wants another order reorders a
tuple; nothing else knows the numbers.
"""

from __future__ import annotations

from dataclasses import dataclass, replace


@dataclass(frozen=True)
class Step:
    id: str
    title: str
    short: str
    """for the step list (fits 14 columns)"""
    sections: tuple[str, ...]
    """the worksheet sections this step edits and commits (none for solving and review)"""
    screen: str
    """``module:Class`` of its screen (imported when the step is first shown)"""
    number: int = 0
    """its place in its kind's steps, from 1 (set by :func:`_numbered`)"""


def _numbered(*steps: Step) -> tuple[Step, ...]:
    return tuple(replace(step, number=i + 1) for i, step in enumerate(steps))


#: Each kind of balance (balance.kinds) and its steps, in the trade's order.
STEPS_BY_KIND = {
    "closed": _numbered(
        Step("purpose", "Purpose and basis", "Purpose", ("worksheet",), "tui.screens.purpose:PurposeScreen"),
        Step("boundary", "System boundary", "Boundary", ("system",), "tui.screens.boundary:BoundaryScreen"),
        Step("fluid", "Fluid and property model", "Fluid, model", ("fluid",), "tui.screens.fluid:FluidScreen"),
        Step("states", "States", "States", ("initial", "final"), "tui.screens.states:StatesScreen"),
        Step("terms", "Heat and work terms", "Heat, work", ("heat", "work"), "tui.screens.terms:TermsScreen"),
        Step("constraints", "Constraints and the unknown", "Constraints", ("process",),
             "tui.screens.constraints:ConstraintsScreen"),
        Step("results", "Solve and results", "Solve", (), "tui.screens.results:ResultsScreen"),
        Step("review", "Review and sign", "Review, sign", (), "tui.screens.review:ReviewScreen"),
    ),
    "steady-flow": _numbered(
        Step("purpose", "Purpose and basis", "Purpose", ("worksheet",), "tui.screens.purpose:PurposeScreen"),
        Step("boundary", "System boundary", "Boundary", ("system",), "tui.screens.boundary:BoundaryScreen"),
        Step("fluid", "Fluid and property model", "Fluid, model", ("fluid",), "tui.screens.fluid:FluidScreen"),
        Step("streams", "Streams", "Streams", ("stream",), "tui.screens.streams:StreamsScreen"),
        Step("devices", "Devices", "Devices", ("device",), "tui.screens.devices:DevicesScreen"),
        Step("results", "Solve and results", "Solve", (), "tui.screens.results:ResultsScreen"),
        Step("review", "Review and sign", "Review, sign", (), "tui.screens.review:ReviewScreen"),
    ),
}

#: The app's steps. Only closed systems can be balanced today; a worksheet of another
#: kind is kept as typed in these steps (the boundary step marks the kind invalid).
STEPS = STEPS_BY_KIND["closed"]
BY_ID = {s.id: s for s in STEPS}
ORDER = tuple(s.id for s in STEPS)
#: The sections each input step commits.
STEP_SECTIONS = {s.id: s.sections for s in STEPS if s.sections}
#: The step where each worksheet section is typed.
SECTION_STEPS = {section: s for s in STEPS for section in s.sections}


def neighbour(step: str, offset: int) -> str | None:
    i = ORDER.index(step) + offset
    return ORDER[i] if 0 <= i < len(ORDER) else None


def screen_class(step: str):
    """The screen class of a step (its module imported on first use)."""
    from importlib import import_module

    module, name = BY_ID[step].screen.split(":")
    return getattr(import_module(module), name)
