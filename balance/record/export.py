"""A printable calculation report from a record, in Markdown or standalone HTML.

The report has a title block (job, purpose, basis, assumptions, the record
and its pins), every step as recorded, the results of the last solve (states,
energy and entropy balances, equations with numbers, warnings, cautions),
and a sign-off block with the verification status and the chain head hash.
Both formats are built from the same list of blocks; the HTML needs no
other file (styles inline, no scripts, no fonts or images fetched).
"""

from __future__ import annotations

import dataclasses
import html
import re
from typing import Sequence

from ..errors import BalanceError
from ..worksheet import CONVENTIONS
from .format import SOLVE
from .review import revisions
from . import solve_text_flow as flow
from .text import energy_rows, entropy_rows, state_rows

# A block: (kind, payload). Kinds: h1, h2, h3, p, kv, table, pre, list, olist.
Block = tuple


def blocks(record, verification) -> list[Block]:
    """The report's content, independent of the output format."""
    from .. import __version__

    entries = record.entries
    try:
        ws = record.worksheet()
        head = ws.heading
        ws_error = ""
    except BalanceError as exc:
        ws, head, ws_error = None, None, str(exc)
    title = (head.title if head and head.title else
             TITLES.get(ws.system.kind if ws is not None else "closed", TITLES["closed"]))
    out: list[Block] = [("h1", title)]
    broken = _broken(verification)
    if broken:
        out.append(("p", broken))
    opening = entries[0].data if entries else {}
    kv = []
    if head:
        kv += [("Job", head.job or "—"), ("Purpose", head.purpose or "—"), ("Basis", head.basis or "—"),
               ("Sign convention", CONVENTIONS.get(head.convention, head.convention)),
               ("Atmosphere for gauge readings", head.atmosphere)]
    if ws is not None:
        kv += [("Fluid and model", f"{ws.fluid.species or '—'}, {ws.fluid.model or '—'}"),
               ("System", ws.system.inside or ws.system.kind)]
    kv += [("Record", f"{record.path.name}: {len(entries)} entries, revision {record.revision}"),
           ("Chain head (SHA-256)", verification.head),
           ("Pinned", f"joulebook {opening.get('joulebook', '?')}; species data SHA-256 "
                      f"{opening.get('species_data_sha256', '?')}"),
           ("Verification", _verdict(verification)),
           ("Current revision", _current(verification))]
    pin = opening.get("procedure")
    if isinstance(pin, dict):
        kv.append(("House procedure", f"{pin.get('id')} version {pin.get('version')} (file SHA-256 "
                                      f"{pin.get('sha256')})"))
    if isinstance(opening.get("practice"), dict):
        kv.append(("Practice", f"a practice record (exercise {opening['practice'].get('exercise')}): never signed"))
    out.append(("kv", kv))
    if head and head.deviations:
        out += [("h2", "Deviations from the house procedure, justified"),
                ("olist", [f"{rule}: {why}" for rule, why in head.deviations.items()])]
    if ws_error:
        out.append(("p", f"The worksheet cannot be rebuilt from the record: {ws_error}"))
    if head and head.assumptions:
        out += [("h2", "Assumptions"), ("olist", list(head.assumptions))]

    out.append(("h2", "Steps"))
    revs = revisions(entries)
    for e, rev in zip(entries, revs):
        out.append(("h3", f"Entry {e.seq}: {e.kind}"))
        out.append(("p", f"{e.time} by {e.author}; revision {rev}"))
        out.append(("pre", e.text.split("\n")))

    out.append(("h2", "Results"))
    if broken:
        out.append(("p", broken))
    solve = next((e for e in reversed(entries) if e.kind == SOLVE), None)
    if solve is None:
        out.append(("p", "Not solved: the record has no solve entry."))
    elif "error" in solve.data:
        out.append(("p", f"The last solve (entry {solve.seq}) failed: {solve.data['error_kind']}: "
                         f"{solve.data['error']}"))
    else:
        d = solve.data
        later = [e.seq for e in entries if e.section and e.seq > solve.seq]
        out += _RESULTS[d.get("kind", "closed")](d, solve.seq, revs[solve.seq - 1], later)
        if isinstance(d.get("uncertainty"), dict):  # values typed with their uncertainties: the budgets
            from .solve_text import uncertainty_lines

            out += [("h3", "Uncertainty of the results"), ("pre", uncertainty_lines(d["uncertainty"])[2:])]

    out.append(("h2", "Sign-off"))
    if verification.signoffs:
        rows = [[s.role, s.signer, s.time, f"{s.revision} (entries 1–{s.covers_seq})", s.status]
                for s in verification.signoffs]
        out.append(("table", ["role", "signer", "time (UTC)", "revision", "signature"], rows, "lllll"))
    else:
        out.append(("p", "No sign-offs."))
    out.append(("pre", dataclasses.replace(verification, source=record.path.name).lines()))
    out.append(("p", f"Report generated by joulebook {__version__} from {record.path.name}. "
                     f"Check the record itself with: joulebook record verify {record.path.name} "
                     "--allowed-signers FILE"))
    return out


def _changed_after(later: list[int]) -> list[Block]:
    if not later:
        return []
    return [("p", "The inputs changed after this solve (entry " + ", ".join(map(str, later))
                  + "): these results are not those of the current inputs.")]


def _closed_results(d: dict, seq: int, rev: int, later: list[int]) -> list[Block]:
    """A closed system's results: states, energy and entropy balances, equations, warnings, cautions."""
    out: list[Block] = [("p", f"From the solve in entry {seq} (revision {rev}), "
                              f"with joulebook {d.get('joulebook', '?')}: {d.get('species', '?')}, {d.get('model', '?')}. "
                              f"Reference state: {d.get('reference_state', '?')}.")]
    out += _changed_after(later)
    out.append(("h3", "States"))
    headers, rows = state_rows(d["states"])
    out.append(("table", headers, rows, "ll" + "r" * (len(headers) - 2)))
    out.append(("h3", "Energy balance"))
    headers, rows = energy_rows(d)
    out.append(("table", headers, rows, "llrl"))
    out.append(("h3", "Entropy balance"))
    headers, rows = entropy_rows(d)
    out.append(("table", headers, rows, "lr"))
    return out + _words(d)


def _flow_results(d: dict, seq: int, rev: int, later: list[int]) -> list[Block]:
    """A steady-flow network's results: the streams (states and rates), the devices (Q̇, Ẇ, η,
    Ṡ_gen, exergy destroyed), each device's recomputed balances, equations, warnings, cautions."""
    fluids = "; ".join(flow.fluids(d)) or "no streams"
    out: list[Block] = [("p", f"From the solve in entry {seq} (revision {rev}), "
                              f"with joulebook {d.get('joulebook', '?')}: {fluids}. {flow.UNITS}")]
    if d.get("basis"):
        out.append(("p", f"Basis: {d['basis']}"))
    out += _changed_after(later)
    out.append(("h3", "Streams"))
    out.append(("table", *flow.stream_rows(d)))
    out.append(("h3", "Stream rates"))
    out.append(("table", *flow.rate_rows(d)))
    given = flow.rates_given(d)
    if given:
        out.append(("list", given))
    out.append(("h3", "Devices"))
    out.append(("table", *flow.device_rows(d)))
    out.append(("p", flow.totals(d)))
    out.append(("h3", "Each device's balances, recomputed from its flows"))
    out.append(("table", *flow.check_rows(d)))
    return out + _words(d)


def _words(d: dict) -> list[Block]:
    return [("h3", "Equations with numbers"), ("pre", [str(x) for x in _as_list(d.get("equations"))]),
            ("h3", "Warnings"), ("list", [str(x) for x in _as_list(d.get("warnings"))] or ["none"]),
            ("h3", "Cautions"), ("list", [str(x) for x in _as_list(d.get("cautions"))] or ["none"])]


def _transient_results(d: dict, seq: int, rev: int, later: list[int]) -> list[Block]:
    """A transient's results: the end state without time, the history's extremes, each vessel at
    the history's end with its closure, the resampled history, equations, warnings, cautions."""
    from . import solve_text_transient as tr

    out: list[Block] = [("p", f"From the solve in entry {seq} (revision {rev}), with joulebook "
                              f"{d.get('joulebook', '?')}: {d.get('species', '?')}, {d.get('model', '?')}; "
                              f"{d.get('end', '')}. {tr.UNITS}")]
    out += _changed_after(later)
    out.append(("h3", "End state without time"))
    rows = tr.end_state_rows(d)
    out.append(("table", *rows) if rows is not None else ("p", f"none: {d.get('end_state_why', '?')}"))
    h = d.get("history")
    out.append(("h3", "History in time"))
    if not isinstance(h, dict):
        out.append(("p", f"none: {d.get('history_why', '?')}"))
    else:
        out.append(("p", f"{h.get('settings', '?')}; {h.get('stop', '?')}"))
        for block in (tr.extreme_rows(d), tr.vessel_end_rows(d), tr.history_table(d)):
            if block is not None:
                out.append(("table", *block))
    return out + _words(d)


#: A solve's results as blocks, by the kind of balance its data name (the reader refuses another).
_RESULTS = {"closed": _closed_results, "steady-flow": _flow_results, "transient": _transient_results}
#: A report's title where the worksheet has none, by its kind of balance.
TITLES = {"closed": "Closed-system energy balance", "steady-flow": "Steady-flow energy balance",
          "transient": "Transient vessel balance"}


def _broken(v) -> str:
    """The warning a report of a record with a broken chain opens with ("" when the chain is intact)."""
    if v.chain_ok:
        return ""
    where = f"at entry {v.broken_seq}" if v.broken_seq else "in the file"
    return (f"WARNING: this record's chain is BROKEN {where}: {v.reason}. The entries and results in this "
            "report are shown as read, not as filed: they cannot be relied on. Restore the filed copy.")


def _as_list(value) -> list:
    return [] if value is None else value if isinstance(value, list) else [value]


def _current(v) -> str:
    """Who signed off the revision the results belong to."""
    mine = [s for s in v.signoffs if s.revision == v.revision]
    if not mine:
        return f"revision {v.revision}: not signed off; these results are not checked"
    roles = ", ".join(f"{s.role} by {s.signer} ({s.status})" for s in mine)
    tail = f"; {len(v.later)} later entries not covered" if v.later else ""
    return f"revision {v.revision}: {roles}{tail}"


def _verdict(v) -> str:
    if not v.chain_ok:
        return f"BROKEN at entry {v.broken_seq}: {v.reason}"
    if v.ok:
        return "intact" + (", all signatures valid" if any(s.status == "valid" for s in v.signoffs) else "")
    if v.problems:
        return f"FAILED at entry {v.broken_seq}: {v.reason}"
    return "chain intact; signatures not checked"


# -- Markdown ------------------------------------------------------------------------------
def _md_cell(text: str) -> str:
    return _md_text(str(text)).replace("\n", " ")


def _md_text(text: str) -> str:
    return re.sub(r"([\\`*_\[\]<>#|])", r"\\\1", str(text))


def _fence(lines: Sequence[str]) -> str:
    longest = max((len(m) for ln in lines for m in re.findall(r"`+", ln)), default=0)
    return "`" * max(3, longest + 1)


def to_markdown(bs: list[Block]) -> str:
    out: list[str] = []
    for b in bs:
        kind = b[0]
        if kind in ("h1", "h2", "h3"):
            out += ["#" * int(kind[1]) + " " + _md_text(b[1]), ""]
        elif kind == "p":
            out += [_md_text(b[1]), ""]
        elif kind == "kv":
            out += ["| | |", "|---|---|"]
            out += [f"| **{_md_cell(k)}** | {_md_cell(v)} |" for k, v in b[1]]
            out.append("")
        elif kind == "table":
            headers, rows, align = b[1], b[2], b[3]
            out.append("| " + " | ".join(_md_cell(h) or " " for h in headers) + " |")
            out.append("|" + "|".join("---:" if a == "r" else "---" for a in align) + "|")
            out += ["| " + " | ".join(_md_cell(c) for c in r) + " |" for r in rows]
            out.append("")
        elif kind == "pre":
            fence = _fence(b[1])
            out += [fence + "text", *b[1], fence, ""]
        elif kind == "list":
            out += [f"- {_md_text(x)}" for x in b[1]] + [""]
        elif kind == "olist":
            out += [f"{i + 1}. {_md_text(x)}" for i, x in enumerate(b[1])] + [""]
    return "\n".join(out).rstrip("\n") + "\n"


# -- HTML -----------------------------------------------------------------------------------
_CSS = """
body { font-family: system-ui, sans-serif; max-width: 60rem; margin: 2rem auto; padding: 0 1rem; color: #111; }
h1 { border-bottom: 2px solid #111; padding-bottom: .3rem; }
h2 { border-bottom: 1px solid #999; margin-top: 2rem; }
h3 { margin-bottom: .3rem; }
table { border-collapse: collapse; margin: .5rem 0 1rem; }
th, td { border: 1px solid #bbb; padding: .2rem .5rem; vertical-align: top; text-align: left; }
td.r, th.r { text-align: right; font-variant-numeric: tabular-nums; }
table.kv th { background: #f2f2f2; width: 14rem; }
pre { background: #f7f7f7; border: 1px solid #ddd; padding: .5rem; white-space: pre-wrap; font-size: .85rem; }
@media print { body { margin: 0; max-width: none; } h2, h3 { break-after: avoid; } pre, table { break-inside: avoid; } }
"""


def to_html(bs: list[Block]) -> str:
    e = html.escape
    title = next((b[1] for b in bs if b[0] == "h1"), "joulebook report")
    out = ["<!DOCTYPE html>", '<html lang="en">', "<head>", '<meta charset="utf-8">',
           '<meta name="viewport" content="width=device-width, initial-scale=1">',
           f"<title>{e(title)}</title>", f"<style>{_CSS}</style>", "</head>", "<body>"]
    for b in bs:
        kind = b[0]
        if kind in ("h1", "h2", "h3"):
            out.append(f"<{kind}>{e(b[1])}</{kind}>")
        elif kind == "p":
            out.append(f"<p>{e(b[1])}</p>")
        elif kind == "kv":
            out.append('<table class="kv">')
            out += [f"<tr><th>{e(k)}</th><td>{e(str(v))}</td></tr>" for k, v in b[1]]
            out.append("</table>")
        elif kind == "table":
            headers, rows, align = b[1], b[2], b[3]
            cls = [' class="r"' if a == "r" else "" for a in align]
            out.append("<table>")
            out.append("<tr>" + "".join(f"<th{c}>{e(h)}</th>" for h, c in zip(headers, cls)) + "</tr>")
            for r in rows:
                out.append("<tr>" + "".join(f"<td{c}>{e(str(x))}</td>" for x, c in zip(r, cls)) + "</tr>")
            out.append("</table>")
        elif kind == "pre":
            out.append("<pre>" + e("\n".join(b[1])) + "</pre>")
        elif kind in ("list", "olist"):
            tag = "ul" if kind == "list" else "ol"
            out.append(f"<{tag}>" + "".join(f"<li>{e(x)}</li>" for x in b[1]) + f"</{tag}>")
    out += ["</body>", "</html>"]
    return "\n".join(out) + "\n"


def export_markdown(record, allowed_signers=None) -> str:
    """The calculation report as Markdown."""
    return to_markdown(blocks(record, record.verify(allowed_signers)))


def export_html(record, allowed_signers=None) -> str:
    """The calculation report as one standalone HTML page."""
    return to_html(blocks(record, record.verify(allowed_signers)))
