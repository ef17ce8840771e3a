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


__all__ = ["closing_panels"]
