"""The record: joulebook's audit trail of a calculation, append-only and hash-chained.

A record is what gets filed: a UTF-8 plain-text file, one line per line of
content, readable in any pager and diffable in git. It holds every step an
engineer took, in order; the worksheet is never stored on its own but is the
replay of the record's step entries (:meth:`Record.worksheet`).

Layout (format 1)
-----------------

The first line is ``joulebook record, format 1``. Entries follow, each
preceded by one empty line::

    entry 4: initial state
    at      2025-03-04T10:02:11Z
    by      a.engineer
    | Initial state: set, 2 compartments
    |   compartment 1 'V-101'
    |     T  20 degC
    : [[initial]]
    : name = "V-101"
    : T = "20 degC"
    follows 5e1a…(64 hexadecimal digits)
    sha256  77ab…(64 hexadecimal digits)

- ``entry N: KIND`` — the sequence number (1, 2, 3 … with no gaps) and the
  kind of step: ``opening``, ``purpose and basis``, ``system boundary``,
  ``fluid and model``, ``initial state``, ``final state``, ``heat terms``,
  ``work terms``, ``constraints`` (a closed system), ``streams``, ``devices``
  (a steady-flow network), ``solve``, ``comment``, ``resolution``,
  ``sign-off``, ``revision note``. A record holds the sections its kind of
  balance reads (``balance.kinds``).
- ``at`` — when, in UTC to the second; ``by`` — the author.
- ``| `` lines — the human-readable rendering (what changed, values with
  units as typed; for a solve: states, the energy balance term by term, the
  entropy balance, the ΔU split, equations with numbers, warnings and
  cautions; for a steady-flow solve: the streams, the devices' heat, work,
  efficiency, entropy generation and exergy destroyed, each device's
  recomputed balances, equations, warnings and cautions). A line of just
  ``|`` is an empty line.
- ``: `` lines — the machine-readable part, a TOML fragment. A step entry
  holds the worksheet section exactly as in a worksheet file (``[final]``,
  ``[[heat]]`` …); a solve holds ``Result.as_json()`` (values that are None
  left out: TOML has no null) after the joulebook version and species-data
  hash it was computed with, or ``error_kind`` and ``error`` when it failed.
- ``follows`` — the seal of the entry before (for entry 1: the SHA-256 of
  the first line of the file).
- ``sha256`` — the entry's seal: the SHA-256 of its lines from ``entry`` to
  ``follows`` inclusive, in UTF-8, each ending in a newline.

The file ends with a newline after the last ``sha256`` line. Any other
line, any missing line, and any line in another order is an error naming
the line; a last entry cut off while being written (a torn tail) is set
aside by :meth:`Record.load` into ``<record>.torn-<UTC time>``.

Entry 1 (``opening``) pins what the numbers depend on: the joulebook version,
the SHA-256 of the species data, the property model names, and the
sign-off roles in their order. Sign-offs, revisions and review: see
:mod:`balance.record.review`; verification: :mod:`balance.record.verify`;
signatures: :mod:`balance.record.signing`; safe writing:
:mod:`balance.record.store`; replay: :mod:`balance.record.replay`.
"""

from __future__ import annotations

from .author import default_allowed_signers, default_author
from .export import export_html, export_markdown
from .format import KINDS, SECTION_KINDS, Entry, parse
from .record import Record
from .replay import DEFAULT_TOLERANCE, Difference, ReplayReport, SolveReplay
from .review import RecordDiff, diff_entries
from .review import diff_records as review_diff_records
from .signing import NAMESPACE, ROLES
from .verify import SignoffStatus, Verification, inspect


def diff(record: Record, from_seq: int, to_seq: int) -> RecordDiff:
    """What inputs and results differ between the record as of entry ``from_seq`` and as of ``to_seq``."""
    return diff_entries(record.entries, from_seq, to_seq)


def diff_records(first: Record, second: Record, from_seq: int | None = None, to_seq: int | None = None) -> RecordDiff:
    """What inputs and results differ between ``first`` as of entry ``from_seq`` and ``second`` as of
    ``to_seq`` (each by default as of its last entry): a calculation and its variant filed apart."""
    return review_diff_records(first.entries, second.entries, (first.path.name, second.path.name),
                               len(first.entries) if from_seq is None else from_seq,
                               len(second.entries) if to_seq is None else to_seq)


__all__ = [
    "DEFAULT_TOLERANCE", "Difference", "Entry", "KINDS", "NAMESPACE", "ROLES", "Record", "RecordDiff",
    "ReplayReport", "SECTION_KINDS", "SignoffStatus", "SolveReplay", "Verification", "default_allowed_signers",
    "default_author", "diff", "diff_records", "export_html", "export_markdown", "inspect", "parse",
]
