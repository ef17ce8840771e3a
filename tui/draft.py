"""The autosaved draft beside a record: ``NAME.jbk.draft`` (JSON).

Rewritten atomically after every edit (a temporary file, then a rename):
the worksheet exactly as typed (blank fields and all), the step shown, the
display units, and which sections were uncommitted. Closing the terminal
or losing the SSH session loses nothing; reopening the record restores the
draft over it (:meth:`tui.session.Session.open`).
"""

from __future__ import annotations

import json
import os
import tempfile
import threading
from dataclasses import asdict
from pathlib import Path

from balance.errors import InputError
from balance.worksheet import (
    DeviceInput,
    EndInput,
    Fluid,
    Heading,
    HeatTerm,
    LineInput,
    Process,
    StateInput,
    StreamInput,
    System,
    VesselInput,
    Worksheet,
    WorkTerm,
)

#: Appended to the record's path for the autosaved draft.
DRAFT_SUFFIX = ".draft"
DRAFT_FORMAT = 1


# -- the draft's own plain-data form of a worksheet (keeps blank fields) -------
def worksheet_to_raw(ws: Worksheet) -> dict:
    return asdict(ws)


def worksheet_from_raw(raw: dict) -> Worksheet:
    """Inverse of :func:`worksheet_to_raw`; raises InputError on a damaged draft."""
    try:
        head = dict(raw["heading"])
        head["assumptions"] = tuple(head.get("assumptions", ()))
        proc = dict(raw["process"])
        proc["constraints"] = tuple(proc.get("constraints", ()))
        return Worksheet(
            heading=Heading(**head),
            fluid=Fluid(**raw["fluid"]),
            system=System(**raw["system"]),
            initial=tuple(StateInput(**s) for s in raw["initial"]),
            final=StateInput(**raw["final"]),
            heat=tuple(HeatTerm(**h) for h in raw["heat"]),
            work=tuple(WorkTerm(**w) for w in raw["work"]),
            process=Process(**proc),
            # a draft saved before steady-flow worksheets has neither
            streams=tuple(StreamInput(**st) for st in raw.get("streams", ())),
            devices=tuple(_device(d) for d in raw.get("devices", ())),
            # nor one saved before transient worksheets these
            vessels=tuple(_vessel(v) for v in raw.get("vessels", ())),
            lines=tuple(LineInput(**ln) for ln in raw.get("lines", ())),
            end=EndInput(**raw.get("end", {})),
            history=dict(raw.get("history", {})),
        )
    except (KeyError, TypeError, ValueError) as exc:
        raise InputError("draft", f"is damaged and cannot be read ({exc})") from None


def _vessel(raw: dict) -> VesselInput:
    v = dict(raw)
    v["Q_points"] = tuple(v.get("Q_points", ()))
    return VesselInput(**v)


def _device(raw: dict) -> DeviceInput:
    d = dict(raw)
    for key in ("inlets", "outlets", "fractions"):
        d[key] = tuple(d.get(key, ()))
    return DeviceInput(**d)


def draft_path(record: Path) -> Path:
    return Path(str(record) + DRAFT_SUFFIX)


class DraftFile:
    """One draft file, written now or soon (from a background thread), never torn.

    Each snapshot written carries a number; an older one never overwrites a
    newer one already on disk.
    """

    def __init__(self, path: Path) -> None:
        self.path = path
        self._lock = threading.Lock()
        self._write_lock = threading.Lock()
        self._wake = threading.Event()
        self._writer: threading.Thread | None = None
        self._pending: tuple[int, dict] | None = None
        self._seq = 0
        self._written = 0
        self.write_error = ""
        """the last background write that failed (shown by the app), or ''"""

    def number(self, data: dict) -> tuple[int, dict]:
        """``data`` as the next snapshot (numbered in the order they are taken)."""
        with self._lock:
            self._seq += 1
            return self._seq, data

    def save(self, snapshot: tuple[int, dict]) -> None:
        """Write a snapshot now, atomically."""
        seq, data = snapshot
        with self._write_lock:
            if seq <= self._written:
                return  # a newer draft is already on disk
            target = self.path
            target.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.", suffix=".tmp")
            try:
                with os.fdopen(fd, "w", encoding="utf-8") as fh:
                    json.dump(data, fh, ensure_ascii=False, indent=1)
                os.replace(tmp, target)
            except BaseException:
                try:
                    os.unlink(tmp)
                except OSError:
                    pass
                raise
            self._written = seq

    def save_soon(self, snapshot: tuple[int, dict]) -> None:
        """Write a snapshot from a background thread (a rename can take tens of ms on a busy
        disk). Only the latest one is written; :meth:`flush` waits for it."""
        with self._lock:
            self._pending = snapshot
            if self._writer is None or not self._writer.is_alive():
                self._writer = threading.Thread(target=self._write_pending, name="joulebook-draft", daemon=True)
                self._writer.start()
            self._wake.set()

    def flush(self) -> None:
        """Wait until the latest snapshot is on disk."""
        with self._lock:
            pending, self._pending = self._pending, None
        if pending is not None:
            self.save(pending)

    def _write_pending(self) -> None:
        while True:
            self._wake.wait()
            self._wake.clear()
            with self._lock:
                pending, self._pending = self._pending, None
            if pending is not None:
                try:
                    self.save(pending)
                except OSError as exc:
                    self.write_error = f"{self.path}: {exc.strerror}"

    def read(self) -> dict:
        """The draft's data with both worksheets read back; raises OSError, ValueError or InputError."""
        data = json.loads(self.path.read_text(encoding="utf-8"))
        return {**data, "worksheet": worksheet_from_raw(data["worksheet"]),
                "committed": worksheet_from_raw(data["committed"])}
