"""The shape of each kind of entry's data: the keys the code after the reader relies on.

A record may be written by another program, or edited and sealed again.
The reader refuses an entry whose data lacks what the rest of the package
takes for granted (a step entry holds exactly its section; a solve its
states and terms, or its error; a sign-off its role, signer, revision, the
head it covers and a signature or ``unsigned = true``), naming the line.
"""

from __future__ import annotations

from ..worksheet import shown
from .layout import COMMENT, KIND_SECTIONS, LIST_SECTIONS, NOTE, OPENING, RESOLUTION, SIGN_OFF, SOLVE

#: What a solved entry's data must hold, by the kind of balance they name (``kind``; a closed
#: system's data name none).
SOLVED = {
    "closed": {"states": dict, "terms": list},
    "steady-flow": {"streams": dict, "devices": dict},
    "transient": {"case": str, "equations": list},
}

#: Required keys and their types in the data of each kind that is not a step or a solve.
_KEYS = {
    OPENING: {"format": int, "joulebook": str, "species_data_sha256": str, "models": list, "roles": list},
    COMMENT: {"on": int, "text": str},
    RESOLUTION: {"comment": int, "note": str},
    SIGN_OFF: {"role": str, "signer": str, "covers": str, "revision": int},
    NOTE: {"note": str},
}


def shape_problem(kind: str, data: dict) -> str | None:
    """What is wrong with the shape of an entry's data (None when nothing is)."""
    section = KIND_SECTIONS.get(kind)
    if section:
        if list(data) != [section]:
            return f"expected exactly the section [{section}]"
        value = data[section]
        if section in LIST_SECTIONS:
            if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
                return f"[[{section}]] must be a list of tables"
        elif not isinstance(value, dict):
            return f"[{section}] must be a table"
        return None
    if kind == SOLVE:
        if "error" in data:
            if not isinstance(data["error"], str) or not isinstance(data.get("error_kind"), str):
                return "a failed solve needs 'error' and 'error_kind' as text"
            return None
        kind = data.get("kind", "closed")
        if not isinstance(kind, str) or kind not in SOLVED:
            return f"a solve of an unknown kind of balance {shown(str(kind))}; expected one of {', '.join(SOLVED)}"
        keys = SOLVED[kind]
        if not all(isinstance(data.get(k), t) for k, t in keys.items()):
            return f"a solve needs {' and '.join(repr(k) for k in keys)}, or 'error'"
        return None
    for key, typ in _KEYS[kind].items():
        value = data.get(key)
        if not isinstance(value, typ) or isinstance(value, bool):
            return f"'{key}' is missing or not {typ.__name__}"
    if kind == SIGN_OFF:
        unsigned = data.get("unsigned", False)
        signature = data.get("signature")
        if unsigned is not True and not (isinstance(signature, list) and signature
                                         and all(isinstance(s, str) for s in signature)):
            return "a sign-off needs a 'signature' (lines of text) or 'unsigned = true'"
        if unsigned is True and signature is not None:
            return "a sign-off marked unsigned must not carry a signature"
    if kind == OPENING and not all(isinstance(r, str) for r in data["roles"]):
        return "'roles' must be a list of text"
    if kind == OPENING and "procedure" in data:
        pin = data["procedure"]
        if not isinstance(pin, dict) or not all(isinstance(pin.get(k), str) for k in ("id", "version", "sha256")) \
                or not isinstance(pin.get("rules"), dict):
            return "'procedure' must hold the procedure's id, version and sha256 (text) and its rules (a table)"
    if kind == OPENING and "practice" in data:
        if not isinstance(data["practice"], dict) or not isinstance(data["practice"].get("exercise"), str):
            return "'practice' must name its exercise (text)"
    return None
