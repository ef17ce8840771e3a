"""P–v and T–s diagrams of the process, drawn in the terminal with plotext.

The widget only draws: the points come from :func:`balance.diagrams.trace`
(molar SI) and are shown per unit mass in the display units.
"""

from __future__ import annotations

from textual_plotext import PlotextPlot

from ..display import converter, unit_label

#: plotext colours: path, jump, dome, states
COLOURS = {"path": "cyan", "jump": "orange", "dome": "gray", "state": "red"}
JUMP_POINTS = 24


class ProcessDiagram(PlotextPlot):
    """``kind`` is ``'Pv'`` (pressure against specific volume, log-log) or ``'Ts'``."""

    DEFAULT_CSS = """
    ProcessDiagram { height: 1fr; min-height: 12; }
    """

    def __init__(self, kind: str, id: str | None = None) -> None:
        super().__init__(id=id)
        self.kind = kind
        self.trace = None
        self.units = "metric"

    def show_trace(self, trace, units: str) -> None:
        self.trace, self.units = trace, units
        self._draw()
        self.refresh()

    def _axes(self):
        u = self.units
        if self.kind == "Pv":
            fx, fy = converter("v", u), converter("P", u)
            return (lambda v, M: fx(v / M)), (lambda P: fy(P)), f"v [{unit_label('v', u)}]", \
                f"P [{unit_label('P', u)}]"
        fx, fy = converter("s", u), converter("T", u)
        return (lambda s, M: fx(s / M)), (lambda T: fy(T)), f"s [{unit_label('s', u)}]", \
            f"T [{unit_label('T', u)}]"

    def _draw(self) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        tr = self.trace
        if tr is None:
            plt.title("solve to draw the process")
            return
        X, Y, xl, yl = self._axes()
        M = tr.M
        pv = self.kind == "Pv"

        def xy(curve):
            if pv:
                return [X(v, M) for v in curve.v], [Y(P) for P in curve.P]
            return [X(s, M) for s in curve.s], [Y(T) for T in curve.T]

        for curve in tr.curves:
            xs, ys = xy(curve)
            if curve.style == "jump":
                # no quasi-static path: a dotted straight line (in the plotted axes)
                n = JUMP_POINTS
                xs = [xs[0] + (xs[1] - xs[0]) * i / (n - 1) for i in range(n)] if not pv else _geom(xs[0], xs[1], n)
                ys = [ys[0] + (ys[1] - ys[0]) * i / (n - 1) for i in range(n)] if not pv else _geom(ys[0], ys[1], n)
                plt.scatter(xs, ys, marker="dot", color=COLOURS["jump"])
            else:
                plt.plot(xs, ys, marker="braille", color=COLOURS[curve.style])
        points = [((X(v, M), Y(P)) if pv else (X(s, M), Y(T)), name) for name, T, P, v, s in tr.states]
        xs = [p[0][0] for p in points]
        lo, hi = min(xs), max(xs)
        for (x, y), name in points:
            plt.scatter([x], [y], marker="●", color=COLOURS["state"])
            # labels lean away from the nearer edge so they are not cut off
            right = hi > lo and (x - lo) > 0.5 * (hi - lo) if not pv else hi > lo and x > (lo * hi) ** 0.5
            plt.text(f"{name} " if right else f" {name}", x, y, color=COLOURS["state"],
                     alignment="right" if right else "left")
        if pv:
            plt.xscale("log")
            plt.yscale("log")
        plt.xlabel(xl)
        plt.ylabel(yl)
        kinds = {c.style: c.label for c in tr.curves}
        what = "no quasi-static path (dotted)" if "jump" in kinds and "path" not in kinds else kinds.get("path", "")
        plt.title(("P–v" if pv else "T–s") + (f": {what}" if what else "")
                  + (" · saturation dome grey" if "dome" in kinds else ""))


def _geom(a: float, b: float, n: int) -> list[float]:
    if a > 0 and b > 0:
        return [a * (b / a) ** (i / (n - 1)) for i in range(n)]
    return [a + (b - a) * i / (n - 1) for i in range(n)]
