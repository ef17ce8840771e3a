"""Small builders shared by the tests."""

from __future__ import annotations

from pathlib import Path

from balance.worksheet import Worksheet

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"


def sheet(text: str) -> Worksheet:
    """A worksheet from TOML text."""
    return Worksheet.from_toml(text)


def sample(name: str) -> Worksheet:
    return Worksheet.load(SAMPLES / name)
