"""The hash chain: each entry's seal and the seal it follows.

An entry's seal (its ``sha256`` line) is the SHA-256 of its sealed bytes:
its lines from ``entry`` to ``follows`` inclusive, in UTF-8, each ending in a
newline. Its ``follows`` line repeats the seal of the entry before it; for
entry 1 it is the SHA-256 of the record's first line (:data:`GENESIS`). The
entries are numbered 1, 2, 3 ... in order. So changing any byte of an entry
changes its seal; changing a seal breaks the next entry's ``follows``; and
removing, inserting or moving an entry breaks the numbering and the
``follows`` of the entry after it. :func:`chain_break` names the first
entry where any of this fails.

What a chain cannot show by itself is that entries were cut off the end:
the chain head hash (the seal of the last entry), signed by a sign-off or
quoted in a filed report, is what pins the end.
"""

from __future__ import annotations

from typing import Sequence

from .format import GENESIS, Entry


def chain_break(entries: Sequence[Entry]) -> tuple[int, str] | None:
    """The first entry where the chain fails, as (position, reason); None when intact."""
    prev = GENESIS
    for i, e in enumerate(entries):
        expected = i + 1
        if e.seq != expected:
            return expected, (f"the entry at line {e.line} is numbered {e.seq} where entry {expected} should be: "
                              "an entry was removed, inserted or moved")
        if e.prev_hash != prev:
            before = "the record's first line" if i == 0 else f"entry {i}"
            return expected, (f"entry {expected} (line {e.line}) does not follow {before}: its 'follows' hash is not "
                              f"the seal of {before} (an entry before it was changed, removed or moved)")
        if e.computed_hash() != e.hash:
            return expected, (f"entry {expected} (line {e.line}) does not match its sha256 seal: "
                              "it was changed after it was written")
        prev = e.hash
    return None


def head_of(entries: Sequence[Entry]) -> str:
    """The chain head hash: the seal of the last entry."""
    return entries[-1].hash if entries else GENESIS
