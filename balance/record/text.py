"""The human-readable part of each entry, rendered from its data as plain text.

Everything here is a pure function of an entry's data and of the entries
before it, so a verifier can render an entry again and compare it with the
text in the file. No rich or textual: tables are drawn with spaces
(:mod:`.plain`). Steps are rendered by :mod:`.step_text`, solves by
:mod:`.solve_text`; the opening and the review entries (comments,
resolutions, sign-offs, revision notes) here, and :func:`render` picks the
rendering for an entry's kind.
"""

from __future__ import annotations

from typing import Sequence

from ..errors import InputError
from .layout import COMMENT, NOTE, OPENING, RESOLUTION, SECTION_KINDS, SIGN_OFF, SOLVE, Entry, value_problem
from .plain import wrap
from .solve_text import energy_rows, entropy_rows, solve_text, state_rows
from .step_text import step_text

__all__ = [
    "comment_text", "energy_rows", "entropy_rows", "note_text", "opening_text", "render", "resolution_text",
    "signoff_text", "solve_text", "state_rows", "step_text",
]


# -- the opening ----------------------------------------------------------------------
def opening_text(data: dict) -> str:
    lines = [
        f"Record opened with joulebook {data['joulebook']} (record format {data['format']}).",
        f"Species data SHA-256: {data['species_data_sha256']}",
        "Property models: " + ", ".join(str(m) for m in data["models"]),
        "Sign-off roles, in order: " + ", ".join(data["roles"]),
    ]
    pin = data.get("procedure")
    if isinstance(pin, dict):
        lines += [f"House procedure: {pin.get('id')} version {pin.get('version')}, {pin.get('title', '')}",
                  f"Procedure file SHA-256: {pin.get('sha256')} (its rules are kept below)"]
    if isinstance(data.get("practice"), dict):
        lines.append(f"PRACTICE record for exercise {data['practice'].get('exercise')}: it can never be signed")
    lines += [
        "Each entry is sealed: its 'sha256' line is the SHA-256 of its lines from 'entry' to",
        "'follows' (UTF-8, each line ending in a newline), and its 'follows' line repeats the",
        "seal of the entry before it (for entry 1, the SHA-256 of the record's first line).",
    ]
    return "\n".join(lines)


# -- review and sign-off -----------------------------------------------------------------
def comment_text(data: dict, target: Entry | None) -> str:
    about = f"entry {data['on']}" + (f" ({target.kind})" if target else "")
    return "\n".join([f"Comment on {about}, open until resolved:", *wrap(data["text"], "  ", "  ")])


def resolution_text(data: dict, comment: Entry | None) -> str:
    about = f"comment {data['comment']}"
    if comment is not None and comment.kind == COMMENT:
        about += f" (on entry {comment.data.get('on')})"
    return "\n".join([f"Resolves {about}:", *wrap(data["note"], "  ", "  ")])


def signoff_text(data: dict, seq: int) -> str:
    covered = seq - 1
    lines = [f"{data['role'].capitalize()} by {data['signer']}: revision {data['revision']} "
             f"(entries 1–{covered}).",
             f"Covers the chain head: entry {covered}, sha256 {data['covers']}"]
    if data.get("unsigned") is True:
        lines.append("Not signed cryptographically: marked unsigned.")
    else:
        key = data.get("key")
        lines.append(f"Signed with ssh-keygen -Y sign, namespace {data.get('namespace', '?')}"
                     + (f", key {key}" if key else "") + ".")
    return "\n".join(lines)


def note_text(data: dict) -> str:
    return "\n".join(["Revision note:", *wrap(data["note"], "  ", "  ")])


# -- any entry -----------------------------------------------------------------------------
def render(kind: str, data: dict, before: Sequence[Entry]) -> str:
    """The human text of an entry of this kind and data, placed after ``before`` (data within
    what a record holds, :func:`.layout.value_problem`: the renderings compare and print it whole)."""
    problem = value_problem(data)
    if problem:
        raise InputError(kind, f"its data {problem}")
    if kind == OPENING:
        return opening_text(data)
    for section, k in SECTION_KINDS.items():
        if k == kind:
            old = None
            for e in reversed(before):
                if e.kind == kind:
                    old = e.data.get(section)
                    break
            return step_text(section, data[section], old)
    if kind == SOLVE:
        steps = [e.seq for e in before if e.section]
        return solve_text(data, steps[-1] if steps else None)
    by_seq = {e.seq: e for e in before}
    if kind == COMMENT:
        return comment_text(data, by_seq.get(data["on"]))
    if kind == RESOLUTION:
        return resolution_text(data, by_seq.get(data["comment"]))
    if kind == SIGN_OFF:
        return signoff_text(data, len(before) + 1)
    if kind == NOTE:
        return note_text(data)
    raise ValueError(f"unknown entry kind {kind!r}")
