"""Who writes an entry: the author's name, and the reviewer's allowed-signers file.

The author is, in this order: the ``JOULEBOOK_AUTHOR`` environment
variable; ``author = "..."`` in the config file
``$XDG_CONFIG_HOME/joulebook/config.toml`` (``~/.config/joulebook/config.toml``
when XDG_CONFIG_HOME is not set); the login name.

The same config file may name an allowed-signers file for verification
(``allowed_signers = "~/.ssh/allowed_signers"``); so may the environment
variable ``JOULEBOOK_ALLOWED_SIGNERS``.
"""

from __future__ import annotations

import getpass
import os
import tomllib
from pathlib import Path

from ..errors import InputError
from .format import clean_author


def config_path() -> Path:
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "joulebook" / "config.toml"


def config() -> dict:
    """The config file's contents ({} when there is none)."""
    path = config_path()
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        return {}
    except OSError as exc:
        raise InputError(str(path), f"cannot be read: {exc.strerror}") from None
    try:
        return tomllib.loads(raw.decode("utf-8"))
    except (UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise InputError(str(path), f"is not valid TOML: {exc}") from None


def default_author() -> str:
    """The author of new entries (see the module docstring)."""
    env = os.environ.get("JOULEBOOK_AUTHOR", "").strip()
    if env:
        return clean_author(env, "JOULEBOOK_AUTHOR")
    name = config().get("author")
    if name is not None:
        if not isinstance(name, str):
            raise InputError(f"{config_path()}: author", "must be text")
        return clean_author(name, f"{config_path()}: author")
    try:
        login = getpass.getuser()
    except (KeyError, OSError):  # no login name in the environment or the password database
        login = ""
    if not login.strip():
        raise InputError("author", "no author known: set JOULEBOOK_AUTHOR or 'author' in "
                                   f"{config_path()}")
    return clean_author(login)


def default_allowed_signers() -> str | None:
    """The allowed-signers file from JOULEBOOK_ALLOWED_SIGNERS or the config file, if any."""
    env = os.environ.get("JOULEBOOK_ALLOWED_SIGNERS", "").strip()
    if env:
        return str(Path(env).expanduser())
    value = config().get("allowed_signers")
    if value is None:
        return None
    if not isinstance(value, str):
        raise InputError(f"{config_path()}: allowed_signers", "must be a file name")
    return str(Path(value).expanduser())
