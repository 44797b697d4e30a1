"""Checked reading of the TOML files people write (gauge profiles, scenarios): each bad key or
value is one `UsageError` line naming the file, the key and what was expected."""

from __future__ import annotations

import math
import tomllib
from pathlib import Path
from typing import Any

from tui.errors import UsageError


def read_toml_text(path: Path, kind: str) -> str:
    """The text of a TOML file; an unreadable or non-UTF-8 file is a one-line `UsageError`."""
    try:
        return path.read_bytes().decode("utf-8")
    except OSError as exc:
        raise UsageError(f"cannot read {kind} {path}: {exc.strerror or exc}") from None
    except UnicodeDecodeError as exc:
        raise UsageError(f"{kind} {path}: not UTF-8 text ({exc.reason} at byte {exc.start})") from None


def parse_toml(text: str, kind: str, origin: str) -> dict:
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise UsageError(f"{kind} {origin}: not valid TOML: {exc}") from None


class TomlTable:
    """Typed access to one table of a TOML file; `where` is its dotted name ('top' for the file)."""

    def __init__(self, table: Any, where: str, origin: str, allowed: set[str], *, kind: str = "profile"):
        self.origin, self.where, self.kind = origin, where, kind
        if not isinstance(table, dict):
            self.fail(f"[{where}] must be a table")
        unknown = sorted(set(table) - allowed)
        if unknown:
            place = "" if where == "top" else f" in [{where}]"
            self.fail(f"unknown key {unknown[0]!r}{place}; allowed: {', '.join(sorted(allowed))}")
        self.table = table

    def fail(self, problem: str):
        raise UsageError(f"{self.kind} {self.origin}: {problem}")

    def name(self, key: str) -> str:
        return f"{self.where}.{key}" if self.where != "top" else key

    def text(self, key: str, default: str | None = None) -> str | None:
        value = self.table.get(key, default)
        if value is not None and not isinstance(value, str):
            self.fail(f"{self.name(key)} must be a string, got {value!r}")
        return value

    def number(self, key: str, default: float | None = None, *, positive: bool = False,
               required: bool = False) -> float | None:
        value = self.table.get(key, default)
        if value is None:
            if required:
                self.fail(f"{self.name(key)} is missing: give a number")
            return None
        if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
            self.fail(f"{self.name(key)} must be a finite number, got {value!r}")
        if positive and value <= 0:
            self.fail(f"{self.name(key)} must be positive, got {value!r}")
        return float(value)

    def integer(self, key: str, default: int | None = None, *, low: int = 0, high: int = 65535) -> int | None:
        value = self.table.get(key, default)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int) or not low <= value <= high:
            self.fail(f"{self.name(key)} must be a whole number from {low} to {high}, got {value!r}")
        return value

    def flag(self, key: str, default: bool = False) -> bool:
        value = self.table.get(key, default)
        if not isinstance(value, bool):
            self.fail(f"{self.name(key)} must be true or false, got {value!r}")
        return value

    def pair(self, key: str) -> tuple[float, float] | None:
        value = self.table.get(key)
        if value is None:
            return None
        ok = isinstance(value, list) and len(value) == 2 and all(
            not isinstance(v, bool) and isinstance(v, int | float) and math.isfinite(v) for v in value
        )
        if not ok or value[0] == value[1]:
            self.fail(f"{self.name(key)} must be two different numbers [low, high], got {value!r}")
        return float(value[0]), float(value[1])

    def choice(self, key: str, choices: tuple, default: Any) -> Any:
        value = self.table.get(key, default)
        if value not in choices:
            self.fail(f"{self.name(key)} must be one of {', '.join(map(str, choices))}, got {value!r}")
        return value

    def sub(self, key: str, allowed: set[str]) -> TomlTable:
        return TomlTable(self.table.get(key, {}), self.name(key), self.origin, allowed, kind=self.kind)
