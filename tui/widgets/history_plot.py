"""A transient's temperature (gas and wall) or pressure against time, drawn with plotext.

The widget only draws: the points are the history's rows (:class:`tui.analysis.HistoryTrace`,
SI), shown in the display units, time in s, min or h as the history's length suits.
"""

from __future__ import annotations

from textual_plotext import PlotextPlot

from ..display import converter, unit_label

#: plotext colours: each vessel's gas in turn, its wall in the next
COLOURS = ("cyan", "orange", "green", "magenta")


def time_scale(t_end: float) -> tuple[float, str]:
    """(seconds per unit, unit) for a history of this length."""
    if t_end < 120:
        return 1.0, "s"
    if t_end < 7200:
        return 60.0, "min"
    return 3600.0, "h"


class HistoryPlot(PlotextPlot):
    """``plane`` is ``'T-t'`` or ``'P-t'`` (a :data:`tui.analysis.DRAWN` plane)."""

    DEFAULT_CSS = """
    HistoryPlot { height: 1fr; min-height: 12; }
    """

    def __init__(self, plane: str, id: str | None = None) -> None:
        super().__init__(id=id)
        self.plane = plane
        self.trace = None
        self.units = "metric"

    def show_trace(self, trace, units: str) -> None:
        """Draw ``trace`` (a HistoryTrace, or None before it is computed or without a history)."""
        self.trace = trace
        self.units = units
        self._draw()
        self.refresh()

    def _draw(self) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        tr = self.trace
        if tr is None or not tr.t:
            plt.title("solve to draw the history (it needs a restriction on every line)")
            return
        key = "T" if self.plane == "T-t" else "P"
        to = converter(key, self.units)
        scale, t_unit = time_scale(tr.t[-1])
        t = [x / scale for x in tr.t]
        i = 0
        for name, T, P, T_wall in tr.vessels:
            ys = T if key == "T" else P
            plt.plot(t, [to(y) for y in ys], marker="braille", color=COLOURS[i % len(COLOURS)],
                     label=f"{name} gas" if key == "T" else name)
            i += 1
            if key == "T" and T_wall is not None:
                plt.plot(t, [to(y) for y in T_wall], marker="braille", color=COLOURS[i % len(COLOURS)],
                         label=f"{name} wall")
                i += 1
        what = "temperature" if key == "T" else "pressure"
        plt.title(f"{what} against time")
        plt.xlabel(f"t [{t_unit}]")
        plt.ylabel(f"{key} [{unit_label(key, self.units)}]")


__all__ = ["HistoryPlot", "time_scale"]
