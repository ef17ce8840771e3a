"""T–s, h–s and P–h diagrams of a steady-flow network, drawn in the terminal with plotext.

The widget only draws: the points come from :func:`balance.diagrams.flow_trace`
(molar SI, each curve with its own molar mass) and are shown per unit mass in
the display units. Each device's path is drawn in its own colour and named
beside it, in the style of its path: a valve's isenthalpic line and a heater's,
a cooler's or an exchanger side's isobar solid, a machine's isentropic line
from its inlet dotted and its inlet joined to its actual outlet dashed (no path
is known between them), a mixer's, splitter's or separator's streams as points.
Every stream's state is marked and named. The view holds the network; a
saturation dome is drawn where it passes through that view. The title says
what is drawn, in words, as much of it as the plot's width holds. On the P–h
plane the pressure axis is logarithmic and labelled so.
"""

from __future__ import annotations

import math

from textual_plotext import PlotextPlot

from ..display import converter, unit_label
from .process_diagram import geom, inside, window

#: plotext colours: each device's in turn (red is the states', grey the dome's)
DEVICE_COLOURS = ("cyan", "green", "magenta", "orange", "blue", "yellow")
COLOURS = {"dome": "gray", "state": "red"}
#: a dashed line: this many dashes, each half of its step
DASHES = 12
#: every how many of an isentropic line's points one dot is drawn (dotted, not solid)
DOT_EVERY = 2
#: the columns of the widget outside the plot's frame (the y ticks and the frame), about
PLOT_MARGIN = 10
#: the words for each device's path in the title (long, then short), by its curves' style
PATH_WORDS = {"isenthalpic": ("isenthalpic", "isenthalpic"), "isobar": ("isobar", "isobar"),
              "isentropic": ("isentropic dotted, actual dashed", "isentropic dotted"),
              "points": ("streams", "streams")}


class FlowDiagram(PlotextPlot):
    """``plane`` is ``'T-s'``, ``'h-s'`` or ``'P-h'`` (a :data:`tui.analysis.DRAWN` plane)."""

    DEFAULT_CSS = """
    FlowDiagram { height: 1fr; min-height: 12; }
    """

    def __init__(self, plane: str, id: str | None = None) -> None:
        super().__init__(id=id)
        self.plane = plane
        self.trace = None
        self.units = "metric"
        self.dome_shown = False
        self.titles: tuple[str, ...] = ("solve to draw the network",)
        """the title's forms, longest first: the first that fits the plot is drawn"""

    def show_trace(self, traces, units: str) -> None:
        """Draw ``traces`` (:class:`tui.analysis.FlowTraces`, or None before the diagram is computed)."""
        self.trace = None if traces is None else traces.on(self.plane)
        self.units = units
        self._draw()
        self.refresh()

    def render(self):
        # drawn at the plot's width: a state's name is set one cell off its mark, and the title
        # is the longest form that fits (plotext leaves out a title wider than the plot)
        width = self.size.width
        self._draw(width)
        self.plt.title(next((t for t in self.titles if len(t) <= width - 2), ""))
        return super().render()

    def _axis(self, key: str):
        """(value of a curve's property, M) -> its display value, and the axis label."""
        to = converter(key, self.units)
        label = f"{key} [{unit_label(key, self.units)}]"
        if key in ("h", "s"):  # per unit mass
            return (lambda q, M: to(q / M)), label
        return (lambda q, M: to(q)), label + (", log scale" if key == "P" else "")

    def _draw(self, width: int = 80) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        tr = self.trace
        if tr is None:
            self.titles = ("solve to draw the network",)
            return
        (xk, yk) = tr.axes
        (X, xl), (Y, yl) = self._axis(xk), self._axis(yk)
        x_log, y_log = xk == "P", yk == "P"

        def xy(curve):
            M = curve.M
            return [X(q, M) for q in getattr(curve, xk)], [Y(q, M) for q in getattr(curve, yk)]

        at = {"T": 2, "P": 3, "v": 4, "h": 5, "s": 6}
        states = [(st[0], X(st[at[xk]], st[1]), Y(st[at[yk]], st[1])) for st in tr.states]
        # the view: the devices' paths and the streams' states with a margin; a dome only where
        # it passes through that view (whole, it would squash the network to a dot)
        lines = [xy(c) for c in tr.curves if c.style != "dome"]
        lines.append(([x for _, x, _ in states], [y for _, _, y in states]))
        x_lo, x_hi = window([x for xs, _ in lines for x in xs], x_log)
        y_lo, y_hi = window([y for _, ys in lines for y in ys], y_log)
        colour = {}
        for c in tr.curves:
            if c.device and c.device not in colour:
                colour[c.device] = DEVICE_COLOURS[len(colour) % len(DEVICE_COLOURS)]
        self.dome_shown = False
        for curve in tr.curves:
            xs, ys = xy(curve)
            if curve.style == "dome":
                for run in inside(xs, ys, (x_lo, x_hi), (y_lo, y_hi)):
                    plt.plot(*run, marker="braille", color=COLOURS["dome"])
                    self.dome_shown = True
            elif curve.style == "jump":
                for run in _dashes(xs, ys, x_log, y_log):
                    plt.plot(*run, marker="braille", color=colour[curve.device])
            elif curve.style == "isentropic":
                plt.scatter(xs[::DOT_EVERY], ys[::DOT_EVERY], marker="braille", color=colour[curve.device])
            elif curve.style == "points":
                plt.scatter(xs, ys, marker="◆", color=colour[curve.device])
            else:  # isenthalpic, isobar
                plt.plot(xs, ys, marker="braille", color=colour[curve.device])
        for device, (x, y) in _name_places(tr, xy).items():
            plt.text(device, x, y, color=colour[device], alignment="center")
        xs = [x for _, x, _ in states]
        lo, hi = min(xs), max(xs)
        columns = max(width - PLOT_MARGIN, 10)
        cell = (x_hi / x_lo) ** (1 / columns) if x_log else (x_hi - x_lo) / columns  # one column, about
        for name, x, y in states:
            plt.scatter([x], [y], marker="●", color=COLOURS["state"])
            # labels lean away from the nearer edge so they are not cut off, one cell off the mark
            right = hi > lo and (x > (lo * hi) ** 0.5 if x_log and lo > 0 else (x - lo) > 0.5 * (hi - lo))
            off = (x / cell if right else x * cell) if x_log else (x - cell if right else x + cell)
            plt.text(name, off, y, color=COLOURS["state"], alignment="right" if right else "left")
        for log, scale, limits, ends in ((x_log, plt.xscale, plt.xlim, (x_lo, x_hi)),
                                         (y_log, plt.yscale, plt.ylim, (y_lo, y_hi))):
            if log:  # plotext takes the limits of a log axis as powers of ten
                scale("log")
                limits(math.log10(ends[0]), math.log10(ends[1]))
            else:
                limits(*ends)
        plt.xlabel(xl)
        plt.ylabel(yl)
        self.titles = title_texts(tr, self.dome_shown)


def title_texts(tr, dome_shown: bool = True) -> tuple[str, ...]:
    """What the diagram shows, in words, from the longest form to the shortest: each device
    (its kind, name and the kind of its path), then each device's name and path, then the names
    alone; and the saturation dome (or that it lies outside the view). The tab names the plane."""
    devices: dict[str, tuple[str, str]] = {}
    for c in tr.curves:
        if c.device and c.device not in devices:
            devices[c.device] = (c.label.split(" ", 1)[0], c.style)
    has_dome = any(c.style == "dome" for c in tr.curves)
    dome = ("" if not has_dome else " · dome grey" if dome_shown else " · dome off view")
    forms = (
        " · ".join(f"{kind} {name} {PATH_WORDS.get(style, ('', ''))[0]}".rstrip()
                   for name, (kind, style) in devices.items()),
        " · ".join(f"{name} {PATH_WORDS.get(style, ('', ''))[1]}".rstrip() for name, (kind, style) in devices.items()),
        " · ".join(devices),
    )
    # the devices' words before the dome's: each form with the dome, then without it
    return tuple(text for f in forms for text in (f + dome, f))


def _dashes(xs, ys, x_log: bool, y_log: bool) -> list[tuple[list[float], list[float]]]:
    """A straight line (in the plotted axes) from the first point to the last, as dashes."""
    n = 2 * DASHES
    px = geom(xs[0], xs[-1], n + 1) if x_log else [xs[0] + (xs[-1] - xs[0]) * i / n for i in range(n + 1)]
    py = geom(ys[0], ys[-1], n + 1) if y_log else [ys[0] + (ys[-1] - ys[0]) * i / n for i in range(n + 1)]
    return [([px[i], px[i + 1]], [py[i], py[i + 1]]) for i in range(0, n, 2)]


def _name_places(tr, xy) -> dict[str, tuple[float, float]]:
    """Where each device's name is written: the middle point of its first path (of a machine,
    its isentropic line); a device drawn as points only is named in the title."""
    places: dict[str, tuple[float, float]] = {}
    for c in tr.curves:
        if c.device and c.device not in places and c.style in ("isenthalpic", "isobar", "isentropic"):
            xs, ys = xy(c)
            places[c.device] = (xs[len(xs) // 2], ys[len(ys) // 2])
    return places
