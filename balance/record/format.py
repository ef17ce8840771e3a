"""The record's format: one grammar, its writer and its reader.

The parts, each owning one thing:

- :mod:`.layout` — the grammar: the first line, the kinds of entry, each
  line's tag and pattern (and the whole-entry pattern built from them), the
  checks of a line's fields, what a line of text may hold, and :class:`Entry`;
- :mod:`.writer` — an entry's lines (the data part as a TOML fragment) and its seal;
- :mod:`.reader` — :func:`parse`: bytes to entries and any torn tail, a fast
  path and the exact line-by-line path over the same grammar;
- :mod:`.shapes` — the shape each kind of entry's data must have.

This module gathers their names, so ``from balance.record.format import ...``
serves every reader and writer of records. It never touches the disk.
"""

from __future__ import annotations

from .layout import (COMMENT, CONTENT_KINDS, FORMAT, GENESIS, KIND_SECTIONS, KINDS, LIST_SECTIONS, MAGIC,
                     MAGIC_LINE, NOTE, OPENING, RESOLUTION, SECTION_KINDS, SIGN_OFF, SOLVE, TAG_AT, TAG_BY,
                     TAG_ENTRY, TAG_FOLLOWS, TAG_SEAL, Entry, clean_author, format_time, normal_text, visible)
from .reader import Parsed, parse
from .shapes import shape_problem
from .writer import data_lines, entry_lines, prune, seal

__all__ = [
    "COMMENT", "CONTENT_KINDS", "FORMAT", "GENESIS", "KIND_SECTIONS", "KINDS", "LIST_SECTIONS", "MAGIC",
    "MAGIC_LINE", "NOTE", "OPENING", "RESOLUTION", "SECTION_KINDS", "SIGN_OFF", "SOLVE", "TAG_AT", "TAG_BY",
    "TAG_ENTRY", "TAG_FOLLOWS", "TAG_SEAL", "Entry", "Parsed", "clean_author", "data_lines", "entry_lines",
    "format_time", "normal_text", "parse", "prune", "seal", "shape_problem", "visible",
]
