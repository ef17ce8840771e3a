"""P–v and T–s diagrams of the process, drawn in the terminal with plotext.

The widget only draws: the points come from :func:`balance.diagrams.trace`
(molar SI) and are shown per unit mass in the display units. A quasi-static
path is drawn through the states the model computed along it, and those
states are marked on it; the P–v axes are logarithmic and labelled so.
"""

from __future__ import annotations

from textual_plotext import PlotextPlot

from ..display import converter, unit_label

#: plotext colours: path, jump, dome, states
COLOURS = {"path": "cyan", "jump": "orange", "dome": "gray", "state": "red", "along": "white"}
JUMP_POINTS = 24
#: every how many of a path's states one is marked on it
ALONG_EVERY = 4


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
                if curve.style == "path":  # the model's states the path is drawn through
                    plt.scatter(xs[::ALONG_EVERY], ys[::ALONG_EVERY], marker="•", color=COLOURS["along"])
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
            xl, yl = f"{xl}, log scale", f"{yl}, log scale"
        plt.xlabel(xl)
        plt.ylabel(yl)
        plt.title(self.title_text(tr, pv))

    @staticmethod
    def title_text(tr, pv: bool) -> str:
        """What the diagram shows, in words: the path (through the model's states, •) or
        that there is none, and the saturation dome."""
        kinds = {c.style: c for c in tr.curves}
        if "path" in kinds:
            what = f"{kinds['path'].label}, {len(kinds['path'].T)} model states •"
        elif "jump" in kinds:
            what = "no quasi-static path (dotted)"
        else:
            what = ""
        return (("P–v log–log" if pv else "T–s") + (f": {what}" if what else "")
                + (" · dome grey" if "dome" in kinds else ""))


def _geom(a: float, b: float, n: int) -> list[float]:
    if a > 0 and b > 0:
        return [a * (b / a) ** (i / (n - 1)) for i in range(n)]
    return [a + (b - a) * i / (n - 1) for i in range(n)]
