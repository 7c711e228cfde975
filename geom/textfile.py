"""Reading a user's text file with one clear message per failure (shared by scenes and points),
and the checks every piece of user text goes through (ids, names, free text)."""

from __future__ import annotations

import os
import re
import stat
import unicodedata
from pathlib import Path
from typing import Callable, NoReturn

MAX_SCENE_BYTES = 64 * 2**20  # a scene file larger than this is refused (64 MiB)
MAX_POINTS_BYTES = int(os.environ.get("MATEZONE_MAX_POINTS_MB", "512")) * 2**20  # points CSV limit


def read_text(path: str | os.PathLike, expected: str, fail: Callable[[str], NoReturn],
              max_bytes: int = MAX_SCENE_BYTES) -> str:
    """UTF-8 text of ``path`` (a leading byte-order mark is dropped); on failure calls
    ``fail(message)``, which raises the caller's own error type.

    Only regular files are read (never a device, a named pipe or a socket, which could block or
    never end), and at most ``max_bytes``. ``expected`` names what the file should be, e.g.
    ``"a .toml scene file"``.
    """
    p = Path(path)
    try:
        st = os.stat(p)
    except FileNotFoundError:
        fail("no such file")
    except OSError as e:
        fail(f"cannot be read ({e.strerror})")
    if stat.S_ISDIR(st.st_mode):
        fail(f"is a folder, expected {expected}")
    if not stat.S_ISREG(st.st_mode):
        fail(f"is not a regular file (a device, pipe or socket), expected {expected}")
    if st.st_size > max_bytes:
        fail(f"is {st.st_size / 2**20:.0f} MiB; expected {expected} of at most {max_bytes / 2**20:.0f} MiB")
    try:
        with open(p, "rb") as fh:
            raw = fh.read(max_bytes + 1)
    except IsADirectoryError:
        fail(f"is a folder, expected {expected}")
    except OSError as e:
        fail(f"cannot be read ({e.strerror})")
    if len(raw) > max_bytes:
        fail(f"grew beyond {max_bytes / 2**20:.0f} MiB while being read; expected {expected}")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        fail(f"expected UTF-8 text, got the byte 0x{raw[e.start]:02x} at offset {e.start}")


def clip(text: str, n: int) -> str:
    """One line of at most ``n`` characters, for a message (a message never echoes a whole file).

    >>> clip("a  b  c" + "x" * 20, 8)
    'a b cxx…'
    """
    text = " ".join(text.split())
    return text if len(text) <= n else text[: n - 1] + "…"


def text_problem(text: str, what: str, max_len: int, newlines: bool = False) -> str | None:
    """Why a piece of user text cannot be used, or None: control characters (newlines unless
    allowed), bidirectional and other format characters (they can make text read differently
    from what it is), unassigned code points, or more than ``max_len`` characters.

    >>> text_problem("cap-bore", "an id", 64) is None
    True
    >>> text_problem("a\u202eb", "an id", 64)
    'expected an id without control or format characters, got U+202E at position 1'
    """
    if len(text) > max_len:
        return f"expected {what} of at most {max_len} characters, got {len(text)}"
    for i, ch in enumerate(text):
        if newlines and ch in "\n\t":
            continue
        if unicodedata.category(ch) in ("Cc", "Cf", "Cn", "Co", "Cs", "Zl", "Zp"):
            return f"expected {what} without control or format characters, got U+{ord(ch):04X} at position {i}"
    return None


def file_slug(text: str) -> str:
    """The file-name-safe form of an id used for output files (``viewer.report`` names its files
    with it; the scene loader refuses two ids with the same slug).

    >>> file_slug("cap bore/2"), file_slug("ÄÖ")
    ('cap_bore_2', 'item')
    """
    return re.sub(r"[^A-Za-z0-9._-]+", "_", text).strip("_.") or "item"
