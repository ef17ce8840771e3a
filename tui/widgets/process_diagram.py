"""P–v and T–s diagrams of the process, drawn in the terminal with plotext.

The widget only draws: the points come from :func:`balance.diagrams.trace`
(molar SI) and are shown per unit mass in the display units. A quasi-static
path is drawn through the states the model computed along it, and those
states are marked on it; the P–v axes are logarithmic and labelled so.
"""

from __future__ import annotations

import math

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

        # the view: the process (its states and path) with a margin; a saturation dome is
        # drawn where it passes through that view (whole, it would squash the process to a dot)
        process = [xy(c) for c in tr.curves if c.style != "dome"]
        process.append(([X(v, M) if pv else X(s, M) for _, T, P, v, s in tr.states],
                        [Y(P) if pv else Y(T) for _, T, P, v, s in tr.states]))
        x_lo, x_hi = window([x for xs, _ in process for x in xs], pv)
        y_lo, y_hi = window([y for _, ys in process for y in ys], pv)
        self.dome_shown = False
        for curve in tr.curves:
            xs, ys = xy(curve)
            if curve.style == "dome":
                for run in inside(xs, ys, (x_lo, x_hi), (y_lo, y_hi)):
                    plt.plot(*run, marker="braille", color=COLOURS["dome"])
                    self.dome_shown = True
                continue
            if curve.style == "jump":
                # no quasi-static path: a dotted straight line (in the plotted axes)
                n = JUMP_POINTS
                xs = [xs[0] + (xs[1] - xs[0]) * i / (n - 1) for i in range(n)] if not pv else geom(xs[0], xs[1], n)
                ys = [ys[0] + (ys[1] - ys[0]) * i / (n - 1) for i in range(n)] if not pv else geom(ys[0], ys[1], n)
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
        if pv:  # plotext takes the limits of a log axis as powers of ten
            plt.xlim(math.log10(x_lo), math.log10(x_hi))
            plt.ylim(math.log10(y_lo), math.log10(y_hi))
        else:
            plt.xlim(x_lo, x_hi)
            plt.ylim(y_lo, y_hi)
        plt.xlabel(xl)
        plt.ylabel(yl)
        plt.title(self.title_text(tr, pv, self.dome_shown))

    @staticmethod
    def title_text(tr, pv: bool, dome_shown: bool = True) -> str:
        """What the diagram shows, in words: the path (through the model's states, •) or
        that there is none, and the saturation dome (or that it lies outside the view)."""
        kinds = {c.style: c for c in tr.curves}
        if "path" in kinds:
            what = f"{kinds['path'].label}: {len(kinds['path'].T)} model states •"
        elif "jump" in kinds:
            what = "no quasi-static path (dotted)"
        else:
            what = ""
        dome = ("" if "dome" not in kinds else " · dome grey" if dome_shown else " · dome off view")
        # the tab names the plane; a title wider than the plot is not drawn at all
        return (what + dome).lstrip(" ·")


#: the margin around the process: a share of its span (linear axes), a factor (log axes)
MARGIN, LOG_MARGIN = 0.25, 1.6


def window(values: list[float], log: bool) -> tuple[float, float]:
    """The range of an axis: the process's values with a margin (never empty)."""
    lo, hi = min(values), max(values)
    if log and lo > 0:
        spread = max(LOG_MARGIN, (hi / lo) ** MARGIN)
        return lo / spread, hi * spread
    pad = MARGIN * (hi - lo) or 0.05 * max(abs(lo), abs(hi)) or 1.0
    return lo - pad, hi + pad


def inside(xs, ys, x_range, y_range) -> list[tuple[list[float], list[float]]]:
    """The runs of a curve's points inside the view, each drawn on its own (a gap is not a chord)."""
    runs, run = [], ([], [])
    for x, y in zip(xs, ys):
        if x_range[0] <= x <= x_range[1] and y_range[0] <= y <= y_range[1]:
            run[0].append(x)
            run[1].append(y)
        elif run[0]:
            runs.append(run)
            run = ([], [])
    if run[0]:
        runs.append(run)
    return [r for r in runs if len(r[0]) >= 2]


def geom(a: float, b: float, n: int) -> list[float]:
    if a > 0 and b > 0:
        return [a * (b / a) ** (i / (n - 1)) for i in range(n)]
    return [a + (b - a) * i / (n - 1) for i in range(n)]
