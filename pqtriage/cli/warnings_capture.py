"""Warnings from libraries, in pqtriage's one-line form.

Python prints a warning as two lines with the source line of the library that raised it
(for example the cryptography library on a certificate whose serial number is not
positive). During a run every warning that is not recorded closer to its cause (the scan
turns parsing warnings into notes on the item) goes through the CLI's error printer as
``pqtriage: warning: ...``, once per distinct message.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import TextIO


@contextmanager
def captured_warnings(printer: Callable[[str, str], None]) -> Iterator[None]:
    """Route warnings raised inside the block to ``printer(text, "warning")``, one line each."""
    seen: set[str] = set()

    def show(message: Warning | str, category: type[Warning], filename: str, lineno: int,
             file: TextIO | None = None, line: str | None = None) -> None:
        text = f"{message} ({category.__name__})"
        if text not in seen:
            seen.add(text)
            printer(text, "warning")

    with warnings.catch_warnings():
        warnings.showwarning = show  # type: ignore[assignment]
        yield

