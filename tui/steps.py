"""The steps of a worksheet, per kind of balance: one table.

A step is data: its id, its title, the worksheet sections it commits and
the screen that edits it. A kind's steps are numbered in the order the
table lists them, so a procedure that wants another order reorders a
tuple; nothing else knows the numbers.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from balance.kinds import STEP_SECTIONS


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


def _step(id: str, title: str, short: str, screen: str) -> Step:
    """A step, committing the sections the domain says it edits (:data:`balance.kinds.STEP_SECTIONS`)."""
    return Step(id, title, short, STEP_SECTIONS.get(id, ()), screen)


# the steps every kind opens and closes with
_PURPOSE = _step("purpose", "Purpose and basis", "Purpose", "tui.screens.purpose:PurposeScreen")
_BOUNDARY = _step("boundary", "System boundary", "Boundary", "tui.screens.boundary:BoundaryScreen")
_FLUID = _step("fluid", "Fluid and property model", "Fluid, model", "tui.screens.fluid:FluidScreen")
_RESULTS = _step("results", "Solve and results", "Solve", "tui.screens.results:ResultsScreen")
_REVIEW = _step("review", "Review and sign", "Review, sign", "tui.screens.review:ReviewScreen")

#: Each kind of balance (balance.kinds) and its steps, in the trade's order.
STEPS_BY_KIND = {
    "closed": _numbered(
        _PURPOSE, _BOUNDARY, _FLUID,
        _step("states", "States", "States", "tui.screens.states:StatesScreen"),
        _step("terms", "Heat and work terms", "Heat, work", "tui.screens.terms:TermsScreen"),
        _step("constraints", "Constraints and the unknown", "Constraints",
              "tui.screens.constraints:ConstraintsScreen"),
        _RESULTS, _REVIEW,
    ),
    "steady-flow": _numbered(
        _PURPOSE, _BOUNDARY, _FLUID,
        _step("streams", "Streams", "Streams", "tui.screens.streams:StreamsScreen"),
        _step("devices", "Devices", "Devices", "tui.screens.devices:DevicesScreen"),
        _RESULTS, _REVIEW,
    ),
    "transient": _numbered(
        _PURPOSE, _BOUNDARY, _FLUID,
        _step("vessels", "Vessels", "Vessels", "tui.screens.vessels:VesselsScreen"),
        _step("lines", "Lines and restrictions", "Lines", "tui.screens.lines:LinesScreen"),
        _step("end", "End condition and integrator", "End, history", "tui.screens.end:EndScreen"),
        _RESULTS, _REVIEW,
    ),
}


class Steps:
    """One kind's steps and what the app looks up in them: by id, in order, the sections
    each commits and the step where each section is typed (:func:`steps_of`)."""

    def __init__(self, kind: str, steps: tuple[Step, ...]) -> None:
        self.kind = kind
        self.steps = steps
        self.by_id = {s.id: s for s in steps}
        self.order = tuple(s.id for s in steps)
        #: the sections each input step commits
        self.sections = {s.id: s.sections for s in steps if s.sections}
        #: the step where each worksheet section is typed
        self.section_steps = {section: s for s in steps for section in s.sections}

    def __iter__(self):
        return iter(self.steps)

    def __len__(self) -> int:
        return len(self.steps)

    def __contains__(self, step: str) -> bool:
        return step in self.by_id

    def __getitem__(self, step: str) -> Step:
        return self.by_id[step]

    def neighbour(self, step: str, offset: int) -> str | None:
        """The step ``offset`` places from ``step`` (None past either end, or for a step
        this kind does not have)."""
        if step not in self.by_id:
            return None
        i = self.order.index(step) + offset
        return self.order[i] if 0 <= i < len(self.order) else None

    def committed(self) -> tuple[str, ...]:
        """Every section these steps commit (the kind's sections)."""
        return tuple(self.section_steps)


_BY_KIND = {kind: Steps(kind, steps) for kind, steps in STEPS_BY_KIND.items()}


def steps_of(kind: str) -> Steps:
    """The steps of a worksheet of ``kind`` (its ``[system] kind``). A kind that cannot be
    balanced (a reserved or mistyped one) is kept as typed in the closed system's steps,
    where the boundary step marks it invalid."""
    return _BY_KIND.get(kind, _BY_KIND["closed"])


#: The closed system's steps: what a new worksheet starts with.
STEPS = STEPS_BY_KIND["closed"]
#: The most steps a kind has (the step list's digit keys).
MOST = max(len(steps) for steps in STEPS_BY_KIND.values())


def screen_class(step: str):
    """The screen class of a step (its module imported on first use). A step id names the
    same screen in every kind that has it."""
    from importlib import import_module

    found = next(s for steps in STEPS_BY_KIND.values() for s in steps if s.id == step)
    module, name = found.screen.split(":")
    return getattr(import_module(module), name)
