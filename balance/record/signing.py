"""Sign-off signatures with OpenSSH's ``ssh-keygen -Y`` (the SSHSIG format).

joulebook never reads or writes the signature format itself: it hands the
signed message to the real ``ssh-keygen`` (``-Y sign`` with a key file or a
key held in ssh-agent, ``-Y verify`` against an allowed-signers file, as in
OpenSSH ssh-keygen(1)) and keeps the armoured signature it prints.

The signed message is a few lines of text naming the entry, the role, the
signer and the chain head hash the sign-off covers (see :func:`message`), so
a signature made for one role, signer or hash does not verify for another.
Signatures use the namespace :data:`NAMESPACE`; a signature made for any
other namespace (``file``, ``git``, ...) does not verify here.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import tempfile
from pathlib import Path

from ..errors import InputError

NAMESPACE = "joulebook-record"
ROLES = ("prepared", "checked", "approved")
_FINGERPRINT = re.compile(r"(SHA256:[A-Za-z0-9+/=]+)")


def message(seq: int, role: str, signer: str, covers: str) -> bytes:
    """The exact bytes a sign-off signs."""
    return (
        "joulebook record sign-off\n"
        f"entry: {seq}\n"
        f"role: {role}\n"
        f"signer: {signer}\n"
        f"covers: {covers}\n"
    ).encode("utf-8")


def ssh_keygen() -> str:
    found = shutil.which("ssh-keygen")
    if not found:
        raise InputError("ssh-keygen", "was not found on PATH: install OpenSSH's client (e.g. openssh-client)")
    return found


def _last_line(text: str) -> str:
    lines = [ln.strip() for ln in text.strip().splitlines() if ln.strip()]
    return lines[-1] if lines else "no message"


def sign(key: str | os.PathLike, msg: bytes) -> tuple[list[str], str]:
    """Sign msg with an SSH key; return the armoured signature's lines and the key's fingerprint.

    ``key`` is a private key file, or a public key file whose private half
    is in ssh-agent (ssh-keygen asks for a passphrase on the terminal if the
    key has one).
    """
    key = Path(key)
    if not key.is_file():
        raise InputError("--key", f"{key} is not a key file")
    tool = ssh_keygen()
    try:
        done = subprocess.run([tool, "-q", "-Y", "sign", "-f", str(key), "-n", NAMESPACE],
                              input=msg, capture_output=True)
    except OSError as exc:
        raise InputError("ssh-keygen", f"could not be run: {exc.strerror}") from None
    text = done.stdout.decode("utf-8", "replace")
    if done.returncode != 0 or "BEGIN SSH SIGNATURE" not in text:
        err = done.stderr.decode("utf-8", "replace")
        raise InputError("--key", f"ssh-keygen could not sign with {key}: {_last_line(err)}")
    lines = [ln for ln in text.strip().split("\n") if ln]
    return lines, fingerprint(lines, msg)


def fingerprint(signature: list[str], msg: bytes) -> str:
    """The signing key's fingerprint, read back by ``ssh-keygen -Y check-novalidate`` ('' if unknown)."""
    ok, detail = _run_check(["-Y", "check-novalidate", "-n", NAMESPACE], signature, msg)
    m = _FINGERPRINT.search(detail)
    return m.group(1) if ok and m else ""


def verify(allowed_signers: str | os.PathLike, signer: str, signature: list[str], msg: bytes) -> tuple[bool, str]:
    """Check a signature with ``ssh-keygen -Y verify``: is it ``signer``'s, by the allowed-signers file?

    Returns (valid, ssh-keygen's message).
    """
    return _run_check(["-Y", "verify", "-f", str(allowed_signers), "-I", signer, "-n", NAMESPACE], signature, msg)


def _run_check(args: list[str], signature: list[str], msg: bytes) -> tuple[bool, str]:
    tool = ssh_keygen()
    with tempfile.TemporaryDirectory(prefix="joulebook-sig-") as tmp:
        sig = Path(tmp) / "sign-off.sig"
        sig.write_text("\n".join(signature) + "\n", encoding="utf-8")
        try:
            done = subprocess.run([tool, *args, "-s", str(sig)], input=msg, capture_output=True, timeout=60)
        except (OSError, subprocess.TimeoutExpired) as exc:
            return False, f"ssh-keygen could not be run: {exc}"
    out = (done.stdout + done.stderr).decode("utf-8", "replace")
    return done.returncode == 0, _last_line(out)


def check_allowed_signers(path) -> str:
    """The allowed-signers file as a path ssh-keygen can read; raises InputError if it cannot be read."""
    p = Path(path)
    try:
        with open(p, "rb"):
            pass
    except OSError as exc:
        raise InputError("--allowed-signers", f"{p} cannot be read: {exc.strerror}") from None
    return str(p)
