"""Time to first screen of the joulebook app against a bare Textual app.

Target: ratio <= 1.5. Each run is a fresh process that imports what it
needs, builds the app, runs it headless (``App.run_test``) and stops the
clock when the first screen has been painted (the first refresh after
mount), then exits. Prints the best of N for each, and the ratio measured in
this one run. Not a test: machines here are shared and noisy.

    python benchmarks/bench_tui_startup.py [N]

joulebook is measured opening a new worksheet (``joulebook``) and, for
information, an existing record (``joulebook open RECORD``).
"""

from __future__ import annotations

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

JOULEBOOK_NEW = """
import os, tempfile
from tui.session import Session
from tui.app import JoulebookApp
app = JoulebookApp(Session.new(directory=tempfile.mkdtemp()))
"""

JOULEBOOK_OPEN = """
from tui.session import open_target
from tui.app import JoulebookApp
app = JoulebookApp(open_target(sys.argv[1], must_exist=True))
"""


def once(build: str, *args: str) -> float:
    code = HARNESS.format(build=textwrap.indent(textwrap.dedent(build), "").strip())
    out = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True, cwd=ROOT,
                         check=True)
    return float(out.stdout.strip().splitlines()[-1])


def best_of(build: str, n: int, *args: str) -> float:
    return min(once(build, *args) for _ in range(n))


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    folder = Path(tempfile.mkdtemp(prefix="jb-bench-"))
    record = folder / "bench.jbk"
    from balance.worksheet import Worksheet
    from tui.session import Session

    Session.from_worksheet(Worksheet.load(ROOT / "samples" / "n2-buffer-into-receiver.toml"), record)
    bare = best_of(BARE, n)
    new = best_of(JOULEBOOK_NEW, n)
    opened = best_of(JOULEBOOK_OPEN, n, str(record))
    print(f"bare Textual app, first screen      : {bare * 1e3:8.1f} ms (best of {n})")
    print(f"joulebook, new worksheet            : {new * 1e3:8.1f} ms (best of {n})")
    print(f"joulebook open RECORD (demo record) : {opened * 1e3:8.1f} ms (best of {n})")
    print(f"ratio new worksheet / bare          : {new / bare:8.2f}x  (target <= 1.5x)")
    print(f"ratio open record / bare            : {opened / bare:8.2f}x  (for information)")


if __name__ == "__main__":
    main()
