"""``joulebook sweep WORKSHEET --vary PATH=VALUES ...``: one worksheet solved over a range of inputs.

Prints the cases as a table (the varied fields as typed, then the kind's main results in SI
with their units), writes every number of every case to ``--csv``, and draws one result against
the first varied field in the terminal (``--plot``; to a PNG or SVG file with ``--plot-file``
when the plotting extra, matplotlib, is installed). A case that fails is a row with its message.
Exit codes: 0 every case solved, 1 some did not (their rows say why), 2 bad input.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

EXIT_OK, EXIT_FAILED, EXIT_INPUT = 0, 1, 2
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)")


def add_parser(sub) -> None:
    p = sub.add_parser("sweep", help="solve a worksheet over a range of inputs: a table, a CSV, a plot")
    p.add_argument("file", help="the worksheet (.toml)")
    p.add_argument("--vary", action="append", metavar="PATH=VALUES", required=True,
                   help="a field and its values: initial.V-101.P='150 barg..180 barg' (with --points), or a list "
                        "fluid.model=ideal-gas,peng-robinson; several make a grid")
    p.add_argument("--points", type=int, metavar="N", help="values of each FROM..TO range, its ends included")
    p.add_argument("--together", action="store_true",
                   help="the fields varied go together value by value (each as many values), not as a grid")
    p.add_argument("--csv", metavar="FILE", help="every number of every case, one row per case")
    p.add_argument("--plot", nargs="?", const="", metavar="COLUMN",
                   help="draw a result (a CSV column; default the first main result) against the first field varied")
    p.add_argument("--plot-file", metavar="FILE.png|FILE.svg", help="draw it to a file (needs matplotlib: "
                   "pip install 'joulebook[plot]')")
    p.add_argument("--jobs", type=int, default=1, metavar="N", help="solve on N processes (the same rows)")
    p.set_defaults(func=cmd_sweep)


def _number(text: str) -> float | None:
    m = _NUMBER.match(text)
    return float(m.group(1)) if m else None


def cmd_sweep(args) -> int:
    from balance import api
    from balance.errors import InputError

    ws = api.read(Path(args.file))
    if args.plot_file and Path(args.plot_file).suffix.lower() not in (".png", ".svg"):
        raise InputError("--plot-file", f"draws a .png or an .svg file; got {args.plot_file!r}")
    progress = _progress() if sys.stderr.isatty() else None
    try:
        result = api.sweep(ws, args.vary, args.points, together=args.together, jobs=args.jobs,
                           progress=progress.tick if progress else None)
    finally:
        if progress:
            progress.stop()
    column = args.plot or (result.main[0] if result.main else "")
    if (args.plot is not None or args.plot_file) and column not in result.columns:
        raise InputError("--plot", f"{column!r} is no column of this sweep; its main results are "
                                   f"{', '.join(result.main) or 'none (no case solved)'}")
    if args.csv:
        try:
            with open(args.csv, "w", newline="", encoding="utf-8") as handle:
                result.csv(handle)
        except OSError as exc:
            raise InputError("--csv", f"{args.csv}: cannot be written: {exc.strerror}") from None
    from rich.console import Console

    console = Console()
    console.print(sweep_table(result))
    if args.plot is not None:
        print(sweep_plot(result, column))
    if args.plot_file:
        draw_file(result, column, args.plot_file)
        print(f"drawn to {args.plot_file}")
    failed = result.failed()
    if failed:
        print(f"{failed} of {len(result.rows)} cases not solved: their rows say why", file=sys.stderr)
    return EXIT_FAILED if failed else EXIT_OK


class _progress:
    """A progress bar on stderr, shown once a sweep has cases enough to wait for."""

    def __init__(self):
        from rich.console import Console
        from rich.progress import Progress

        self.bar = Progress(transient=True, console=Console(stderr=True))  # stdout keeps the table
        self.task = None

    def tick(self, done: int, total: int) -> None:
        if total < 20:
            return
        if self.task is None:
            self.bar.start()
            self.task = self.bar.add_task("solving cases", total=total)
        self.bar.update(self.task, completed=done)

    def stop(self) -> None:
        if self.task is not None:
            self.bar.stop()


def sweep_table(result, limit: int = 200):
    """The cases: the fields varied as typed, solved or why not, the main results (SI, units named)."""
    from rich import box
    from rich.table import Table

    t = Table(box=box.SIMPLE_HEAD, title=f"Sweep: {len(result.rows)} cases", title_justify="left")
    for v in result.varies:
        t.add_column(str(v.path))
    main = result.main
    for c in main:
        t.add_column(c.replace(" [", "\n["), justify="right")
    for r in result.rows[:limit]:
        if r.ok:
            t.add_row(*r.inputs, *(f"{r.values[c]:.6g}" if c in r.values else "—" for c in main))
        else:
            t.add_row(*r.inputs, *([f"not solved: {r.message}"] + [""] * (len(main) - 1) if main else []))
    if len(result.rows) > limit:
        t.caption = f"the first {limit} of {len(result.rows)} cases; --csv FILE has them all"
    return t


def _x_label(result) -> str:
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


def _lines(result, column: str):
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

    lines, labels = _lines(result, column)
    plt.clear_figure()
    plt.plotsize(width, height)
    plt.theme("clear")
    for label, xs, ys in lines:
        pts = [(x, y) for x, y in zip(xs, ys) if y is not None]
        if pts:
            plt.plot([p[0] for p in pts], [p[1] for p in pts], label=label or None, marker="dot")
    if labels:
        plt.xticks(list(range(1, len(labels) + 1)), labels)
    plt.title(f"{column} against {result.varies[0].path}")
    plt.xlabel(_x_label(result))
    text = re.sub(r"\x1b\[[0-9;]*m", "", plt.build())
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
    lines, labels = _lines(result, column)
    fig, ax = plt.subplots(figsize=(7, 4.5))
    for label, xs, ys in lines:
        pts = [(x, y) for x, y in zip(xs, ys) if y is not None]
        ax.plot([p[0] for p in pts], [p[1] for p in pts], marker="o", label=label or None)
    if labels:
        ax.set_xticks(range(1, len(labels) + 1), labels)
    ax.set_xlabel(_x_label(result))
    ax.set_ylabel(column)
    ax.grid(True, alpha=0.3)
    if len(lines) > 1:
        ax.legend()
    try:
        fig.savefig(path)
    except OSError as exc:
        raise InputError("--plot-file", f"{path}: cannot be written: {exc.strerror}") from None
    finally:
        plt.close(fig)
