"""Reading a user's text file with one clear message per failure (shared by scenes and points)."""

from __future__ import annotations

import os
from pathlib import Path
from typing import Callable, NoReturn


def read_text(path: str | os.PathLike, expected: str, fail: Callable[[str], NoReturn]) -> str:
    """UTF-8 text of ``path`` (a leading byte-order mark is dropped); on failure calls
    ``fail(message)``, which raises the caller's own error type.

    ``expected`` names what the file should be, e.g. ``"a .toml scene file"``.
    """
    p = Path(path)
    try:
        raw = p.read_bytes()
    except FileNotFoundError:
        fail("no such file")
    except IsADirectoryError:
        fail(f"is a folder, expected {expected}")
    except OSError as e:
        fail(f"cannot be read ({e.strerror})")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        fail(f"expected UTF-8 text, got the byte 0x{raw[e.start]:02x} at offset {e.start}")
