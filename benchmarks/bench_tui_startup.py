"""Time to first screen of the joulebook app against a bare Textual app.

Target: ratio <= 1.5. Each run is a fresh process that imports what it
needs, builds the app, runs it headless (``App.run_test``) and stops the
clock when the first screen has been painted (the first refresh after
mount), then exits. The cases take turns for N rounds; prints the best and
the median of each, and the ratio measured in this one run: the median of
the rounds' own ratios (each round's runs are seconds apart, under the
same load), and best to best. Not a test: machines here are shared and
noisy.

    python benchmarks/bench_tui_startup.py [N]     (N rounds, default 15)

joulebook is measured opening a new worksheet (``joulebook``) and, for
information, an existing record (``joulebook open RECORD``), each built by
``tui.cli.app_for`` as the command builds it. Both sides run as installed:
the bytecode of ``balance`` and ``tui`` is compiled first (pip does that on
install; Textual's is), whatever PYTHONDONTWRITEBYTECODE says.
"""

from __future__ import annotations

import compileall
import os
import statistics
import subprocess
import sys
import tempfile
import textwrap
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

HARNESS = textwrap.dedent(
    """
    import asyncio, sys, time
    t0 = time.perf_counter()
    {build}

    async def main():
        painted = asyncio.get_running_loop().create_future()

        def first_paint():
            if not painted.done():
                painted.set_result(time.perf_counter())

        async with app.run_test(size=(80, 24)) as pilot:
            app.screen.call_after_refresh(first_paint)
            t1 = await painted
        print(t1 - t0)

    asyncio.run(main())
    """
)

BARE = """
from textual.app import App
from textual.widgets import Footer, Static

class Bare(App):
    def compose(self):
        yield Static("hello")
        yield Footer()

app = Bare()
"""

# what `joulebook` and `joulebook open RECORD` do up to App.run (tui.cli.cmd_open)
JOULEBOOK_NEW = """
import os, tempfile
os.chdir(tempfile.mkdtemp())
from tui.session import open_target
from tui.cli import app_for
app = app_for(open_target(None))
"""

JOULEBOOK_OPEN = """
from tui.session import open_target
from tui.cli import app_for
app = app_for(open_target(sys.argv[1], must_exist=True))
"""


def once(build: str, *args: str) -> float:
    code = HARNESS.format(build=textwrap.indent(textwrap.dedent(build), "").strip())
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    out = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True, cwd=ROOT,
                         check=True, env=env)
    return float(out.stdout.strip().splitlines()[-1])


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 15
    folder = Path(tempfile.mkdtemp(prefix="jb-bench-"))
    record = folder / "bench.jbk"
    from balance.worksheet import Worksheet
    from tui.session import Session

    Session.from_worksheet(Worksheet.load(ROOT / "samples" / "n2-buffer-into-receiver.toml"), record)
    # as installed: pip compiles the bytecode at install time, Textual's included
    for package in ("balance", "tui"):
        compileall.compile_dir(ROOT / package, quiet=1)
    cases = {
        "bare Textual app": (BARE, ()),
        "joulebook, new worksheet": (JOULEBOOK_NEW, ()),
        "joulebook open RECORD": (JOULEBOOK_OPEN, (str(record),)),
    }
    times: dict[str, list[float]] = {name: [] for name in cases}
    for _ in range(n):  # interleaved, so that a slow spell of a shared machine hits every case
        for name, (build, args) in cases.items():
            times[name].append(once(build, *args))
    for name, seen in times.items():
        print(f"{name:26s}: best {min(seen) * 1e3:7.1f} ms, median {statistics.median(seen) * 1e3:7.1f} ms (of {n})")
    bare = times["bare Textual app"]
    for name, label in (("joulebook, new worksheet", "target <= 1.5x"), ("joulebook open RECORD", "for information")):
        # each round's own ratio: its two runs are seconds apart, under the same load
        per_round = statistics.median(t / b for t, b in zip(times[name], bare))
        best = min(times[name]) / min(bare)
        print(f"ratio {name.removeprefix('joulebook').strip(', ')} / bare: {per_round:5.2f}x median of the rounds' "
              f"ratios, {best:5.2f}x best to best ({label})")


if __name__ == "__main__":
    main()
