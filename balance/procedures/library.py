"""Where procedures come from: the firm's folders, then the bundled ones.

The folders searched, in order (the first procedure of an id wins):

1. ``JOULEBOOK_PROCEDURES``: folders separated by the path separator (``:`` on Unix);
2. the user's config file (``$XDG_CONFIG_HOME/joulebook/config.toml``, by default
   ``~/.config/joulebook/config.toml``; ``JOULEBOOK_CONFIG`` names another), its key
   ``procedures = ["/srv/firm/procedures", ...]``;
3. the procedures bundled with joulebook (``balance/data/procedures``).

A procedure is a ``*.toml`` file in one of them (not in sub-folders: an exercise's answer
worksheets sit beside it and are named by it).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError
from .load import ProcedureError, load
from .schema import Procedure

BUNDLED = Path(__file__).resolve().parent.parent / "data" / "procedures"


def config_path() -> Path:
    named = os.environ.get("JOULEBOOK_CONFIG")
    if named:
        return Path(named).expanduser()
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base).expanduser() / "joulebook" / "config.toml"


def folders() -> list[tuple[Path, str]]:
    """Every folder searched, in order, with where it was named."""
    out: list[tuple[Path, str]] = []
    for part in (os.environ.get("JOULEBOOK_PROCEDURES") or "").split(os.pathsep):
        if part.strip():
            out.append((Path(part.strip()).expanduser(), "JOULEBOOK_PROCEDURES"))
    config = config_path()
    if config.is_file():
        import tomllib

        try:
            data = tomllib.loads(config.read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
            raise InputError(str(config), f"cannot be read as TOML: {exc}") from None
        named = data.get("procedures", [])
        if isinstance(named, str):
            named = [named]
        if not isinstance(named, list) or not all(isinstance(p, str) for p in named):
            raise InputError(f"{config}: procedures", "must be a list of folders (text)")
        out += [(Path(p).expanduser(), str(config)) for p in named]
    out.append((BUNDLED, "bundled"))
    return out


@dataclass(frozen=True)
class Listed:
    """A procedure file found in a folder: read, or its first mistake."""

    path: Path
    origin: str
    procedure: Procedure | None
    problem: str = ""
    shadowed: bool = False
    """an earlier folder has a procedure of the same id"""


def listing() -> list[Listed]:
    """Every procedure file in the folders, in search order."""
    out, seen = [], set()
    for folder, origin in folders():
        if not folder.is_dir():
            continue
        for path in sorted(folder.glob("*.toml")):
            try:
                procedure = load(path)
            except ProcedureError as exc:
                out.append(Listed(path, origin, None, str(exc)))
                continue
            except InputError as exc:
                out.append(Listed(path, origin, None, str(exc)))
                continue
            out.append(Listed(path, origin, procedure, shadowed=procedure.id in seen))
            seen.add(procedure.id)
    return out


def find(procedure_id: str, field: str = "procedure") -> Procedure:
    """The procedure of this id from the first folder that has it; raises InputError naming
    ``field`` and the ids there are."""
    found = listing()
    for item in found:
        if item.procedure is not None and item.procedure.id == procedure_id:
            return item.procedure
    ids = sorted({i.procedure.id for i in found if i.procedure is not None})
    raise InputError(field, f"no procedure {procedure_id!r} in the procedure folders; there are "
                            f"{', '.join(ids) or 'none'} (`joulebook procedure list` shows where each is)")


def find_or_none(procedure_id: str) -> Procedure | None:
    try:
        return find(procedure_id)
    except InputError:
        return None
