"""The panels every kind's results end with: the equations with numbers, the warnings (where
there are any) and the cautions, in the display units."""

from __future__ import annotations

from rich import box
from rich.panel import Panel

from .display import caution_writer


def closing_panels(result, units: str, equations_title: str) -> list[Panel]:
    """The equations under ``equations_title``, then the warnings and the cautions of ``result``."""
    panels = [Panel("\n".join(result.equations), title=equations_title, title_align="left", box=box.SQUARE)]
    if result.warnings:
        panels.append(Panel("\n".join(f"• {w}" for w in result.warnings), title="Warnings", title_align="left",
                            border_style="yellow", box=box.SQUARE))
    write = caution_writer(units)
    panels.append(Panel("\n".join(f"• {c.text(write)}" for c in result.cautions), title="Cautions",
                        title_align="left", border_style="red", box=box.SQUARE))
    return panels


#: How each outcome of a house rule begins, so it reads without colour too.
OUTCOME_MARKS = {"pass": ("✓ pass", "green"), "warn": ("! WARN", "yellow"), "stop": ("✗ STOP", "bold red"),
                 "justified": ("≈ deviation", "cyan"), "n/a": ("· n/a", "dim")}


def house_panel(findings, procedure) -> Panel:
    """A house procedure's rules applied to a result: each check, model rule and required field
    with its outcome and message, and each deviation with its written justification."""
    from rich.text import Text

    order = {"stop": 0, "warn": 1, "justified": 2, "n/a": 3}
    text = Text(f"{procedure.id} version {procedure.version}", style="dim")
    for f in sorted((f for f in findings if f.outcome != "pass"), key=lambda f: order.get(f.outcome, 4)):
        mark, style = OUTCOME_MARKS.get(f.outcome, OUTCOME_MARKS["n/a"])
        text.append("\n")
        text.append(f"{mark} ", style=style)
        text.append(f"{f.rule}: ", style="bold")
        text.append(f.message)
        if f.justification:
            text.append(f"\n  justified: {f.justification}", style="italic")
    passed = [f.rule for f in findings if f.outcome == "pass"]
    if passed:  # the passes in one line: what needs reading comes first
        text.append("\n")
        text.append(f"{OUTCOME_MARKS['pass'][0]} ", style=OUTCOME_MARKS["pass"][1])
        text.append(f"{len(passed)} rule{'s pass' if len(passed) > 1 else ' passes'}: " + ", ".join(passed))
    stops = sum(1 for f in findings if f.blocks)
    title = "House rules: " + (f"{stops} STOP the sign-off" if stops else "the sign-off may proceed")
    return Panel(text, title=title, title_align="left", border_style="red" if stops else "green", box=box.SQUARE)


__all__ = ["closing_panels", "house_panel"]
