"""How long work says how far it has got: a bar per named step on standard error (tqdm), or nothing.

Library code takes a :class:`Progress` and never prints; the command line makes the bars visible (``--quiet``
hides them). The bars go to standard error, so ``--json`` output on standard output stays clean."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any


class Bar:
    """One step's bar: ``update`` after each unit, ``note`` to say what is being done now."""

    def __init__(self, total: int, desc: str, unit: str, enabled: bool):
        self._bar: Any = None
        if enabled:
            from tqdm import tqdm

            self._bar = tqdm(total=total, desc=desc, unit=unit, dynamic_ncols=True, leave=True, mininterval=0.5)

    def update(self, n: int = 1) -> None:
        if self._bar is not None:
            self._bar.update(n)

    def note(self, text: str) -> None:
        if self._bar is not None:
            self._bar.set_postfix_str(text, refresh=True)

    def grow(self, n: int) -> None:
        """The step turned out to have ``n`` more units."""
        if self._bar is not None:
            self._bar.total += n
            self._bar.refresh()

    @property
    def n(self) -> int:
        return 0 if self._bar is None else int(self._bar.n)

    @property
    def total(self) -> int:
        return 0 if self._bar is None else int(self._bar.total)

    def close(self) -> None:
        if self._bar is not None:
            self._bar.close()


class Progress:
    """Shows bars when ``enabled`` (the command line's default), says nothing otherwise."""

    def __init__(self, enabled: bool = False):
        self.enabled = enabled

    @contextmanager
    def bar(self, total: int, desc: str, unit: str = "step") -> Iterator[Bar]:
        b = Bar(total, desc, unit, self.enabled)
        try:
            yield b
        finally:
            b.close()

    def open(self, total: int, desc: str, unit: str = "step") -> Bar:
        """A bar the caller closes."""
        return Bar(total, desc, unit, self.enabled)


QUIET = Progress(False)
