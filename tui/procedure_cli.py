"""``joulebook procedure list | show ID | check FILE``: the house procedures, from the command line.

Headless: plain text, no Textual. Exit codes as the rest of the command: 0 fine, 2 a
procedure file with mistakes (each on its own line, ``FILE:LINE: key: what is wrong``) or an
unknown id.
"""

from __future__ import annotations

import sys
import textwrap
from pathlib import Path

EXIT_OK, EXIT_INPUT = 0, 2


def cmd_list(args) -> int:
    from balance.procedures import folders, listing

    found = listing()
    print("Procedure folders, searched in this order:")
    for folder, origin in folders():
        state = "" if folder.is_dir() else "  (no such folder)"
        print(f"  {folder}  [{origin}]{state}")
    if not found:
        print("No procedures found.")
        return EXIT_OK
    print()
    for item in found:
        p = item.procedure
        if p is None:
            print(f"  {item.path.name}: NOT READ: {item.problem}")
            continue
        shadow = "  (hidden by an earlier folder's procedure of this id)" if item.shadowed else ""
        exercises = f", {len(p.exercises)} exercise{'s' if len(p.exercises) != 1 else ''}" if p.exercises else ""
        print(f"  {p.id}  version {p.version}  [{', '.join(p.kinds)}{exercises}]  {p.title}{shadow}")
        print(f"      {item.path}")
    return EXIT_OK


def _para(text: str, indent: str = "    ") -> list[str]:
    out = []
    for block in text.split("\n\n"):
        out += textwrap.wrap(" ".join(block.split()), 88, initial_indent=indent, subsequent_indent=indent) or [""]
        out.append("")
    return out[:-1]


def show_lines(p) -> list[str]:
    """A procedure in words: what ``procedure show`` prints."""
    from balance.kinds import KINDS
    from balance.procedures.quantities import QUANTITIES
    from balance.procedures.schema import COMPARISONS, REQUIRABLE

    out = [f"{p.title}", f"  id {p.id}, version {p.version}, owner {p.owner}",
           "  for " + "; ".join(KINDS[k].title for k in p.kinds), f"  file {p.path}", f"  sha256 {p.sha256}"]
    if p.summary:
        out += [""] + _para(p.summary, "  ")
    if p.defaults:
        out += ["", "House defaults: " + ", ".join(f"{k} {v}" for k, v in p.defaults.items())]
    order = list(dict.fromkeys(s for k in p.kinds for s in KINDS[k].steps))
    for step in order:
        guide = p.steps.get(step)
        if guide is None:
            continue
        out += ["", f"Step {step}:"]
        if guide.guidance:
            out += _para(guide.guidance)
        for name in guide.required:
            out.append(f"    required: {name} ({REQUIRABLE[name].words})")
    if p.model_rules:
        out += ["", "Property models:"]
        for r in p.model_rules:
            when = [f"the pressure above {r.P_above / 1e5:g} bar"] if r.P_above is not None else []
            when += [f"the reduced temperature below {r.Tr_below:g}"] if r.Tr_below is not None else []
            out.append(f"  {r.id} ({r.severity}): {', '.join(r.allowed)} " +
                       (f"when {' or '.join(when)}" if when else "always"))
            out += _para(r.text, "      ")
    if p.checks:
        out += ["", "Acceptance checks on the result:"]
        for c in p.checks:
            out.append(f"  {c.id} ({c.severity}): {c.quantity} {COMPARISONS[c.compare][1]} {c.limit_text}"
                       + (f" [{', '.join(c.kinds)}]" if c.kinds else ""))
            out.append(f"      {QUANTITIES[c.quantity].words}")
            out += _para(c.message, "      ")
    s = p.signoff
    out += ["", "Sign-off: " + ", ".join(s.roles) + (", each by a different person" if s.distinct else "")]
    for e in s.escalations:
        out.append(f"  and {e.role} when {e.quantity} is above {e.above_text}: {e.text}")
    if p.exercises:
        out += ["", "Exercises (joulebook practice " + p.id + " --exercise ID):"]
        out += [f"  {e.id}: {e.title}" for e in p.exercises]
    return out


def cmd_show(args) -> int:
    from balance.procedures import find, load

    p = load(Path(args.id)) if args.id.endswith(".toml") else find(args.id, "procedure show")
    print("\n".join(show_lines(p)))
    return EXIT_OK


def cmd_check(args) -> int:
    from balance.procedures import check_file

    found = check_file(Path(args.file))
    for problem in found:
        where = f"{args.file}:{problem.line}" if problem.line else args.file
        print(f"{where}: {problem.key + ': ' if problem.key else ''}{problem.message}", file=sys.stderr)
    if found:
        print(f"joulebook: {args.file}: {len(found)} mistake{'s' if len(found) > 1 else ''}", file=sys.stderr)
        return EXIT_INPUT
    from balance.procedures import load

    p = load(Path(args.file))
    print(f"{args.file}: procedure {p.id} version {p.version} reads: {len(p.steps)} steps with guidance, "
          f"{len(p.required())} required fields, {len(p.model_rules)} model rules, {len(p.checks)} checks, "
          f"{len(p.exercises)} exercises; sha256 {p.sha256}")
    return EXIT_OK


def add_parser(sub) -> None:
    p = sub.add_parser("procedure", help="the house procedures: list them, show one, check a procedure file")
    what = p.add_subparsers(dest="procedure_command", required=True)
    q = what.add_parser("list", help="every procedure in the procedure folders, and the folders")
    q.set_defaults(func=cmd_list)
    q = what.add_parser("show", help="a procedure in words: guidance, required fields, models, checks, sign-off")
    q.add_argument("id", help="a procedure's id (or a procedure file, .toml)")
    q.set_defaults(func=cmd_show)
    q = what.add_parser("check", help="check a procedure file: every key, unit and quantity, each mistake by its line")
    q.add_argument("file")
    q.set_defaults(func=cmd_check)
