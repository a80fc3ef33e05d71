"""Reading the keys of a study-file table: the rules and one-line messages every table shares (the study parser's
own tables and the tables of registered checks, which sit below the parser). Each message names the field (its
full dotted path), echoes the value and says what is allowed."""

from __future__ import annotations

import difflib
from typing import Any

from holeshape.errors import StudyError


def unknown_keys(table: dict, allowed: tuple[str, ...], where: str) -> None:
    """Refuse a key that is not one of ``allowed`` (``where``: the table's dotted prefix, "fatigue.curve.")."""
    for key in table:
        if key not in allowed:
            hint = difflib.get_close_matches(key, allowed, n=1)
            tip = f" (did you mean {hint[0]!r}?)" if hint else ""
            raise StudyError(f"{where}{key} is not a known key{tip}; allowed: {', '.join(allowed)}")


def string_value(table: dict, key: str, where: str, choices: tuple[str, ...] | None = None, default: Any = ...
                 ) -> Any:
    """A string of the table, one of ``choices`` when given (with a "did you mean" hint); ``default`` when absent
    (``...``: required)."""
    if key not in table:
        if default is ...:
            raise StudyError(f"{where}{key} is missing")
        return default
    v = table[key]
    if not isinstance(v, str):
        raise StudyError(f"{where}{key} must be a string, got {v!r}")
    if choices is not None and v not in choices:
        hint = difflib.get_close_matches(v, choices, n=1)
        tip = f" (did you mean {hint[0]!r}?)" if hint else ""
        raise StudyError(f"{where}{key} must be one of {', '.join(choices)}, got {v!r}{tip}")
    return v


def table_list(value: Any, name: str) -> list[dict]:
    """An array of tables ``[[name]]`` (one ``[name]`` table is taken as a list of one), refused with one line when
    it is anything else or empty."""
    if isinstance(value, dict):
        value = [value]
    if not isinstance(value, list) or not value or not all(isinstance(t, dict) for t in value):
        raise StudyError(f"{name} must be one or more [[{name}]] tables, got {value!r}")
    return value
