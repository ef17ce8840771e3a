"""Reusable widgets of the terminal app (one module each)."""
