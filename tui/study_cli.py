"""``joulebook sweep WORKSHEET --vary PATH=VALUES ...``: one worksheet solved over a range of inputs.

Prints the cases as a table (the varied fields as typed, then the kind's main results in SI
with their units), writes every number of every case to ``--csv``, and draws one result against
the first varied field in the terminal (``--plot``; to a PNG or SVG file with ``--plot-file``
when the plotting extra, matplotlib, is installed). A case that fails is a row with its message.
Exit codes: 0 every case solved, 1 some did not (their rows say why), 2 bad input.
"""

from __future__ import annotations

import sys
from pathlib import Path

EXIT_OK, EXIT_FAILED, EXIT_INPUT = 0, 1, 2


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
        from .sweep_plot import sweep_plot

        print(sweep_plot(result, column))
    if args.plot_file:
        from .sweep_plot import draw_file

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
