"""The uncertainty of a result for the command line: each main result ± U with u_c, its budget,
and a Monte Carlo run's spread when one was asked for. In SI, each number with its unit, as
:mod:`balance.study.uncertainty` gives them (the record's text shows the same budget)."""

from __future__ import annotations

from rich import box
from rich.console import Group
from rich.table import Table
from rich.text import Text

from balance.study.uncertainty import coefficient_unit


def _g(x, unit: str = "") -> str:
    if x is None:
        return "—"
    s = f"{x:.6g}"
    return s + (f" {unit}" if unit else "")


def budget_table(b, compact: bool = False) -> Table:
    """One result's budget (:class:`balance.study.uncertainty.Budget`), largest share first;
    ``compact`` (the app's narrow pane): the input by its path, u, c·u and the share only."""
    if b.u_c is not None:
        title = f"{b.column}: {_g(b.value, b.unit)} ± {_g(b.U, b.unit)} (k = {b.k:g}), u_c = {_g(b.u_c, b.unit)}"
    else:
        title = f"{b.column}: {_g(b.value, b.unit)}; u_c not given: an input's cases did not solve"
    t = Table(title=title, box=box.SIMPLE_HEAD, title_justify="left")
    t.add_column("input, as typed", ratio=1)
    names = ("u", "c·u", "share") if compact else ("u", "c (sensitivity)", "c·u", "share")
    for name in names:
        t.add_column(name, justify="right", no_wrap=True)
    for li in b.lines:
        inp = li.input
        typed = Text(inp.path)
        typed.append(f"\n{inp.value_text} ± {inp.uncertainty.text}", style="dim")
        if li.failed:
            t.add_row(typed, _g(inp.u, inp.si_unit), Text(f"not evaluated: {li.failed}", style="red"),
                      *([""] * (len(names) - 2)))
            continue
        c = () if compact else (_g(li.c, coefficient_unit(b.unit, inp.si_unit)),)
        t.add_row(typed, _g(inp.u, inp.si_unit), *c, _g(li.contribution, b.unit), f"{100 * li.share:.1f} %")
    return t


def monte_carlo_table(run) -> Table:
    """A Monte Carlo run (:class:`balance.study.uncertainty.MonteCarlo`): each result's mean,
    standard deviation and coverage interval; the samples that failed, with why."""
    t = Table(title=f"Monte Carlo (JCGM 101:2008): {run.samples} samples, seed {run.seed}; {run.solved} solved, "
                    f"{run.failed} failed", box=box.SIMPLE_HEAD, title_justify="left")
    for name, justify in (("result", "left"), ("mean", "right"), ("standard deviation", "right"),
                          (f"{100 * run.probability:g} % coverage interval", "right")):
        t.add_column(name, justify=justify)
    for s in run.spreads:
        t.add_row(s.column, _g(s.mean, s.unit), _g(s.sd, s.unit), f"[{_g(s.low)}, {_g(s.high)}] {s.unit}".rstrip())
    if run.failures:
        t.caption = "failed: " + "; ".join(f"{n} × {m}" for m, n in run.failures[:3]) + (
            f"; and {len(run.failures) - 3} other messages" if len(run.failures) > 3 else "")
    return t


def uncertainty_renderable(p, compact: bool = False) -> Group:
    """Every result's budget, then the Monte Carlo run (:class:`balance.study.uncertainty.Propagation`);
    ``compact``: narrower budgets, for the app."""
    parts = [Text("Uncertainty of the results: law of propagation of uncertainty, first order (JCGM 100:2008 "
                  "5.1.2), inputs uncorrelated; sensitivity coefficients by central differences, step u/10; SI",
                  style="bold")]
    parts += [budget_table(b, compact) for b in p.budgets]
    if p.monte_carlo is not None:
        parts.append(monte_carlo_table(p.monte_carlo))
    return Group(*parts)
