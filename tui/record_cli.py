"""``joulebook record …``: the audit trail on the command line.

Subcommands (the README's "The record" lists them with examples):

import, show, verify, sign, comment, resolve, diff, replay, export,
worksheet, update, recheck.

Exit codes as for the other commands: 0 done (verified, reproduced,
solved), 1 a check failed (broken chain, invalid signature, results that do
not reproduce, a solve that failed and was recorded as such), 2 bad input
or an unreadable record (the message names the file and line). ``recheck``
of an archive tells two more apart: 4 results changed, 5 a re-solve failed
(:data:`RECHECK_EXIT`).
"""

from __future__ import annotations

import sys

EXIT_OK, EXIT_FAILED, EXIT_INPUT = 0, 1, 2
#: ``recheck``: the records are intact but the running joulebook computes otherwise (3 is taken by
#: `joulebook solve`: a house procedure's rule stops the result)
EXIT_CHANGED, EXIT_RESOLVE = 4, 5
#: ``recheck``'s exit code for the outcome that wins over the others found (balance.record.recheck.OUTCOMES)
RECHECK_EXIT = {"chain broken": EXIT_FAILED, "unreadable": EXIT_INPUT, "signature invalid": EXIT_FAILED,
                "fails verification": EXIT_FAILED, "re-solve failed": EXIT_RESOLVE,
                "results changed": EXIT_CHANGED, "not signed": EXIT_OK, "reproduced": EXIT_OK}
#: balance.record.DEFAULT_TOLERANCE, repeated so that building the parser imports nothing (a test checks)
DEFAULT_TOLERANCE = 1e-9


def _console():
    from rich.console import Console

    return Console(highlight=False)


def _wide_console():
    from rich.console import Console

    return Console(highlight=False, width=10_000)


def _load(path: str):
    from balance.record import Record

    rec = Record.load(path)
    if rec.recovered:
        print(f"joulebook: {path}: {rec.recovered}", file=sys.stderr)
    return rec


def _broken(rec, path: str, what: str) -> bool:
    """Say on standard error that the record's chain is broken and what that means for ``what``
    this command printed; True when it is (the command then exits 1, as verify does)."""
    if rec.broken is None:
        return False
    seq, reason = rec.broken
    print(f"joulebook: {path}: the chain is broken at entry {seq}: {reason}; {what}", file=sys.stderr)
    return True


def _allowed(args) -> str | None:
    if getattr(args, "allowed_signers", None):
        return args.allowed_signers
    from balance.record import default_allowed_signers

    return default_allowed_signers()


def _pipe_safe(func):
    """A command whose output may go to a pager or `head` that closes early: no traceback."""
    import functools
    import os

    @functools.wraps(func)
    def run(args) -> int:
        try:
            code = func(args)
            sys.stdout.flush()
            return code
        except BrokenPipeError:
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
            return EXIT_OK
    return run


def _entry_line(e) -> str:
    return f"entry {e.seq} ({e.kind}) written; chain head {e.hash}"


def _solve_outcome(entry) -> int:
    if "error" in entry.data:
        print(f"joulebook: not solved (recorded in entry {entry.seq}): {entry.data['error']}", file=sys.stderr)
        return EXIT_FAILED
    return EXIT_OK


# -- subcommands ------------------------------------------------------------------------
@_pipe_safe
def cmd_import(args) -> int:
    from balance.record import Record
    from balance.worksheet import Worksheet

    ws = Worksheet.load(args.worksheet)
    rec = Record.create(args.record, worksheet=ws)
    print(f"{args.record}: new record, {len(rec.entries)} entries; chain head {rec.head}")
    return _solve_outcome(rec.entries[-1])


@_pipe_safe
def cmd_show(args) -> int:
    from rich.text import Text

    rec = _load(args.record)
    v = rec.verify(_allowed(args))
    status = {s.seq: s for s in v.signoffs}
    con = _console()
    con.print(Text(f"{args.record}: {len(rec.entries)} entries, revision {rec.revision}", style="bold"))
    if rec.broken:
        con.print(Text(f"The chain is BROKEN at entry {rec.broken[0]}: {rec.broken[1]}. The entries below are "
                       "shown as read, not as filed.", style="bold red"), soft_wrap=True)
    for e in rec.entries:
        head = Text()
        head.append(f"entry {e.seq}", style="bold cyan")
        head.append(f"  {e.kind}", style="bold")
        head.append(f"  {e.time}  by {e.author}", style="dim")
        if e.seq in status:
            s = status[e.seq]
            head.append(f"  [{s.status}]", style={"valid": "green", "unsigned": "yellow"}.get(s.status, "red"))
        con.print()
        con.print(head)
        con.print(Text(e.text), soft_wrap=True)  # long lines wrap in the terminal, tables stay whole
        if args.data:
            from balance.record.format import data_lines

            con.print(Text("\n".join(data_lines(e.data)), style="dim"), soft_wrap=True)
    con.print()
    style = "green" if v.ok else ("yellow" if v.chain_ok and not v.problems else "red")
    for line in v.lines():
        con.print(Text(line, style=style if line.startswith("verdict") else ""), soft_wrap=True)
    return EXIT_FAILED if _broken(rec, args.record, "the entries shown are not the record as filed") else EXIT_OK


@_pipe_safe
def cmd_verify(args) -> int:
    rec = _load(args.record)
    v = rec.verify(_allowed(args))
    for line in v.lines():
        print(line)
    if not v.ok:
        print(f"joulebook: {args.record}: " + (f"broken at entry {v.broken_seq}: " if v.broken_seq else "")
              + v.reason, file=sys.stderr)
        return EXIT_FAILED
    if rec.recovered:
        return EXIT_FAILED  # the file as found was not intact: its last entry was cut off
    return EXIT_OK


@_pipe_safe
def cmd_sign(args) -> int:
    rec = _load(args.record)
    e = rec.sign(args.role, key_path=args.key, signer=args.signer, unsigned=args.unsigned)
    kind = "unsigned sign-off" if args.unsigned else "signed"
    print(f"{args.record}: {args.role} by {e.data['signer']} ({kind}), revision {e.data['revision']}, "
          f"covers {e.data['covers']}; {_entry_line(e)}")
    return EXIT_OK


@_pipe_safe
def cmd_comment(args) -> int:
    rec = _load(args.record)
    e = rec.comment(args.entry, args.text)
    print(f"{args.record}: comment on entry {args.entry}; {_entry_line(e)}")
    return EXIT_OK


@_pipe_safe
def cmd_resolve(args) -> int:
    rec = _load(args.record)
    e = rec.resolve(args.comment, args.note)
    left = len(rec.open_comments())
    print(f"{args.record}: comment {args.comment} resolved; {_entry_line(e)}; {left} comment(s) still open")
    return EXIT_OK


def _point(rec, text: str, flag: str) -> int:
    from balance.errors import InputError
    from balance.record.review import revisions

    text = text.strip()
    if text[:1] in ("r", "R"):
        try:
            rev = int(text[1:])
        except ValueError:
            raise InputError(flag, f"expected an entry number or rN (end of revision N); got {text!r}") from None
        revs = revisions(rec.entries)
        seqs = [e.seq for e, r in zip(rec.entries, revs) if r == rev]
        if not seqs:
            raise InputError(flag, f"there is no revision {rev} (revisions 1–{revs[-1]})")
        return seqs[-1]
    try:
        return int(text)
    except ValueError:
        raise InputError(flag, f"expected an entry number or rN (end of revision N); got {text!r}") from None


@_pipe_safe
def cmd_diff(args) -> int:
    from balance.errors import InputError
    from balance.record import diff, diff_records

    rec = _load(args.record)
    if args.against:  # --from in this record, --to in the other, each its last entry by default
        other = _load(args.against)
        d = diff_records(rec, other, _point(rec, args.from_, "--from") if args.from_ else None,
                         _point(other, args.to, "--to") if args.to else None)
    else:
        if not args.from_:
            raise InputError("--from", "give the entry to compare from (a number, or rN: the end of revision N), "
                                       "or --against another record")
        to = _point(rec, args.to, "--to") if args.to else len(rec.entries)
        d = diff(rec, _point(rec, args.from_, "--from"), to)
        other = None
    for line in d.lines():
        print(line)
    broken = _broken(rec, args.record, "the entries compared are not the record as filed")
    if other is not None:
        broken = _broken(other, args.against, "the entries compared are not the record as filed") or broken
    return EXIT_FAILED if broken else EXIT_OK


@_pipe_safe
def cmd_replay(args) -> int:
    rec = _load(args.record)
    report = rec.replay(args.tolerance)
    for line in report.lines():
        print(line)
    _broken(rec, args.record, "only the entries before it were replayed, and nothing is confirmed")
    return EXIT_OK if report.ok else EXIT_FAILED


@_pipe_safe
def cmd_export(args) -> int:
    from balance.record import export_html, export_markdown

    rec = _load(args.record)
    allowed = _allowed(args)
    text = export_markdown(rec, allowed) if args.format == "md" else export_html(rec, allowed)
    if args.output:
        from balance.record.store import write_output

        write_output(args.output, text.encode("utf-8"))
        print(f"{args.output}: {args.format} report of {args.record} written")
    else:
        sys.stdout.write(text)
    return EXIT_FAILED if _broken(rec, args.record, "the report says so; its entries and results cannot be "
                                                    "relied on") else EXIT_OK


@_pipe_safe
def cmd_worksheet(args) -> int:
    rec = _load(args.record)
    ws = rec.worksheet()
    if rec.broken:  # said in the TOML too, where the worksheet is kept
        print(f"# joulebook: the record's chain is BROKEN at entry {rec.broken[0]}: this worksheet is folded "
              "from its entries as read, not as filed")
    import tomli_w

    from balance.record.replay import sections_of

    sys.stdout.write(tomli_w.dumps(sections_of(ws), multiline_strings=True))  # Worksheet.to_toml, of its kind's sections
    return EXIT_FAILED if _broken(rec, args.record, "the worksheet printed is not the record's as filed") else EXIT_OK


@_pipe_safe
def cmd_update(args) -> int:
    from balance.record.format import LIST_SECTIONS, SECTION_KINDS
    from balance.record.replay import fold, sections_of
    from balance.worksheet import Worksheet

    rec = _load(args.record)
    if rec.broken:  # not even "no change": what it holds is not the record as filed
        from balance.errors import InputError

        raise InputError(args.record, f"its chain is broken at entry {rec.broken[0]} ({rec.broken[1]}); "
                                      "a broken record cannot be extended: restore the filed copy")
    new = sections_of(Worksheet.load(args.worksheet))
    current = fold(rec.entries)
    changed = []
    for section in SECTION_KINDS:
        value = new.get(section, [] if section in LIST_SECTIONS else {})
        old = current.get(section)
        if old is None and value in ([], {}):
            continue
        if old != value:
            changed.append((section, value))
    last_step = max((e.seq for e in rec.entries if e.section), default=0)
    last_solve = rec.last_solve()
    if not changed and last_solve is not None and last_solve.seq > last_step:
        print(f"{args.record}: no change; the record already holds this worksheet, solved in entry {last_solve.seq}")
        return _solve_outcome(last_solve)
    if args.note and changed:
        e = rec.note(args.note)
        print(f"{args.record}: {_entry_line(e)}")
    for section, value in changed:
        e = rec.append_step(section, value)
        print(f"{args.record}: {_entry_line(e)}")
    e = rec.append_solve()
    print(f"{args.record}: {_entry_line(e)}")
    return _solve_outcome(e)


@_pipe_safe
def cmd_recheck(args) -> int:
    from balance.errors import InputError
    from balance.record.recheck import as_csv, counts, find_records, recheck_all, worst
    from balance.record.signing import check_allowed_signers

    allowed = _allowed(args)
    if allowed is not None:
        allowed = check_allowed_signers(allowed)  # once, before the run, naming --allowed-signers
    if args.csv:
        _check_csv(args.csv)
    paths = find_records(args.paths)
    if not paths:
        raise InputError(", ".join(args.paths), "holds no records (*.jbk)")
    with _progress(len(paths)) as tell:
        rows = recheck_all(paths, jobs=args.jobs, scheduler=args.scheduler, allowed_signers=allowed,
                           tolerance=args.tolerance, progress=tell)
    # in a pipe or a log, one line a row however long (a terminal wraps the table to fit)
    (_console() if sys.stdout.isatty() else _wide_console()).print(_recheck_table(rows))
    found = counts(rows)
    print(f"{len(rows)} record{'s' if len(rows) != 1 else ''}: " + ", ".join(f"{n} {o}" for o, n in found.items()))
    unchecked = sum(r.signatures == "not checked" for r in rows)
    if unchecked:
        print(f"signatures were not checked in {unchecked} signed record{'s' if unchecked != 1 else ''}: "
              "give --allowed-signers FILE to check them")
    if args.csv:
        from balance.record.store import write_output

        write_output(args.csv, as_csv(rows).encode("utf-8"))
        print(f"{args.csv}: the table as CSV, {len(rows)} rows")
    code = RECHECK_EXIT[worst(rows)]
    if code != EXIT_OK:
        bad = sum(RECHECK_EXIT[r.outcome] != EXIT_OK for r in rows)
        print(f"joulebook: {bad} of {len(rows)} records failed the re-check; exit {code}: {worst(rows)} "
              "(README, 'Re-checking an archive')", file=sys.stderr)
    return code


def _check_csv(path: str) -> None:
    """Refuse a CSV file that cannot be written before a long run, not after it."""
    from pathlib import Path

    from balance.errors import InputError

    p = Path(path)
    if p.is_dir():
        raise InputError("--csv", f"{path} is a folder; give a file name")
    if not p.parent.is_dir():
        raise InputError("--csv", f"{path}: its folder does not exist")


class _progress:
    """A progress line on standard error while records are re-checked, when it is a terminal
    (nothing in a pipe or a log); used as ``with _progress(n) as tell``."""

    def __init__(self, total: int):
        self.total, self.bar = total, None

    def __enter__(self):
        if not sys.stderr.isatty():
            return None
        from rich.console import Console
        from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

        self.bar = Progress(TextColumn("re-checking"), BarColumn(), MofNCompleteColumn(), TimeRemainingColumn(),
                            console=Console(stderr=True), transient=True)
        task = self.bar.add_task("recheck", total=self.total)
        self.bar.start()
        return lambda done, total: self.bar.update(task, completed=done)

    def __exit__(self, *exc) -> None:
        if self.bar is not None:
            self.bar.stop()


def _recheck_table(rows):
    from rich.table import Table
    from rich.text import Text

    from balance.record.recheck import COLUMNS, NOT_SIGNED, REPRODUCED

    table = Table(box=None, header_style="bold", pad_edge=False)
    for name in COLUMNS:  # a path and a detail fold in a narrow terminal; the short columns never wrap
        wide = name in ("path", "detail")
        table.add_column(name, overflow="fold" if wide else "ellipsis", no_wrap=not wide, ratio=1 if wide else None,
                         justify="right" if name == "revision" else "left")
    for r in rows:
        style = "green" if r.outcome == REPRODUCED else "yellow" if r.outcome == NOT_SIGNED else "red"
        # Text, not markup: a path or a detail may hold [brackets]
        table.add_row(*(Text(c, style=style if i == 1 else "") for i, c in enumerate(r.cells())))
    return table


# -- the parser ---------------------------------------------------------------------------
def _jobs(text: str) -> int:
    import argparse

    try:
        value = int(text)
    except ValueError:
        value = 0
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a whole number of processes >= 1, like 4; got {text!r}")
    return value


def _tolerance(text: str) -> float:
    import argparse
    import math

    try:
        value = float(text)
    except ValueError:
        value = math.nan
    if not (math.isfinite(value) and value >= 0):
        raise argparse.ArgumentTypeError(f"expected a relative tolerance >= 0, like 1e-9; got {text!r}")
    return value


def add_parser(subparsers) -> None:
    """Add ``record`` and its subcommands to the ``joulebook`` parser (imports nothing heavy)."""
    top = subparsers.add_parser(
        "record", help="the audit trail: a signed, hash-chained record of a calculation",
        description="Build, review, sign and verify a record: the append-only, hash-chained text file "
                    "of every step of a calculation (README: 'The record').")
    top.set_defaults(func=lambda args: (top.print_help(), EXIT_OK)[1])
    sub = top.add_subparsers(dest="record_command")
    allowed = dict(metavar="FILE", help="OpenSSH allowed-signers file to check signatures against "
                                        "(default: JOULEBOOK_ALLOWED_SIGNERS or the config file)")

    p = sub.add_parser("import", help="start a record from a worksheet, and solve it")
    p.add_argument("worksheet", help="worksheet (TOML)")
    p.add_argument("record", help="the new record file (never overwritten)")
    p.set_defaults(func=cmd_import)

    p = sub.add_parser("show", help="print every entry of a record")
    p.add_argument("record")
    p.add_argument("--data", action="store_true", help="also print each entry's machine-readable part")
    p.add_argument("--allowed-signers", **allowed)
    p.set_defaults(func=cmd_show)

    p = sub.add_parser("verify", help="check the hash chain, the sign-off rules and the signatures")
    p.add_argument("record")
    p.add_argument("--allowed-signers", **allowed)
    p.set_defaults(func=cmd_verify)

    p = sub.add_parser("sign", help="sign off the record as it stands")
    p.add_argument("record")
    p.add_argument("--role", required=True, help="prepared, checked or approved (in that order)")
    how = p.add_mutually_exclusive_group(required=True)
    how.add_argument("--key", metavar="KEYFILE", help="SSH private key (or a public key whose private half is in ssh-agent)")
    how.add_argument("--unsigned", action="store_true", help="record the sign-off without a signature (reported as unsigned)")
    p.add_argument("--signer", metavar="ID", help="the signer's identity in the allowed-signers file (default: the author)")
    p.set_defaults(func=cmd_sign)

    p = sub.add_parser("comment", help="add a review comment on an entry")
    p.add_argument("record")
    p.add_argument("entry", type=int, help="number of the entry commented on")
    p.add_argument("text")
    p.set_defaults(func=cmd_comment)

    p = sub.add_parser("resolve", help="resolve an open comment")
    p.add_argument("record")
    p.add_argument("comment", type=int, help="number of the comment's entry")
    p.add_argument("note", help="how it was resolved")
    p.set_defaults(func=cmd_resolve)

    p = sub.add_parser("diff", help="inputs and results that changed between two points of a record, or two records")
    p.add_argument("record")
    p.add_argument("--from", dest="from_", metavar="N", help="entry number, or rN: the end of revision N "
                                                            "(needed unless --against; then default the last entry)")
    p.add_argument("--to", metavar="M", help="entry number or rN (default: the last entry); of the other record "
                                            "with --against")
    p.add_argument("--against", metavar="OTHER", help="compare with another record (a variant of the calculation)")
    p.set_defaults(func=cmd_diff)

    p = sub.add_parser("replay", help="rebuild the worksheet, re-solve it and check every recorded result")
    p.add_argument("record")
    p.add_argument("--tolerance", type=_tolerance, default=DEFAULT_TOLERANCE,
                   help=f"relative tolerance (default {DEFAULT_TOLERANCE:g})")
    p.set_defaults(func=cmd_replay)

    p = sub.add_parser("recheck", help="verify and replay every record under some folders: one row each",
                       description="Find every record (*.jbk) under the folders, verify it and replay it, and "
                                   "print one row per record with its outcome (README: 'Re-checking an archive').")
    p.add_argument("paths", nargs="+", metavar="DIR", help="a folder searched recursively for *.jbk, or a record file")
    p.add_argument("--jobs", type=_jobs, default=1, metavar="N", help="re-check in N processes here (default 1)")
    p.add_argument("--scheduler", metavar="ADDRESS", help="re-check on a Dask cluster, like tcp://host:8786 "
                                                          "(needs joulebook[cluster])")
    p.add_argument("--csv", metavar="FILE", help="also write the table as CSV")
    p.add_argument("--allowed-signers", **allowed)
    p.add_argument("--tolerance", type=_tolerance, default=DEFAULT_TOLERANCE,
                   help=f"relative tolerance of the replay (default {DEFAULT_TOLERANCE:g})")
    p.set_defaults(func=cmd_recheck)

    p = sub.add_parser("export", help="a printable calculation report (Markdown or standalone HTML)")
    p.add_argument("record")
    p.add_argument("--format", choices=("md", "html"), required=True)
    p.add_argument("-o", "--output", metavar="FILE", help="write to FILE (default: standard output)")
    p.add_argument("--allowed-signers", **allowed)
    p.set_defaults(func=cmd_export)

    p = sub.add_parser("worksheet", help="print the worksheet the record replays to (TOML)")
    p.add_argument("record")
    p.set_defaults(func=cmd_worksheet)

    p = sub.add_parser("update", help="append the sections a changed worksheet changes, and solve")
    p.add_argument("record")
    p.add_argument("worksheet", help="the edited worksheet (TOML)")
    p.add_argument("--note", help="a revision note saying why, written before the changes")
    p.set_defaults(func=cmd_update)
