"""A sweep drawn: a result against the first field varied, one line per value of the second.

The same lines for the command line's text plot (plotext), its PNG or SVG file (matplotlib, the
``plot`` extra) and the app's Sweep tab (textual-plotext): :func:`lines` and :func:`x_label`.
"""

from __future__ import annotations

import re

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)")
_ANSI = re.compile(r"\x1b\[[0-9;]*m")


def _number(text: str) -> float | None:
    m = _NUMBER.match(text)
    return float(m.group(1)) if m else None


def x_label(result) -> str:
    """The first field's path, with the unit its values were typed in."""
    m = [_NUMBER.match(r.inputs[0]) for r in result.rows]
    units = {r.inputs[0][k.end():].strip() for r, k in zip(result.rows, m) if k}
    return f"{result.varies[0].path} [{units.pop()}]" if len(units) == 1 and "" not in units else str(result.varies[0].path)


def _xs(result) -> tuple[list[float], list[str] | None]:
    """The first field's values as numbers (a list of words, as 1, 2, 3 with their labels)."""
    texts = [r.inputs[0] for r in result.rows]
    numbers = [_number(t) for t in texts]
    if all(n is not None for n in numbers):
        return numbers, None
    labels = list(dict.fromkeys(texts))
    return [float(labels.index(t) + 1) for t in texts], labels


def lines(result, column: str):
    """(label, xs, ys) per value of the second field varied (one line on a grid), else one line."""
    xs, labels = _xs(result)
    if len(result.varies) < 2:
        ys = [r.values.get(column) for r in result.rows]
        return [("", xs, ys)], labels
    out = []
    for value in dict.fromkeys(r.inputs[1] for r in result.rows):
        pick = [k for k, r in enumerate(result.rows) if r.inputs[1] == value]
        out.append((f"{result.varies[1].path} = {value}", [xs[k] for k in pick],
                    [result.rows[k].values.get(column) for k in pick]))
    return out, labels


def sweep_plot(result, column: str, width: int = 80, height: int = 18) -> str:
    """``column`` against the first field varied, drawn in text (plotext); unsolved cases left out."""
    import plotext as plt

    drawn, labels = lines(result, column)
    plt.clear_figure()
    plt.plotsize(width, height)
    plt.theme("clear")
    for label, xs, ys in drawn:
        pts = [(x, y) for x, y in zip(xs, ys) if y is not None]
        if pts:
            plt.plot([p[0] for p in pts], [p[1] for p in pts], label=label or None, marker="dot")
    if labels:
        plt.xticks(list(range(1, len(labels) + 1)), labels)
    plt.title(f"{column} against {result.varies[0].path}")
    plt.xlabel(x_label(result))
    text = _ANSI.sub("", plt.build())
    plt.clear_figure()
    return text


def draw_file(result, column: str, path: str) -> None:
    """The same plot to a PNG or SVG file, with matplotlib (the ``plot`` extra)."""
    from balance.errors import InputError

    try:
        import matplotlib

        matplotlib.use("Agg")  # no screen: a file only
        import matplotlib.pyplot as plt
    except ImportError:
        raise InputError("--plot-file", "needs matplotlib: pip install 'joulebook[plot]' (the terminal plot, "
                                        "--plot, needs nothing more)") from None
    drawn, labels = lines(result, column)
    fig, ax = plt.subplots(figsize=(7, 4.5))
    for label, xs, ys in drawn:
        pts = [(x, y) for x, y in zip(xs, ys) if y is not None]
        ax.plot([p[0] for p in pts], [p[1] for p in pts], marker="o", label=label or None)
    if labels:
        ax.set_xticks(range(1, len(labels) + 1), labels)
    ax.set_xlabel(x_label(result))
    ax.set_ylabel(column)
    ax.grid(True, alpha=0.3)
    if len(drawn) > 1:
        ax.legend()
    try:
        fig.savefig(path)
    except OSError as exc:
        raise InputError("--plot-file", f"{path}: cannot be written: {exc.strerror}") from None
    finally:
        plt.close(fig)
